// A content hash for a study's inputs: 64-bit FNV-1a (Fowler, Noll and Vo; the algorithm and its
// test vectors as published by its authors). Not cryptographic: it tells a changed input file from
// the one a results store was made with.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

namespace lapwing {

/// FNV-1a, 64 bit:  h = 14695981039346656037;  for each byte b: h = (h xor b) * 1099511628211
/// (mod 2^64).
std::uint64_t fnv1a64(std::string_view bytes);

/// 16 lowercase hex digits.
std::string hex64(std::uint64_t v);

}  // namespace lapwing
