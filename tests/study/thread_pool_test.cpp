// The thread pool: every index runs once, and the failure reported is the lowest index's,
// whatever the thread count.
#include <doctest/doctest.h>

#include <atomic>
#include <stdexcept>
#include <string>
#include <vector>

#include "lapwing/study/thread_pool.hpp"

using namespace lapwing;

TEST_CASE("every job runs once, on one thread or several") {
  for (unsigned threads : {1u, 3u}) {
    std::vector<std::atomic<int>> runs(100);
    parallel_for(runs.size(), threads, [&](std::size_t i, LapSolver&) { ++runs[i]; });
    for (const auto& r : runs) CHECK(r.load() == 1);
  }
}

TEST_CASE("the lowest failing index is rethrown, whatever the thread count") {
  for (unsigned threads : {1u, 2u, 4u}) {
    try {
      parallel_for(50, threads, [](std::size_t i, LapSolver&) {
        if (i == 37 || i == 11) throw std::runtime_error("job " + std::to_string(i));
      });
      FAIL("expected a failure");
    } catch (const std::runtime_error& e) {
      CHECK(std::string(e.what()) == "job 11");
    }
  }
}
