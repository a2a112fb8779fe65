#include "lapwing/io/track_file.hpp"

#include <filesystem>

#include "lapwing/base/units.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/track_import.hpp"
#include "lapwing/path/racing_line.hpp"

namespace lapwing {

namespace {

constexpr Range grade_range{-0.5, 0.5};                   // +-50 %: steeper is no road
constexpr Range segment_length{0.0, 100e3, true, false};  // up to 100 km a piece
constexpr Range radius_range{0.0, 100e3, true, false};
constexpr Range width_range{0.0, 100.0, true, false};  // edge to edge: (0, 100] m

double turn_sign(Reader& r) {
  return r.choice("turn", {"left", "right"}) == "left" ? 1.0 : -1.0;
}

Segment read_segment(const Document& doc, const Node& item, const std::string& path) {
  if (item.kind != Node::Kind::map || item.entries.size() != 1)
    throw InputError(doc.file, item.mark,
                     "a segment is one of 'straight: LENGTH', 'straight: {...}', 'arc: {...}', "
                     "'clothoid: {...}'",
                     path);
  const auto& [kind, body] = item.entries.front();
  const std::string p = path + "." + kind;
  Segment s{};
  s.mark = item.mark;
  if (kind == "straight") {
    s.kind = Segment::Kind::straight;
    if (body.kind == Node::Kind::scalar) {
      Reader parent(doc, item, path);
      s.length_m = parent.node_quantity(body, Quantity::length, segment_length, p);
      return s;
    }
    Reader r(doc, body, p);
    s.length_m = r.quantity("length", Quantity::length, segment_length);
    s.grade = r.quantity_or("grade", Quantity::fraction, grade_range, 0.0);
    s.width_m = r.quantity_or("width", Quantity::length, width_range, 0.0);
    r.finish();
    return s;
  }
  if (kind == "arc") {
    s.kind = Segment::Kind::arc;
    Reader r(doc, body, p);
    const double radius = r.quantity("radius", Quantity::length, radius_range);
    const double angle =
        r.quantity("angle", Quantity::angle, Range{0.0, 4 * units::pi, true, false});
    const double sign = turn_sign(r);
    s.length_m = radius * angle;
    s.curvature_start_1pm = s.curvature_end_1pm = sign / radius;
    s.grade = r.quantity_or("grade", Quantity::fraction, grade_range, 0.0);
    s.width_m = r.quantity_or("width", Quantity::length, width_range, 0.0);
    r.finish();
    return s;
  }
  if (kind == "clothoid") {
    s.kind = Segment::Kind::clothoid;
    Reader r(doc, body, p);
    s.length_m = r.quantity("length", Quantity::length, segment_length);
    auto from = r.optional_quantity("from_radius", Quantity::length, radius_range);
    auto to = r.optional_quantity("to_radius", Quantity::length, radius_range);
    if (!from && !to)
      r.fail(body, "a clothoid needs from_radius, to_radius or both (a missing one is straight)");
    const double sign = turn_sign(r);
    s.curvature_start_1pm = from ? sign / *from : 0.0;
    s.curvature_end_1pm = to ? sign / *to : 0.0;
    s.grade = r.quantity_or("grade", Quantity::fraction, grade_range, 0.0);
    s.width_m = r.quantity_or("width", Quantity::length, width_range, 0.0);
    r.finish();
    return s;
  }
  const std::string near = closest(kind, {"straight", "arc", "clothoid"});
  throw InputError(doc.file, item.mark,
                   "unknown segment kind '" + kind + "'" +
                       (near.empty() ? "" : "; did you mean '" + near + "'?"),
                   path);
}

}  // namespace

Track load_track(const std::string& file) {
  Document doc = load_document(file);
  Reader r(doc, doc.root, "");
  r.keys({"format", "name", "closed", "start_speed", "altitude", "ambient", "mesh", "segments",
          "sectors", "centerline", "curvature", "width", "line"});
  {
    const Node& n = r.require("format");
    if (r.node_quantity(n, Quantity::number, Range{}, "format") != 1.0)
      r.fail(n, "unsupported format " + n.scalar + " (this lapwing reads format 1)", "format");
  }
  Track t;
  t.file = file;
  t.id = std::filesystem::path(file).stem().string();
  t.name = r.string("name");
  t.closed = r.boolean_or("closed", true);
  if (const Node* n = r.get("start_speed")) {
    if (t.closed)
      r.fail(*n, "start_speed applies to open tracks only (closed: false)", "start_speed");
    t.start_speed_mps = r.node_quantity(*n, Quantity::speed, Range{0.0, 150.0}, "start_speed");
    t.start_speed_mark = n->mark;
  }
  t.air.altitude_m = r.quantity_or("altitude", Quantity::length, Range{-500.0, 6000.0}, 0.0);
  if (r.has("ambient")) {
    Reader a = r.map("ambient");
    t.air.temperature_k =
        a.optional_quantity("temperature", Quantity::temperature, Range{223.15, 343.15});
    t.air.pressure_pa =
        a.optional_quantity("pressure", Quantity::pressure, Range{30000.0, 110000.0});
    t.air.relative_humidity = a.quantity_or("humidity", Quantity::fraction, Range{0.0, 1.0}, 0.0);
    a.finish();
  }
  t.mesh_m = r.quantity_or("mesh", Quantity::length, Range{0.01, 10.0}, 0.5);
  const int forms = int(r.has("segments")) + int(r.has("centerline")) + int(r.has("curvature"));
  if (forms != 1) r.fail(r.node(), "give exactly one of segments, centerline, curvature");
  // A data file named inside the track file is found from the track file's folder.
  auto data_file = [&](Reader& m) {
    const Node& n = m.require("file");
    const std::string f = m.node_string(n, m.child_path("file"));
    const std::filesystem::path p =
        std::filesystem::path(f).is_absolute() ? std::filesystem::path(f) : doc.directory / f;
    if (!std::filesystem::exists(p)) m.fail(n, "no such file: " + p.string(), "file");
    return p.string();
  };
  if (r.has("centerline")) {
    Reader c = r.map("centerline");
    c.keys({"file", "smoothing", "elevation_smoothing"});
    CenterlineOptions o;
    const std::string f = data_file(c);
    // `smoothing: auto` (the default) lets generalised cross-validation choose; a length
    // overrides.
    if (const Node* sm = c.get("smoothing");
        sm && !(sm->kind == Node::Kind::scalar && sm->scalar == "auto"))
      o.smoothing_m =
          c.node_quantity(*sm, Quantity::length, Range{1.0, 2000.0}, c.child_path("smoothing"));
    o.elevation_smoothing_m = c.quantity_or("elevation_smoothing", Quantity::length,
                                            Range{1.0, 5000.0}, o.elevation_smoothing_m);
    c.finish();
    t.segments_mark = c.node().mark;
    t.profile = import_centerline(f, t.closed, o);
  } else if (r.has("curvature")) {
    Reader c = r.map("curvature");
    c.keys({"file"});
    const std::string f = data_file(c);
    c.finish();
    t.segments_mark = c.node().mark;
    t.profile = import_curvature(f);
  } else {
    const Node& segs = r.require("segments");
    t.segments_mark = segs.mark;
    if (segs.kind != Node::Kind::sequence || segs.items.empty())
      r.fail(segs, "expected a non-empty list of segments", "segments");
    for (std::size_t i = 0; i < segs.items.size(); ++i)
      t.segments.push_back(read_segment(doc, segs.items[i], "segments[" + std::to_string(i) + "]"));
  }
  if (const Node* w = r.get("width")) {
    if (!t.segments.empty())
      t.width_m = r.node_quantity(*w, Quantity::length, width_range, "width");
    else
      r.fail(*w,
             "width applies to segment tracks; a centerline gives its widths as the columns "
             "width_left_m,width_right_m of its CSV",
             "width");
  }
  if (r.has("line")) {
    Reader l = r.map("line");
    l.keys({"method", "vehicle_width", "margin"});
    LineSpec spec;
    const Node* method = l.get("method");
    if (method) {
      const std::string m = l.node_string(*method, l.child_path("method"));
      if (m == "min-time")
        l.fail(*method,
               "the min-time line depends on the car: make it with 'lapwing track line --method "
               "min-time --car CAR' and lap the track that writes",
               "method");
      if (m != "min-curvature")
        l.fail(*method, "unknown line method '" + m + "' (a track file takes min-curvature)",
               "method");
    }
    spec.vehicle_width_m =
        l.quantity_or("vehicle_width", Quantity::length, Range{0.5, 5.0}, spec.vehicle_width_m);
    spec.margin_m = l.quantity_or("margin", Quantity::length, Range{0.0, 5.0}, spec.margin_m);
    l.finish();
    t.line = spec;
    t.line_mark = l.node().mark;
  }
  const double length = t.length_m();
  // A mesh of more than 20 million points is no circuit (and would exhaust the machine).
  constexpr double max_points = 20e6;
  if (length / t.mesh_m > max_points)
    r.fail(r.node(), "the track is " + std::to_string(length) + " m long: at a mesh of " +
                         std::to_string(t.mesh_m) + " m that is more than 20 million points");
  if (r.has("sectors")) {
    t.sectors_mark = r.node().find("sectors")->mark;
    t.sectors_m = r.quantities("sectors", Quantity::length, non_negative());
    const Node& list = *r.node().find("sectors");
    if (t.sectors_m.empty() || t.sectors_m.front() != 0.0)
      r.fail(list, "sectors must start at 0 m", "sectors");
    for (std::size_t i = 1; i < t.sectors_m.size(); ++i) {
      if (t.sectors_m[i] <= t.sectors_m[i - 1])
        r.fail(list.items[i], "sector starts must be strictly increasing", "sectors");
      if (t.sectors_m[i] >= length)
        r.fail(list.items[i],
               "sector start lies beyond the track's length (" + std::to_string(length) + " m)",
               "sectors");
    }
  } else {
    t.sectors_m = {0.0};
  }
  r.finish();
  if (t.line) {
    // The line over the path just read: what every command laps. Its errors (no widths, a
    // track narrower than the vehicle and its margins) are the `line` key's.
    try {
      lay_racing_line(t);
    } catch (const LineError& e) {
      throw InputError(file, t.line_mark, e.what(), e.key_path());
    }
  }
  return t;
}

}  // namespace lapwing
