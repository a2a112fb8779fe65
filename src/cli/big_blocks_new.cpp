// The lapwing executable's operator new and delete: requests of 64 KB or more (a lap's per-point
// buffers, the mesh's) from an arena in transparent huge pages (base/big_blocks.hpp), the rest
// from the C library as before. Only this program's: the library and the Python module allocate
// as their host does. Left out under AddressSanitizer, whose own operator new checks every block.
#include <sys/resource.h>

#include <algorithm>
#include <atomic>
#include <cstddef>
#include <cstdlib>
#include <new>

#include "lapwing/base/big_blocks.hpp"

#if !defined(__SANITIZE_ADDRESS__)

namespace {

constexpr std::size_t big = std::size_t{64} << 10;

// Set once the arena is made; delete reads it to tell the arena's blocks from the C library's.
std::atomic<lapwing::BigBlocks*> made{nullptr};

// Made on the first large request and never destroyed: a block may be freed by a static's
// destructor after main returns.
lapwing::BigBlocks* arena() {
  alignas(lapwing::BigBlocks) static unsigned char storage[sizeof(lapwing::BigBlocks)];
  // 64 GB of address space (room for a mesh of tens of millions of points, and no memory until
  // written), or half of what a limit on the process's address space allows (ulimit -v), so
  // that the C library keeps the other half.
  static lapwing::BigBlocks* const a = [] {
    std::size_t want = std::size_t{64} << 30;
    rlimit limit{};
    if (::getrlimit(RLIMIT_AS, &limit) == 0 && limit.rlim_cur != RLIM_INFINITY)
      want = std::min<std::size_t>(want, static_cast<std::size_t>(limit.rlim_cur / 2));
    auto* b = new (storage) lapwing::BigBlocks(want);
    made.store(b, std::memory_order_release);
    return b;
  }();
  return a;
}

// nullptr where neither can give it.
void* take(std::size_t n, std::size_t alignment) noexcept {
  if (n >= big && alignment <= lapwing::BigBlocks::page) {
    try {  // the arena's bookkeeping allocates too: out of memory, the C library decides
      if (void* p = arena()->allocate(n)) return p;
    } catch (const std::bad_alloc&) {
    }
  }
  if (n == 0) n = 1;
  if (alignment <= __STDCPP_DEFAULT_NEW_ALIGNMENT__) return std::malloc(n);
  return std::aligned_alloc(alignment, (n + alignment - 1) / alignment * alignment);
}

void* take_or_throw(std::size_t n, std::size_t alignment) {
  void* p = take(n, alignment);
  if (!p) throw std::bad_alloc();
  return p;
}

void give_back(void* p) noexcept {
  if (!p) return;
  lapwing::BigBlocks* a = made.load(std::memory_order_acquire);
  if (a && a->owns(p))
    a->deallocate(p);
  else
    std::free(p);
}

constexpr std::size_t plain = __STDCPP_DEFAULT_NEW_ALIGNMENT__;

}  // namespace

void* operator new(std::size_t n) {
  return take_or_throw(n, plain);
}
void* operator new[](std::size_t n) {
  return take_or_throw(n, plain);
}
void* operator new(std::size_t n, const std::nothrow_t&) noexcept {
  return take(n, plain);
}
void* operator new[](std::size_t n, const std::nothrow_t&) noexcept {
  return take(n, plain);
}
void* operator new(std::size_t n, std::align_val_t a) {
  return take_or_throw(n, static_cast<std::size_t>(a));
}
void* operator new[](std::size_t n, std::align_val_t a) {
  return take_or_throw(n, static_cast<std::size_t>(a));
}
void* operator new(std::size_t n, std::align_val_t a, const std::nothrow_t&) noexcept {
  return take(n, static_cast<std::size_t>(a));
}
void* operator new[](std::size_t n, std::align_val_t a, const std::nothrow_t&) noexcept {
  return take(n, static_cast<std::size_t>(a));
}
void operator delete(void* p) noexcept {
  give_back(p);
}
void operator delete[](void* p) noexcept {
  give_back(p);
}
void operator delete(void* p, std::size_t) noexcept {
  give_back(p);
}
void operator delete[](void* p, std::size_t) noexcept {
  give_back(p);
}
void operator delete(void* p, const std::nothrow_t&) noexcept {
  give_back(p);
}
void operator delete[](void* p, const std::nothrow_t&) noexcept {
  give_back(p);
}
void operator delete(void* p, std::align_val_t) noexcept {
  give_back(p);
}
void operator delete[](void* p, std::align_val_t) noexcept {
  give_back(p);
}
void operator delete(void* p, std::size_t, std::align_val_t) noexcept {
  give_back(p);
}
void operator delete[](void* p, std::size_t, std::align_val_t) noexcept {
  give_back(p);
}
void operator delete(void* p, std::align_val_t, const std::nothrow_t&) noexcept {
  give_back(p);
}
void operator delete[](void* p, std::align_val_t, const std::nothrow_t&) noexcept {
  give_back(p);
}

#endif
