// A value built once per key in the process and shared: the tables of FixedPower and
// EllipseShape, made per exponent; and, for keys without bound (a sweep's cars), the few built
// last: an Envelope's drive rows, made per powertrain.
#pragma once

#include <cstddef>
#include <deque>
#include <map>
#include <memory>
#include <mutex>
#include <utility>

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

/// The value `make()` builds for `key`, shared with later callers that ask for an equal key
/// (Key's ==) while it is among the `Kept` values this call site built last: where keys vary
/// without bound (a sweep over thousands of cars), once_per_key would keep every one. The build
/// runs outside the lock (another key's caller need not wait for it); where two threads build
/// the same key at once, the first kept is returned to both, so every caller reads the same bits
/// whichever thread made them (`make` must depend on the key alone).
template <typename T, std::size_t Kept, typename Key, typename Make>
std::shared_ptr<const T> recent_per_key(const Key& key, const Make& make) {
  static_assert(Kept > 0);
  static std::mutex mutex;
  static std::deque<std::pair<Key, std::shared_ptr<const T>>> made;  // oldest first
  const auto find = [&key]() -> std::shared_ptr<const T> {
    for (const auto& [k, v] : made)
      if (k == key) return v;
    return nullptr;
  };
  {
    const std::lock_guard<std::mutex> lock(mutex);
    if (std::shared_ptr<const T> v = find()) return v;
  }
  std::shared_ptr<const T> value = make();
  const std::lock_guard<std::mutex> lock(mutex);
  if (std::shared_ptr<const T> v = find()) return v;
  made.emplace_back(key, value);
  if (made.size() > Kept) made.pop_front();
  return value;
}

}  // namespace lapwing
