// Output files and folders, written so that a reader, a failure or a kill never sees a mix:
// - a file goes to a temporary name in its own folder and is renamed over its name;
// - an output folder (--out DIR) is built whole in a new sibling folder and swapped in by one
//   atomic step, renameat2(RENAME_EXCHANGE) on Linux; the old folder is then removed.
// Temporaries a killed run left are recognised by their names and removed by the next run that
// writes the same file or folder (each live run holds an flock on its own, so a run in progress
// is never disturbed). Every "cannot ..." error gives the system's reason (errno text).
#pragma once

#include <filesystem>
#include <functional>
#include <string>
#include <string_view>
#include <vector>

namespace lapwing {

/// Receives a file's bytes piece by piece, in order.
using OutputSink = std::function<void(std::string_view)>;

/// One output file: its name in the folder and its bytes, given whole (`content`) or, when
/// `stream` is set, made piece by piece into the file as it is written: a trace of a long mesh
/// is never held whole in memory.
struct OutputFile {
  std::string name;
  std::string content;
  std::function<void(const OutputSink&)> stream = {};
};

/// The hidden file every output folder holds: it marks the folder as one lapwing wrote, which
/// the next run may replace whole.
inline constexpr const char* output_folder_marker = ".lapwing-output";

/// OutputError ("cannot write PATH: it would replace INPUT, which this command reads") when `path`
/// is one file (same_file) with an input the command read (io/input_file.hpp, InputLedger).
/// Every writer here checks each file before it writes anything; a command may call it early, to
/// refuse before long work.
void require_not_input(const std::filesystem::path& path);

/// OutputError ("will not replace DIR: it holds INPUT, which this command reads") when the folder
/// `dir` (followed if a symlink) holds an input the command read, as named or at a symlink's end:
/// replacing the folder would remove it. write_outputs checks it; a command may call it early.
/// `shown`: the name in the message (default `dir`).
void require_no_input_inside(const std::filesystem::path& dir, const std::string& shown = {});

/// The missing folders above an output: made when constructed (OutputError "cannot create SHOWN:"
/// and the system's reason when one cannot be), and removed again, those still empty, when
/// destroyed before keep(): a write that fails leaves no folder it made. Every writer here makes
/// an output's missing parent folders this way (README, "Output files").
class MadeFolders {
 public:
  MadeFolders(const std::filesystem::path& folder, const std::string& shown);
  ~MadeFolders();
  MadeFolders(const MadeFolders&) = delete;
  MadeFolders& operator=(const MadeFolders&) = delete;
  /// The write succeeded: the folders stay.
  void keep() { made_.clear(); }

 private:
  void remove_made();
  std::vector<std::filesystem::path> made_;  // the deepest first
};

/// Writes `content` to `path`.
/// - A new path or a regular file: written to `.NAME.tmp.XXXXXX` beside it, then renamed over it
///   (atomic); the file keeps its permissions.
/// - A symlink: followed; a regular file at its end is replaced the same way (the link stays),
///   anything else (a device, a pipe: `/dev/stdout`) is opened and written through, never
///   replaced. A link that leads nowhere is refused ("it is a symlink that leads nowhere").
/// - A path that is an input the command read (require_not_input): refused.
/// Missing parent folders are made (MadeFolders). A write that fails removes its temporary.
/// - A device, pipe or socket: opened and written through.
/// - A folder: refused.
/// Throws OutputError (the path and the system's reason).
void write_file_atomic(const std::filesystem::path& path, const std::string& content);

/// Writes each file into the existing or new folder `dir` by write_file_atomic, in the order
/// given (a file that names another goes last). For a folder that holds other things: a track
/// file and its data beside other tracks. Throws OutputError.
void write_files_atomic(const std::filesystem::path& dir, const std::vector<OutputFile>& files);

/// Replaces the folder `dir` with one holding exactly `files` (and the marker), as one
/// transaction: the files are written and synced into `.NAME.lapwing-stage.XXXXXX` beside `dir`,
/// which is then exchanged with `dir` (renamed to it when `dir` does not exist) and the old
/// folder removed. A failure before the exchange leaves `dir` as it was (and no folder it made);
/// a kill leaves `dir` either old or new, and a staging folder the next run removes.
/// `dir` given as a symlink is followed (the folder it leads to is replaced, the link stays).
/// An existing `dir` is replaced only if it is empty, holds the marker, or holds nothing but
/// regular files named as in `files` (and temporaries of them): anything else is the user's,
/// and refused; so is one that holds (as named, or at a symlink's end) an input the command read
/// (InputLedger), which the replacement would remove. Missing parents are made (MadeFolders).
/// Names must be unique (a repeated name is an OutputError naming it).
/// Call only after all results are computed. Throws OutputError.
void write_outputs(const std::filesystem::path& dir, const std::vector<OutputFile>& files);

}  // namespace lapwing
