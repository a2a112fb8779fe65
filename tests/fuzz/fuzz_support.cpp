#include "fuzz_support.hpp"

#include <stdlib.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>

namespace lapwing::fuzz {

namespace {
const std::string& folder() {
  static const std::string dir = [] {
    std::string t = (std::filesystem::temp_directory_path() / "lapwing-fuzz-XXXXXX").string();
    if (!::mkdtemp(t.data())) finding("cannot make a scratch folder");
    return t;
  }();
  return dir;
}
}  // namespace

std::string scratch(const std::string& name) {
  return folder() + "/" + name;
}

std::string as_file(const std::uint8_t* data, std::size_t size, const std::string& name) {
  const std::string path = scratch(name);
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out.write(reinterpret_cast<const char*>(data), static_cast<std::streamsize>(size));
  if (!out) finding("cannot write " + path);
  return path;
}

}  // namespace lapwing::fuzz
