#include "lapwing/base/halves.hpp"

#include <algorithm>
#include <chrono>
#include <system_error>
#include <thread>
#include <utility>

#if defined(__linux__)
#include <sched.h>
#endif

namespace lapwing {

namespace {
// How long either side spins before it sleeps: longer than the gaps between a lap's jobs (a
// few to a few hundred microseconds) and short against a process's life.
constexpr std::chrono::microseconds spin_limit{300};

// Spins until `ready()` or spin_limit has passed; whether it became ready. The clock is read
// every 64 checks.
template <typename Ready>
bool spin_until(const Ready& ready) {
  const auto end = std::chrono::steady_clock::now() + spin_limit;
  for (;;) {
    for (int k = 0; k < 64; ++k) {
      if (ready()) return true;
#if defined(__x86_64__) || defined(__i386__)
      __builtin_ia32_pause();
#endif
    }
    if (std::chrono::steady_clock::now() >= end) return ready();
    // Let a thread that shares this processor run (the other side of the hand-over among them,
    // on a machine busy with other work).
    std::this_thread::yield();
  }
}
}  // namespace

unsigned usable_processors() {
#if defined(__linux__)
  cpu_set_t set;
  CPU_ZERO(&set);
  if (sched_getaffinity(0, sizeof set, &set) == 0) {
    const int count = CPU_COUNT(&set);
    if (count > 0) return static_cast<unsigned>(count);
  }
#endif
  return std::max(1u, std::thread::hardware_concurrency());
}

SecondThread::SecondThread() : thread_([this] { loop(); }) {}

SecondThread::~SecondThread() {
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    stop_ = true;
  }
  wake_.notify_all();
  thread_.join();
}

std::unique_ptr<SecondThread> SecondThread::try_start() {
  try {
    return std::make_unique<SecondThread>();
  } catch (const std::system_error&) {
    return nullptr;
  }
}

void SecondThread::start(std::function<void()> job) {
  {
    const std::lock_guard<std::mutex> lock(mutex_);
    job_ = std::move(job);
    error_ = nullptr;
    posted_.fetch_add(1, std::memory_order_release);
  }
  wake_.notify_all();
}

void SecondThread::wait() {
  spin_until([this] {
    return done_.load(std::memory_order_acquire) == posted_.load(std::memory_order_relaxed);
  });
  std::unique_lock<std::mutex> lock(mutex_);
  wake_.wait(lock, [this] { return done_.load() == posted_.load(); });
  if (error_) std::rethrow_exception(std::exchange(error_, nullptr));
}

void SecondThread::wait_quietly() {
  spin_until([this] {
    return done_.load(std::memory_order_acquire) == posted_.load(std::memory_order_relaxed);
  });
  std::unique_lock<std::mutex> lock(mutex_);
  wake_.wait(lock, [this] { return done_.load() == posted_.load(); });
  error_ = nullptr;
}

void SecondThread::loop() {
  std::uint64_t seen = 0;
  for (;;) {
    spin_until([&] {
      return posted_.load(std::memory_order_acquire) != seen ||
             stop_.load(std::memory_order_relaxed);
    });
    std::unique_lock<std::mutex> lock(mutex_);
    wake_.wait(lock, [&] { return stop_ || posted_.load() != seen; });
    if (stop_) return;
    seen = posted_.load();
    std::function<void()> job = std::move(job_);
    job_ = nullptr;
    lock.unlock();
    std::exception_ptr error;
    try {
      job();
    } catch (...) {
      error = std::current_exception();
    }
    lock.lock();
    error_ = std::move(error);
    done_.store(seen, std::memory_order_release);
    lock.unlock();
    wake_.notify_all();
  }
}

}  // namespace lapwing
