#include "lapwing/store/sweep_store.hpp"

#include <fcntl.h>
#include <sqlite3.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <optional>
#include <set>
#include <sstream>
#include <string_view>
#include <tuple>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/hash.hpp"
#include "lapwing/base/text.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/input_file.hpp"
#include "lapwing/io/output.hpp"

namespace lapwing {

namespace {

// A connection, closed on scope exit; every failure an OutputError naming the file (`shown`: the
// name the user gave, where the file opened is a temporary beside it).
class Connection {
 public:
  Connection(const std::string& file, bool create, const std::string& shown = {})
      : file_(shown.empty() ? file : shown) {
    const int flags = SQLITE_OPEN_READWRITE | (create ? SQLITE_OPEN_CREATE : 0);
    if (sqlite3_open_v2(file.c_str(), &db_, flags, nullptr) != SQLITE_OK) fail("cannot open");
    // Wait for a lock held by another process (a merge reading while a shard commits) rather
    // than fail at once.
    sqlite3_busy_timeout(db_, 10000);
  }
  ~Connection() { sqlite3_close(db_); }
  Connection(const Connection&) = delete;
  Connection& operator=(const Connection&) = delete;

  // A failure the file system gave is "cannot write FILE: " and the system's reason; any other,
  // "FILE: WHAT (" and SQLite's words ")" ("file is not a database").
  [[noreturn]] void fail(const std::string& what) const {
    if (const auto why = system_reason()) throw OutputError("cannot write " + file_ + ": " + *why);
    throw OutputError(file_ + ": " + what + " (" + (db_ ? sqlite3_errmsg(db_) : "no memory") + ")");
  }
  void exec(const std::string& sql) {
    char* err = nullptr;
    if (sqlite3_exec(db_, sql.c_str(), nullptr, nullptr, &err) != SQLITE_OK) {
      const std::string msg = err ? err : "?";
      sqlite3_free(err);
      if (const auto why = system_reason())
        throw OutputError("cannot write " + file_ + ": " + *why);
      throw OutputError(file_ + ": " + msg);
    }
  }
  // The system's reason for the last failure (strerror: "No space left on device", "Permission
  // denied") when the file system refused (SQLite's result codes for that), else nothing: the
  // errno of the database file's own failed call (SQLITE_FCNTL_LAST_ERRNO) where it has one, else
  // the one SQLite kept for the connection; SQLite's words when neither says.
  std::optional<std::string> system_reason() const {
    if (!db_) return std::nullopt;
    const int code = sqlite3_errcode(db_) & 0xff;  // the primary result code
    if (code != SQLITE_CANTOPEN && code != SQLITE_IOERR && code != SQLITE_FULL &&
        code != SQLITE_READONLY && code != SQLITE_PERM)
      return std::nullopt;
    int sys = 0;
    if (sqlite3_file_control(db_, "main", SQLITE_FCNTL_LAST_ERRNO, &sys) != SQLITE_OK) sys = 0;
    if (sys == 0) sys = sqlite3_system_errno(db_);
    if (sys == 0 && code == SQLITE_FULL) sys = ENOSPC;  // a short write on a full disk sets none
    return sys != 0 ? std::string(std::strerror(sys)) : std::string(sqlite3_errmsg(db_));
  }
  sqlite3* get() const { return db_; }
  const std::string& file() const { return file_; }

