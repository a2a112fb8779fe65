// The results store of a sweep (README, "Sweep"): an SQLite database with the study that made it
// (`study`, `inputs`, `sets`) and one row per point x track x config (`laps`). Rows are committed
// point by point in transactions, so a killed sweep loses only the points in flight, and the same
// command on the same file resumes: the points stored are skipped. Shards of one study merge into
// one file; shards of different studies are refused.
//
// Its own layer (store/, above study and io): it stores what a study computes (study's rows) in a
// file (io's writers), and SQLite stays out of every other layer.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "lapwing/study/sweep.hpp"

namespace lapwing {

/// What made a study: its identity (a hash of the inputs' contents, the sets, the design, the
/// configs and the version: shards and resumed runs of one study share it) and, for the reader,
/// the command and the inputs' hashes.
struct StudyRecord {
  std::string study_id;  // 16 hex digits
  std::string version;   // lapwing's
  std::string command;   // as typed
  std::string design;    // "grid", "lhs:N", "sobol:N"
  std::string shard;     // "K/N"; a merged file lists its shards ("1/4,2/4")
  std::size_t points = 0;
  struct Input {
    std::string role, file, fnv1a64;  // role: "car" or "track"
  };
  std::vector<Input> inputs;
  std::vector<std::string> tracks;   // the laps table's names, by the study's circuit index
  std::vector<std::string> configs;  // by the study's config index
};

class SweepStore : public SweepSink {
 public:
  /// Opens `file` for the study: creates it, or, when it holds this study already, opens it to
  /// resume (has() then says which points are stored). A file of another study, or one that is
  /// no results store, or an input of the command (require_not_input), is an OutputError;
  /// nothing is changed then (a file this call made is removed). A new store's missing folders
  /// are made.
  SweepStore(const std::string& file, const StudyRecord& study, const SweepPlan& plan);
  ~SweepStore() override;
  SweepStore(const SweepStore&) = delete;
  SweepStore& operator=(const SweepStore&) = delete;

  bool has(std::size_t point) const override;
  /// Whether this store made the file (it did not hold the study before).
  bool created() const { return created_; }
  /// One transaction: every row, with the point's set values (plan.value) as columns.
  void commit(const std::vector<SweepRow>& rows) override;

 private:
  struct Db;
  /// The constructor's part after the file is there: opened, its study and shards checked.
  void open(const std::string& file, const StudyRecord& study, const SweepPlan& plan);
  std::unique_ptr<Db> db_;
  const SweepPlan* plan_;
  StudyRecord study_;
  std::vector<bool> done_;
  bool created_ = false;
};

/// The fastest point of a track in a results store (status ok), any config.
struct BestPoint {
  std::string track, config;
  std::int64_t point = 0;
  std::vector<std::pair<std::string, std::string>> values;  // set key, value as stored
  double lap_time_s = 0.0;
};
/// Per track (in the order the study names them), the best point among the laps whose
/// balance_window is pass; a track with none is left out, and so is every track when the car
/// has no balance window (the column is NULL throughout).
std::vector<BestPoint> best_points_in_window(const std::string& file);
/// The same among the laps that reach the window (inside it or not; not those that never run
/// where it applies).
std::vector<BestPoint> best_points_reaching_window(const std::string& file);
/// Per track (in the order the study names them), the best point; a track with no lap that
/// completes is left out. OutputError when `file` is no results store.
std::vector<BestPoint> best_points(const std::string& file);

/// Row counts: laps stored, how many of them are not ok, and the laps of the whole study
/// (points x tracks x configs).
struct StoreCounts {
  std::size_t rows = 0, not_ok = 0, expected = 0;
  std::size_t warned = 0;  // ok laps with a warning (their message)
};
StoreCounts store_counts(const std::string& file);

/// Joins the results stores `inputs` (shards of one study) into `out`, created when it does not
/// exist (written whole under `.NAME.lapwing-new` beside it, its missing folders made, then
/// renamed; a failure removes both), else added to (one transaction per input). The inputs are
/// recorded as read (note_input): an `out` that is one of them is refused (require_not_input).
/// A file of another study than the first's is an OutputError, naming it; nothing is written.
/// A write the system refuses: "cannot write OUT: " and its reason.
void merge_stores(const std::string& out, const std::vector<std::string>& inputs);

/// The laps table as CSV: the columns in the table's order (point, track, config, the sets,
/// the results, status, message), the rows by point, track, config; numbers at full precision.
/// Written atomically.
void export_csv(const std::string& file, const std::string& csv_file);

/// The laps table's fixed columns after the sets (README, "Sweep"), in order, with their SQL
/// type: the one definition the table, its rows and the CSV export follow.
struct StoreColumn {
  const char* name;
  const char* type;
};
inline constexpr StoreColumn sweep_result_columns[] = {
    {"lap_time_s", "REAL"},       {"top_speed_kph", "REAL"},
    {"min_speed_kph", "REAL"},    {"full_throttle_fraction", "REAL"},
    {"braking_fraction", "REAL"}, {"min_front_share_200kph", "REAL"},
    {"balance_window", "TEXT"},  // pass, fail, not reached; NULL: the car has no window
    {"status", "TEXT NOT NULL"},  {"message", "TEXT NOT NULL"}};

/// The word a balance window's result is stored as ("pass", "fail", "not reached").
const char* window_column_text(WindowResult w);

}  // namespace lapwing
