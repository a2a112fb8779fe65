#include "lapwing/io/output.hpp"

#include <unistd.h>

#include <fstream>
#include <system_error>

#include "lapwing/base/error.hpp"

namespace lapwing {

namespace fs = std::filesystem;

namespace {

// Writes `content` to a temporary name beside `path` (same folder, so the rename is atomic).
fs::path write_temp(const fs::path& path, const std::string& content) {
  const fs::path tmp =
      path.parent_path() / ("." + path.filename().string() + ".tmp." + std::to_string(::getpid()));
  std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
  if (!out) throw OutputError("cannot write " + tmp.string());
  out.write(content.data(), static_cast<std::streamsize>(content.size()));
  out.flush();
  if (!out) {
    out.close();
    std::error_code ec;
    fs::remove(tmp, ec);
    throw OutputError("cannot write " + tmp.string());
  }
  return tmp;
}

void commit(const fs::path& tmp, const fs::path& path) {
  std::error_code ec;
  fs::rename(tmp, path, ec);
  if (ec) {
    std::error_code ignored;
    fs::remove(tmp, ignored);
    throw OutputError("cannot rename " + tmp.string() + " to " + path.string() + ": " +
                      ec.message());
  }
}

}  // namespace

void write_file_atomic(const fs::path& path, const std::string& content) {
  commit(write_temp(path, content), path);
}

void write_outputs(const fs::path& dir,
                   const std::vector<std::pair<std::string, std::string>>& files) {
  std::error_code ec;
  const bool existed = fs::exists(dir, ec);
  fs::create_directories(dir, ec);
  if (ec) throw OutputError("cannot create " + dir.string() + ": " + ec.message());
  // Every file to its temporary first: a failure on any leaves the folder as it was.
  std::vector<std::pair<fs::path, fs::path>> staged;
  try {
    for (const auto& [name, content] : files)
      staged.emplace_back(write_temp(dir / name, content), dir / name);
  } catch (...) {
    for (const auto& s : staged) fs::remove(s.first, ec);
    if (!existed) fs::remove(dir, ec);  // only if empty: remove() does not recurse
    throw;
  }
  for (const auto& [tmp, path] : staged) commit(tmp, path);
}

}  // namespace lapwing
