// A value built once per key in the process and shared: the tables of FixedPower and
// EllipseShape, made per exponent.
#pragma once

#include <map>
#include <memory>
#include <mutex>

namespace lapwing {

/// The value `make()` builds for `key`, built by the first caller and shared with every later one
/// (kept for the process's life; a mutex around a map, so the same bits whichever thread made
/// it). Each call site (its `make`'s type) keeps a map of its own.
template <typename T, typename Make>
std::shared_ptr<const T> once_per_key(double key, const Make& make) {
  static std::mutex mutex;
  static std::map<double, std::shared_ptr<const T>> made;
  const std::lock_guard<std::mutex> lock(mutex);
  std::shared_ptr<const T>& slot = made[key];
  if (!slot) slot = make();
  return slot;
}

}  // namespace lapwing
