// Large blocks (a lap's per-point buffers) in transparent huge pages. A fresh 4 KB page costs
// the system some 2.6 microseconds on this project's virtual machine (base/memory.hpp), a fifth
// of a whole run's time on a long track; a 2 MB huge page costs about what its 512 small pages'
// clearing does: 8 MB made ready took 3.5 ms in small pages and 0.27 ms in huge ones, measured
// here (docs/performance.md, "Large buffers in huge pages"). Huge pages need 2 MB-aligned ranges
// marked for them (madvise(MADV_HUGEPAGE), Linux 2.6.38: transparent huge pages in "madvise" mode),
// which the C library's allocator does not give blocks of a few hundred KB. BigBlocks keeps one
// reserved range so marked and hands out page-aligned blocks from it, first fit, freed blocks
// coalesced and their whole huge pages given back to the system (so that a long study's memory
// follows what it holds). The lapwing executable's operator new sends every request of 64 KB or
// more here, the library's code in it included (cli/big_blocks_new.cpp); other programs linking the
// library (the Python module, lapwing_bench) allocate as their host does.
#pragma once

#include <cstddef>
#include <map>
#include <mutex>

namespace lapwing {

class BigBlocks {
 public:
  static constexpr std::size_t page = std::size_t{4} << 10;
  static constexpr std::size_t huge_page = std::size_t{2} << 20;
  /// Reserves `reserve_bytes` of address space (no memory: pages come when first written), a
  /// whole number of huge pages, huge-page aligned, opened for use as blocks are handed out.
  /// Where the system refuses the reservation (an address-space limit) the arena is empty and
  /// allocate() says so, as it does where the system refuses to open more of it.
  explicit BigBlocks(std::size_t reserve_bytes);
  ~BigBlocks();
  BigBlocks(const BigBlocks&) = delete;
  BigBlocks& operator=(const BigBlocks&) = delete;

  /// A block of at least `bytes`, aligned to a 4 KB page; nullptr where the arena cannot give
  /// one (empty, or full): the caller takes it elsewhere. Throws std::bad_alloc only where its
  /// own bookkeeping finds no memory.
  void* allocate(std::size_t bytes);
  /// Whether p lies in the arena's range (a block of allocate()'s).
  bool owns(const void* p) const {
    return static_cast<const char*>(p) >= base_ && static_cast<const char*>(p) < base_ + size_;
  }
  /// Frees a block of allocate()'s (its whole huge pages back to the system at once). Any other
  /// pointer in the range (freed twice, never allocated) aborts the program, as the C library
  /// does.
  void deallocate(void* p);

  /// The reserved range's size (0: none).
  std::size_t reserved() const { return size_; }
  /// Bytes in blocks handed out and not freed, and the free extents below the top.
  std::size_t in_use() const;
  std::size_t free_extents() const;

 private:
  void release(std::size_t from, std::size_t to);  // whole huge pages of [from, to) to the system
  bool commit(std::size_t to);  // [0, to) readable and writable (false: the system refused)
  static constexpr std::size_t commit_step = std::size_t{32} << 20;

  char* base_ = nullptr;
  std::size_t size_ = 0;
  mutable std::mutex mutex_;
  std::size_t top_ = 0;                      // bytes from base_ ever handed out above
  std::size_t committed_ = 0;                // bytes from base_ open for reading and writing
  std::map<std::size_t, std::size_t> free_;  // offset -> length, coalesced, below top_
  std::map<std::size_t, std::size_t> used_;  // offset -> length of blocks handed out
};

}  // namespace lapwing
