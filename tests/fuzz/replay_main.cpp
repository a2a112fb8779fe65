// Replays inputs through a fuzz target's entry point without libFuzzer, so that the corpus and
// every past crash run as regression inputs in any build (tools/test's sanitizer build with
// GCC among them). Arguments: files or folders (each file in a folder, in name order; a folder
// that does not exist holds nothing). Prints the count; a finding aborts as under the fuzzer.
#include <algorithm>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>
#include <vector>

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size);

int main(int argc, char** argv) {
  namespace fs = std::filesystem;
  std::vector<fs::path> files;
  for (int i = 1; i < argc; ++i) {
    const fs::path p = argv[i];
    if (fs::is_directory(p)) {
      std::vector<fs::path> in;
      for (const auto& e : fs::directory_iterator(p))
        if (e.is_regular_file() && e.path().filename().string().front() != '.')
          in.push_back(e.path());
      std::sort(in.begin(), in.end());
      files.insert(files.end(), in.begin(), in.end());
    } else if (fs::exists(p)) {
      files.push_back(p);
    }
  }
  for (const auto& f : files) {
    std::ifstream in(f, std::ios::binary);
    const std::vector<char> bytes((std::istreambuf_iterator<char>(in)),
                                  std::istreambuf_iterator<char>());
    LLVMFuzzerTestOneInput(reinterpret_cast<const std::uint8_t*>(bytes.data()), bytes.size());
  }
  std::printf("replayed %zu inputs\n", files.size());
  return files.empty() ? 1 : 0;
}
