#include "lapwing/study/memory.hpp"

#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <fstream>
#include <string>

namespace lapwing {

double estimate_peak_bytes(const MemoryPlan& plan) {
  double points = 0.0, largest = 0.0;
  for (std::size_t n : plan.mesh_points) {
    points += static_cast<double>(n);
    largest = std::max(largest, static_cast<double>(n));
  }
  const double lap = plan.channels ? lap_bytes_per_point : speed_lap_bytes_per_point;
  return static_cast<double>(fixed_bytes) + points * mesh_bytes_per_point +
         points * static_cast<double>(plan.laps_kept) * lap_bytes_per_point +
         largest * plan.solvers * (lap + solver_bytes_per_point) + largest * delta_bytes_per_point +
         largest * static_cast<double>(plan.variant_meshes) * mesh_bytes_per_point;
}

double machine_memory_bytes() {
  const long pages = ::sysconf(_SC_PHYS_PAGES), page = ::sysconf(_SC_PAGE_SIZE);
  double bytes = pages > 0 && page > 0 ? static_cast<double>(pages) * static_cast<double>(page) : 0;
  // A container's limit (cgroup v2): "max", or a number of bytes.
  std::ifstream in("/sys/fs/cgroup/memory.max");
  std::string word;
  if (in >> word && word != "max") {
    try {
      const double limit = std::stod(word);
      if (limit > 0 && (bytes == 0 || limit < bytes)) bytes = limit;
    } catch (...) {
    }
  }
  return bytes;
}

std::string describe_bytes(double bytes) {
  const char* units[] = {"B", "kB", "MB", "GB", "TB"};
  int u = 0;
  while (bytes >= 1000 && u < 4) {
    bytes /= 1000;
    ++u;
  }
  char buf[32];
  std::snprintf(buf, sizeof buf,
                bytes >= 100 || u == 0 ? "%.0f %s"
                : bytes >= 10          ? "%.1f %s"
                                       : "%.2f %s",
                bytes, units[u]);
  return buf;
}

}  // namespace lapwing
