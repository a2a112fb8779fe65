// resize_ready (base/memory.hpp) is v.resize(n) with the pages made ready first: the same
// contents as resize (std::vector::resize value-initialises new elements: zeros for double;
// ISO C++ [vector.capacity]), kept elements unchanged, on buffers below and above its 64 KB
// threshold. Its effect on speed is measured by tools/bench, not here.
#include <doctest/doctest.h>

#include <cstddef>
#include <vector>

#include "lapwing/base/memory.hpp"

using namespace lapwing;

TEST_CASE("resize_ready gives what resize gives, below and above its threshold") {
  for (std::size_t n :
       {std::size_t{10}, std::size_t{8191}, std::size_t{8192}, std::size_t{300000}}) {
    std::vector<double> a{1.5, -2.0, 3.25}, b = a;
    resize_ready(a, n);
    b.resize(n);
    CHECK(a == b);
    CHECK(a.size() == n);
    // Growing again keeps what is there; shrinking is resize's.
    a[n - 1] = 7.0;
    b[n - 1] = 7.0;
    resize_ready(a, 2 * n);
    b.resize(2 * n);
    CHECK(a == b);
    resize_ready(a, n / 2 + 1);
    b.resize(n / 2 + 1);
    CHECK(a == b);
  }
  // populate on an unaligned range inside a buffer, and on a range with no whole page: no change.
  std::vector<unsigned char> bytes(100000, 0x5a);
  populate(bytes.data() + 3, bytes.size() - 7);
  populate(bytes.data() + 1, 10);
  CHECK(bytes == std::vector<unsigned char>(100000, 0x5a));
}
