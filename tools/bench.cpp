// Benchmark (not a test): solve one lap of a track many times and report the cost per mesh
// point per lap, laps per second, and the envelope's build time on its own.
//   lapwing_bench CAR TRACK [CONFIG] [--laps N] [--mesh M] [--integrator rk4|exponential]
//   lapwing_bench CAR TRACK [CONFIG] --convergence : lap time against the mesh step for both
//     integrators, against RK4 on a 0.0625 m mesh
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/path/racing_line.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/min_time_line.hpp"
#include "lapwing/study/trade.hpp"

namespace {

// lapwing_bench --trade CAR CONFIG TRACK... : the trade study (sensitivities, the 9 x 9 grid,
// attributions) over all cores, timed end to end after loading.
int bench_trade(int argc, char** argv) {
  using namespace lapwing;
  using clock = std::chrono::steady_clock;
  if (argc < 5) {
    std::fprintf(stderr, "usage: lapwing_bench --trade CAR CONFIG TRACK...\n");
    return 2;
  }
  const Car car = load_car(argv[2]);
  const int ci = car.config_index(argv[3]);
  if (ci < 0) throw std::runtime_error(std::string("no config ") + argv[3]);
  std::vector<Circuit> circuits;
  for (int i = 4; i < argc; ++i) {
    const Track t = load_track(argv[i]);
    circuits.push_back(lay_out(t, make_air(t.air)));
  }
  const TradeOptions options;
  const std::size_t laps_per_track =
      car.configs.size() + 8 + static_cast<std::size_t>(options.grid_points * options.grid_points);
  const std::size_t laps = laps_per_track * circuits.size();
  std::vector<double> runs;
  for (int k = 0; k < 5; ++k) {
    const auto t0 = clock::now();
    const Trade t = trade(car, {static_cast<std::size_t>(ci)}, circuits, options, 0);
    runs.push_back(std::chrono::duration<double>(clock::now() - t0).count());
    if (t.sensitivities.empty()) return 1;
  }
  std::sort(runs.begin(), runs.end());
  std::printf(
      "trade: %zu tracks, %zu laps (%zu configs' own, 8 perturbed, %d x %d grid each), "
      "%u threads\n",
      circuits.size(), laps, car.configs.size(), options.grid_points, options.grid_points,
      std::max(1u, std::thread::hardware_concurrency()));
  std::printf("trade: fastest of 5 %.3f s (%.0f laps/s), median %.3f s\n", runs.front(),
              static_cast<double>(laps) / runs.front(), runs[2]);
  return 0;
}

// lapwing_bench --line CAR CONFIG TRACK... : the racing line of each track (its widths, a 2 m
// car with 0.5 m margins): the minimum-curvature solve (reference laid out, then the line) and
// the minimum-time refinement for CONFIG, each the fastest and the median of 5 runs.
int bench_line(int argc, char** argv) {
  using namespace lapwing;
  using clock = std::chrono::steady_clock;
  if (argc < 5) {
    std::fprintf(stderr, "usage: lapwing_bench --line CAR CONFIG TRACK...\n");
    return 2;
  }
  const Car car = load_car(argv[2]);
  const int ci = car.config_index(argv[3]);
  if (ci < 0) throw std::runtime_error(std::string("no config ") + argv[3]);
  const ConfiguredCar configured = car.configured(static_cast<std::size_t>(ci));
  auto stats = [](std::vector<double> v) {
    std::sort(v.begin(), v.end());
    return std::pair<double, double>{v.front(), v[v.size() / 2]};
  };
  for (int i = 4; i < argc; ++i) {
    Track t = load_track(argv[i]);
    t.line.reset();
    t.line_path.reset();
    const Air air = make_air(t.air);
    std::vector<double> mc, mt;
    int iterations = 0, passes = 0;
    std::size_t points = 0;
    double mc_lap = 0.0, mt_lap = 0.0;
    for (int k = 0; k < 5; ++k) {
      const auto t0 = clock::now();
      const LineReference ref = line_reference(t);
      const RacingLine line = min_curvature_line(ref, LineOptions{});
      mc.push_back(std::chrono::duration<double>(clock::now() - t0).count());
      iterations = line.iterations;
      points = ref.size();
      const auto t1 = clock::now();
      const MinTimeLine m = min_time_line(t, air, configured, LineSpec{});
      mt.push_back(std::chrono::duration<double>(clock::now() - t1).count());
      passes = m.passes;
      mc_lap = m.min_curvature_lap_s;
      mt_lap = m.lap_s;
    }
    const auto [mc_fast, mc_median] = stats(mc);
    const auto [mt_fast, mt_median] = stats(mt);
    std::printf(
        "line: %s, %.1f m, %zu points: min-curvature %.3f s (median %.3f s, %d linearisations, "
        "lap %.3f s); min-time %.3f s (median %.3f s, %d passes, lap %.3f s)\n",
        t.id.c_str(), t.length_m(), points, mc_fast, mc_median, iterations, mc_lap, mt_fast,
        mt_median, passes, mt_lap);
  }
  return 0;
}

// The lap time on meshes of 2 m to 0.125 m with each integrator, and its error relative to
// RK4's at 0.0625 m (the exponential step's own lap there too: the two must agree).
void convergence(const lapwing::Envelope& env, const lapwing::Track& track) {
  using namespace lapwing;
  const auto lap = [&](double mesh_m, Integrator integrator) {
    return solve_lap(env, build_mesh(track, mesh_m), track.start_speed_mps, integrator).lap_time_s;
  };
  const double ref = lap(0.0625, Integrator::rk4);
  std::printf("convergence: %s; reference RK4 at 0.0625 m %.9f s, exponential there %.9f s\n",
              track.name.c_str(), ref, lap(0.0625, Integrator::exponential));
  std::printf("%8s %14s %12s %14s %12s\n", "mesh_m", "rk4_s", "rk4_rel_err", "exp_s",
              "exp_rel_err");
  for (const double m : {2.0, 1.0, 0.5, 0.25, 0.125}) {
    const double a = lap(m, Integrator::rk4), b = lap(m, Integrator::exponential);
    std::printf("%8.4f %14.9f %12.3e %14.9f %12.3e\n", m, a, (a - ref) / ref, b, (b - ref) / ref);
  }
}

}  // namespace

