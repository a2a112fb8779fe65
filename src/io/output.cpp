#include "lapwing/io/output.hpp"

#include <dirent.h>
#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdio>  // renameat2 (glibc 2.28+, Linux 3.15+)
#include <cstring>
#include <memory>
#include <optional>
#include <set>
#include <system_error>

#include "lapwing/base/error.hpp"
#include "lapwing/io/input_file.hpp"

namespace lapwing {

namespace fs = std::filesystem;

namespace {

[[noreturn]] void fail(const std::string& what, int err) {
  throw OutputError(what + ": " + std::strerror(err));
}

// A file descriptor closed on every path out.
class Fd {
 public:
  explicit Fd(int fd = -1) : fd_(fd) {}
  Fd(const Fd&) = delete;
  Fd& operator=(const Fd&) = delete;
  Fd(Fd&& o) noexcept : fd_(o.fd_) { o.fd_ = -1; }
  ~Fd() {
    if (fd_ >= 0) ::close(fd_);
  }
  int get() const { return fd_; }

 private:
  int fd_;
};

// What open(..., O_CREAT, full) would give a new file or folder: the process's umask applied.
// (umask() can only be read by setting it; nothing else creates files while outputs are written.)
mode_t created_mode(mode_t full) {
  const mode_t mask = ::umask(0);
  ::umask(mask);
  return full & ~mask;
}

// write(2) until all is written (it may write less, or be interrupted).
bool write_all(int fd, std::string_view content) {
  const char* p = content.data();
  std::size_t left = content.size();
  while (left > 0) {
    const ssize_t n = ::write(fd, p, left);
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    p += n;
    left -= static_cast<std::size_t>(n);
  }
  return true;
}

bool starts_with(const std::string& s, const std::string& prefix) {
  return s.compare(0, prefix.size(), prefix) == 0;
}

// Removes the entries of `folder` whose names start with `prefix` and whose writer is gone. A
// live writer holds an exclusive flock(2) on its temporary (file or staging folder) until it is
// done, and the kernel drops the lock when the process dies, however it dies: a lock we can take
// belongs to no one. O_NOFOLLOW: a symlink of that name is not ours, and nothing is followed.
void remove_leftovers(const fs::path& folder, const std::string& prefix) {
  std::vector<std::string> names;
  if (DIR* d = ::opendir(folder.c_str())) {
    while (const dirent* e = ::readdir(d))
      if (starts_with(e->d_name, prefix)) names.emplace_back(e->d_name);
    ::closedir(d);
  }
  for (const auto& n : names) {
    const fs::path p = folder / n;
    const Fd fd(::open(p.c_str(), O_RDONLY | O_NOFOLLOW | O_CLOEXEC | O_NONBLOCK));
    if (fd.get() < 0 || ::flock(fd.get(), LOCK_EX | LOCK_NB) != 0) continue;
    std::error_code ignored;
    fs::remove_all(p, ignored);
  }
}

// Whether `path` still names the file `fd` has open. A writer makes its temporary before it can
// lock it, and another run's remove_leftovers can take that lock between the two steps and
// remove the temporary (two runs given the same --out at once): then the writer holds a file
// or folder no name leads to, and makes another (the remover's lock is gone by then).
bool still_named(int fd, const std::string& path) {
  struct stat a, b;
  return ::fstat(fd, &a) == 0 && ::lstat(path.c_str(), &b) == 0 && a.st_dev == b.st_dev &&
         a.st_ino == b.st_ino;
}
// Tries a temporary's making before giving up (each lost only to another run's removal).
constexpr int temporary_attempts = 8;

// A path that ends at one of this process's own descriptors (/dev/stdout -> /proc/self/fd/1):
// that descriptor. Writing to it keeps the shell's redirection and its offset, where opening the
// path again would start a second offset at 0 (or, renamed over, detach the shell's file).
std::optional<int> own_descriptor(fs::path p) {
  const std::string self = "/proc/" + std::to_string(::getpid()) + "/fd/";
  for (int hop = 0; hop < 40; ++hop) {  // 40: the kernel's own limit on links in a path
    const std::string s = fs::absolute(p).lexically_normal().string();
    for (const std::string& dir : {std::string("/proc/self/fd/"), self, std::string("/dev/fd/")})
      if (starts_with(s, dir) && s.size() > dir.size() &&
          s.find_first_not_of("0123456789", dir.size()) == std::string::npos)
        return std::stoi(s.substr(dir.size()));
    struct stat st;
    if (::lstat(s.c_str(), &st) != 0 || !S_ISLNK(st.st_mode)) return std::nullopt;
    std::error_code ec;
    const fs::path t = fs::read_symlink(s, ec);
    if (ec) return std::nullopt;
    p = t.is_absolute() ? t : fs::path(s).parent_path() / t;
  }
  return std::nullopt;
}

// Whether `file` lies inside `folder` (a real path, no symlink in it), so that removing the
// folder removes it: as named (the real path of its folder, and its name: a symlink inside goes
// with the folder) or where it leads (a symlink elsewhere to a file inside).
bool lies_inside(const fs::path& file, const fs::path& folder) {
  std::error_code e1, e2, e3;
  const fs::path abs = fs::absolute(file, e1);
  const fs::path named = fs::weakly_canonical(abs.parent_path(), e2) / abs.filename();
  const fs::path real = fs::weakly_canonical(abs, e3);
  const auto under = [&](const fs::path& p, bool ok) {
    const auto [f, q] = std::mismatch(folder.begin(), folder.end(), p.begin(), p.end());
    return ok && f == folder.end() && q != p.end();
  };
  return under(named, !e1 && !e2) || under(real, !e1 && !e3);
}

// "it is a symlink that leads nowhere (to T: reason)": a link whose end is missing is not
// followed to make a file or folder there; the user said where the link goes, not what to make.
[[noreturn]] void dangling(const std::string& what, const fs::path& link, int err) {
  std::error_code ec;
  const fs::path to = fs::read_symlink(link, ec);
  throw OutputError(what + ": it is a symlink that leads nowhere (to " +
                    (ec ? std::string("?") : to.string()) + ": " + std::strerror(err) + ")");
}

// One file on its way out: either a temporary beside its target, renamed over it by commit(),
// or a target written through (a device, a pipe, a descriptor of ours) at commit().
class PendingFile {
 public:
  PendingFile(const fs::path& path, const std::string& content) : shown_(path), content_(content) {
    require_not_input(path);
    struct stat st;
    if (::lstat(path.c_str(), &st) != 0) {
      if (errno != ENOENT) fail("cannot write " + shown_.string(), errno);
      stage(path, created_mode(0666));
      return;
    }
    if (S_ISLNK(st.st_mode)) {
      if (const auto fd = own_descriptor(path)) {
        descriptor_ = *fd;
        return;
      }
      struct stat end;
      if (::stat(path.c_str(), &end) != 0) {
        if (errno == ENOENT) dangling("cannot write " + shown_.string(), path, errno);
        fail("cannot write " + shown_.string(), errno);
      }
      if (S_ISDIR(end.st_mode))
        throw OutputError("cannot write " + shown_.string() + ": it leads to a folder");
      if (!S_ISREG(end.st_mode)) {
        through_ = path;
        return;
      }
      // The file at the link's end is replaced; the link is kept.
      std::error_code ec;
      const fs::path real = fs::canonical(path, ec);
      if (ec) throw OutputError("cannot write " + shown_.string() + ": " + ec.message());
      stage(real, end.st_mode & 07777);
      return;
    }
    if (S_ISDIR(st.st_mode))
      throw OutputError("cannot write " + shown_.string() + ": it is a folder");
    if (!S_ISREG(st.st_mode)) {
      through_ = path;
      return;
    }
    stage(path, st.st_mode & 07777);
  }
  PendingFile(const PendingFile&) = delete;
  PendingFile& operator=(const PendingFile&) = delete;
  ~PendingFile() {
    if (!tmp_.empty()) ::unlink(tmp_.c_str());
    if (fd_ >= 0) ::close(fd_);
  }

