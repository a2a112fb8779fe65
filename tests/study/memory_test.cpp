// The memory estimate (issue 19, finding 11; README, "Memory"): its bytes per mesh point are
// those the structures hold, so that a new channel cannot slip past it, and the point count is
// build_mesh's. Its accuracy on whole runs (within 10 % above the peak /usr/bin/time -v
// measures) is a measurement (README, "Memory"), not a timed test.
#include <doctest/doctest.h>

#include "lapwing/base/units.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/study/memory.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {
template <typename T>
std::size_t bytes(const std::vector<T>& v) {
  return v.size() * sizeof(T);
}
}  // namespace

TEST_CASE("the point count is the mesh's, known before the mesh is built") {
  for (double step : {0.01, 0.3, 0.5, 7.0}) {
    const Track t = test::circle_track(100.0, step);
    CHECK(mesh_point_count(t, step) == build_mesh(t, step).size());
  }
}

TEST_CASE("bytes per mesh point: every vector a mesh, a lap and a sweep hold is counted") {
  // Banked, climbing, in a wind: the mesh holds its bank, elevation and head wind (a flat track
  // in still air not).
  Track t = test::circle_track(200.0, 0.5);
  for (auto& g : t.segments) {
    g.bank_rad = 5 * units::deg;
    g.grade = 0.01;
  }
  t.wind = Wind{4.0, 0.0};
  const Mesh m = build_mesh(t, t.mesh_m);
  const double n = static_cast<double>(m.size());
  const std::size_t mesh = bytes(m.s_m) + bytes(m.x_m) + bytes(m.y_m) + bytes(m.heading_rad) +
                           bytes(m.curvature_1pm) + bytes(m.elevation_m) + bytes(m.grade) +
                           bytes(m.bank_rad) + bytes(m.head_wind_mps) + bytes(m.trim_zone);
  CHECK(static_cast<double>(mesh) / n == mesh_bytes_per_point);
  CHECK(m.width_left_m.empty());  // a track without widths: the edges hold nothing
  const Mesh flat = build_mesh(test::circle_track(200.0, 0.5), 0.5);
  CHECK((flat.bank_rad.empty() && flat.elevation_m.empty() && flat.grade.empty() &&
         flat.head_wind_mps.empty()));
  CHECK(flat.bank_rad.capacity() == 0);  // never laid out (or freed), not only emptied
  CHECK(flat.elevation_m.capacity() == 0);
  CHECK(flat.grade.capacity() == 0);
  CHECK(sizeof(Mesh) < 512);  // nothing else of the mesh's own: twelve vectors and three scalars

  const ConfiguredCar car = test::configured(test::plain_car());
  const Envelope env(car, make_air(AirSpec{}));
  auto lap_bytes = [](const Lap& l) {
    return bytes(l.speed_mps) + bytes(l.time_s) + bytes(l.long_accel_mps2) +
           bytes(l.lat_accel_mps2) + bytes(l.gear) + bytes(l.engine_radps) + bytes(l.drag_n) +
           bytes(l.downforce_n) + bytes(l.front_load_n) + bytes(l.rear_load_n) +
           bytes(l.aero_balance_eff) + bytes(l.front_usage) + bytes(l.rear_usage) + bytes(l.phase) +
           bytes(l.trimmed);
  };
  // A solver of its own for each, so that the speed-only lap holds no channel of another lap.
  LapSolver full, speed_only;
  CHECK(static_cast<double>(lap_bytes(full.solve(env, m))) / n == lap_bytes_per_point);
  CHECK(static_cast<double>(lap_bytes(speed_only.solve_speed(env, m))) / n ==
        speed_lap_bytes_per_point);

  // A solver's own state: its steady limits, its two sweeps and their second parts (a closed
  // lap's, forward_split and backward_split: each a sweep's buffers).
  const SteadyProfile& steady = full.steady();
  const std::vector<double>& limit = steady.speed_mps;
  auto sweep_bytes = [](const SweepResult& s) {
    return bytes(s.speed_mps) + bytes(s.cut) + bytes(s.gear);
  };
  const std::size_t state = bytes(steady.speed_mps) + bytes(steady.limit) +
                            sweep_bytes(sweep(env, m, Sweep::forward, limit, 0, 10)) +
                            sweep_bytes(sweep(env, m, Sweep::backward, limit, m.size() - 1, 10)) +
                            sweep_bytes(sweep(env, m, Sweep::forward, limit, 0, 10)) +
                            sweep_bytes(sweep(env, m, Sweep::backward, limit, m.size() - 1, 10));
  // And on a lap whose engine limit drops where the car comes to it faster: the sweeps' own
  // limits (a second steady profile) and a forward sweep within the tyres' limits.
  const std::size_t above_engine = bytes(steady.speed_mps) + bytes(steady.limit) +
                                   sweep_bytes(sweep(env, m, Sweep::forward, limit, 0, 10));
  CHECK(static_cast<double>(state + above_engine) / n == solver_bytes_per_point);
}