 private:
  std::string file_;
  sqlite3* db_ = nullptr;
};

class Statement {
 public:
  Statement(Connection& c, const std::string& sql) : c_(&c) {
    if (sqlite3_prepare_v2(c.get(), sql.c_str(), -1, &s_, nullptr) != SQLITE_OK)
      c.fail("not a lapwing results store");
  }
  ~Statement() { sqlite3_finalize(s_); }
  Statement(const Statement&) = delete;
  Statement& operator=(const Statement&) = delete;
  // SQLITE_ROW: true; SQLITE_DONE: false.
  bool step() {
    const int rc = sqlite3_step(s_);
    if (rc == SQLITE_ROW) return true;
    if (rc != SQLITE_DONE) c_->fail("cannot write");
    return false;
  }
  void reset() {
    sqlite3_reset(s_);
    sqlite3_clear_bindings(s_);
  }
  void bind(int i, const std::string& v) {
    sqlite3_bind_text(s_, i, v.c_str(), static_cast<int>(v.size()), SQLITE_TRANSIENT);
  }
  void bind(int i, double v) { sqlite3_bind_double(s_, i, v); }
  void bind(int i, std::int64_t v) { sqlite3_bind_int64(s_, i, v); }
  void bind_null(int i) { sqlite3_bind_null(s_, i); }
  std::string text(int i) const {
    const unsigned char* t = sqlite3_column_text(s_, i);
    return t ? reinterpret_cast<const char*>(t) : "";
  }
  std::int64_t integer(int i) const { return sqlite3_column_int64(s_, i); }
  double real(int i) const { return sqlite3_column_double(s_, i); }
  int type(int i) const { return sqlite3_column_type(s_, i); }
  int columns() const { return sqlite3_column_count(s_); }
  std::string name(int i) const { return sqlite3_column_name(s_, i); }

 private:
  Connection* c_;
  sqlite3_stmt* s_ = nullptr;
};

// An SQL identifier: "KEY" with any quote doubled (a set's key holds dots).
std::string quoted(const std::string& name) {
  std::string out = "\"";
  for (char c : name) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

std::string study_id_of(Connection& c) {
  Statement s(c, "SELECT study_id FROM study");
  if (!s.step()) c.fail("not a lapwing results store");
  return s.text(0);
}

void create_schema(Connection& c, const StudyRecord& st, const SweepPlan& plan) {
  c.exec(
      "CREATE TABLE study (study_id TEXT NOT NULL, lapwing TEXT NOT NULL, command TEXT NOT NULL, "
      "design TEXT NOT NULL, points INTEGER NOT NULL, shard TEXT NOT NULL);"
      "CREATE TABLE inputs (role TEXT NOT NULL, file TEXT NOT NULL, fnv1a64 TEXT NOT NULL);"
      "CREATE TABLE sets (key TEXT NOT NULL, unit TEXT NOT NULL, \"values\" TEXT NOT NULL);"
      "CREATE TABLE tracks (track_index INTEGER NOT NULL, track TEXT NOT NULL);"
      "CREATE TABLE configs (config_index INTEGER NOT NULL, config TEXT NOT NULL);");
  {
    Statement s(c, "INSERT INTO study VALUES (?, ?, ?, ?, ?, ?)");
    s.bind(1, st.study_id);
    s.bind(2, st.version);
    s.bind(3, st.command);
    s.bind(4, st.design);
    s.bind(5, static_cast<std::int64_t>(st.points));
    s.bind(6, st.shard);
    s.step();
  }
  {
    Statement s(c, "INSERT INTO inputs VALUES (?, ?, ?)");
    for (const auto& in : st.inputs) {
      s.reset();
      s.bind(1, in.role);
      s.bind(2, in.file);
      s.bind(3, in.fnv1a64);
      s.step();
    }
  }
  {
    Statement s(c, "INSERT INTO sets VALUES (?, ?, ?)");
    for (const auto& set : plan.sets()) {
      s.reset();
      s.bind(1, set.key);
      s.bind(2, set.unit);
      s.bind(3, set.text.substr(set.text.find('=') + 1));
      s.step();
    }
  }
  {
    Statement s(c, "INSERT INTO tracks VALUES (?, ?)");
    for (std::size_t t = 0; t < st.tracks.size(); ++t) {
      s.reset();
      s.bind(1, static_cast<std::int64_t>(t));
      s.bind(2, st.tracks[t]);
      s.step();
    }
  }
  {
    Statement s(c, "INSERT INTO configs VALUES (?, ?)");
    for (std::size_t k = 0; k < st.configs.size(); ++k) {
      s.reset();
      s.bind(1, static_cast<std::int64_t>(k));
      s.bind(2, st.configs[k]);
      s.step();
    }
  }
  // A set's column has no declared type, so SQLite keeps each value as given: a number as a
  // REAL, a word as TEXT.
  std::string sql =
      "CREATE TABLE laps (point INTEGER NOT NULL, track TEXT NOT NULL, "
      "config TEXT NOT NULL";
  for (const auto& set : plan.sets()) sql += ", " + quoted(set.key);
  for (const StoreColumn& col : sweep_result_columns)
    sql += ", " + std::string(col.name) + " " + col.type;
  sql += ", PRIMARY KEY (point, track, config))";
  c.exec(sql);
}

}  // namespace

struct SweepStore::Db {
  Connection c;
  std::unique_ptr<Statement> insert;
  Db(const std::string& file, bool create) : c(file, create) {}
};

namespace {

// A store under construction beside its name (`.NAME.lapwing-new`, and SQLite's journal beside
// that): removed again when destroyed before it is renamed into place, so that a write that fails
// (a full disk, an I/O error) leaves nothing behind; only a kill leaves one, which the next run
// that makes the store removes. The folders made for it go too.
class NewStore {
 public:
  explicit NewStore(const std::string& file)
      : target_(file),
        tmp_(target_.parent_path() / ("." + target_.filename().string() + ".lapwing-new")),
        folders_(target_.parent_path(), file) {
    clear();
  }
  ~NewStore() {
    if (!placed_) clear();
  }
  NewStore(const NewStore&) = delete;
  NewStore& operator=(const NewStore&) = delete;
  std::string tmp() const { return tmp_.string(); }
  // Renamed over its name: "cannot write FILE: " and the system's reason when it cannot be.
  void place() {
    std::error_code ec;
    std::filesystem::rename(tmp_, target_, ec);
    if (ec) throw OutputError("cannot write " + target_.string() + ": " + ec.message());
    placed_ = true;
    folders_.keep();
  }

