#include "commands.hpp"
#include "fit_module.hpp"

#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <cctype>
#include <chrono>
#include <cmath>
#include <csignal>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <optional>
#include <sstream>
#include <system_error>
#include <thread>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/base/hash.hpp"
#include "lapwing/base/named_value.hpp"
#include "lapwing/base/text.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/input_file.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/io/line_track.hpp"
#include "lapwing/io/log_file.hpp"
#include "lapwing/io/output.hpp"
#include "lapwing/io/track_data.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/model/aero.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/corners.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/path/racing_line.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/check_report.hpp"
#include "lapwing/report/compare_report.hpp"
#include "lapwing/report/correlate_report.hpp"
#include "lapwing/report/html_report.hpp"
#include "lapwing/report/lap_files.hpp"
#include "lapwing/report/lap_text.hpp"
#include "lapwing/report/text_table.hpp"
#include "lapwing/report/track_quality_text.hpp"
#include "lapwing/report/trade_report.hpp"
#include "lapwing/solve/axle.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"
#include "lapwing/store/sweep_store.hpp"
#include "lapwing/study/check_summary.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/compare.hpp"
#include "lapwing/study/correlate.hpp"
#include "lapwing/study/fit.hpp"
#include "lapwing/study/memory.hpp"
#include "lapwing/study/min_time_line.hpp"
#include "lapwing/study/sweep.hpp"
#include "lapwing/study/thread_pool.hpp"
#include "lapwing/study/track_quality.hpp"
#include "lapwing/study/trade.hpp"

namespace lapwing::cli {

namespace {

std::optional<double> option_value(const std::string& text, const char* option, Quantity q,
                                   Range r) {
  if (text.empty()) return std::nullopt;
  std::string error;
  const auto v = parse_named_value(text, option, q, r, error);
  if (!v) throw UsageError{error};
  return v;
}

// The air of a track's own values with the options' in their place. Where the options made it
// impossible (water vapour above the air's pressure), the options are named; an impossible air
// of the track file's own values is the file's error, at its place.
Air air_of(const AirSpec& track_air, const AirOverride& o) {
  try {
    return make_air(apply(track_air, o));
  } catch (const InvalidInput& e) {
    if (!(o.altitude_m || o.temperature_k || o.pressure_pa || o.humidity)) throw;
    throw UsageError{
        "the air the options --altitude, --temperature, --pressure and --humidity "
        "give (the track's own values for the rest): " +
        e.message()};
  }
}

// An option's rule broken (a log's columns and units): the option's error, not the log file's.
void require_options(const std::optional<Violation>& v) {
  if (!v) return;
  std::string option = v->field;
  std::replace(option.begin(), option.end(), '_', '-');
  throw UsageError{"--" + option + ": " + v->message()};
}

AirOverride parse_air(const AirOptions& o) {
  return {option_value(o.altitude, "--altitude", Quantity::length, AirSpec::altitude_range),
          option_value(o.temperature, "--temperature", Quantity::temperature,
                       AirSpec::temperature_range),
          option_value(o.pressure, "--pressure", Quantity::pressure, AirSpec::pressure_range),
          option_value(o.humidity, "--humidity", Quantity::fraction, AirSpec::humidity_range)};
}

// The files a command loads, and where each of their values stands: an error the library finds
// in them later (an InvalidInput: a start speed too high, a ride-height map that does not
// converge) is reported at its place in the file, as the loader's own errors are.
class Inputs {
 public:
  Car car(const std::string& file) {
    CarFile f = read_car_file(file);
    sources_.add(std::move(f.sources));
    return std::move(f.car);
  }
  // A track file read, as it is.
  Track track(const std::string& file) {
    TrackFile f = read_track_file(file);
    sources_.add(std::move(f.sources));
    return std::move(f.track);
  }
  // A track file read, in the air it is run in; laid out (its mesh built) later.
  struct Loaded {
    Track track;
    Air air;
  };
  Loaded load(const std::string& file, const AirOverride& air) {
    Track t = track(file);
    const Air a = air_of(t.air, air);
    return {std::move(t), a};
  }
  // Laid out with the mesh's positions where a command draws or writes them (a map, a trace,
  // a line), without them where it reads laps alone (MeshPositions).
  Circuit lay_out(const std::string& file, const AirOverride& air, MeshPositions positions) {
    const Loaded l = load(file, air);
    return lapwing::lay_out(l.track, l.air, positions);
  }
  std::vector<Loaded> load_all(const std::vector<std::string>& files, const AirOverride& air);
  std::vector<Circuit> lay_out_all(const std::vector<std::string>& files, const AirOverride& air,
                                   MeshPositions positions) {
    return lay_out_each(load_all(files, air), positions);
  }
  static std::vector<Circuit> lay_out_each(const std::vector<Loaded>& tracks,
                                           MeshPositions positions) {
    std::vector<Circuit> out;
    for (const Loaded& l : tracks) out.push_back(lapwing::lay_out(l.track, l.air, positions));
    return out;
  }
  InputError error(const InvalidInput& e) const { return sources_.error(e); }