TEST_CASE("the estimate adds the parts: meshes, laps kept, solvers at the largest mesh") {
  MemoryPlan p;
  p.mesh_points = {1000, 3000};
  p.laps_kept = 2;
  p.channels = true;
  p.solvers = 2;
  // fixed + (1000 + 3000) (mesh + 2 laps) + 3000 (2 solvers' lap and sweeps + one delta trace)
  const double want = static_cast<double>(fixed_bytes) +
                      4000.0 * (mesh_bytes_per_point + 2 * lap_bytes_per_point) +
                      3000.0 * (2 * (lap_bytes_per_point + solver_bytes_per_point) + 8);
  CHECK(estimate_peak_bytes(p) == want);
  // The verdict's two smoothing variants: two more meshes at the largest.
  p.variant_meshes = 2;
  CHECK(estimate_peak_bytes(p) == want + 2 * 3000.0 * mesh_bytes_per_point);
  p.variant_meshes = 0;
  p.channels = false;
  CHECK(estimate_peak_bytes(p) < want);
}

TEST_CASE("a study's check against a limit: the plan of its tracks, and what makes the need") {
  // Two circles (points from mesh_point_count), two laps kept, channels, 4 threads over 3 jobs:
  // 3 solvers at the larger mesh; the verdict's variants counted for a fitted centerline alone.
  const Track a = test::circle_track(100.0, 0.5), b = test::circle_track(300.0, 0.5);
  const std::vector<const Track*> both{&a, &b};
  MemoryPlan p;
  p.mesh_points = {mesh_point_count(a, 0.5), mesh_point_count(b, 0.5)};
  p.laps_kept = 2;
  p.solvers = 3;
  const double need = estimate_peak_bytes(p);
  const MemoryVerdict under = check_memory(both, 2, true, 4, 3, true, need);
  CHECK(under.need == need);
  CHECK_FALSE(under.over);
  CHECK(under.largest == 1);
  CHECK(under.largest_points == p.mesh_points[1]);
  CHECK(under.solvers == 3);
  CHECK(under.what.rfind("the largest mesh, of " + b.subject() + ", has " +
                             std::to_string(p.mesh_points[1]) + " points",
                         0) == 0);
  CHECK(under.what.find("with 2 laps kept per track, 3 laps solved at once") != std::string::npos);
  CHECK(check_memory(both, 2, true, 4, 3, true, need * (1 - 1e-12)).over);
  // No limit known (0): never over.
  CHECK_FALSE(check_memory(both, 2, true, 4, 3, true, 0.0).over);
}

TEST_CASE("sizes read in decimal units, three figures") {
  CHECK(describe_bytes(6.5e9) == "6.50 GB");
  CHECK(describe_bytes(480e6) == "480 MB");
  CHECK(describe_bytes(12.34e3) == "12.3 kB");
  CHECK(describe_bytes(999) == "999 B");
  CHECK(machine_memory_bytes() > 0);  // sysconf reads it on Linux
}