int main(int argc, char** argv) {
  using namespace lapwing;
  using clock = std::chrono::steady_clock;
  if (argc >= 2 && (std::string(argv[1]) == "--trade" || std::string(argv[1]) == "--line")) {
    try {
      return std::string(argv[1]) == "--trade" ? bench_trade(argc, argv) : bench_line(argc, argv);
    } catch (const std::exception& e) {
      std::fprintf(stderr, "lapwing_bench: %s\n", e.what());
      return 1;
    }
  }
  if (argc < 3) {
    std::fprintf(stderr,
                 "usage: lapwing_bench CAR TRACK [CONFIG] [--laps N] [--mesh M] "
                 "[--model point-mass|axle] [--integrator rk4|exponential] [--convergence]\n");
    return 2;
  }
  std::string config;
  int laps = 200;
  double mesh_m = 0.5;
  std::string model;  // empty: the car file's model
  std::string integrator_name = default_integrator == Integrator::rk4 ? "rk4" : "exponential";
  bool convergence_table = false;
  for (int i = 3; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--laps" && i + 1 < argc)
      laps = std::atoi(argv[++i]);
    else if (a == "--mesh" && i + 1 < argc)
      mesh_m = std::atof(argv[++i]);
    else if (a == "--model" && i + 1 < argc)
      model = argv[++i];
    else if (a == "--integrator" && i + 1 < argc)
      integrator_name = argv[++i];
    else if (a == "--convergence")
      convergence_table = true;
    else
      config = a;
  }
  try {
    Car car = load_car(argv[1]);
    // As `lapwing run --model`: the plain script of the speed ratio (tools/plain-script-lap.py)
    // solves the point mass.
    if (model == "point-mass")
      car.model = VehicleModel::point_mass;
    else if (model == "axle")
      car.model = VehicleModel::axle;
    else if (!model.empty())
      throw std::runtime_error("--model: '" + model + "' is not one of point-mass | axle");
    if (integrator_name != "rk4" && integrator_name != "exponential")
      throw std::runtime_error("--integrator: '" + integrator_name +
                               "' is not one of rk4 | exponential");
    const Integrator integrator =
        integrator_name == "rk4" ? Integrator::rk4 : Integrator::exponential;
    const Track track = load_track(argv[2]);
    const int ci = config.empty() ? 0 : car.config_index(config);
    if (ci < 0) throw std::runtime_error("no config " + config);
    const ConfiguredCar configured = car.configured(static_cast<std::size_t>(ci));
    const Air air = make_air(track.air);
    if (convergence_table) {
      convergence(Envelope(configured, air), track);
      return 0;
    }
    const Mesh mesh = build_mesh(track, mesh_m);

    constexpr int envelope_builds = 50;
    auto t0 = clock::now();
    double sink = 0.0;
    for (int k = 0; k < envelope_builds; ++k) {
      const Envelope env(configured, air);
      sink += env.top_speed_level_mps();
    }
    const double envelope_s =
        std::chrono::duration<double>(clock::now() - t0).count() / envelope_builds;

    const Envelope env(configured, air);
    // One solver reused lap after lap, as a study does. The laps run in batches; the fastest
    // batch and the median batch are reported (a shared machine's noise only ever adds time).
    LapSolver solver(integrator);
    const Lap warm = solve_lap(env, mesh, track.start_speed_mps, integrator);
    constexpr int batches = 10;
    const int per_batch = std::max(1, laps / batches);
    // Seconds per lap of each batch of `lap()`, fastest first.
    const auto batched = [&](const auto& lap) {
      std::vector<double> per_lap_s;
      for (int b = 0; b < batches; ++b) {
        const auto start = clock::now();
        for (int k = 0; k < per_batch; ++k) sink += lap();
        per_lap_s.push_back(std::chrono::duration<double>(clock::now() - start).count() /
                            per_batch);
      }
      std::sort(per_lap_s.begin(), per_lap_s.end());
      return per_lap_s;
    };
    const std::vector<double> batch_s =
        batched([&] { return solver.solve(env, mesh, track.start_speed_mps).lap_time_s; });
    const double per_lap = batch_s.front(), median = batch_s[batch_s.size() / 2];
    // The same laps without the channels (loads, usage, forces): what a trade's laps cost.
    const std::vector<double> bare_s =
        batched([&] { return solver.solve_speed(env, mesh, track.start_speed_mps).lap_time_s; });
    // One lap on two threads (LapSolver::set_threads), as lapwing run solves it: the same lap.
    LapSolver two(integrator);
    two.set_threads(2);
    if (two.solve(env, mesh, track.start_speed_mps).lap_time_s != warm.lap_time_s)
      throw std::runtime_error("the lap on two threads differs from the lap on one");
    const std::vector<double> two_s =
        batched([&] { return two.solve(env, mesh, track.start_speed_mps).lap_time_s; });
    const std::vector<double> two_bare_s =
        batched([&] { return two.solve_speed(env, mesh, track.start_speed_mps).lap_time_s; });
    std::printf("track %s: %.1f m, %zu mesh points at %.3f m; config %s; %s; lap %.6f s\n",
                track.name.c_str(), mesh.length_m, mesh.size(), mesh.step_m,
                configured.aero().name.c_str(), integrator_name.c_str(), warm.lap_time_s);
    std::printf("envelope build: %.3f ms (mean of %d)\n", envelope_s * 1e3, envelope_builds);
    const double points = static_cast<double>(mesh.size());
    std::printf(
        "lap solve (fastest of %d batches of %d laps): %.3f ms per lap, %.1f laps/s, "
        "%.1f ns per mesh point per lap\n",
        batches, per_batch, per_lap * 1e3, 1.0 / per_lap, per_lap * 1e9 / points);
    std::printf("lap solve (median batch): %.3f ms per lap, %.1f ns per mesh point per lap\n",
                median * 1e3, median * 1e9 / points);
    std::printf(
        "lap time only, no channels (fastest / median batch): %.1f / %.1f ns per mesh "
        "point per lap\n",
        bare_s.front() * 1e9 / points, bare_s[bare_s.size() / 2] * 1e9 / points);
    std::printf(
        "one lap on 2 threads, with every channel / lap time only (fastest batch): %.1f / %.1f "
        "ns per mesh point per lap\n",
        two_s.front() * 1e9 / points, two_bare_s.front() * 1e9 / points);
    if (sink == 0.0) std::printf("\n");  // keeps the work observable
  } catch (const std::exception& e) {
    std::fprintf(stderr, "lapwing_bench: %s\n", e.what());
    return 1;
  }
  return 0;
}