  void commit() {
    if (descriptor_) {
      if (!write_all(*descriptor_, content_)) fail("cannot write " + shown_.string(), errno);
      return;
    }
    if (!through_.empty()) {
      // O_NOCTTY: a terminal named here must not become ours; no O_TRUNC on a device or pipe.
      const Fd fd(::open(through_.c_str(), O_WRONLY | O_CLOEXEC | O_NOCTTY));
      if (fd.get() < 0 || !write_all(fd.get(), content_))
        fail("cannot write " + shown_.string(), errno);
      return;
    }
    if (::rename(tmp_.c_str(), target_.c_str()) != 0)
      fail("cannot rename " + tmp_.string() + " to " + shown_.string(), errno);
    tmp_.clear();
    if (folders_) folders_->keep();
  }

 private:
  // Writes the content to `.NAME.tmp.XXXXXX` beside `target` (the same folder: rename is atomic
  // only within a file system), locked while this process lives, synced before the rename so
  // that the name never points at a file the disk does not hold whole.
  // A write that fails (a full disk, an I/O error) removes its temporary before it says so: only
  // a kill leaves one, for the next run to remove. The folders it made for a new file go too.
  void stage(const fs::path& target, mode_t mode) {
    target_ = target;
    const fs::path folder = target.parent_path().empty() ? fs::path(".") : target.parent_path();
    folders_.emplace(folder, shown_.string());
    const std::string prefix = "." + target.filename().string() + ".tmp.";
    remove_leftovers(folder, prefix);
    for (int attempt = 1;; ++attempt) {
      std::string name = (folder / (prefix + "XXXXXX")).string();
      fd_ = ::mkstemp(name.data());
      if (fd_ < 0) fail("cannot write " + shown_.string(), errno);
      const bool locked = ::flock(fd_, LOCK_EX) == 0;
      const int err = errno;
      const bool named = still_named(fd_, name);
      if (locked && named) {
        tmp_ = name;
        break;
      }
      if (named) ::unlink(name.c_str());  // the lock failed: nothing of it is left behind
      ::close(fd_);
      fd_ = -1;
      if (attempt == temporary_attempts) fail("cannot write " + shown_.string(), err);
    }
    if (::fchmod(fd_, mode) != 0 || !write_all(fd_, content_) || ::fsync(fd_) != 0) {
      const int err = errno;
      ::unlink(tmp_.c_str());
      tmp_.clear();
      ::close(fd_);  // the destructor does not run for a constructor that throws
      fd_ = -1;
      fail("cannot write " + shown_.string(), err);
    }
  }

