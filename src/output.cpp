#include "lapwing/output.hpp"

#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <stdexcept>
#include <system_error>

namespace lapwing {

void write_file_atomic(const std::filesystem::path& path, const std::string& content) {
  namespace fs = std::filesystem;
  const fs::path tmp =
      path.parent_path() / ("." + path.filename().string() + ".tmp." + std::to_string(::getpid()));
  {
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    if (!out) throw std::runtime_error("cannot write " + tmp.string());
    out.write(content.data(), static_cast<std::streamsize>(content.size()));
    out.flush();
    if (!out) {
      std::error_code ec;
      fs::remove(tmp, ec);
      throw std::runtime_error("cannot write " + tmp.string());
    }
  }
  std::error_code ec;
  fs::rename(tmp, path, ec);
  if (ec) {
    std::error_code ignored;
    fs::remove(tmp, ignored);
    throw std::runtime_error("cannot rename " + tmp.string() + " to " + path.string() + ": " +
                             ec.message());
  }
}

void write_outputs(const std::filesystem::path& dir,
                   const std::vector<std::pair<std::string, std::string>>& files) {
  std::error_code ec;
  std::filesystem::create_directories(dir, ec);
  if (ec) throw std::runtime_error("cannot create " + dir.string() + ": " + ec.message());
  for (const auto& [name, content] : files) write_file_atomic(dir / name, content);
}

}  // namespace lapwing
