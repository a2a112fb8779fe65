// Large buffers made ready before they are first written. On Linux a fresh page costs a fault
// when first touched; on this project's virtual machine 2.6 microseconds a 4 KB page (0.64 ns a
// byte, ten times writing the byte afterwards), and a lap's buffers are ~190 bytes a mesh point.
// madvise(MADV_POPULATE_WRITE) (Linux 5.14) makes a range's pages ready in one call, without a
// fault each: 1.75 microseconds a page measured here (README, "A lone lap on two threads").
#pragma once

#include <cstddef>
#include <vector>

namespace lapwing {

/// Makes the whole pages inside [p, p + bytes) ready for writing where the system can (Linux:
/// MADV_POPULATE_WRITE); else, or where it refuses, does nothing (the pages fault as before).
void populate(void* p, std::size_t bytes);

/// v.resize(n), the new storage of a large buffer (64 KB or more) made ready first (populate):
/// the same contents, fewer faults.
template <typename T>
void resize_ready(std::vector<T>& v, std::size_t n) {
  if (n > v.capacity() && n * sizeof(T) >= (std::size_t{1} << 16)) {
    v.reserve(n);
    populate(v.data(), n * sizeof(T));
  }
  v.resize(n);
}

}  // namespace lapwing
