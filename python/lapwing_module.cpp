// The `lapwing` Python module (README, "In Python"): the library's public API (the umbrella
// header) bound with pybind11. Results come back as the output files hold them: summary,
// compare and trade as the dicts their JSON files parse to (made by the report layer's own
// writers, read back by Python's json module, so the two cannot differ), the trace as one NumPy
// array per column of the trace CSV (the report layer's list of channels). Laps are solved with
// the GIL released, so that Python threads run laps in parallel.
#include <pybind11/numpy.h>
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "lapwing/lapwing.hpp"

namespace py = pybind11;

namespace lapwing::python {

namespace {

// Bad input of no file (an argument: the air, a config, the trade's step): raised as
// lapwing.InputError with the command line's words for the same input, the Python argument
// named where the command line names its option.
struct BadArgument : std::runtime_error {
  using std::runtime_error::runtime_error;
};

// A car as read from its file: the parsed file (with_values edits a copy of it, as `sweep --set`
// does), the car, and where each value stands (to place the errors a lap finds later).
struct CarHandle {
  std::shared_ptr<const Document> doc;
  std::shared_ptr<const CarFile> file;
  const Car& car() const { return file->car; }
};

struct TrackHandle {
  std::shared_ptr<const TrackFile> file;
  // The file's place when it was loaded (its canonical path then), the track's identity for
  // "given twice": a relative path read again later names whatever file the working directory
  // then holds (a helper's finding: two files of one name in two folders, each loaded from its
  // folder, were refused as one file given twice).
  std::string identity;
  const Track& track() const { return file->track; }
};

// A solved lap as Python sees it.
struct PyLap {
  double lap_time_s = 0.0;
  py::dict summary;
  py::dict trace;
  py::list corners;
};

py::object parse_json(const std::string& text) {
  return py::module_::import("json").attr("loads")(text);
}

// Runs `work` (no Python object may be touched in it) with the GIL released; an error the
// library finds in a loaded file (InvalidInput) is raised at its place in that file, as the
// command line reports it.
template <typename Work>
auto solve_unlocked(const SourceMaps& maps, Work&& work) {
  py::gil_scoped_release unlocked;
  try {
    return work();
  } catch (const InvalidInput& e) {
    throw maps.error(e);
  }
}

SourceMaps maps_of(const CarHandle& car, const std::vector<TrackHandle>& tracks) {
  SourceMaps maps;
  maps.add(car.file->sources);
  for (const auto& t : tracks) maps.add(t.file->sources);
  return maps;
}

std::string type_name(const py::handle& v) {
  return std::string(py::str(py::type::of(v).attr("__name__")));
}

// A Python str as UTF-8; one that has none (a lone surrogate, '\ud800') is refused by name.
std::string utf8(const py::handle& v, const std::string& what) {
  if (!py::isinstance<py::str>(v))
    throw py::type_error(what + ": give a string, not " + type_name(v));
  Py_ssize_t size = 0;
  const char* data = PyUnicode_AsUTF8AndSize(v.ptr(), &size);
  if (!data) {
    PyErr_Clear();
    throw BadArgument(what + ": the text is not valid Unicode (it holds a lone surrogate)");
  }
  return std::string(data, static_cast<std::size_t>(size));
}

// An optional text argument (config, model): None, or a str with UTF-8.
std::optional<std::string> optional_text(const py::object& v, const std::string& what) {
  if (v.is_none()) return std::nullopt;
  return utf8(v, what);
}

// An optional list of names (configs): None, or a list or tuple of str.
std::optional<std::vector<std::string>> optional_texts(const py::object& v,
                                                       const std::string& what) {
  if (v.is_none()) return std::nullopt;
  if (!py::isinstance<py::list>(v) && !py::isinstance<py::tuple>(v))
    throw py::type_error(what + ": give a list of names, not " + type_name(v));
  std::vector<std::string> out;
  for (const auto& item : v) out.push_back(utf8(item, what));
  return out;
}

// A real number of any Python type (int, float, numpy.int64, numpy.float32, Fraction: what
// numbers.Real or __float__ makes one; not bool, not str) as a double, NaN and infinities as
// they are. An integer beyond a double's range is refused as too large, not cast into an error.
double real_number(const py::handle& v, const std::string& what) {
  const bool real =
      py::isinstance(v, py::module_::import("numbers").attr("Real")) || py::hasattr(v, "__float__");
  const std::string type = type_name(v);
  if (py::isinstance<py::bool_>(v) || type == "bool_" || py::isinstance<py::str>(v) ||
      py::isinstance<py::bytes>(v) || !real)
    throw py::type_error(what + ": give a number or a string with a unit, not " + type_name(v));
  PyObject* f = PyNumber_Float(v.ptr());
  if (!f) {
    if (PyErr_ExceptionMatches(PyExc_OverflowError)) {
      PyErr_Clear();
      throw BadArgument(what + ": the number is too large (beyond 1.8e308 in magnitude)");
    }
    throw py::error_already_set();
  }
  const double x = PyFloat_AsDouble(f);
  Py_DECREF(f);
  return x;
}

// A value of a dict as the text a file would hold: a string as given ("650 kg"), a number in
// the key's default unit (full precision).
std::string value_text(const py::handle& v, const std::string& what) {
  if (py::isinstance<py::str>(v)) return utf8(v, what);
  const double x = real_number(v, what);
  // Non-finite as the text a file or an option would hold, refused in the same words.
  if (!std::isfinite(x)) return std::isnan(x) ? "nan" : x > 0 ? "inf" : "-inf";
  return format_number(x);
}

// A count given as a Python int (or numpy integer) in [lo, hi], with the command line's words
// for one out of range (its parser's: "Value 300 not in range 0 to 256").
unsigned count_in(const py::handle& v, const std::string& what, long long lo, long long hi) {
  if (py::isinstance<py::bool_>(v) ||
      !py::isinstance(v, py::module_::import("numbers").attr("Integral")))
    throw py::type_error(what + ": give an integer, not " + type_name(v));
  const py::int_ i = py::reinterpret_steal<py::int_>(PyNumber_Index(v.ptr()));
  if (!i) throw py::error_already_set();
  int overflow = 0;
  const long long n = PyLong_AsLongLongAndOverflow(i.ptr(), &overflow);
  if (overflow == 0 && n >= lo && n <= hi) return static_cast<unsigned>(n);
  std::string digits;
  try {
    digits = std::string(py::str(py::handle(i)));
  } catch (const py::error_already_set&) {  // beyond Python's limit on an int's digits
    digits = overflow > 0 ? "(a huge number)" : "(a huge negative number)";
  }
  throw BadArgument(what + ": Value " + digits + " not in range " + std::to_string(lo) + " to " +
                    std::to_string(hi));
}

// model=None keeps the car file's; "axle" or "point-mass" replaces it (as --model does).
Car with_model(Car car, const std::optional<std::string>& model) {
  if (!model) return car;
  if (*model == "axle")
    car.model = VehicleModel::axle;
  else if (*model == "point-mass")
    car.model = VehicleModel::point_mass;
  else
    throw BadArgument("model: '" + *model + "' is not one of point-mass | axle");
  return car;
}

// air={"altitude": ..., "temperature": ..., "pressure": ..., "humidity": ...}: each replaces the
// track's value, as --altitude, --temperature, --pressure and --humidity do; a number is in the
// key's default unit (m, C, Pa, a fraction), a string may carry a unit ("31 C", "985 hPa").
AirOverride parse_air(const std::optional<py::dict>& air) {
  AirOverride o;
  if (!air) return o;
  struct Key {
    const char* name;
    Quantity q;
    Range range;
    std::optional<double> AirOverride::*field;
  };
  const Key keys[] = {
      {"altitude", Quantity::length, AirSpec::altitude_range, &AirOverride::altitude_m},
      {"temperature", Quantity::temperature, AirSpec::temperature_range,
       &AirOverride::temperature_k},
      {"pressure", Quantity::pressure, AirSpec::pressure_range, &AirOverride::pressure_pa},
      {"humidity", Quantity::fraction, AirSpec::humidity_range, &AirOverride::humidity}};
  for (const auto& [k, v] : *air) {
    const std::string name = utf8(k, "air key");
    const Key* key = nullptr;
    for (const Key& c : keys)
      if (name == c.name) key = &c;
    if (!key)
      throw BadArgument("air: unknown key '" + name +
                        "' (keys: altitude, temperature, pressure, humidity)");
    const std::string what = "air['" + name + "']";
    const std::string text = value_text(v, what);
    std::string error;
    const auto si = parse_named_value(text, what, key->q, key->range, error);
    if (!si) throw BadArgument(error);
    o.*(key->field) = *si;
  }
  return o;
}

// The circuits of `tracks` in the air asked for (an air value out of range: InvalidInput of
// "air", as make_air says it).
std::vector<Circuit> lay_out_all(const std::vector<TrackHandle>& tracks, const AirOverride& air) {
  std::vector<Circuit> out;
  for (const auto& t : tracks) {
    Air a;
    try {
      a = make_air(apply(t.track().air, air));
    } catch (const InvalidInput& e) {
      // Impossible through the argument's values (the command line's words, the argument named);
      // of the track file's own values, the file's error at its place.
      if (!(air.altitude_m || air.temperature_k || air.pressure_pa || air.humidity)) throw;
      throw BadArgument("the air that air gives (the track's own values for the rest): " +
                        e.message());
    }
    out.push_back(lay_out(t.track(), a));
  }
  return out;
}

// A call whose estimated peak memory is over half the machine's (the command line's default
// --memory-limit, study/memory.hpp) is refused before any mesh is laid out, as the command line
// refuses it (a helper's finding: a 19.8-million-point ring ran for 19 s under a 4 GB limit
// before a MemoryError; without one it would have asked for some 31 GB of a 24 GB machine).
void require_memory(const std::vector<TrackHandle>& tracks, std::size_t laps_kept, bool channels,
                    unsigned threads, std::size_t jobs) {
  const double limit = machine_memory_bytes() / 2;
  if (!(limit > 0)) return;  // the machine's memory unknown: no limit
  std::vector<const Track*> ts;
  for (const TrackHandle& t : tracks) ts.push_back(&t.track());
  const MemoryVerdict v = check_memory(ts, laps_kept, channels, threads, jobs, true, limit);
  if (v.over)
    throw BadArgument("needs about " + describe_bytes(v.need) +
                      " of memory, more than half the "
                      "machine's (" +
                      describe_bytes(limit) + "): " + v.what +
                      "; give a coarser mesh, fewer configs or threads");
}

// The tracks of compare and trade: at least one, none twice (by the file each was loaded from, as
// --track is checked).
void check_tracks(const std::vector<TrackHandle>& tracks) {
  if (tracks.empty()) throw BadArgument("tracks is required: give at least one track");
  for (std::size_t i = 0; i < tracks.size(); ++i)
    for (std::size_t j = 0; j < i; ++j)
      if (tracks[i].file == tracks[j].file || tracks[i].identity == tracks[j].identity)
        throw BadArgument("tracks: " + tracks[i].track().file + " is given twice");
}

// A config by name; an unknown name is the car file's error at its aero.configs, as the command
// line reports it.
std::size_t config_of(const CarHandle& car_handle, const Car& car, const std::string& name,
                      const std::string& what) {
  if (name.empty()) throw BadArgument(what + " is given an empty value");
  try {
    return pick_config(car, name);
  } catch (const InvalidInput& e) {
    throw maps_of(car_handle, {}).error(e);
  }
}

std::vector<std::size_t> pick_configs(const CarHandle& car_handle, const Car& car,
                                      const std::optional<std::vector<std::string>>& names) {
  std::vector<std::size_t> out;
  if (!names) {
    for (std::size_t i = 0; i < car.configs.size(); ++i) out.push_back(i);
    return out;
  }
  if (names->empty())
    throw BadArgument("configs is empty: give at least one config, or None for all of the car's");
  for (const auto& n : *names) {
    const std::size_t i = config_of(car_handle, car, n, "configs");
    if (std::find(out.begin(), out.end(), i) != out.end())
      throw BadArgument("configs: " + n + " is given twice");
    out.push_back(i);
  }
  return out;
}

CarHandle read_car(const Document& doc) {
  auto kept = std::make_shared<const Document>(doc);
  return {kept, std::make_shared<const CarFile>(read_car_document(kept))};
}

// A path with a NUL character would be opened cut at it (the C library's end of a name): refused.
void check_path(const std::string& path) {
  // As the command line's --car and --track: an empty path is no file (it read ": error: cannot
  // open the file", naming none: a helper's finding).
  if (path.empty()) throw BadArgument("path is given an empty value");
  if (path.find('\0') != std::string::npos)
    throw BadArgument("path '" + printable(path) + "': a file name cannot hold a NUL character");
}

// A path as Python gives it: a str, bytes or any os.PathLike (pathlib.Path), as open() takes
// (os.fsdecode: bytes by the file system's encoding); anything else a TypeError. The text read
// as every other text argument is: one with no UTF-8 (a lone surrogate) an InputError naming
// the path, not a failed cast.
std::string path_text(const py::object& path) {
  const py::object text = py::module_::import("os").attr("fsdecode")(path);
  return utf8(text, "path");
}

CarHandle load_car_file(const py::object& path_object) {
  const std::string path = path_text(path_object);
  check_path(path);
  return read_car(load_document(path));
}

TrackHandle load_track_file(const py::object& path_object) {
  const std::string path = path_text(path_object);
  check_path(path);
  auto file = std::make_shared<const TrackFile>(read_track_file(path));
  std::error_code ec;
  const std::filesystem::path where = std::filesystem::weakly_canonical(path, ec);
  return {std::move(file), ec ? std::filesystem::absolute(path, ec).string() : where.string()};
}

// car.with_values({"mass": 650, "aero.configs.medium.cla": 3.8}): each key set in the car file's
// text and the car read again from it, as `sweep --set` makes each point's car, so the keys,
// units and rules are the file's.
// An error of the car read with the values is named by them, as `sweep --set` names the point:
// its place in the file is the original value's line, which holds another value (a helper's
// finding: straight_trim.cla -4.31 was reported at the line that reads -0.9 m2).
CarHandle with_values(const CarHandle& car, const py::dict& values) {
  Document doc = *car.doc;
  std::string set;
  for (const auto& [k, v] : values) {
    const std::string key = utf8(k, "with_values key");
    const std::string text = value_text(v, key);
    set_car_value(doc, car_key_path(doc, key), text);
    set += (set.empty() ? "" : ", ") + key + " = " + text;
  }
  try {
    return read_car(doc);
  } catch (const InputError& e) {
    if (set.empty()) throw;
    throw BadArgument("with_values " + set + ": " + e.message() +
                      (e.key_path().empty() ? "" : " (" + e.key_path() + ")"));
  }
}

// What `run` computes for one lap: the lap, its summary with the data's verdict (a poor one is a
// warning too), and summary.json's text of it.
struct SolvedLap {
  LapRun run;
  Circuit circuit;
  std::string summary_json;
};

PyLap run(const CarHandle& car_handle, const TrackHandle& track_handle,
          const py::object& config_arg, const py::object& model_arg,
          const std::optional<py::dict>& air_dict) {
  const std::optional<std::string> config = optional_text(config_arg, "config");
  const std::optional<std::string> model = optional_text(model_arg, "model");
  const AirOverride air = parse_air(air_dict);
  const Car car = with_model(car_handle.car(), model);
  const std::size_t ci =
      config ? config_of(car_handle, car, *config, "config") : pick_config(car, "");
  const std::vector<TrackHandle> tracks{track_handle};
  require_memory(tracks, 0, true, 1, 1);
  SolvedLap solved = solve_unlocked(maps_of(car_handle, tracks), [&] {
    std::vector<Circuit> circuits = lay_out_all(tracks, air);
    SolvedLap s{{}, std::move(circuits.front()), {}};
    const ConfiguredCar configured = car.configured(ci);
    s.run = run_lap(configured, s.circuit);
    const TrackQuality quality = assess_track(s.circuit, smoothing_variants(s.circuit), configured,
                                              car.configs[ci].name, s.run.summary.lap_time_s);
    if (quality.verdict == Verdict::poor)
      s.run.summary.warnings.push_back(quality_warning(quality));
    s.summary_json = summary_json(car.name, {s.run.summary}, {quality});
    return s;
  });

  PyLap out;
  out.lap_time_s = solved.run.summary.lap_time_s;
  out.summary = parse_json(solved.summary_json)["results"][py::int_(0)];
  out.corners = out.summary["corners"];
  const Lap& lap = solved.run.lap;
  const Mesh& mesh = solved.circuit.mesh;
  const std::size_t n = mesh.size();
  require_positions(mesh, "the trace's arrays");  // x_m and y_m among them
  for (const TraceChannel& c : trace_channels()) {
    const std::string name(c.name);
    if (c.kind == TraceChannel::Kind::phase) {
      py::list words;
      for (std::size_t i = 0; i < n; ++i) words.append(std::string(phase_name(lap.phase[i])));
      out.trace[name.c_str()] = py::module_::import("numpy").attr("array")(words);
    } else if (c.kind == TraceChannel::Kind::integer) {
      py::array_t<long long> a(static_cast<py::ssize_t>(n));
      auto v = a.mutable_unchecked<1>();
      for (std::size_t i = 0; i < n; ++i)
        v(static_cast<py::ssize_t>(i)) = std::llround(c.number(lap, mesh, i));
      out.trace[name.c_str()] = a;
    } else {
      py::array_t<double> a(static_cast<py::ssize_t>(n));
      auto v = a.mutable_unchecked<1>();
      for (std::size_t i = 0; i < n; ++i) v(static_cast<py::ssize_t>(i)) = c.number(lap, mesh, i);
      out.trace[name.c_str()] = a;
    }
  }
  return out;
}

py::object compare(const CarHandle& car_handle, const std::vector<TrackHandle>& tracks,
                   const py::object& configs_arg, const py::object& model_arg,
                   const std::optional<py::dict>& air_dict, const py::object& threads_arg) {
  const std::optional<std::vector<std::string>> configs = optional_texts(configs_arg, "configs");
  const std::optional<std::string> model = optional_text(model_arg, "model");
  const unsigned threads = count_in(threads_arg, "threads", 0, 256);
  check_tracks(tracks);
  const AirOverride air = parse_air(air_dict);
  const Car car = with_model(car_handle.car(), model);
  const std::vector<std::size_t> picked = pick_configs(car_handle, car, configs);
  require_memory(tracks, picked.size(), true, threads, tracks.size() * picked.size());
  const std::string text = solve_unlocked(maps_of(car_handle, tracks), [&] {
    const std::vector<Circuit> circuits = lay_out_all(tracks, air);
    return compare_json(car, lapwing::compare(car, picked, circuits, threads), circuits);
  });
  return parse_json(text);
}

// A fraction given as a number (0.02) or as text with its unit ("2 %"), in its range.
double fraction(const py::handle& v, const std::string& what, const Range& range) {
  std::string error;
  const auto x = parse_named_value(value_text(v, what), what, Quantity::fraction, range, error);
  if (!x) throw BadArgument(error);
  return *x;
}

py::object trade(const CarHandle& car_handle, const std::vector<TrackHandle>& tracks,
                 const py::object& config_arg, const py::object& step, const py::object& span,
                 const py::object& grid, const py::object& model_arg,
                 const std::optional<py::dict>& air_dict, const py::object& threads_arg) {
  const std::optional<std::string> config = optional_text(config_arg, "config");
  const std::optional<std::string> model = optional_text(model_arg, "model");
  const unsigned threads = count_in(threads_arg, "threads", 0, 256);
  check_tracks(tracks);
  // In the command line's order: the air and the trade's options, then the car's config.
  const AirOverride air = parse_air(air_dict);
  TradeOptions options;
  options.step = fraction(step, "step", TradeOptions::step_range);
  options.grid_span = fraction(span, "span", TradeOptions::grid_span_range);
  options.grid_points = static_cast<int>(
      count_in(grid, "grid", TradeOptions::min_grid_points, TradeOptions::max_grid_points));
  const Car car = with_model(car_handle.car(), model);
  std::vector<std::size_t> configs;
  if (config)
    configs.push_back(config_of(car_handle, car, *config, "config"));
  else
    configs = pick_configs(car_handle, car, std::nullopt);
  require_memory(tracks, 0, false, threads, std::size_t{1} << 20);
  const std::string text = solve_unlocked(maps_of(car_handle, tracks), [&] {
    const std::vector<Circuit> circuits = lay_out_all(tracks, air);
    return trade_json(car, lapwing::trade(car, configs, circuits, options, threads), circuits);
  });
  return parse_json(text);
}

std::string model_name(VehicleModel m) {
  return m == VehicleModel::axle ? "axle" : "point-mass";
}

}  // namespace

}  // namespace lapwing::python

