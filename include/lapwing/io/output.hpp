// Output files: written whole to a temporary name in the same folder, then renamed, so that a
// reader never sees a half-written file and a failed run changes nothing.
#pragma once

#include <filesystem>
#include <string>
#include <utility>
#include <vector>

namespace lapwing {

/// Writes `content` to `path` atomically (temporary file in the same folder, then rename).
/// Throws OutputError when the folder cannot be written.
void write_file_atomic(const std::filesystem::path& path, const std::string& content);

/// Creates `dir` (and parents) if needed, writes every file to a temporary name, then renames
/// them all: a failure while writing leaves the folder as it was (and removes a folder it made).
/// Call only after all results are computed. Throws OutputError.
void write_outputs(const std::filesystem::path& dir,
                   const std::vector<std::pair<std::string, std::string>>& files);

}  // namespace lapwing
