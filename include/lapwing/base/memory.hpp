// Large buffers made ready before they are first written. On Linux a fresh page costs a fault
// when first touched; on this project's virtual machine 2.6 microseconds a 4 KB page (0.64 ns a
// byte, ten times writing the byte afterwards), and a lap's buffers are ~190 bytes a mesh point.
// madvise(MADV_POPULATE_WRITE) (Linux 5.14) makes a range's pages ready in one call, without a
// fault each: 1.75 microseconds a page measured here (docs/performance.md, "A lone lap on two
// threads").
#pragma once

#include <cstddef>
#include <initializer_list>
#include <vector>

#include "lapwing/base/halves.hpp"

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

/// resize_ready for several buffers at once, their new storage made ready in two halves of the
/// points, [0, n/2) and [n/2, n), the second on `second` where there is one. Readying the pages
/// is the system's work and most of a fresh buffer's cost; on two cores two threads do it in
/// about 0.6 of the time one takes (docs/performance.md, "A lone lap on two threads"). The same
/// contents either way.
template <typename T>
void resize_ready(std::initializer_list<std::vector<T>*> buffers, std::size_t n,
                  SecondThread* second) {
  std::vector<T*> fresh;
  for (std::vector<T>* v : buffers)
    if (n > v->capacity() && n * sizeof(T) >= (std::size_t{1} << 16)) {
      v->reserve(n);
      fresh.push_back(v->data());
    }
  if (!fresh.empty())
    in_halves(n, second, [&](std::size_t lo, std::size_t hi) {
      for (T* p : fresh) populate(p + lo, (hi - lo) * sizeof(T));
    });
  for (std::vector<T>* v : buffers) v->resize(n);
}

}  // namespace lapwing
