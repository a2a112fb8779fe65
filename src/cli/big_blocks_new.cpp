// The lapwing executable's operator new and delete: requests of 64 KB or more (a lap's per-point
// buffers, the mesh's; from any code in the process) from an arena in transparent huge pages
// (base/big_blocks.hpp), the rest from the C library as before. Only this program's: the Python
// module and lapwing_bench allocate as their host does. Left out under the sanitizers, whose own
// operator new checks every block (GCC says so by __SANITIZE_ADDRESS__ and __SANITIZE_THREAD__,
// clang by __has_feature).
#include <sys/resource.h>

#include <atomic>
#include <cstddef>
#include <cstdlib>
#include <new>

#include "lapwing/base/big_blocks.hpp"

#if defined(__SANITIZE_ADDRESS__) || defined(__SANITIZE_THREAD__)
#define LAPWING_BIG_BLOCKS 0
#elif defined(__has_feature)
#if __has_feature(address_sanitizer) || __has_feature(hwaddress_sanitizer) || \
    __has_feature(memory_sanitizer) || __has_feature(thread_sanitizer)
#define LAPWING_BIG_BLOCKS 0
#endif
#endif
#ifndef LAPWING_BIG_BLOCKS
#define LAPWING_BIG_BLOCKS 1
#endif

#if LAPWING_BIG_BLOCKS

namespace {

constexpr std::size_t big = std::size_t{64} << 10;

// Set once the arena is made; delete reads it to tell the arena's blocks from the C library's.
std::atomic<lapwing::BigBlocks*> made{nullptr};

// Made on the first large request and never destroyed: a block may be freed by a static's
// destructor after main returns.
lapwing::BigBlocks* arena() {
  alignas(lapwing::BigBlocks) static unsigned char storage[sizeof(lapwing::BigBlocks)];
  // 64 GB of address space: room for a mesh of tens of millions of points, and no memory until
  // used. None under a limit on the process's address space (ulimit -v): the reservation counts
  // against it whole, and what it took the C library, thread stacks and libraries would miss
  // (a trade on 8 threads under such a limit ran out of room for its threads).
  static lapwing::BigBlocks* const a = [] {
    rlimit limit{};
    const bool limited = ::getrlimit(RLIMIT_AS, &limit) != 0 || limit.rlim_cur != RLIM_INFINITY;
    auto* b = new (storage) lapwing::BigBlocks(limited ? 0 : std::size_t{64} << 30);
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