PYBIND11_MODULE(lapwing, m) {
  using namespace lapwing::python;
  namespace lw = lapwing;
  m.doc() =
      "lapwing: quasi-steady lap-time simulation with aero maps. Load a car and a track, run "
      "laps, compare aero configs and trade downforce for drag; results as dicts (the JSON "
      "files' content) and NumPy arrays (the trace's columns).";
  m.attr("__version__") = lw::version();

  // Bad input: the text the command line prints, FILE:LINE:COL: error: ... (key.path).
  static py::exception<lw::InputError> input_error(m, "InputError", PyExc_ValueError);
  // A car that cannot complete the track (exit 3 on the command line).
  static py::exception<lw::CannotMove> cannot_move(m, "CannotMove", PyExc_RuntimeError);
  py::register_exception_translator([](std::exception_ptr p) {
    try {
      if (p) std::rethrow_exception(p);
    } catch (const lw::InputError& e) {
      input_error(e.what());
    } catch (const lw::InvalidInput& e) {  // of no file loaded (the air, the trade's options)
      input_error(e.what());
    } catch (const BadArgument& e) {
      input_error(e.what());
    } catch (const lw::CannotMove& e) {
      cannot_move((std::string("the car cannot complete the track: ") + e.what()).c_str());
    }
  });

  py::class_<CarHandle>(m, "Car", "A car read from its file (lapwing.load_car).")
      .def_property_readonly("name", [](const CarHandle& c) { return c.car().name; })
      .def_property_readonly("file", [](const CarHandle& c) { return c.car().file; })
      .def_property_readonly(
          "configs", [](const CarHandle& c) { return c.car().config_names(); },
          "The aero configs' names, in the file's order.")
      .def_property_readonly(
          "model", [](const CarHandle& c) { return model_name(c.car().model); },
          "The vehicle model the file asks for: 'axle' or 'point-mass'.")
      .def_property_readonly("mass_kg", [](const CarHandle& c) { return c.car().mass_kg; })
      .def("with_values", &with_values, py::arg("values"),
           "A copy with values set by the car file's key paths, as `sweep --set` sets them: "
           "{'mass': 650, 'aero.configs.medium.cla': 3.8, 'tyres.mu_lat': '1.8'}. A number is "
           "in the key's default unit, a string may carry a unit ('650 kg'). Checked as the "
           "file is: a bad key or value raises InputError.")
      .def("__repr__", [](const CarHandle& c) {
        return "<lapwing.Car '" + c.car().name + "' from " + c.car().file + ">";
      });

  py::class_<TrackHandle>(m, "Track", "A track read from its file (lapwing.load_track).")
      .def_property_readonly("name", [](const TrackHandle& t) { return t.track().name; })
      .def_property_readonly("file", [](const TrackHandle& t) { return t.track().file; })
      .def_property_readonly(
          "id", [](const TrackHandle& t) { return t.track().id; },
          "The file's name without folder and extension.")
      .def_property_readonly("closed", [](const TrackHandle& t) { return t.track().closed; })
      .def_property_readonly("length_m", [](const TrackHandle& t) { return t.track().length_m(); })
      .def_property_readonly(
          "mesh_m", [](const TrackHandle& t) { return t.track().mesh_m; },
          "The solver step the file asks for (the lap's mesh adjusts it to divide the length).")
      .def("__repr__", [](const TrackHandle& t) {
        return "<lapwing.Track '" + t.track().name + "' from " + t.track().file + ">";
      });

  py::class_<PyLap>(m, "Lap", "One solved lap (lapwing.run).")
      .def_readonly("lap_time_s", &PyLap::lap_time_s)
      .def_readonly("summary", &PyLap::summary,
                    "The lap's result as summary.json holds it (one entry of its 'results').")
      .def_readonly("trace", &PyLap::trace,
                    "One NumPy array per column of the trace CSV, one entry per mesh point.")
      .def_readonly("corners", &PyLap::corners, "The summary's corners (a list of dicts).")
      .def("__repr__", [](const PyLap& l) {
        return "<lapwing.Lap " + std::string(py::str(l.summary["track"])) + ", " +
               std::string(py::str(l.summary["config"])) + ": " + lw::format_number(l.lap_time_s) +
               " s>";
      });

  m.def("load_car", &load_car_file, py::arg("path"), "Reads and checks a car file.");
  m.def("load_track", &load_track_file, py::arg("path"),
        "Reads and checks a track file (and the data file it names).");
  m.def("run", &run, py::arg("car"), py::arg("track"), py::arg("config") = py::none(),
        py::arg("model") = py::none(), py::arg("air") = py::none(),
        "One lap, as `lapwing run` solves it. config: a config's name (default the car's "
        "first); model: 'axle' or 'point-mass' (default the car file's, axle unless it says "
        "otherwise); air: {'altitude', 'temperature', 'pressure', 'humidity'} replacing the "
        "track's values.");
  m.def("compare", &compare, py::arg("car"), py::arg("tracks"), py::arg("configs") = py::none(),
        py::arg("model") = py::none(), py::arg("air") = py::none(), py::arg("threads") = 0,
        "Every config (default all of the car's) round every track, as `lapwing compare`: "
        "what compare.json holds, as a dict. threads=0: all cores.");
  m.def("trade", &trade, py::arg("car"), py::arg("tracks"), py::arg("config") = py::none(),
        py::arg("step") = 0.02, py::arg("span") = 0.15, py::arg("grid") = 9,
        py::arg("model") = py::none(), py::arg("air") = py::none(), py::arg("threads") = 0,
        "The downforce-for-drag trade, as `lapwing trade`: what trade.json holds, as a dict. "
        "step and span: fractions (0.02) or text ('2 %').");
}
