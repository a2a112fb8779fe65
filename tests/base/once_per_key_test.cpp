// recent_per_key (base/once_per_key.hpp): an equal key gets the value built for it while that is
// among the last `Kept` built at the call site; an older one is built again; threads asking for
// the same key at once all get the one kept. Its use, the Envelope's drive rows, is checked bit
// for bit against rows built afresh in solve.envelope_test.
#include <doctest/doctest.h>

#include <atomic>
#include <memory>
#include <thread>
#include <vector>

#include "lapwing/base/once_per_key.hpp"

using namespace lapwing;

namespace {
std::atomic<int> builds{0};
// One call site (one cache): the value is the key times ten.
std::shared_ptr<const int> tenfold(int key) {
  return recent_per_key<int, 3>(key, [key] {
    ++builds;
    return std::make_shared<const int>(10 * key);
  });
}
}  // namespace

TEST_CASE("recent_per_key shares the last few keys' values and builds older ones again") {
  builds = 0;
  const auto a = tenfold(1);
  CHECK(*a == 10);
  CHECK(tenfold(1) == a);  // the same object, not built again
  CHECK(builds == 1);
  tenfold(2);
  tenfold(3);
  CHECK(tenfold(1) == a);  // three kept: 1, 2, 3
  CHECK(builds == 3);
  tenfold(4);  // 1 goes
  const auto again = tenfold(1);
  CHECK(builds == 5);
  CHECK(again != a);
  CHECK(*again == 10);
}

TEST_CASE("recent_per_key: threads asking for one key at once get one value") {
  std::vector<std::shared_ptr<const int>> got(8);
  std::vector<std::thread> threads;
  for (std::size_t t = 0; t < got.size(); ++t)
    threads.emplace_back([&got, t] { got[t] = tenfold(100); });
  for (std::thread& t : threads) t.join();
  for (const auto& g : got) {
    REQUIRE(g != nullptr);
    CHECK(g == got.front());
    CHECK(*g == 1000);
  }
}