 private:
  void clear() const {
    std::error_code ec;
    std::filesystem::remove(tmp_, ec);
    std::filesystem::remove(tmp_.string() + "-journal", ec);
  }
  std::filesystem::path target_, tmp_;
  MadeFolders folders_;
  bool placed_ = false;
};

// `from` copied byte for byte to the new file `to` and synced; "cannot write SHOWN: " and the
// system's reason (errno) when it cannot be. (std::filesystem::copy_file's error says neither
// which side failed nor, under a file size limit, the reason: libstdc++ gave EIO for EFBIG.)
void copy_store(const std::string& from, const std::string& to, const std::string& shown) {
  const auto closed = [](int fd) {
    if (fd >= 0) ::close(fd);
  };
  const int in = ::open(from.c_str(), O_RDONLY | O_CLOEXEC);
  if (in < 0) throw OutputError("cannot read " + from + ": " + std::strerror(errno));
  const int out = ::open(to.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
  if (out < 0) {
    const int err = errno;
    closed(in);
    throw OutputError("cannot write " + shown + ": " + std::strerror(err));
  }
  std::vector<char> buf(std::size_t{1} << 20);
  std::string failure;
  for (;;) {
    const ssize_t n = ::read(in, buf.data(), buf.size());
    if (n < 0 && errno == EINTR) continue;
    if (n < 0) {
      failure = "cannot read " + from + ": " + std::strerror(errno);
      break;
    }
    if (n == 0) {
      if (::fsync(out) != 0) failure = "cannot write " + shown + ": " + std::strerror(errno);
      break;
    }
    for (ssize_t done = 0; done < n && failure.empty();) {
      const ssize_t w = ::write(out, buf.data() + done, static_cast<std::size_t>(n - done));
      if (w < 0 && errno == EINTR) continue;
      if (w < 0) failure = "cannot write " + shown + ": " + std::strerror(errno);
      done += w > 0 ? w : 0;
    }
    if (!failure.empty()) break;
  }
  closed(in);
  if (::close(out) != 0 && failure.empty())
    failure = "cannot write " + shown + ": " + std::strerror(errno);
  if (!failure.empty()) throw OutputError(failure);
}

// A new results store is built whole under a temporary name beside `file` (its schema and study
// committed), then renamed into place: a sweep killed while it creates the store leaves either no
// store or one that resumes, never a file without the study (which the next run would refuse). A
// temporary left by such a kill is removed by the next run that creates the store.
void create_store(const std::string& file, const StudyRecord& study, const SweepPlan& plan) {
  NewStore fresh(file);
  {
    Connection c(fresh.tmp(), true, file);
    // The default rollback journal, fully synced: a commit survives a kill (SQLite, "Atomic
    // Commit In SQLite").
    c.exec("PRAGMA synchronous = FULL");
    // The file's layout fixed here rather than left to how the library was built (its compiled
    // defaults), so that the same study gives the same bytes: 4096-byte pages, no auto-vacuum.
    // Nothing in the file depends on the clock, the thread count or its name (rows go in point
    // order, 64 points per transaction); what still differs between machines is the SQLite
    // version stamped in the header (SQLite, "Database File Format", offsets 92-99).
    c.exec("PRAGMA page_size = 4096; PRAGMA auto_vacuum = NONE");
    c.exec("BEGIN");
    create_schema(c, study, plan);
    c.exec("COMMIT");
  }
  fresh.place();
}

// A file's shards: each label "K/N" as (N, K, its text), (0, 0, text) where a label is not one
// (no split a run can share); in N's then K's order, so that a list reads 1/12,2/12,...,10/12.
// N and K as wide as the study's own (Shard: std::size_t): read as 32-bit numbers, a --shard of
// N >= 2^32 did not parse back from the file it had just written (a robustness campaign's
// finding), and the run refused its own split.
using ShardLabels = std::set<std::tuple<std::size_t, std::size_t, std::string>>;

// Adds the labels of a shard list ("1/4,2/4"; one label, or "").
void add_shards(ShardLabels& to, std::string_view list) {
  for (std::size_t x = 0; x <= list.size();) {
    const std::size_t y = std::min(list.find(',', x), list.size());
    if (y > x) {
      const std::string_view k_n = list.substr(x, y - x);
      std::size_t k = 0, n = 0;
      const std::size_t slash = k_n.find('/');
      const char* b = k_n.data();
      const bool ok = slash != std::string_view::npos && [&] {
        const auto rk = std::from_chars(b, b + slash, k);
        const auto rn = std::from_chars(b + slash + 1, b + k_n.size(), n);
        return rk.ec == std::errc() && rk.ptr == b + slash && rn.ec == std::errc() &&
               rn.ptr == b + k_n.size() && n > 0 && k > 0 && k <= n;
      }();
      to.emplace(ok ? n : 0, ok ? k : 0, std::string(k_n));
    }
    x = y + 1;
  }
}

// The labels as a shard list, each once.
std::string shard_list(const ShardLabels& labels) {
  std::string list;
  for (const auto& one : labels) list += (list.empty() ? "" : ",") + std::get<2>(one);
  return list;
}

}  // namespace

SweepStore::SweepStore(const std::string& file, const StudyRecord& study, const SweepPlan& plan)
    : plan_(&plan), study_(study), done_(plan.points(), false) {
  require_not_input(file);
  if (!std::filesystem::exists(file)) {
    create_store(file, study, plan);
    created_ = true;
  }
  // A store this run made goes where it cannot be opened as the study's (no output from a
  // refused run); one that was there stays as it was.
  try {
    open(file, study, plan);
  } catch (...) {
    db_.reset();
    if (created_) {
      std::error_code ec;
      std::filesystem::remove(file, ec);
    }
    throw;
  }
}

void SweepStore::open(const std::string& file, const StudyRecord& study, const SweepPlan& plan) {
  db_ = std::make_unique<Db>(file, false);
  Connection& c = db_->c;
  c.exec("PRAGMA synchronous = FULL");
  if (study_id_of(c) != study.study_id)
    throw OutputError(file +
                      " holds another study (other inputs, sets, design or configs); give a "
                      "new --out, or the same command to resume it");
  {
    // The shards the file holds ("K/N"; a merged file's "1/4,2/4"). A run that splits the study
    // another way (another N; no --shard is 1/1) would add its points under a label that does
    // not say so: refused. A shard of the same split not yet held joins the list, as a merge's.
    // A file that holds every shard of its split (1/N to N/N: the whole study, a complete merge)
    // is the study whatever the split: any run resumes it (it finds every point there).
    std::string held;
    {
      Statement s(c, "SELECT shard FROM study");
      if (s.step()) held = s.text(0);
    }
    ShardLabels each, mine;
    add_shards(each, held);
    add_shards(mine, study.shard);
    const std::size_t n_held = each.empty() ? 0 : std::get<0>(*each.begin());
    const bool whole = n_held > 0 && each.size() == n_held && std::get<0>(*each.rbegin()) == n_held;
    if (!whole) {
      const std::size_t n_mine = mine.empty() ? 0 : std::get<0>(*mine.begin());
      for (const auto& one : each)
        if (std::get<0>(one) != n_mine || n_mine == 0)
          throw OutputError(file + " holds shard " + held + " of this study, and --shard " +
                            study.shard +
                            " splits it another way (another N; no --shard is 1/1): give "
                            "--shard of the same split to resume it, or a new --out");
      const std::size_t before = each.size();
      each.insert(mine.begin(), mine.end());
      if (each.size() != before) {
        c.exec("BEGIN");
        {
          Statement upd(c, "UPDATE study SET shard = ?");
          upd.bind(1, shard_list(each));
          upd.step();
        }
        c.exec("COMMIT");
      }
    }
  }
  Statement s(c, "SELECT DISTINCT point FROM laps");
  while (s.step()) {
    const std::int64_t p = s.integer(0);
    if (p >= 0 && static_cast<std::size_t>(p) < done_.size())
      done_[static_cast<std::size_t>(p)] = true;
  }
  std::string sql = "INSERT OR IGNORE INTO laps VALUES (?, ?, ?";
  for (std::size_t i = 0; i < plan.sets().size(); ++i) sql += ", ?";
  for (std::size_t i = 0; i < std::size(sweep_result_columns); ++i) sql += ", ?";
  sql += ")";
  db_->insert = std::make_unique<Statement>(c, sql);
}

SweepStore::~SweepStore() = default;

bool SweepStore::has(std::size_t point) const {
  return point < done_.size() && done_[point];
}

void SweepStore::commit(const std::vector<SweepRow>& rows) {
  Connection& c = db_->c;
  Statement& s = *db_->insert;
  c.exec("BEGIN");
  for (const SweepRow& r : rows) {
    s.reset();
    int i = 1;
    s.bind(i++, static_cast<std::int64_t>(r.point));
    s.bind(i++, study_.tracks[r.track]);
    s.bind(i++, study_.configs[r.config]);
    for (std::size_t k = 0; k < plan_->sets().size(); ++k) {
      const SetValue v = plan_->value(r.point, k);
      if (v.number)
        s.bind(i++, *v.number);
      else
        s.bind(i++, v.text);
    }
    if (r.ok) {
      for (double v : {r.lap_time_s, r.top_speed_kph, r.min_speed_kph, r.full_throttle_fraction,
                       r.braking_fraction})
        s.bind(i++, v);
      if (r.lowest_front_share_fast)
        s.bind(i++, *r.lowest_front_share_fast);
      else
        s.bind_null(i++);
      if (r.window)
        s.bind(i++, std::string(window_column_text(*r.window)));
      else
        s.bind_null(i++);
      s.bind(i++, std::string("ok"));
    } else {
      // Every result column but status and message is NULL for a lap that cannot move.
      for (std::size_t k = 0; k + 2 < std::size(sweep_result_columns); ++k) s.bind_null(i++);
      s.bind(i++, std::string("cannot-move"));
    }
    s.bind(i++, r.message);
    s.step();
    done_[r.point] = true;
  }
  c.exec("COMMIT");
}

const char* window_column_text(WindowResult w) {
  switch (w) {
    case WindowResult::pass:
      return "pass";
    case WindowResult::fail:
      return "fail";
    case WindowResult::not_reached:
      return "not reached";  // the words of summary.json's "result" (README, "Output files")
  }
  return "?";
}

namespace {
std::vector<std::string> set_keys(Connection& c) {
  std::vector<std::string> keys;
  Statement s(c, "SELECT key FROM sets ORDER BY rowid");
  while (s.step()) keys.push_back(s.text(0));
  return keys;
}
}  // namespace

namespace {
// Per track, the fastest ok lap that meets `where` (SQL over the laps table's columns).
std::vector<BestPoint> best_where(const std::string& file, const std::string& where) {
  if (!std::filesystem::exists(file)) throw OutputError(file + ": no such results store");
  Connection c(file, false);
  const std::vector<std::string> keys = set_keys(c);
  std::string cols;
  for (const auto& k : keys) cols += ", " + quoted(k);
  std::vector<BestPoint> out;
  Statement tracks(c, "SELECT track FROM tracks ORDER BY track_index");
  Statement best(c, "SELECT config, point, lap_time_s" + cols +
                        " FROM laps WHERE track = ? AND status = 'ok'" + where +
                        " ORDER BY lap_time_s, point, config LIMIT 1");
  while (tracks.step()) {
    best.reset();
    best.bind(1, tracks.text(0));
    if (!best.step()) continue;
    BestPoint b{tracks.text(0), best.text(0), best.integer(1), {}, best.real(2)};
    for (std::size_t k = 0; k < keys.size(); ++k) {
      const int col = 3 + static_cast<int>(k);
      b.values.push_back({keys[k], best.type(col) == SQLITE_FLOAT ? format_number(best.real(col))
                                                                  : best.text(col)});
    }
    out.push_back(std::move(b));
  }
  return out;
}
}  // namespace

std::vector<BestPoint> best_points(const std::string& file) {
  return best_where(file, "");
}

std::vector<BestPoint> best_points_in_window(const std::string& file) {
  return best_where(file, " AND balance_window = 'pass'");
}

std::vector<BestPoint> best_points_reaching_window(const std::string& file) {
  return best_where(file, " AND balance_window IN ('pass', 'fail')");
}

StoreCounts store_counts(const std::string& file) {
  Connection c(file, false);
  Statement s(c,
              "SELECT (SELECT count(*) FROM laps), "
              "(SELECT coalesce(sum(status != 'ok'), 0) FROM laps), "
              "(SELECT points FROM study) * (SELECT count(*) FROM tracks) * "
              "(SELECT count(*) FROM configs), "
              "(SELECT coalesce(sum(status = 'ok' AND message != ''), 0) FROM laps)");
  s.step();
  return {static_cast<std::size_t>(s.integer(0)), static_cast<std::size_t>(s.integer(1)),
          static_cast<std::size_t>(s.integer(2)), static_cast<std::size_t>(s.integer(3))};
}

namespace {
// The command of a merged store: its shards' sweep command (the first input's) without
// `--shard K/N`, its `--out` the merged file as merge was given it: the command that reruns the
// whole study, or resumes the merged file (README, "Sweep").
std::string merged_command(const std::string& shard_command, const std::string& out) {
  const std::vector<std::string> words = shell_words(shard_command);
  std::string command;
  const auto add = [&](const std::string& w) {
    command += (command.empty() ? "" : " ") + shell_word(w);
  };
  bool has_out = false;
  for (std::size_t i = 0; i < words.size(); ++i) {
    const std::string& w = words[i];
    const bool shard = w == "--shard" || w.rfind("--shard=", 0) == 0;
    const bool out_option = w == "--out" || w.rfind("--out=", 0) == 0;
    if (w == "--shard" || w == "--out") ++i;  // its value, the next word
    if (out_option) {
      add("--out");
      add(out);
      has_out = true;
    } else if (!shard) {
      add(w);
    }
  }
  if (!has_out) {
    add("--out");
    add(out);
  }
  return command;
}
}  // namespace

void merge_stores(const std::string& out, const std::vector<std::string>& inputs) {
  if (out.empty()) throw OutputError("sweep merge: the name of the store to write is empty");
  if (inputs.empty()) throw OutputError("sweep merge: give the results stores to merge");
  std::string id;
  std::set<std::string> shards;
  for (const auto& in : inputs) {
    if (!std::filesystem::exists(in)) throw OutputError(in + ": no such results store");
    note_input(in);
    Connection c(in, false);
    const std::string this_id = study_id_of(c);
    if (id.empty()) id = this_id;
    if (this_id != id)
      throw OutputError(in + " holds another study than " + inputs.front() + " (study_id " +
                        this_id + ", not " + id + "); refusing to merge");
    Statement s(c, "SELECT shard FROM study");
    if (s.step()) shards.insert(s.text(0));
  }
  require_not_input(out);
  const bool exists = std::filesystem::exists(out);
  if (exists) {
    Connection c(out, false);
    if (study_id_of(c) != id)
      throw OutputError(out + " holds another study than " + inputs.front() +
                        "; refusing to merge");
  }
  // A new file is built under a temporary name beside it (the first input copied there) and
  // renamed when whole; the temporary is removed when anything fails.
  std::optional<NewStore> fresh;
  if (!exists) {
    fresh.emplace(out);
    copy_store(inputs.front(), fresh->tmp(), out);
  }
  const std::string target = exists ? out : fresh->tmp();
  {
    Connection c(target, false, out);
    c.exec("PRAGMA synchronous = FULL");
    // One transaction per input (a database is attached outside a transaction); rows go in
    // with INSERT OR IGNORE, so a merge interrupted and run again adds each row once.
    for (std::size_t i = exists ? 0 : 1; i < inputs.size(); ++i) {
      {
        Statement attach(c, "ATTACH DATABASE ? AS shard");
        attach.bind(1, inputs[i]);
        attach.step();
      }  // finalized: an unfinished statement would hold the attached file
      c.exec("BEGIN");
      c.exec("INSERT OR IGNORE INTO main.laps SELECT * FROM shard.laps");
      c.exec("COMMIT");
      c.exec("DETACH DATABASE shard");
    }
    c.exec("BEGIN");
    {
      Statement s(c, "SELECT shard FROM study");
      if (s.step()) shards.insert(s.text(0));
    }
    // The shards the file now holds, each once ("1/4,2/4,...").
    ShardLabels each;
    for (const auto& sh : shards) add_shards(each, sh);
    Statement upd(c, "UPDATE study SET shard = ?");
    upd.bind(1, shard_list(each));
    upd.step();
    // The command: not a shard's (its --shard and --out), the whole study's into this file.
    std::string command;
    {
      Statement s(c, "SELECT command FROM study");
      if (s.step()) command = s.text(0);
    }
    Statement cmd(c, "UPDATE study SET command = ?");
    cmd.bind(1, merged_command(command, out));
    cmd.step();
    c.exec("COMMIT");
  }
  if (fresh) fresh->place();
}

void export_csv(const std::string& file, const std::string& csv_file) {
  if (!std::filesystem::exists(file)) throw OutputError(file + ": no such results store");
  note_input(file);
  Connection c(file, false);
  study_id_of(c);
  {
    // The files the study was made from (its inputs), where they are still there with the same
    // bytes: the export replaces none of them either (`--csv car.yaml` once wrote the table
    // over the study's own car file).
    Statement in(c, "SELECT file, fnv1a64 FROM inputs");
    while (in.step()) {
      const std::string input = in.text(0), hash = in.text(1);
      std::error_code ec;
      if (!std::filesystem::is_regular_file(input, ec)) continue;
      std::ifstream is(input, std::ios::binary);
      std::ostringstream bytes;
      bytes << is.rdbuf();
      if (hex64(fnv1a64(bytes.str())) == hash) note_input(input);
    }
  }
  Statement s(c,
              "SELECT laps.* FROM laps JOIN tracks USING (track) JOIN configs USING (config) "
              "ORDER BY point, track_index, config_index");
  std::string out;
  for (int i = 0; i < s.columns(); ++i) {
    if (i) out += ',';
    csv_text(out, s.name(i));
  }
  out += '\n';
  while (s.step()) {
    for (int i = 0; i < s.columns(); ++i) {
      if (i) out += ',';
      switch (s.type(i)) {
        case SQLITE_INTEGER:
          out += std::to_string(s.integer(i));
          break;
        case SQLITE_FLOAT:
          csv_number(out, s.real(i));
          break;
        case SQLITE_NULL:
          break;
        default:
          csv_text(out, s.text(i));
      }
    }
    out += '\n';
  }
  write_file_atomic(csv_file, out);
}

}  // namespace lapwing
