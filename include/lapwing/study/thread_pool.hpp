// Laps are independent: a small pool of threads runs them, each with its own LapSolver, and
// every result lands at its own index, so output does not depend on the thread count.
#pragma once

#include <cstddef>
#include <functional>

#include "lapwing/solve/solver.hpp"

namespace lapwing {

/// Runs job(i, solver) for i in [0, count) over `threads` threads (0: all cores), each thread
/// with its own LapSolver. The first exception thrown (lowest index) is rethrown after all stop.
/// A single job given two threads or more gets a solver on two (LapSolver::set_threads).
void parallel_for(std::size_t count, unsigned threads,
                  const std::function<void(std::size_t, LapSolver&)>& job);

}  // namespace lapwing
