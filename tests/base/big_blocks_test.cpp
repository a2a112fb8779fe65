// The huge-page arena (base/big_blocks.hpp): blocks aligned, apart and reused, freed space
// coalesced and given back, a full or refused arena said so, many threads at once, and huge
// pages where the kernel gives them (its transparent huge pages in "madvise" or "always" mode:
// Documentation/admin-guide/mm/transhuge.rst of the Linux kernel).
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdint>
#include <cstring>
#include <fstream>
#include <iterator>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "lapwing/base/big_blocks.hpp"

using namespace lapwing;

TEST_CASE("blocks are page-aligned, apart and writable; freed ones are reused and coalesced") {
  BigBlocks a(std::size_t{64} << 20);
  REQUIRE(a.reserved() == std::size_t{64} << 20);
  auto* p = static_cast<char*>(a.allocate(100000));
  auto* q = static_cast<char*>(a.allocate(300000));
  auto* r = static_cast<char*>(a.allocate(5000));
  REQUIRE((p && q && r));
  for (char* b : {p, q, r}) {
    CHECK(reinterpret_cast<std::uintptr_t>(b) % BigBlocks::page == 0);
    CHECK(a.owns(b));
  }
  // In order, each after the last, rounded to whole pages.
  CHECK(q - p == 102400);  // 100000 rounded up to 25 pages of 4096
  CHECK(r - q == 303104);  // 74 pages
  std::memset(p, 1, 100000);
  std::memset(q, 2, 300000);
  std::memset(r, 3, 5000);
  CHECK(p[99999] == 1);
  CHECK(q[0] == 2);
  CHECK(a.in_use() == 102400 + 303104 + 8192);
  // A freed block's space is the first fit for a block that fits it.
  a.deallocate(p);
  CHECK(a.free_extents() == 1);
  CHECK(a.allocate(50000) == p);
  a.deallocate(p);
  // Freed neighbours coalesce; freed at the top, the space is simply the top again.
  a.deallocate(q);
  CHECK(a.free_extents() == 1);
  a.deallocate(r);
  CHECK(a.free_extents() == 0);
  CHECK(a.in_use() == 0);
  CHECK(a.allocate(4096) == p);
  CHECK_FALSE(a.owns(&a));
}

TEST_CASE(
    "a full arena and a refused reservation give no block, for the caller to take "
    "elsewhere") {
  BigBlocks small(std::size_t{4} << 20);  // two huge pages
  void* first = small.allocate(std::size_t{3} << 20);
  CHECK(first != nullptr);
  CHECK(small.allocate(std::size_t{3} << 20) == nullptr);
  CHECK(small.allocate(0) == nullptr);
  small.deallocate(first);
  CHECK(small.allocate(std::size_t{3} << 20) == first);
  // No address space of 2^62 bytes (x86-64 user space is 2^47).
  BigBlocks refused(std::size_t{1} << 62);
  CHECK(refused.reserved() == 0);
  CHECK(refused.allocate(4096) == nullptr);
}

TEST_CASE("four threads allocating and freeing at once never share a byte") {
  BigBlocks a(std::size_t{256} << 20);
  std::vector<std::thread> threads;
  std::vector<int> bad(4, 0);
  for (int t = 0; t < 4; ++t)
    threads.emplace_back([&, t] {
      std::mt19937 rng(static_cast<unsigned>(t) + 1);
      std::uniform_int_distribution<std::size_t> size(65536, 1 << 20);
      std::vector<std::pair<unsigned char*, std::size_t>> held;
      for (int k = 0; k < 400; ++k) {
        const std::size_t n = size(rng);
        auto* b = static_cast<unsigned char*>(a.allocate(n));
        if (!b) continue;
        std::memset(b, t + 1, n);  // the thread's mark over the whole block
        held.emplace_back(b, n);
        if (held.size() > 6 || rng() % 2) {
          const auto [c, m] = held[rng() % held.size()];
          for (std::size_t i = 0; i < m; i += 997)
            bad[static_cast<std::size_t>(t)] += c[i] != t + 1;
          a.deallocate(c);
          held.erase(std::find(held.begin(), held.end(), std::make_pair(c, m)));
        }
      }
      for (const auto& [c, m] : held) a.deallocate(c);
    });
  for (auto& th : threads) th.join();
  for (int b : bad) CHECK(b == 0);
  CHECK(a.in_use() == 0);
  CHECK(a.free_extents() == 0);
}

namespace {
// The kernel's transparent huge page mode: the bracketed word of its setting ("never" where it
// has none).
std::string thp_mode() {
  std::ifstream in("/sys/kernel/mm/transparent_hugepage/enabled");
  std::string s((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  const auto a = s.find('['), b = s.find(']');
  return a == std::string::npos || b == std::string::npos ? "never" : s.substr(a + 1, b - a - 1);
}
// A counter of /proc/vmstat (0 where it has none).
long vmstat(const std::string& name) {
  std::ifstream in("/proc/vmstat");
  std::string key;
  long value = 0;
  while (in >> key >> value)
    if (key == name) return value;
  return 0;
}
// AnonHugePages (kB) of the mapping that holds p (/proc/self/smaps).
long huge_kb_at(const void* p) {
  std::ifstream in("/proc/self/smaps");
  const auto at = reinterpret_cast<std::uintptr_t>(p);
  std::string line;
  bool inside = false;
  while (std::getline(in, line)) {
    std::uintptr_t lo = 0, hi = 0;
    char dash = 0;
    std::istringstream head(line);
    if (head >> std::hex >> lo >> dash >> hi && dash == '-') {
      inside = lo <= at && at < hi;
      continue;
    }
    if (inside && line.rfind("AnonHugePages:", 0) == 0) return std::stol(line.substr(14));
  }
  return -1;
}
}  // namespace

TEST_CASE("a block written whole lies in huge pages where the kernel gives them") {
  const std::string mode = thp_mode();
  if (mode == "never") {
    MESSAGE("transparent huge pages are off on this kernel: nothing to check");
    return;
  }
  BigBlocks a(std::size_t{64} << 20);
  auto* b = static_cast<char*>(a.allocate(std::size_t{8} << 20));
  REQUIRE(b != nullptr);
  const long allocated = vmstat("thp_fault_alloc"), fell_back = vmstat("thp_fault_fallback");
  std::memset(b, 7, std::size_t{8} << 20);
  const long kb = huge_kb_at(b);
  MESSAGE("transparent huge pages '" << mode << "': " << kb << " kB of the block in huge pages");
  // The kernel may refuse them (memory too fragmented, a control group's rule): it then falls
  // back to small pages and counts that (thp_fault_fallback), no error of the arena's.
  if (vmstat("thp_fault_alloc") == allocated && vmstat("thp_fault_fallback") > fell_back) {
    MESSAGE("the kernel fell back to small pages: nothing to check");
    return;
  }
  // 8 MB from a huge-page boundary: four whole huge pages; at least one is asked (another
  // process's faults move the counters too).
  CHECK(kb >= 2048);
  a.deallocate(b);
  // Freed, its huge pages go back to the system.
  CHECK(huge_kb_at(b) == 0);
}