 private:
  SourceMaps sources_;
};

// A command that writes files (--out DIR) draws the track's map and writes traces with
// positions; one that prints its table alone reads laps only.
MeshPositions positions_for(const std::string& out_dir) {
  return out_dir.empty() ? MeshPositions::left_out : MeshPositions::laid_out;
}

// Runs a command with its Inputs; an InvalidInput becomes the input error at its place.
template <typename Options>
int located(int (*command)(const Options&, Inputs&), const Options& o) {
  Inputs in;
  try {
    return command(o, in);
  } catch (const InvalidInput& e) {
    throw in.error(e);
  }
}

// An --out folder that holds an input of the command (a car written by fit, a track kept there)
// is refused as soon as the inputs are read, before the laps are solved; write_outputs would
// refuse it after.
void require_out_keeps_inputs(const std::string& out) {
  if (!out.empty()) require_no_input_inside(out);
}

std::vector<Inputs::Loaded> Inputs::load_all(const std::vector<std::string>& files,
                                             const AirOverride& air) {
  std::vector<Loaded> out;
  for (std::size_t i = 0; i < files.size(); ++i) {
    for (std::size_t j = 0; j < i; ++j)
      if (files[i] == files[j] || same_file(files[i], files[j]))
        throw UsageError{"--track " + files[i] + " is given twice"};
    out.push_back(load(files[i], air));
  }
  return out;
}

// --memory-limit: bytes, or a number with B, kB, MB, GB, TB (powers of 1000) or KiB, MiB, GiB,
// TiB (powers of 1024), a space between allowed.
double parse_memory_limit(const std::string& text) {
  std::size_t used = 0;
  double v = 0.0;
  try {
    v = std::stod(text, &used);
  } catch (const std::exception&) {
    used = 0;
  }
  std::string unit = text.substr(used);
  unit.erase(0, std::min(unit.find_first_not_of(' '), unit.size()));
  const std::pair<const char*, double> units[] = {{"", 1.0},
                                                  {"B", 1.0},
                                                  {"kB", 1e3},
                                                  {"MB", 1e6},
                                                  {"GB", 1e9},
                                                  {"TB", 1e12},
                                                  {"KiB", 1024.0},
                                                  {"MiB", 1048576.0},
                                                  {"GiB", 1073741824.0},
                                                  {"TiB", 1099511627776.0}};
  for (const auto& [name, scale] : units)
    if (used > 0 && unit == name && std::isfinite(v) && v > 0) return v * scale;
  throw UsageError{"--memory-limit: '" + text +
                   "' is not a size (a positive number of bytes, or with B, kB, MB, GB, TB, KiB, "
                   "MiB, GiB or TiB)"};
}

// Refuses, before any mesh is built or lap solved, a study whose estimated peak memory
// (study/memory.hpp) is over the limit: a usage error naming the largest mesh, the estimate and
// the limit. `verdict`: the data-quality verdict is made (its smoothing variants' meshes).
void require_memory(const std::string& option, const std::vector<Inputs::Loaded>& tracks,
                    std::size_t laps_kept, bool channels, unsigned threads, std::size_t jobs,
                    bool verdict) {
  const double limit = option.empty() ? machine_memory_bytes() / 2 : parse_memory_limit(option);
  if (!(limit > 0)) return;  // the machine's memory unknown: no default limit
  std::vector<const Track*> ts;
  for (const auto& t : tracks) ts.push_back(&t.track);
  const MemoryVerdict v = check_memory(ts, laps_kept, channels, threads, jobs, verdict, limit);
  if (!v.over) return;
  throw UsageError{"needs about " + describe_bytes(v.need) +
                   " of memory, more than --memory-limit " + describe_bytes(limit) +
                   (option.empty() ? " (half the machine's memory)" : "") + ": " + v.what +
                   "; give a coarser mesh, fewer configs or --threads, or a higher "
                   "--memory-limit"};
}

// Output file names, made from a track file's stem and config names: one function per kind, used
// both to check the names before any work (below) and to write the files.
std::string trace_file(const Circuit& t, const std::string& config) {
  return "trace-" + t.track.id + "-" + config + ".csv";
}
std::string delta_file(const Circuit& t, const std::string& a, const std::string& b) {
  return "delta-" + t.track.id + "-" + a + "-" + b + ".csv";
}
std::string grid_file(const Circuit& t) {
  return "trade-grid-" + t.track.id + ".csv";
}

// An output file's name and the inputs it is made from.
struct PlannedFile {
  std::string name, from;
};

// Names are unique by construction: two inputs that would give one output file the same name
// (tracks of the same file stem, "a/t.yaml" and "b/t.yaml"; config names joined by '-', "x" +
// "y-z" and "x-y" + "z") are a usage error naming both, found before anything is solved or
// written. Names that differ only in the case of their letters count as one: on a file system
// that ignores case (as those of two common desktop systems do) one file would replace the
// other once the folder is copied there (a helper's finding: t.yaml and T.yaml).
void require_unique(const std::vector<PlannedFile>& files) {
  const auto folded = [](std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
  };
  for (std::size_t i = 0; i < files.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (folded(files[i].name) == folded(files[j].name))
        throw UsageError{"two outputs would be named " + files[j].name +
                         (files[i].name == files[j].name ? ""
                                                         : " and " + files[i].name +
                                                               " (one name where case is not "
                                                               "told apart)") +
                         ": " + files[j].from + ", and " + files[i].from +
                         " (rename a track file or a config, or write them to separate --out "
                         "folders)"};
}

std::vector<PlannedFile> compare_files(const Car& car, const std::vector<std::size_t>& configs,
                                       const std::vector<Circuit>& circuits) {
  std::vector<PlannedFile> out;
  for (const Circuit& t : circuits) {
    const std::string track = "--track " + t.track.file;
    for (std::size_t a = 0; a < configs.size(); ++a) {
      const std::string& ca = car.configs[configs[a]].name;
      out.push_back({trace_file(t, ca), track + " with config " + ca});
      for (std::size_t b = a + 1; b < configs.size(); ++b) {
        const std::string& cb = car.configs[configs[b]].name;
        out.push_back({delta_file(t, ca, cb), track + " with configs " + ca + " and " + cb});
      }
    }
  }
  return out;
}

}  // namespace

namespace {
int check(const CheckOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  const Car car = in.car(o.car);
  const std::vector<Circuit> tracks = in.lay_out_all(o.tracks, air, MeshPositions::left_out);
  // The car's own figures in ISO 2533 sea-level air, or in the air the options give.
  const CheckSummary summary = check_summary(car, tracks, air_of(AirSpec{}, air));
  // Bad input a lap found is worded at its place in the file that gave it.
  const std::string out = check_text(car, tracks, summary,
                                     [&](const InvalidInput& e) { return in.error(e).message(); });
  if (!o.json.empty()) write_file_atomic(o.json, check_json(car, tracks, summary));
  std::cout << out;
  return 0;
}
}  // namespace

int check(const CheckOptions& o) {
  return located(&check, o);
}

void apply_model(const std::string& model, Car& car) {
  if (model.empty()) return;
  if (model == "point-mass")
    car.model = VehicleModel::point_mass;
  else if (model == "axle")
    car.model = VehicleModel::axle;
  else
    throw UsageError{"--model: '" + model + "' is not one of point-mass | axle"};
}

namespace {
int run(const RunOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  Car car = in.car(o.car);
  apply_model(o.model, car);
  const std::size_t ci = pick_config(car, o.config);
  // In a list of one from the start: the report takes a list, and a copy of a long mesh is not
  // free (README, "Memory").
  std::vector<Inputs::Loaded> loaded;
  loaded.push_back(in.load(o.track, air));
  require_out_keeps_inputs(o.out);
  require_memory(o.memory_limit, loaded, 0, true, 1, 1, true);
  std::vector<Circuit> circuits = Inputs::lay_out_each(loaded, positions_for(o.out));
  loaded.clear();
  const Circuit& t = circuits.front();
  const ConfiguredCar configured = car.configured(ci);
  LapRun r = run_lap(configured, t);
  // The data's verdict; a poor one is a warning with the lap's own.
  const TrackQuality quality = assess_track(t, smoothing_variants(t), configured,
                                            car.configs[ci].name, r.summary.lap_time_s);
  if (quality.verdict == Verdict::poor) r.summary.warnings.push_back(quality_warning(quality));
  const LapSummary s = r.summary;

  std::string out;
  out += "car     " + car.name + " (" + car.file + "), config " + s.config + ", " +
         (car.model == VehicleModel::axle ? "axle" : "point-mass") + " model\n";
  out += "track   " + t.track.name + " (" + t.track.file + "), " + fixed(t.mesh.length_m, 1) +
         " m, " + (t.track.closed ? "closed lap" : "open") + "\n";
  out += "air     " + air_text(t.air) + "\n";
  if (t.track.profile)
    for (const auto& n : t.track.profile->notes) out += "note    " + n + "\n";
  if (t.track.profile && t.track.profile->source == PathProfile::Source::centerline)
    out += "smoothing " + smoothing_text(*t.track.profile) + "\n";
  if (t.track.line_path) out += line_text(t.track) + "\n";
  out += quality_line(quality) + "\n";
  for (const auto& n : quality.notes) out += "note    " + n + "\n";
  out += "\n";
  out += lap_table(s);

  if (!o.out.empty()) {
    // The single-lap page: the comparison report of one config on one track.
    const Comparison one = single_lap_comparison(ci, std::move(r), t);
    const Lap& lap = one.tracks.front().entries.front().run.lap;
    const std::vector<TrackQuality> qualities{quality};
    std::vector<OutputFile> files;
    files.push_back({"summary.json", summary_json(car.name, {s}, qualities)});
    files.push_back({trace_file(t, s.config), {}, [&](const OutputSink& sink) {
                       trace_csv(lap, t.mesh, sink);
                     }});
    files.push_back({"corners.csv", corners_csv({s})});
    files.push_back(
        {"report.html",
         html_report({&car, &circuits, &one, nullptr,
                      "run, config " + s.config + ", " +
                          (car.model == VehicleModel::axle ? "axle" : "point-mass") + " model",
                      &qualities})});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}
}  // namespace

int run(const RunOptions& o) {
  return located(&run, o);
}

namespace {
std::vector<std::size_t> pick_configs(const Car& car, const std::vector<std::string>& names) {
  std::vector<std::size_t> out;
  if (names.empty())
    for (std::size_t i = 0; i < car.configs.size(); ++i) out.push_back(i);
  for (const auto& n : names) {
    const std::size_t i = pick_config(car, n);
    if (std::find(out.begin(), out.end(), i) != out.end())
      throw UsageError{"--config " + n + " is given twice"};
    out.push_back(i);
  }
  return out;
}

double parse_fraction_option(const std::string& text, const char* option, Range r) {
  auto v = option_value(text, option, Quantity::fraction, r);
  return *v;
}

int compare(const CompareOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  Car car = in.car(o.car);
  apply_model(o.model, car);
  const std::vector<std::size_t> configs = pick_configs(car, o.configs);
  std::vector<Inputs::Loaded> loaded = in.load_all(o.tracks, air);
  require_out_keeps_inputs(o.out);
  // The verdicts (with --out) lay a fitted centerline out twice more.
  require_memory(o.memory_limit, loaded, configs.size(), true, o.threads,
                 loaded.size() * configs.size(), !o.out.empty());
  const std::vector<Circuit> circuits = Inputs::lay_out_each(loaded, positions_for(o.out));
  loaded.clear();
  if (!o.out.empty()) require_unique(compare_files(car, configs, circuits));
  const Comparison c = lapwing::compare(car, configs, circuits, o.threads);
  const std::string out = compare_table(car, c, circuits);
  if (!o.out.empty()) {
    // The data's verdicts, per track and config (summary.json, the report).
    std::vector<TrackQuality> qualities;
    for (std::size_t t = 0; t < c.tracks.size(); ++t) {
      const SmoothingVariants variants = smoothing_variants(circuits[t]);
      for (std::size_t k = 0; k < configs.size(); ++k)
        qualities.push_back(assess_track(circuits[t], variants, car.configured(configs[k]),
                                         car.configs[configs[k]].name,
                                         c.tracks[t].entries[k].run.summary.lap_time_s));
    }
    std::vector<OutputFile> files;
    std::vector<LapSummary> all;
    for (std::size_t t = 0; t < c.tracks.size(); ++t) {
      const auto& entries = c.tracks[t].entries;
      for (const auto& e : entries) {
        all.push_back(e.run.summary);
        files.push_back({trace_file(circuits[t], e.run.summary.config),
                         {},
                         [&e, &m = circuits[t].mesh](const OutputSink& sink) {
                           trace_csv(e.run.lap, m, sink);
                         }});
      }
      for (std::size_t a = 0; a < entries.size(); ++a)
        for (std::size_t b = a + 1; b < entries.size(); ++b)
          // The delta trace is made as its file is written, and freed after it.
          files.push_back(
              {delta_file(circuits[t], entries[a].run.summary.config,
                          entries[b].run.summary.config),
               {},
               [&ea = entries[a], &eb = entries[b], &m = circuits[t].mesh](const OutputSink& sink) {
                 delta_csv(m, delta_trace(ea.run.lap, eb.run.lap), sink);
               }});
    }
    files.push_back({"summary.json", summary_json(car.name, all, qualities)});
    files.push_back({"corners.csv", corners_csv(all)});
    files.push_back({"compare.json", compare_json(car, c, circuits)});
    files.push_back(
        {"report.html", html_report({&car, &circuits, &c, nullptr, "compare", &qualities})});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}

int trade(const TradeOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  lapwing::TradeOptions options;
  options.step = parse_fraction_option(o.step, "--step", lapwing::TradeOptions::step_range);
  options.grid_span =
      parse_fraction_option(o.span, "--span", lapwing::TradeOptions::grid_span_range);
  options.grid_points = o.grid;
  Car car = in.car(o.car);
  apply_model(o.model, car);
  std::vector<std::size_t> configs;
  if (o.config.empty())
    for (std::size_t i = 0; i < car.configs.size(); ++i) configs.push_back(i);
  else
    configs.push_back(pick_config(car, o.config));
  std::vector<Inputs::Loaded> loaded = in.load_all(o.tracks, air);
  require_out_keeps_inputs(o.out);
  // Speed and time only; no lap kept; many laps per track (the differences and the grid).
  require_memory(o.memory_limit, loaded, 0, false, o.threads, std::size_t{1} << 20, false);
  const std::vector<Circuit> circuits = Inputs::lay_out_each(loaded, positions_for(o.out));
  loaded.clear();
  if (!o.out.empty()) {
    std::vector<PlannedFile> planned;
    for (const Circuit& c : circuits) planned.push_back({grid_file(c), "--track " + c.track.file});
    require_unique(planned);
  }
  const Trade t = lapwing::trade(car, configs, circuits, options, o.threads);
  const std::string out = trade_table(car, t, circuits);
  if (!o.out.empty()) {
    std::vector<OutputFile> files{{"trade.json", trade_json(car, t, circuits)}};
    for (const auto& g : t.grids)
      files.push_back({grid_file(circuits[g.track]), trade_grid_csv(g)});
    files.push_back(
        {"report.html", html_report({&car, &circuits, nullptr, &t,
                                     "trade, steps of " + fixed(100 * options.step, 1) + " %"})});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}

// --- sweep -------------------------------------------------------------------------------------

std::atomic<bool> sweep_interrupted{false};
extern "C" void on_sigint(int) {
  sweep_interrupted.store(true);
}

std::string read_bytes(const std::string& file) {
  std::ifstream in(file, std::ios::binary);
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

// A point's car refused by the car file's rules, said as the set (or the point's values) that
// made it: "--set mass=500kg:700kg:3: value 500 kg: ... (mass)".
UsageError point_error(const SweepPlan& plan, const std::vector<std::string>& paths,
                       std::size_t point, const std::string& k, const std::string& message) {
  for (std::size_t s = 0; s < paths.size(); ++s) {
    const std::string& p = paths[s];
    if (k == p || k.rfind(p + ".", 0) == 0 || k.rfind(p + "[", 0) == 0)
      return UsageError{"--set " + plan.sets()[s].text + ": at " + plan.value(point, s).text +
                        ": " + message + " (" + k + ")"};
  }
  std::string values;
  for (std::size_t s = 0; s < paths.size(); ++s)
    values += (values.empty() ? "" : ", ") + plan.sets()[s].key + " = " + plan.value(point, s).text;
  return UsageError{"--set: the point " + values + ": " + message +
                    (k.empty() ? "" : " (" + k + ")")};
}
UsageError point_error(const SweepPlan& plan, const std::vector<std::string>& paths,
                       std::size_t point, const InputError& e) {
  return point_error(plan, paths, point, e.key_path(), e.message());
}

int sweep(const SweepOptions& o, Inputs& in) {
  if (o.car.empty()) throw UsageError{"sweep: --car is required"};
  if (o.tracks.empty()) throw UsageError{"sweep: --track is required"};
  if (o.sets.empty()) throw UsageError{"sweep: give at least one --set KEY=VALUES"};
  if (o.out.empty()) throw UsageError{"sweep: --out FILE.sqlite is required"};
  const AirOverride air = parse_air(o.air);
  // A bad --set, --design or --shard is a usage error ("lapwing: error: --shard 0/2: ..."),
  // as every other option's; the parsers name the option and its text as the subject.
  const auto option_error = [](const InvalidInput& e) {
    const std::string& key = e.violation().field;
    return UsageError{e.subject() + ": " + e.message() + (key.empty() ? "" : " (" + key + ")")};
  };
  std::vector<SweepSet> sets;
  SweepDesign design;
  Shard shard;
  SweepPlan plan;
  try {
    for (const auto& text : o.sets) sets.push_back(parse_set(text));
    design = parse_design(o.design);
    shard = parse_shard(o.shard);
    plan = SweepPlan(sets, design);
  } catch (const InvalidInput& e) {
    throw option_error(e);
  }

  // The car file as a document: each point sets its values there and is read like a car file.
  const Document doc = load_document(o.car);
  Car base = in.car(o.car);
  apply_model(o.model, base);
  std::vector<std::string> paths;
  std::vector<std::string> configs = o.configs;
  for (const auto& s : plan.sets()) {
    paths.push_back(car_key_path(doc, s.key));
    const std::string fam = "aero.families." + s.key + ".at";
    // Without --config, a swept family's config is what is run.
    if (o.configs.empty() && paths.back() == fam) configs.push_back(s.key);
  }
  if (configs.empty()) configs.push_back(base.configs.front().name);
  for (const auto& c : configs) pick_config(base, c);
  for (std::size_t i = 0; i < configs.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (configs[i] == configs[j]) throw UsageError{"--config " + configs[i] + " is given twice"};
  const std::vector<Circuit> circuits = in.lay_out_all(o.tracks, air, MeshPositions::left_out);
  // A set of a config's key where that config is not run, nor blended into a family that is:
  // its values change nothing the sweep laps, and every point's rows come out alike (a helper's
  // finding: --set aero.configs.medium.cla without --config medium lapped the first config).
  std::vector<std::string> idle_sets;
  const Node* aero_node = doc.root.find("aero");
  const Node* families = aero_node ? aero_node->find("families") : nullptr;
  for (std::size_t s = 0; s < paths.size(); ++s) {
    const std::string prefix = "aero.configs.";
    if (paths[s].rfind(prefix, 0) != 0) continue;
    const std::size_t dot = paths[s].find('.', prefix.size());
    const std::string name = paths[s].substr(prefix.size(), dot - prefix.size());
    bool used = std::find(configs.begin(), configs.end(), name) != configs.end();
    for (const std::string& c : configs) {
      const Node* family = families ? families->find(c) : nullptr;
      const Node* list = family ? family->find("configs") : nullptr;
      if (list)
        for (const Node& item : list->items) used = used || item.scalar == name;
    }
    if (!used) {
      std::string run;
      for (const std::string& c : configs) run += (run.empty() ? "" : ", ") + c;
      idle_sets.push_back("--set " + plan.sets()[s].text + " changes config " + name +
                          ", which this sweep does not run (configs: " + run +
                          "): every point's laps are alike; give --config " + name);
    }
  }

  const auto car_at = [&](std::size_t point) {
    auto d = std::make_shared<Document>(doc);
    for (std::size_t s = 0; s < paths.size(); ++s)
      set_car_value(*d, paths[s], plan.value(point, s).text);
    Car car = read_car_document(std::shared_ptr<const Document>(std::move(d))).car;
    apply_model(o.model, car);
    return car;
  };
  // Every point of the shard is read and checked before any lap is run.
  std::vector<std::size_t> mine;
  for (std::size_t p = 0; p < plan.points(); ++p)
    if (shard.contains(p)) mine.push_back(p);
  parallel_for(mine.size(), o.threads, [&](std::size_t i, LapSolver&) {
    try {
      const Car car = car_at(mine[i]);
      for (const auto& c : configs)
        if (car.config_index(c) < 0) throw InputError(o.car, Mark{}, "no config named '" + c + "'");
    } catch (const InputError& e) {
      throw point_error(plan, paths, mine[i], e);
    }
  });

  StudyRecord study;
  study.version = version();
  study.command = o.command;
  study.design = design.text();
  study.shard = shard.text();
  study.points = plan.points();
  std::string identity = "lapwing " + study.version + "\n";
  const std::string car_bytes = read_bytes(o.car);
  study.inputs.push_back({"car", o.car, hex64(fnv1a64(car_bytes))});
  identity += "car " + study.inputs.back().fnv1a64 + "\n";
  for (std::size_t t = 0; t < circuits.size(); ++t) {
    study.inputs.push_back({"track", o.tracks[t], hex64(fnv1a64(read_bytes(o.tracks[t])))});
    identity += "track " + study.inputs.back().fnv1a64 + "\n";
    // A track's data (centerline or curvature CSV) is an input too: a changed file is another
    // study.
    if (const auto& p = circuits[t].track.profile; p && !p->data_file.empty()) {
      study.inputs.push_back(
          {"track-data", p->data_file, hex64(fnv1a64(read_bytes(p->data_file)))});
      identity += "track-data " + study.inputs.back().fnv1a64 + "\n";
    }
    study.tracks.push_back(circuits[t].track.id);
  }
  study.configs = configs;
  for (const auto& c : configs) identity += "config " + c + "\n";
  for (const auto& s : plan.sets()) identity += "set " + s.text + "\n";
  identity += "design " + design.text() + "\nmodel " + o.model + "\nair " + o.air.altitude + "|" +
              o.air.temperature + "|" + o.air.pressure + "|" + o.air.humidity + "\n";
  study.study_id = hex64(fnv1a64(identity));
  for (std::size_t t = 0; t < study.tracks.size(); ++t)
    for (std::size_t j = 0; j < t; ++j)
      if (study.tracks[t] == study.tracks[j])
        throw UsageError{"--track: two tracks share the name '" + study.tracks[t] +
                         "' (the results name tracks by file name)"};

  std::optional<SweepStore> store;
  store.emplace(o.out, study, plan);
  lapwing::SweepOptions run;
  run.shard = shard;
  run.threads = o.threads;
  run.stop = &sweep_interrupted;
  const bool terminal = isatty(STDERR_FILENO);
  if (terminal)
    run.progress = [](const SweepProgress& p) {
      const double rate = p.elapsed_s > 0 ? p.laps / p.elapsed_s : 0.0;
      const double left =
          p.done ? p.elapsed_s * static_cast<double>(p.total - p.done) / p.done : 0.0;
      std::cerr << "\r" << p.done << "/" << p.total << " points   " << fixed(rate, 1)
                << " laps/s   " << fixed(left, 0) << " s left   " << std::flush;
    };
  sweep_interrupted.store(false);
  const auto previous = std::signal(SIGINT, on_sigint);
  const auto start = std::chrono::steady_clock::now();
  SweepOutcome r;
  try {
    r = run_sweep(plan, circuits, configs, car_at, *store, run);
  } catch (const SweepPointInvalid& e) {
    // A point's car refused where its laps are set up (its Envelope: a rule the air or the
    // speed range breaks), said as the set that made it, as a refusal of the point's car file
    // is before any lap. A store this run made goes, as no output is made from a refused input;
    // a resumed one keeps the points it held and those done before the refused one.
    std::signal(SIGINT, previous);
    const bool made = store->created();
    store.reset();
    if (made) {
      std::error_code ec;
      std::filesystem::remove(o.out, ec);
    }
    throw point_error(plan, paths, e.point(), e.violation().field, e.message());
  } catch (...) {
    std::signal(SIGINT, previous);
    throw;
  }
  std::signal(SIGINT, previous);
  const double secs =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  if (terminal) std::cerr << "\n";

  std::cout << "study   " << study.study_id << ", " << plan.points() << " points x "
            << circuits.size() << " tracks x " << configs.size() << " configs, design "
            << design.text() << (shard.n > 1 ? ", shard " + shard.text() : "") << "\n"
            << "laps    " << r.laps << " in " << fixed(secs, 1) << " s ("
            << fixed(secs > 0 ? static_cast<double>(r.laps) / secs : 0.0, 1) << " laps/s); points "
            << r.run << " run, " << r.skipped << " already in " << o.out << "\n";
  // The tracks' own warnings (a closure gap, a dropout in the data), once each: every lap on
  // such a track carries the fault, and the rows do not repeat them.
  for (const Circuit& c : circuits)
    for (const std::string& w : track_warnings(c.track))
      std::cout << "warning: " << c.track.name << ": " << w << "\n";
  for (const std::string& w : idle_sets) std::cout << "warning: " << w << "\n";
  const StoreCounts counts = store_counts(o.out);
  if (counts.not_ok)
    std::cout << "note    " << counts.not_ok
              << " laps cannot complete their track (status cannot-move in the laps table)\n";
  if (counts.warned)
    std::cout << "warning: " << counts.warned << " of " << counts.rows
              << " laps carry a warning, as run gives it (a table's rows left behind, an axle "
                 "at its lift limit): their message in the laps table\n";
  std::vector<std::string> header{"track", "config", "lap s"};
  for (const auto& s : plan.sets()) header.push_back(s.key + (s.unit.empty() ? "" : " " + s.unit));
  header.push_back("point");
  const auto best_table = [&](const std::vector<BestPoint>& best) {
    std::vector<std::vector<std::string>> rows;
    for (const BestPoint& b : best) {
      std::vector<std::string> row{b.track, b.config, fixed(b.lap_time_s, 3)};
      for (const auto& v : b.values) row.push_back(v.second);
      row.push_back(std::to_string(b.point));
      rows.push_back(row);
    }
    return text_table(header, rows);
  };
  const std::vector<BestPoint> best = best_points(o.out);
  std::cout << "\nbest point per track (" << o.out << ")\n" << best_table(best);
  // A track none of whose laps completes has no row: said, not left out in silence.
  for (const auto& t : study.tracks)
    if (std::none_of(best.begin(), best.end(), [&](const BestPoint& b) { return b.track == t; }))
      std::cout << t << ": no stored lap completes the track (status cannot-move)\n";
  // The fastest point whose lap keeps the front share inside the car's balance window: the best
  // overall may be one the driver would not accept (README, "Sweep").
  if (const auto& w = base.balance_window) {
    const std::vector<BestPoint> inside = best_points_in_window(o.out);
    std::cout << "\nbest point per track inside the balance window (" << window_text(*w) << ")\n"
              << best_table(inside);
    const std::vector<BestPoint> reaching = best_points_reaching_window(o.out);
    const auto has = [](const std::vector<BestPoint>& v, const std::string& t) {
      return std::any_of(v.begin(), v.end(), [&](const BestPoint& b) { return b.track == t; });
    };
    // A lap that never runs where the window applies is not outside it (summary.json's "not
    // reached"): said as such.
    for (const auto& t : study.tracks)
      if (!has(inside, t))
        std::cout << t
                  << (has(reaching, t) ? ": no point's lap stays inside the window\n"
                                       : ": no point's lap reaches the window (not reached)\n");
  }
  if (r.stopped) {
    std::cout << "stopped: " << r.run << " of " << (r.in_shard - r.skipped)
              << " points done and committed; run the same command again to resume\n";
    return 130;
  }
  return 0;
}
}  // namespace

int compare(const CompareOptions& o) {
  return located(&compare, o);
}

int trade(const TradeOptions& o) {
  return located(&trade, o);
}

int sweep(const SweepOptions& o) {
  return located(&sweep, o);
}

int sweep_merge(const SweepMergeOptions& o) {
  if (o.out.empty())
    throw UsageError{"sweep merge: OUT is empty: give the results store to write (or add to)"};
  // A store given twice would be read twice: refused before anything is opened. (OUT given among
  // the inputs is refused as any output that is an input: io/output.hpp, require_not_input.)
  for (std::size_t i = 0; i < o.inputs.size(); ++i) {
    for (std::size_t j = 0; j < i; ++j)
      if (same_file(o.inputs[i], o.inputs[j]))
        throw UsageError{"sweep merge: " + o.inputs[i] + " is given twice (as " + o.inputs[j] +
                         ")"};
  }
  merge_stores(o.out, o.inputs);
  const StoreCounts c = store_counts(o.out);
  std::cout << "merged  " << o.inputs.size() << " files into " << o.out << ": " << c.rows << " of "
            << c.expected << " laps of the study"
            << (c.rows == c.expected ? " (complete)"
                                     : " (incomplete: run the missing shards, then merge them in)")
            << "\n";
  return 0;
}

int sweep_export(const SweepExportOptions& o) {
  if (o.csv.empty()) throw UsageError{"sweep export: --csv OUT.csv is required"};
  // An OUT.csv that is the store read is refused by the writer (require_not_input).
  export_csv(o.file, o.csv);
  std::cout << "wrote   " << o.csv << "\n";
  return 0;
}

}  // namespace lapwing::cli

namespace lapwing::cli {

int track_from_log(const FromLogOptions& o) {
  if (o.distance.empty() == o.time.empty())
    throw UsageError{"give one of --distance COL and --time COL"};
  // The curvature comes from one channel: two given would leave one unread without a word.
  if (o.lat_accel.empty() == o.yaw_rate.empty())
    throw UsageError{"give one of --lat-accel COL and --yaw-rate COL"};
  const std::filesystem::path out(o.out);
  if (out.extension() != ".yaml") throw UsageError{"--out must name a .yaml track file"};
  LogOptions l;
  l.log = o.log;
  l.speed = o.speed;
  l.lat_accel = o.lat_accel;
  l.yaw_rate = o.yaw_rate;
  l.distance = o.distance;
  l.time = o.time;
  l.speed_unit = o.speed_unit;
  l.accel_unit = o.accel_unit;
  l.yaw_unit = o.yaw_unit;
  l.closed = o.closed;
  l.name = o.name;
  if (o.smoothing != "auto")
    l.smoothing_m =
        *option_value(o.smoothing, "--smoothing", Quantity::length, LogOptions::smoothing_range);
  const AirOverride air = parse_air(o.air);
  l.air = apply(AirSpec{}, air);
  (void)air_of(AirSpec{}, air);   // air no air can be: the options' error
  require_options(l.validate());  // a unit or column option: the option's error
  const std::string csv_name = out.stem().string() + ".csv";
  const LogTrack t = lapwing::track_from_log(l, csv_name);
  const std::filesystem::path dir = out.parent_path().empty() ? "." : out.parent_path();
  // The data first, the track file that names it last: a track file never names a missing CSV.
  write_files_atomic(dir, {{csv_name, t.csv}, {out.filename().string(), t.yaml}});
  std::cout << "track   " << o.out << " and " << (dir / csv_name).string() << "\n"
            << "length  " << fixed(t.length_m, 1) << " m"
            << (o.closed
                    ? ", closure spread along the lap: heading " + fixed(t.closure_heading_deg, 2) +
                          " deg, position " + fixed(t.closure_gap_m, 1) + " m"
                    : ", start speed " + fixed(units::to_kph(t.start_speed_mps), 1) +
                          " km/h (the log's first)")
            << ", peak lateral acceleration " << fixed(t.peak_lateral_g, 2) << " g\n"
            << "filter  " << fixed(t.smoothing_m, 1) << " m"
            << (t.smoothing.automatic
                    ? std::string(" (auto: ") +
                          (t.smoothing.at_lower_bound ? "the shortest length searched, 2 row "
                                                        "spacings: the log shows no noise GCV "
                                                        "can tell from the path"
                           : t.smoothing.at_upper_bound
                               ? "the longest length searched: the log looks like noise"
                               : "GCV's minimum on the rows, " +
                                     fixed(t.smoothing.chosen_at_spacing_m, 2) + " m apart") +
                          ")"
                    : std::string(" (given)"))
            << "\n";
  // The spacing of the log's rows, which the track's data-quality verdict judges: the track is
  // resampled every 0.5 m, but draws no more than its rows (README, "Tracks from data").
  const Verdict by_spacing = verdict_of(t.row_spacing_m, std::nullopt);
  std::cout << "rows    " << fixed(t.row_spacing_m, 1) << " m apart (median): data-quality verdict "
            << verdict_name(by_spacing) << " by its spacing\n";
  if (by_spacing == Verdict::poor)
    std::cout << "warning: the log's rows are more than " << fixed(quality_usable_spacing_m, 0)
              << " m apart: they cannot draw a hairpin, and the track rounds its tight corners "
                 "(it laps fast); log at 10 Hz or more\n";
  for (const auto& n : t.notes) std::cout << "note    " << n << "\n";
  for (const auto& w : t.warnings) std::cout << "warning: " << w << "\n";
  return 0;
}

namespace {
int track_line(const TrackLineOptions& o, Inputs& in) {
  const std::filesystem::path out(o.out);
  if (out.extension() != ".yaml") throw UsageError{"--out must name a .yaml track file"};
  if (o.method != "min-curvature" && o.method != "min-time")
    throw UsageError{"--method: '" + o.method + "' is not one of min-curvature | min-time"};
  const bool min_time = o.method == "min-time";
  if (min_time && o.car.empty())
    throw UsageError{"--method min-time needs --car: the minimum-time line depends on the car"};
  if (!o.config.empty() && o.car.empty()) throw UsageError{"--config needs --car"};
  const AirOverride air = parse_air(o.air);
  const Track track = in.track(o.track);
  std::optional<Car> car;
  if (!o.car.empty()) car = in.car(o.car);
  // The files it writes (OUT.yaml and OUT.csv beside it) must not replace the track, its data or
  // the car: refused before the line is solved (the writer would refuse them after).
  const std::filesystem::path dir = out.parent_path().empty() ? "." : out.parent_path();
  const std::string csv_name = out.stem().string() + ".csv";
  require_not_input(out);
  require_not_input(dir / csv_name);
  LineSpec spec = track.line.value_or(LineSpec{});
  if (const auto w = option_value(o.vehicle_width, "--vehicle-width", Quantity::length,
                                  LineSpec::vehicle_width_range))
    spec.vehicle_width_m = *w;
  if (const auto m = option_value(o.margin, "--margin", Quantity::length, LineSpec::margin_range))
    spec.margin_m = *m;
  spec.method = min_time ? LineSpec::Method::min_time : LineSpec::Method::min_curvature;
  const AirSpec air_spec = apply(track.air, air);
  const Air a = air_of(track.air, air);
  // The line is laid over the described path (a line: key of the source is replaced).
  Track described = track;
  described.line.reset();
  described.line_path.reset();
  const std::size_t ci = car ? pick_config(*car, o.config) : 0;
  std::optional<ConfiguredCar> configured;
  if (car) configured.emplace(*car, ci);

  // A track without widths, or too narrow for the vehicle and its margins: an InvalidInput of
  // the track's "line" key (at the line: key, else the file as a whole). Too narrow for the
  // width or margin the options gave: the options' usage error, naming the narrowest point.
  if (!o.vehicle_width.empty() || !o.margin.empty()) {
    const LineReference ref = line_reference(described);
    const std::size_t i = ref.narrowest();
    const double room = spec.vehicle_width_m + 2.0 * spec.margin_m;
    if (ref.width_m(i) < room) {
      const std::string given = !o.vehicle_width.empty() && !o.margin.empty()
                                    ? "--vehicle-width and --margin"
                                : !o.vehicle_width.empty() ? "--vehicle-width"
                                                           : "--margin";
      throw UsageError{given + ": a vehicle " + fixed(spec.vehicle_width_m, 2) +
                       " m wide with a margin of " + fixed(spec.margin_m, 2) +
                       " m each side needs " + fixed(room, 2) + " m, and " + o.track + " is " +
                       fixed(ref.width_m(i), 2) + " m wide at " + fixed(ref.s_m[i], 1) +
                       " m, its narrowest"};
    }
  }
  PathProfile line;
  std::optional<double> centerline_lap, min_curvature_lap, line_lap;
  int passes = 0;
  if (min_time) {
    const MinTimeLine m = min_time_line(described, a, *configured, spec);
    line = m.line;
    min_curvature_lap = m.min_curvature_lap_s;
    line_lap = m.lap_s;
    passes = m.passes;
  } else {
    const LineReference ref = line_reference(described);
    lapwing::LineOptions lo;
    lo.vehicle_width_m = spec.vehicle_width_m;
    lo.margin_m = spec.margin_m;
    line = line_profile(ref, min_curvature_line(ref, lo));
  }
  Track lined = described;
  lined.line_path = line;
  // The source's data-quality verdict: printed, and carried into the track written (its
  // `source_verdict`), which reads no better: the line's own points are 1 m apart and clean.
  // With a car, the full verdict (the lap spread between half and double smoothing); without,
  // the data's spacing alone.
  TrackQuality source_quality;
  {
    const Circuit source = lapwing::lay_out(described, a);
    if (configured) {
      LapSolver solver;  // the lap times alone: no channel is read here
      solver.set_threads(lone_lap_threads());
      centerline_lap = lap_time(*configured, source, solver);
      if (!line_lap) line_lap = lap_time(*configured, lapwing::lay_out(lined, a), solver);
      source_quality = assess_track(source, smoothing_variants(source), *configured,
                                    car->configs[ci].name, *centerline_lap);
    } else {
      source_quality = assess_track_data(source);
      if (!source_quality.segments && source_quality.source != PathProfile::Source::curvature)
        source_quality.notes.push_back(
            "no --car: the source's verdict is by its spacing alone (the lap spread between "
            "half and double smoothing needs a car)");
    }
  }
  const LineTrackFiles files =
      line_track_files(described, line, air_spec, o.method, spec, csv_name,
                       SourceQuality{std::string(verdict_name(source_quality.verdict)),
                                     quality_line(source_quality)});
  // The line's file is a centerline, which needs 10 points to be read back (a line is laid a
  // point a metre or so): a track too short for that would be written and then refused.
  const auto rows = static_cast<std::size_t>(std::count(files.csv.begin(), files.csv.end(), '\n'));
  if (rows < 1 + min_centerline_points)
    throw UsageError{"track line: the line over " + fixed(described.length_m(), 1) +
                     " m of track has " + std::to_string(rows > 0 ? rows - 1 : 0) +
                     " points, and a centerline track needs at least " +
                     std::to_string(min_centerline_points) + ": a line needs a longer track"};
  // Beside other tracks: file by file, the data first, the track file that names it last.
  write_files_atomic(dir, {{csv_name, files.csv}, {out.filename().string(), files.yaml}});

  std::size_t widest = 0;
  for (std::size_t i = 0; i < line.offset_m.size(); ++i)
    if (std::abs(line.offset_m[i]) > std::abs(line.offset_m[widest])) widest = i;
  std::string text = "track   " + o.out + " and " + (dir / csv_name).string() + "\n";
  text += "source  " + quality_line(source_quality) + "\n";
  // The source's own notes (as run prints them): a narrowing the widths' smoothing widened
  // bounds the line here.
  if (described.profile)
    for (const auto& n : described.profile->notes) text += "note    " + n + "\n";
  for (const auto& n : source_quality.notes) text += "note    " + n + "\n";
  // The source's doubts are the line's too: it is drawn from that data (and its track reads
  // no better, source_verdict).
  for (const auto& w : track_warnings(described)) text += "warning: the source's data: " + w + "\n";
  if (source_quality.verdict == Verdict::poor)
    text += "warning: " + quality_warning(source_quality) +
            "; the track written carries it (source_verdict: poor)\n";
  text += "line    " + o.method + ", vehicle " + fixed(spec.vehicle_width_m, 2) +
          " m wide, margin " + fixed(spec.margin_m, 2) + " m: " + fixed(line.s_m.back(), 1) +
          " m long (the centerline " + fixed(described.length_m(), 1) + " m), largest offset " +
          fixed(std::abs(line.offset_m[widest]), 2) + " m " +
          (line.offset_m[widest] >= 0 ? "left" : "right") + " at " +
          fixed(line.reference_s_m[widest], 1) + " m of the centerline\n";
  if (configured) {
    const std::string config = car->configs[ci].name;
    auto delta = [&](double lap) {
      return " (" + std::string(lap <= *centerline_lap ? "" : "+") +
             fixed(100 * (lap / *centerline_lap - 1), 2) + " %)";
    };
    text += "lap     " + car->name + ", config " + config + ": centerline " +
            fixed(*centerline_lap, 3) + " s";
    if (min_curvature_lap)
      text += ", min-curvature line " + fixed(*min_curvature_lap, 3) + " s" +
              delta(*min_curvature_lap) + ", min-time line " + fixed(*line_lap, 3) + " s" +
              delta(*line_lap) + " after " + std::to_string(passes) + " passes";
    else
      text += ", line " + fixed(*line_lap, 3) + " s" + delta(*line_lap);
    text += "\n";
    // A line of less curvature is longer: where that costs more than its speed gains, it laps
    // slower than the path it replaces, and the min-time refinement, which starts from it and
    // keeps only what gains, need not get back below the centerline (README, "The racing line").
    if (*line_lap > *centerline_lap)
      text += "note    the " + o.method + " line laps " + fixed(*line_lap - *centerline_lap, 3) +
              " s slower than the centerline: its extra length costs more than its lower "
              "curvature gains here (on a ring at the grip limit the lap grows as the square "
              "root of the radius)" +
              (min_time ? std::string(", and the refinement starts from the minimum-curvature "
                                      "line and keeps only what gains on it")
                        : std::string()) +
              "; lap the centerline instead\n";
  }
  std::cout << text;
  return 0;
}
}  // namespace

int track_line(const TrackLineOptions& o) {
  return located(&track_line, o);
}

}  // namespace lapwing::cli

namespace lapwing::cli {

namespace {

SpeedLogOptions speed_log_options(const std::string& log, const LogColumns& c) {
  if (c.distance.empty() == c.time.empty())
    throw UsageError{"give one of --distance COL and --time COL"};
  SpeedLogOptions s;
  s.log = log;
  s.speed = c.speed;
  s.distance = c.distance;
  s.time = c.time;
  s.speed_unit = c.speed_unit;
  require_options(s.validate());
  return s;
}

// A log's error the library found (an InvalidInput naming the log and a row) at its line.
template <typename F>
auto at_log_rows(const std::vector<SpeedLogFile>& logs, F&& f) {
  try {
    return f();
  } catch (const InvalidInput& e) {
    for (const SpeedLogFile& l : logs)
      if (e.subject() == l.speed.source) throw row_error(l.table, e);
    throw;
  }
}

std::string model_name(const Car& car) {
  return car.model == VehicleModel::axle ? "axle" : "point-mass";
}

int correlate(const CorrelateOptions& o, Inputs& in) {
  const AirOverride air = parse_air(o.air);
  Car car = in.car(o.car);
  apply_model(o.model, car);
  const std::size_t ci = pick_config(car, o.config);
  std::vector<SpeedLogFile> logs;
  logs.push_back(read_speed_log(speed_log_options(o.log, o.columns)));
  std::vector<Circuit> circuits;
  circuits.push_back(in.lay_out(o.track, air, MeshPositions::laid_out));
  require_out_keeps_inputs(o.out);
  const Circuit& t = circuits.front();
  const LapRun r = run_lap(car.configured(ci), t);
  const Correlation c =
      at_log_rows(logs, [&] { return lapwing::correlate(r.lap, t, logs.front().speed); });
  std::string out;
  out += "car     " + car.name + " (" + car.file + "), config " + car.configs[ci].name + ", " +
         model_name(car) + " model\n";
  out +=
      "track   " + t.track.name + " (" + t.track.file + "), " + fixed(t.mesh.length_m, 1) + " m\n";
  out += "log     " + o.log + ", " + std::to_string(logs.front().table.rows()) + " rows\n";
  for (const auto& n : logs.front().notes) out += "note    " + n + "\n";
  out += correlate_text(t, c);
  if (!o.out.empty()) {
    std::vector<OutputFile> files;
    files.push_back(
        {"correlate.json", correlate_json(car.name, car.configs[ci].name, o.log, t, c)});
    files.push_back({"correlate-" + t.track.id + ".csv", correlate_csv(t.mesh, r.lap, c)});
    ReportInput ri{&car,
                   &circuits,
                   nullptr,
                   nullptr,
                   "correlate, config " + car.configs[ci].name + ", log " + o.log,
                   nullptr};
    ri.correlation = &c;
    ri.correlated_lap = &r.lap;
    files.push_back({"report.html", html_report(ri)});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}

std::vector<FitParameter> parse_free(const std::string& list) {
  std::vector<FitParameter> out;
  std::vector<std::string> names;
  for (std::string_view n :
       {"grip", "grip_lat", "grip_long", "power", "cda", "cla", "balance", "mass"})
    names.emplace_back(n);
  std::size_t a = 0;
  while (a <= list.size()) {
    const std::size_t b = std::min(list.find(',', a), list.size());
    std::string word = list.substr(a, b - a);
    word.erase(0, std::min(word.find_first_not_of(' '), word.size()));
    word.erase(word.find_last_not_of(' ') + 1);
    const auto p = fit_parameter(word);
    if (!p) {
      const std::string near = closest(word, names);
      throw UsageError{"--free: '" + word + "' is not a parameter" +
                       (near.empty() ? "" : "; did you mean '" + near + "'?") + " (" +
                       fit_parameter_names() + ")"};
    }
    if (std::find(out.begin(), out.end(), *p) != out.end())
      throw UsageError{"--free: " + word + " is given twice"};
    out.push_back(*p);
    a = b + 1;
  }
  return out;
}

int fit(const FitOptions& o, Inputs& in) {
  if (o.tracks.size() != o.logs.size())
    throw UsageError{"give one --log per --track, in pairs (" + std::to_string(o.tracks.size()) +
                     " --track, " + std::to_string(o.logs.size()) + " --log)"};
  // The same lap twice would count its points twice (standard errors sqrt 2 too small): one
  // file however it is named (a symlink, another spelling, a hard link: input_file.hpp).
  const auto one_file = [](const std::string& a, const std::string& b) {
    return a == b || same_file(a, b);
  };
  for (std::size_t i = 0; i < o.logs.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (one_file(o.logs[i], o.logs[j]) && one_file(o.tracks[i], o.tracks[j]))
        throw UsageError{"--log " + o.logs[i] + " on --track " + o.tracks[i] +
                         " is given twice (pairs " + std::to_string(j + 1) + " and " +
                         std::to_string(i + 1) +
                         "): one lap counted twice would make the standard errors 1.4 times too "
                         "small"};
  const std::vector<FitParameter> params = parse_free(o.free);
  const AirOverride air = parse_air(o.air);
  // The solve's module (fit_module.hpp), loaded before any input is read: where it is missing,
  // fit stops here, having written nothing.
  const FitFunction fit_solve = fit_function();
  Car car = in.car(o.car);
  apply_model(o.model, car);
  const std::size_t ci = pick_config(car, o.config);
  // A track may be given more than once (two logs of one circuit): each laid out once.
  std::vector<std::string> unique_tracks;
  std::vector<std::size_t> track_of;
  for (const auto& t : o.tracks) {
    auto it = std::find(unique_tracks.begin(), unique_tracks.end(), t);
    if (it == unique_tracks.end()) it = unique_tracks.insert(unique_tracks.end(), t);
    track_of.push_back(static_cast<std::size_t>(it - unique_tracks.begin()));
  }
  std::vector<SpeedLogFile> logs;
  for (const auto& l : o.logs) logs.push_back(read_speed_log(speed_log_options(l, o.columns)));
  const std::vector<Circuit> circuits = in.lay_out_all(unique_tracks, air, MeshPositions::laid_out);
  require_out_keeps_inputs(o.out);
  std::vector<FitLog> fit_logs;
  for (std::size_t i = 0; i < logs.size(); ++i)
    fit_logs.push_back({&circuits[track_of[i]], &logs[i].speed});
  lapwing::FitOptions fo;
  fo.threads = o.threads;
  if (!o.out.empty()) {
    // Where each freed value will be written in the car file, found before the fit runs (a
    // wing family's config has no value of its own to write into): its neutral value written.
    FitResult neutral;
    neutral.params = params;
    for (const FitParameter p : params)
      neutral.values.push_back(p == FitParameter::balance ? 0.0 : 1.0);
    (void)edited_car_text(o.car, fitted_edits(car, ci, neutral));
  }
  const ConfiguredCar start = car.configured(ci);
  const FitResult r = at_log_rows(logs, [&] { return fit_solve(start, fit_logs, params, fo); });
  // Each log's track and the air its laps were solved in (the track's, or the air options'):
  // the fitted factors hold in that air, so the text, car.yaml's header and fit.json say it.
  std::vector<std::string> track_names;
  std::vector<Air> airs;
  for (std::size_t i = 0; i < logs.size(); ++i) {
    track_names.push_back(circuits[track_of[i]].track.name);
    airs.push_back(circuits[track_of[i]].air);
  }
  std::string out;
  out += "car     " + car.name + " (" + car.file + "), config " + car.configs[ci].name + ", " +
         model_name(car) + " model\n";
  for (std::size_t i = 0; i < logs.size(); ++i) {
    out += "log     " + o.logs[i] + " on " + track_names[i] + "\n";
    out += "air     " + air_text(airs[i]) + "\n";
    for (const auto& n : logs[i].notes) out += "note    " + n + "\n";
  }
  out += "\n" + fit_text(r, o.logs);
  if (!o.out.empty()) {
    // The input car with the fitted values written in, and a header saying what was fitted to
    // what; read back as a car file before anything is written.
    std::string header = "# Fitted by 'lapwing fit' (lapwing " + version() + ") from " +
                         printable(std::filesystem::path(o.car).filename().string()) + ", config " +
                         car.configs[ci].name + ", " + model_name(car) + " model, to ";
    for (std::size_t i = 0; i < logs.size(); ++i)
      header += (i ? "; " : "") + printable(std::filesystem::path(o.logs[i]).filename().string()) +
                " on " + printable(track_names[i]) + " in air of " + air_text(airs[i]);
    header += ".\n# Fitted:";
    for (std::size_t i = 0; i < params.size(); ++i)
      header += std::string(i ? "," : "") + " " + std::string(fit_parameter_name(params[i])) + " " +
                fit_value_text(params[i], r.values[i]);
    header += "; RMS speed error " + fixed(units::to_kph(r.rms_before_mps_all), 2) + " -> " +
              fixed(units::to_kph(r.rms_after_mps_all), 2) + " km/h.\n";
    const std::string text = header + edited_car_text(o.car, fitted_edits(car, ci, r));
    try {
      read_car_document(parse_document(text, "car.yaml"));
    } catch (const InputError& e) {
      // The fit itself is printed first (a factor past a rule the bounds do not hold: grip with
      // grip_lat multiplies two factors each within its own bound), then the error: nothing
      // written.
      std::cout << out << std::flush;
      throw UsageError{"the fitted car breaks a rule of a car file, so car.yaml is not written: " +
                       e.message() + " (" + e.key_path() + ")"};
    }
    std::vector<OutputFile> files;
    files.push_back(
        {"fit.json", fit_json(car.name, car.configs[ci].name, o.logs, track_names, airs, r)});
    files.push_back({"car.yaml", text});
    write_outputs(o.out, files);
  }
  std::cout << out;
  return 0;
}

}  // namespace

int correlate(const CorrelateOptions& o) {
  return located(&correlate, o);
}
int fit(const FitOptions& o) {
  try {
    return located(&fit, o);
  } catch (const InputError& e) {
    // The fit's own rules on what is freed (subject "fit", key "free"): the option's error.
    if (e.file() != "fit") throw;
    throw UsageError{(e.key_path().empty() ? std::string("fit") : "--" + e.key_path()) + ": " +
                     e.message()};
  }
}

}  // namespace lapwing::cli
