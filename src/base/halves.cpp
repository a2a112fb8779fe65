#include "lapwing/base/halves.hpp"

#include <system_error>
#include <utility>

namespace lapwing {

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
    busy_ = true;
    error_ = nullptr;
  }
  wake_.notify_all();
}

void SecondThread::wait() {
  std::unique_lock<std::mutex> lock(mutex_);
  wake_.wait(lock, [this] { return !busy_; });
  if (error_) std::rethrow_exception(std::exchange(error_, nullptr));
}

void SecondThread::wait_quietly() {
  std::unique_lock<std::mutex> lock(mutex_);
  wake_.wait(lock, [this] { return !busy_; });
  error_ = nullptr;
}

void SecondThread::loop() {
  std::unique_lock<std::mutex> lock(mutex_);
  for (;;) {
    wake_.wait(lock, [this] { return stop_ || job_ != nullptr; });
    if (stop_) return;
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
    error_ = error;
    busy_ = false;
    wake_.notify_all();
  }
}

}  // namespace lapwing
