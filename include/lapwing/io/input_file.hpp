// Opening an input file (a car, a track, a data file, a log) with the reason it cannot be read:
// the system's words for one that cannot be opened, and what it is instead of a file (a folder).
// A special file (/dev/zero, a pipe that never ends) is read only up to a cap, so a wrong path
// cannot hang the program or fill the memory: the readers stop at max_document_bytes and
// max_data_bytes with an error that says so.
#pragma once

#include <cstddef>
#include <fstream>
#include <optional>
#include <string>
#include <vector>

namespace lapwing {

/// Largest YAML file read (a car or track file): 64 MiB, far above any real one (the bundled
/// ones are under 10 kB; a track of 100 000 segments is ~5 MB).
inline constexpr std::size_t max_document_bytes = std::size_t{64} << 20;
/// Largest CSV data file read (a centerline, a curvature profile, a log): 256 MiB, about 4
/// million rows of 60 bytes (over an hour logged at 1 kHz).
inline constexpr std::size_t max_data_bytes = std::size_t{256} << 20;
/// Longest line of a CSV data file: 1 MiB (a real row is under 1 kB).
inline constexpr std::size_t max_line_bytes = std::size_t{1} << 20;

/// Why `file` cannot be read as an input file, as a sentence about it: "is a directory, not a
/// file", or "cannot open the file: " and the system's reason ("No such file or directory");
/// nothing when it can be read.
std::optional<std::string> unreadable(const std::string& file);

/// `file` opened to read (binary). An InputError for the file as a whole (`FILE: error: `
/// and unreadable()'s sentence) when it cannot be read.
std::ifstream open_input(const std::string& file);

/// Whether two paths name one file: the same file (device and inode, through symlinks, ".." and
/// hard links) when both exist, else the same path once symlinks and ".." are resolved. The one
/// test lapwing uses for "these paths are one file": a file given twice, an output that would
/// replace an input.
bool same_file(const std::string& a, const std::string& b);

/// The input files a command reads, recorded while an InputLedger lives (the command line holds
/// one for each command): open_input() records every file it opens, other readers (the results
/// stores) call note_input(). The output writers (io/output.hpp) refuse to replace any of them,
/// or to remove a folder that holds one. Outside a ledger (a program using the library) nothing
/// is recorded, and nothing refused on that account. Only regular files are recorded: a device
/// or pipe read (/dev/stdin) is never replaced by an output.
class InputLedger {
 public:
  InputLedger();
  ~InputLedger();
  InputLedger(const InputLedger&) = delete;
  InputLedger& operator=(const InputLedger&) = delete;

 private:
  friend void note_input(const std::string& file);
  friend std::vector<std::string> inputs_read();
  std::vector<std::string> files_;
  InputLedger* outer_;
};

/// Records `file` (as given) as read by the command, when a ledger lives and `file` is a
/// regular file. Safe to call from any thread.
void note_input(const std::string& file);

/// The files recorded by the living ledger, each once, in the order first read; empty when none
/// lives.
std::vector<std::string> inputs_read();

/// "64 MiB": a byte count of whole MiB for messages.
std::string mib_text(std::size_t bytes);

}  // namespace lapwing