  fs::path shown_;  // as the user gave it
  const std::string& content_;
  fs::path target_, tmp_, through_;
  std::optional<int> descriptor_;
  int fd_ = -1;
  std::optional<MadeFolders> folders_;  // destroyed after the destructor's unlink of tmp_
};

// Names inside an output folder: plain file names, each once.
void check_names(const std::vector<OutputFile>& files) {
  std::set<std::string> seen;
  for (const auto& f : files) {
    const std::string& name = f.name;
    if (name.empty() || name == "." || name == ".." || name.find('/') != std::string::npos ||
        name == output_folder_marker)
      throw OutputError("cannot write an output file named '" + name + "'");
    if (!seen.insert(name).second) throw OutputError("two output files would be named " + name);
  }
}

// What in an existing folder stops lapwing from replacing it: empty if nothing (the folder is
// empty, holds the marker, or holds only regular files of the names about to be written and
// their temporaries, as an earlier version wrote them); else the first entry that is the user's.
std::string foreign_entry(const fs::path& folder, const std::vector<OutputFile>& files) {
  std::set<std::string> ours;
  for (const auto& f : files) ours.insert(f.name);
  std::vector<std::string> names;
  DIR* d = ::opendir(folder.c_str());
  if (!d) fail("cannot read " + folder.string(), errno);
  while (const dirent* e = ::readdir(d)) {
    const std::string n = e->d_name;
    if (n == "." || n == "..") continue;
    if (n == output_folder_marker) {
      ::closedir(d);
      return {};
    }
    names.push_back(n);
  }
  ::closedir(d);
  std::sort(names.begin(), names.end());
  for (const auto& n : names) {
    struct stat st;
    const bool regular = ::lstat((folder / n).c_str(), &st) == 0 && S_ISREG(st.st_mode);
    bool temporary = false;
    for (const auto& o : ours) temporary = temporary || starts_with(n, "." + o + ".tmp.");
    if (!regular || (!ours.count(n) && !temporary)) return n;
  }
  return {};
}

}  // namespace

MadeFolders::MadeFolders(const fs::path& folder, const std::string& shown) {
  std::error_code ec;
  const fs::path f = folder.empty() ? fs::path(".") : folder;
  for (fs::path p = f; !p.empty() && !fs::exists(p, ec); p = p.parent_path()) {
    made_.push_back(p);
    if (p == p.root_path() || p == p.parent_path()) break;
  }
  if (made_.empty()) return;
  fs::create_directories(f, ec);
  if (ec) {
    remove_made();  // those made before the failure
    throw OutputError("cannot create " + shown + ": " + ec.message());
  }
}

MadeFolders::~MadeFolders() {
  remove_made();
}

void MadeFolders::remove_made() {
  std::error_code ec;
  for (const auto& p : made_) fs::remove(p, ec);  // only an empty folder is removed
  made_.clear();
}

void require_not_input(const fs::path& path) {
  for (const std::string& input : inputs_read())
    if (same_file(path.string(), input))
      throw OutputError("cannot write " + path.string() + ": it would replace " + input +
                        ", which this command reads (write it to another name)");
}

void require_no_input_inside(const fs::path& dir, const std::string& shown) {
  std::error_code ec;
  const fs::path real = fs::weakly_canonical(dir, ec);
  if (ec) return;  // no folder there: nothing in it
  for (const std::string& input : inputs_read())
    if (lies_inside(input, real))
      throw OutputError("will not replace " + (shown.empty() ? dir.string() : shown) +
                        ": it holds " + input +
                        ", which this command reads (write to another folder)");
}

void write_file_atomic(const fs::path& path, const std::string& content) {
  PendingFile(path, content).commit();
}

void write_files_atomic(const fs::path& dir, const std::vector<OutputFile>& files) {
  check_names(files);
  for (const auto& f : files) require_not_input(dir / f.name);
  MadeFolders folders(dir, dir.string());
  // Every file to its temporary first: a failure on any leaves the folder as it was.
  std::vector<std::string> contents;  // a streamed file made whole: these files are small
  for (const auto& f : files) {
    contents.push_back(f.content);
    if (f.stream) f.stream([&](std::string_view piece) { contents.back() += piece; });
  }
  std::vector<std::unique_ptr<PendingFile>> pending;
  for (std::size_t i = 0; i < files.size(); ++i)
    pending.push_back(std::make_unique<PendingFile>(dir / files[i].name, contents[i]));
  for (auto& p : pending) p->commit();
  folders.keep();
}

void write_outputs(const fs::path& dir, const std::vector<OutputFile>& files) {
  check_names(files);
  const std::string shown = dir.string();
  std::error_code ec;
  fs::path target = fs::absolute(dir, ec).lexically_normal();
  if (ec) throw OutputError("cannot create " + shown + ": " + ec.message());
  if (!target.has_filename()) target = target.parent_path();  // "out/" names "out"
  if (target == target.root_path()) throw OutputError("cannot replace " + shown + ": the root");

  // The folder as it stands: followed if a link (the link stays), and replaced only if ours.
  struct stat st;
  bool exists = ::lstat(target.c_str(), &st) == 0;
  if (!exists && errno != ENOENT) fail("cannot create " + shown, errno);
  if (exists && S_ISLNK(st.st_mode)) {
    const fs::path link = target;
    target = fs::canonical(link, ec);
    if (ec == std::errc::no_such_file_or_directory)
      dangling("cannot create " + shown, link, ec.value());
    if (ec) throw OutputError("cannot create " + shown + ": " + ec.message());
    if (::stat(target.c_str(), &st) != 0) fail("cannot create " + shown, errno);
  }
  if (exists && !S_ISDIR(st.st_mode))
    throw OutputError("cannot create " + shown + ": it is not a folder");
  // Inputs of this command inside the folder would be removed with it.
  if (exists) require_no_input_inside(target, shown);
  if (exists) {
    const std::string n = foreign_entry(target, files);
    if (!n.empty())
      throw OutputError("will not replace " + shown + ": it holds " + n +
                        ", which lapwing did not write (give a new or empty folder, or one "
                        "lapwing wrote)");
  }

  // The parents it needs, removed again (if still empty) when the run fails.
  const fs::path parent = target.parent_path();
  MadeFolders folders(parent, shown);

  const std::string prefix = "." + target.filename().string() + ".lapwing-stage.";
  remove_leftovers(parent, prefix);
  std::string stage;
  const Fd folder = [&] {
    for (int attempt = 1;; ++attempt) {
      stage = (parent / (prefix + "XXXXXX")).string();
      if (!::mkdtemp(stage.data())) fail("cannot create " + shown, errno);
      Fd f(::open(stage.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC));
      if (f.get() >= 0 && ::flock(f.get(), LOCK_EX) == 0 && still_named(f.get(), stage)) return f;
      const int err = errno;
      std::error_code ignored;
      if (f.get() >= 0 && still_named(f.get(), stage)) fs::remove_all(stage, ignored);
      if (attempt == temporary_attempts) fail("cannot create " + shown, err);
    }
  }();
  try {
    if (::fchmod(folder.get(), exists ? st.st_mode & 07777 : created_mode(0777)) != 0)
      fail("cannot create " + shown, errno);
    const OutputFile marker{output_folder_marker,
                            "A folder lapwing wrote: the next lapwing run with --out here "
                            "replaces it whole.\n"};
    auto put = [&](const OutputFile& f) {
      const Fd fd(
          ::openat(folder.get(), f.name.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666));
      const auto cannot = [&] { fail("cannot write " + (dir / f.name).string(), errno); };
      if (fd.get() < 0 || !write_all(fd.get(), f.content)) cannot();
      if (f.stream)
        f.stream([&](std::string_view piece) {
          if (!write_all(fd.get(), piece)) cannot();
        });
      if (::fsync(fd.get()) != 0) cannot();
    };
    for (const auto& f : files) put(f);
    put(marker);
    if (::fsync(folder.get()) != 0) fail("cannot write " + shown, errno);

    // The one step a reader or a kill sees: the old folder and the new trade places.
    const auto replace = [&] {
      bool swapped = false;
#ifdef RENAME_EXCHANGE
      if (::renameat2(AT_FDCWD, stage.c_str(), AT_FDCWD, target.c_str(), RENAME_EXCHANGE) == 0)
        swapped = true;
      else if (errno != EINVAL && errno != ENOSYS)
        fail("cannot replace " + shown, errno);
#endif
      if (swapped) return;
      // A file system without the exchange: the old folder aside under a staging name (removed
      // by the next run if this one dies before it is), then the new one in. Between the two, no
      // folder stands at the name; never a mix.
      const std::string old = stage + ".old";
      if (::rename(target.c_str(), old.c_str()) != 0) fail("cannot replace " + shown, errno);
      if (::rename(stage.c_str(), target.c_str()) != 0) {
        const int err = errno;
        ::rename(old.c_str(), target.c_str());
        fail("cannot replace " + shown, err);
      }
      stage = old;
    };
    if (exists) {
      replace();
    } else if (::rename(stage.c_str(), target.c_str()) == 0) {
      stage.clear();
    } else {
      const int err = errno;
      // Another run made the folder since this one looked (two runs given the same new --out
      // at once): replaced as a folder lapwing wrote is, if it is one (the last run to finish
      // leaves its outputs, as where the folder stood before); anything else stays.
      struct stat now;
      const bool raced = (err == ENOTEMPTY || err == EEXIST) &&
                         ::lstat(target.c_str(), &now) == 0 && S_ISDIR(now.st_mode) &&
                         fs::exists(target / output_folder_marker, ec) &&
                         foreign_entry(target, files).empty();
      if (!raced) fail("cannot create " + shown, err);
      replace();
    }
  } catch (...) {
    if (!stage.empty()) fs::remove_all(stage, ec);
    throw;
  }
  folders.keep();
  // The old folder now stands at the staging name. A failure to remove it is left to the next
  // run; the outputs are in place.
  if (!stage.empty()) fs::remove_all(stage, ec);
  const Fd up(::open(parent.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC));
  if (up.get() >= 0) ::fsync(up.get());
}

}  // namespace lapwing
