// SecondThread and in_halves: every job runs once, in order, its effects seen by the caller
// after wait(); a job's exception comes back to the caller; the thread stops whether it was
// spinning for its next job or asleep. Jobs come back to back (the spin's path) and after pauses
// longer than the spin (the condition variable's path).
#include <doctest/doctest.h>

#include <chrono>
#include <cstdint>
#include <memory>
#include <numeric>
#include <stdexcept>
#include <thread>
#include <vector>

#include "lapwing/base/halves.hpp"

using namespace lapwing;

TEST_CASE("SecondThread runs each job once and its writes are seen after wait") {
  SecondThread second;
  std::vector<std::uint64_t> data(1000, 0);
  std::uint64_t expected = 0;
  for (int round = 0; round < 2000; ++round) {
    // Every 250th round waits longer than the spin (300 us) first, so that the thread sleeps.
    if (round % 250 == 0) std::this_thread::sleep_for(std::chrono::milliseconds(2));
    second.start([&data, round] {
      for (auto& d : data) d += static_cast<std::uint64_t>(round);
    });
    // The caller's own half meanwhile, on data of its own.
    expected += static_cast<std::uint64_t>(round);
    if (round % 3 == 0)
      second.wait();
    else
      second.wait_quietly();
    REQUIRE(data.front() == expected);
    REQUIRE(data.back() == expected);
  }
}

TEST_CASE("SecondThread rethrows a job's exception once, then runs the next job") {
  SecondThread second;
  second.start([] { throw std::runtime_error("job failed"); });
  CHECK_THROWS_WITH_AS(second.wait(), "job failed", std::runtime_error);
  int ran = 0;
  second.start([&ran] { ++ran; });
  CHECK_NOTHROW(second.wait());
  CHECK(ran == 1);
  // wait_quietly drops the error: the next wait has nothing to rethrow.
  second.start([] { throw std::runtime_error("dropped"); });
  second.wait_quietly();
  second.start([&ran] { ++ran; });
  CHECK_NOTHROW(second.wait());
  CHECK(ran == 2);
}

TEST_CASE("SecondThread stops promptly whether spinning or asleep") {
  using clock = std::chrono::steady_clock;
  for (const bool asleep : {false, true}) {
    auto second = std::make_unique<SecondThread>();
    int ran = 0;
    second->start([&ran] { ++ran; });
    second->wait();
    if (asleep) std::this_thread::sleep_for(std::chrono::milliseconds(5));
    const auto t0 = clock::now();
    second.reset();  // joins the thread
    CHECK(ran == 1);
    // Generous: the spin is 300 us and the check of the stop flag is in it; a wait that ran
    // out the whole spin would still pass, a thread that never saw the stop would hang here.
    CHECK(clock::now() - t0 < std::chrono::seconds(5));
  }
}

TEST_CASE("in_halves gives the same sum on one thread and on two") {
  std::vector<double> x(100001);
  std::iota(x.begin(), x.end(), 0.5);
  auto sum_halves = [&x](SecondThread* second) {
    double s[2] = {0.0, 0.0};
    in_halves(x.size(), second, [&](std::size_t lo, std::size_t hi) {
      double& out = s[lo == 0 ? 0 : 1];
      for (std::size_t i = lo; i < hi; ++i) out += x[i];
    });
    return s[0] + s[1];
  };
  SecondThread second;
  const double one = sum_halves(nullptr);
  for (int k = 0; k < 100; ++k) REQUIRE(sum_halves(&second) == one);
  // The closed form of 0.5 + 1.5 + ... + 100000.5: n^2 / 2 for n = 100001 terms.
  CHECK(one == 100001.0 * 100001.0 / 2.0);
}
