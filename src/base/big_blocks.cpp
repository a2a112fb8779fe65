#include "lapwing/base/big_blocks.hpp"

#include <sys/mman.h>

#include <algorithm>
#include <cstdint>
#include <cstdlib>
#include <iterator>
#include <new>

namespace lapwing {

namespace {
std::size_t round_up(std::size_t n, std::size_t to) {
  return (n + to - 1) / to * to;
}
}  // namespace

BigBlocks::BigBlocks(std::size_t reserve_bytes) {
  const std::size_t size = round_up(reserve_bytes, huge_page);
  // One huge page more than asked, so that a huge-page-aligned range of `size` lies inside.
  // Address space only, not readable or writable (PROT_NONE): it counts against no memory limit
  // or commit charge (strict overcommit included) and a core dump writes none of it; allocate()
  // opens it for reading and writing as the top grows (commit).
  void* raw = ::mmap(nullptr, size + huge_page, PROT_NONE,
                     MAP_PRIVATE | MAP_ANONYMOUS | MAP_NORESERVE, -1, 0);
  if (raw == MAP_FAILED) return;
  const auto at = reinterpret_cast<std::uintptr_t>(raw);
  const std::uintptr_t aligned = round_up(at, huge_page);
  // The unaligned ends back to the system: the range is exactly [aligned, aligned + size).
  if (aligned > at) ::munmap(raw, aligned - at);
  const std::size_t tail = huge_page - (aligned - at);
  if (tail > 0) ::munmap(reinterpret_cast<void*>(aligned + size), tail);
  base_ = reinterpret_cast<char*>(aligned);
  size_ = size;
#ifdef MADV_HUGEPAGE
  // Refused where the kernel has no transparent huge pages: the blocks are then of small pages,
  // as the C library's would be. The flag stays with the parts mprotect opens.
  ::madvise(base_, size_, MADV_HUGEPAGE);
#endif
}

bool BigBlocks::commit(std::size_t to) {
  if (to <= committed_) return true;
  // In steps of 32 MB at least (a system call per step), never beyond the range.
  const std::size_t want =
      std::min(size_, std::max(round_up(to, huge_page), committed_ + commit_step));
  if (::mprotect(base_ + committed_, want - committed_, PROT_READ | PROT_WRITE) != 0) {
    // The system refuses the memory (a limit on data, strict overcommit): a step of just what
    // is asked for, else none.
    const std::size_t least = round_up(to, huge_page);
    if (least >= want ||
        ::mprotect(base_ + committed_, least - committed_, PROT_READ | PROT_WRITE) != 0)
      return false;
    committed_ = least;
    return true;
  }
  committed_ = want;
  return true;
}

BigBlocks::~BigBlocks() {
  if (base_) ::munmap(base_, size_);
}

void* BigBlocks::allocate(std::size_t bytes) {
  if (!base_ || bytes == 0 || bytes > size_) return nullptr;
  const std::size_t n = round_up(bytes, page);
  const std::lock_guard lock(mutex_);
  std::size_t offset = size_;
  for (auto it = free_.begin(); it != free_.end(); ++it)
    if (it->second >= n) {
      offset = it->first;
      const std::size_t rest = it->second - n;
      free_.erase(it);
      if (rest > 0) free_.emplace(offset + n, rest);
      break;
    }
  if (offset == size_) {
    if (n > size_ - top_ || !commit(top_ + n)) return nullptr;
    offset = top_;
    top_ += n;
  }
  used_.emplace(offset, n);
  return base_ + offset;
}

void BigBlocks::deallocate(void* p) {
  const std::lock_guard lock(mutex_);
  const auto it = used_.find(static_cast<std::size_t>(static_cast<char*>(p) - base_));
  // Not the start of a block handed out (freed twice, or never allocated): a program error,
  // stopped here as the C library's free stops one.
  if (it == used_.end()) std::abort();
  std::size_t from = it->first, to = it->first + it->second;
  used_.erase(it);
  // Coalesced with the free extents either side.
  const auto next = free_.find(to);
  if (next != free_.end()) {
    to += next->second;
    free_.erase(next);
  }
  const auto after = free_.lower_bound(from);
  if (after != free_.begin()) {
    const auto before = std::prev(after);
    if (before->first + before->second == from) {
      from = before->first;
      free_.erase(before);
    }
  }
  if (to == top_) {
    release(from, top_);
    top_ = from;
  } else {
    release(from, to);
    try {
      free_.emplace(from, to - from);
    } catch (const std::bad_alloc&) {
      // Out of memory for the record: the extent is lost to the arena (its huge pages were
      // given back above), not an error of the program's.
    }
  }
}

void BigBlocks::release(std::size_t from, std::size_t to) {
  const std::size_t a = round_up(from, huge_page), b = to / huge_page * huge_page;
  if (b > a) ::madvise(base_ + a, b - a, MADV_DONTNEED);
}

std::size_t BigBlocks::in_use() const {
  const std::lock_guard lock(mutex_);
  std::size_t n = 0;
  for (const auto& [offset, length] : used_) n += length;
  return n;
}

std::size_t BigBlocks::free_extents() const {
  const std::lock_guard lock(mutex_);
  return free_.size();
}

}  // namespace lapwing
