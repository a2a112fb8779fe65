// A pass over a mesh's points worked as two halves, the second on a second thread where there
// is one: a lap on two threads (LapSolver::set_threads) and a long mesh's layout (build_mesh).
// The halves are the same whatever the threads, so the results are too.
#pragma once

#include <atomic>
#include <condition_variable>
#include <cstddef>
#include <cstdint>
#include <exception>
#include <functional>
#include <memory>
#include <mutex>
#include <thread>

namespace lapwing {

/// A second thread that runs one job at a time: start() hands it a job, wait() waits for it and
/// rethrows what it threw. Kept by its owner (a LapSolver keeps one for its life), so that a
/// pass does not pay a thread's start (some 25 microseconds here, measured) each time.
///
/// Both sides spin a short while before they sleep: the thread for its next job after each
/// one (a lap hands it three to five jobs, a few to a few hundred microseconds apart), the
/// caller for the job's end. A wake-up through the condition variable took tens of
/// microseconds on this machine's virtual processors (docs/performance.md, "A lone lap on two
/// threads"), as long as half a short lap's steady limits. The spin is bounded (spin_limit): a
/// thread with no work sleeps.
class SecondThread {
 public:
  SecondThread();
  ~SecondThread();
  SecondThread(const SecondThread&) = delete;
  SecondThread& operator=(const SecondThread&) = delete;

  /// A started thread, or nullptr where none can be had (a process at its limit): the caller
  /// then works on one.
  static std::unique_ptr<SecondThread> try_start();

  /// Runs `job` on the thread; wait() for it before the next.
  void start(std::function<void()> job);
  /// Waits for the job; rethrows what it threw.
  void wait();
  /// Waits for the job, dropping what it threw (the caller has an error of its own to report).
  void wait_quietly();

 private:
  void loop();
  // Jobs handed over and jobs done, counted: the thread has a job where posted_ > its last,
  // the caller's job is done where done_ == posted_. Written under mutex_ too, so that a side
  // that found nothing in its spin and sleeps is woken (condition variable) without a race.
  std::atomic<std::uint64_t> posted_{0}, done_{0};
  std::mutex mutex_;
  std::condition_variable wake_;
  std::function<void()> job_;
  std::atomic<bool> stop_{false};  // written under mutex_; read in the thread's spin too
  std::exception_ptr error_;
  std::thread thread_;  // last: it starts once the rest is built
};

/// The processors this process may run on: its affinity mask's count where the system tells it
/// (taskset, a cpuset, a batch job's cores), else std::thread::hardware_concurrency (at least
/// 1). A second thread on a processor shared with its caller pays SecondThread's spin on every
/// hand-over.
unsigned usable_processors();

/// A pass over points 0 to n-1 worked as two halves, [0, n/2) and [n/2, n), each from a fresh
/// start: `half(lo, hi)`. With a second thread the second half runs there. The halves are the
/// same either way, so the pass's results are too; where both halves throw, the first half's
/// error is the one rethrown (the one a pass from point 0 would meet first).
template <typename Half>
void in_halves(std::size_t n, SecondThread* second, const Half& half) {
  const std::size_t mid = n / 2;
  if (!second) {
    half(std::size_t{0}, mid);
    half(mid, n);
    return;
  }
  second->start([&] { half(mid, n); });
  try {
    half(std::size_t{0}, mid);
  } catch (...) {
    second->wait_quietly();
    throw;
  }
  second->wait();
}

}  // namespace lapwing
