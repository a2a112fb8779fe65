#include "lapwing/study/thread_pool.hpp"

#include <algorithm>
#include <atomic>
#include <exception>
#include <mutex>
#include <system_error>
#include <thread>
#include <vector>

#include "lapwing/base/halves.hpp"

namespace lapwing {

void parallel_for(std::size_t count, unsigned threads,
                  const std::function<void(std::size_t, LapSolver&)>& job) {
  if (threads == 0) threads = usable_processors();
  // Fewer laps than threads (a compare of one config on one track): a lap takes two of the
  // threads it leaves idle (LapSolver::set_threads; the same lap whatever it takes).
  const unsigned per_lap = count == 1 && threads >= 2 ? 2 : 1;
  threads = static_cast<unsigned>(std::min<std::size_t>(threads, std::max<std::size_t>(count, 1)));
  std::atomic<std::size_t> next{0};
  std::mutex failure_mutex;
  std::exception_ptr failure;
  std::size_t failure_index = count;
  auto worker = [&] {
    LapSolver solver;
    solver.set_threads(per_lap);
    // A study's laps: each closed lap's sweeps in two phases, the quicker way on one thread
    // (LapSolver::Order), whatever the count of laps or threads, so that a lap's bits do not
    // depend on how many others a run takes with it (a batch's last point, a resumed sweep).
    solver.set_order(LapSolver::Order::phases);
    for (std::size_t i = next++; i < count; i = next++) {
      try {
        job(i, solver);
      } catch (...) {
        // Keep the failure of the lowest index: the same error whatever the thread count.
        std::lock_guard<std::mutex> lock(failure_mutex);
        if (i < failure_index) {
          failure_index = i;
          failure = std::current_exception();
        }
      }
    }
  };
  if (threads <= 1) {
    worker();
  } else {
    // A thread the system cannot start (no room for its stack under a memory limit) is one
    // fewer: the jobs go to the threads that did start, or to this one (each job's result is
    // its own, whichever thread runs it). Unwinding with threads running would end the program.
    std::vector<std::thread> pool;
    for (unsigned t = 0; t < threads; ++t) {
      try {
        pool.emplace_back(worker);
      } catch (const std::system_error&) {
        break;
      }
    }
    if (pool.empty()) worker();
    for (auto& t : pool) t.join();
  }
  if (failure) std::rethrow_exception(failure);
}

}  // namespace lapwing
