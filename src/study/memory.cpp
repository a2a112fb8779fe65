#include "lapwing/study/memory.hpp"

#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <fstream>
#include <string>

#include "lapwing/base/format.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/mesh.hpp"

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

MemoryVerdict check_memory(const std::vector<const Track*>& tracks, std::size_t laps_kept,
                           bool channels, unsigned threads, std::size_t jobs, bool verdict,
                           double limit) {
  MemoryPlan plan;
  plan.laps_kept = laps_kept;
  plan.channels = channels;
  if (threads == 0) threads = usable_processors();
  plan.solvers = static_cast<unsigned>(std::clamp<std::size_t>(jobs, 1, threads));
  MemoryVerdict v;
  for (std::size_t i = 0; i < tracks.size(); ++i) {
    plan.mesh_points.push_back(mesh_point_count(*tracks[i], tracks[i]->mesh_m));
    if (plan.mesh_points[i] > plan.mesh_points[v.largest]) v.largest = i;
    // A fitted centerline's verdict lays it out again at half and double the strength.
    const auto& p = tracks[i]->profile;
    if (verdict && p && p->source == PathProfile::Source::centerline) plan.variant_meshes = 2;
  }
  v.need = estimate_peak_bytes(plan);
  v.over = limit > 0 && v.need > limit;
  v.solvers = plan.solvers;
  if (tracks.empty()) return v;
  v.largest_points = plan.mesh_points[v.largest];
  const Track& t = *tracks[v.largest];
  v.what = (tracks.size() > 1 ? "the largest mesh, of " + t.subject() + ", has "
                              : "the mesh of " + t.subject() + " has ") +
           std::to_string(v.largest_points) + " points (" + fixed(t.length_m(), 1) +
           " m at a step of " + format_number(t.mesh_m) + " m)" +
           (laps_kept > 1 ? ", with " + std::to_string(laps_kept) + " laps kept per track" : "") +
           ", " + std::to_string(plan.solvers) + (plan.solvers > 1 ? " laps" : " lap") +
           " solved at once";
  return v;
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
