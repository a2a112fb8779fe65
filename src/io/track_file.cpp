#include "lapwing/io/track_file.hpp"

#include <filesystem>
#include <memory>

#include "lapwing/base/units.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/input_file.hpp"
#include "lapwing/io/track_data.hpp"
#include "lapwing/path/racing_line.hpp"

namespace lapwing {

// The reader takes the file's keys, units and forms; the values' rules are Track::validate's,
// called once the file is read, each violation mapped back to its place by the source map. What
// the model does not keep is checked here: an arc's radius and angle (the radius's sign is the
// turn's), with the model's ranges.

namespace {

// A curvature profile's source_spacing: (0, 10 km] (points further apart than that are no
// track's data).
constexpr Range source_spacing_range{0.0, 10000.0, true, false};

double turn_sign(Reader& r) {
  return r.choice("turn", {"left", "right"}) == "left" ? 1.0 : -1.0;
}

Segment read_segment(const Document& doc, const Node& item, const std::string& path,
                     SourceMap& sources) {
  if (item.kind != Node::Kind::map || item.entries.size() != 1)
    throw InputError(doc.file, item.mark,
                     "a segment is one of 'straight: LENGTH', 'straight: {...}', 'arc: {...}', "
                     "'clothoid: {...}'",
                     path);
  const auto& [kind, body] = item.entries.front();
  const std::string p = path + "." + kind;
  Segment s{};
  if (kind == "straight") {
    s.kind = Segment::Kind::straight;
    if (body.kind == Node::Kind::scalar) {
      Reader parent(doc, item, path);
      s.length_m = parent.node_quantity(body, Quantity::length, p);
      sources.alias(p + ".length", p);  // the bare length is the straight's length
      return s;
    }
    Reader r(doc, body, p);
    s.length_m = r.quantity("length", Quantity::length);
    s.grade = r.quantity_or("grade", Quantity::fraction, 0.0);
    s.width_m = r.optional_quantity("width", Quantity::length);
    s.bank_rad = r.quantity_or("bank", Quantity::angle, 0.0);
    r.finish();
    return s;
  }
  if (kind == "arc") {
    s.kind = Segment::Kind::arc;
    Reader r(doc, body, p);
    const double radius = r.quantity("radius", Quantity::length, Segment::radius_range);
    const double angle = r.quantity("angle", Quantity::angle, Segment::angle_range);
    const double sign = turn_sign(r);
    s.length_m = radius * angle;
    s.curvature_start_1pm = s.curvature_end_1pm = sign / radius;
    s.grade = r.quantity_or("grade", Quantity::fraction, 0.0);
    s.width_m = r.optional_quantity("width", Quantity::length);
    s.bank_rad = r.quantity_or("bank", Quantity::angle, 0.0);
    r.finish();
    return s;
  }
  if (kind == "clothoid") {
    s.kind = Segment::Kind::clothoid;
    Reader r(doc, body, p);
    s.length_m = r.quantity("length", Quantity::length);
    auto from = r.optional_quantity("from_radius", Quantity::length, Segment::radius_range);
    auto to = r.optional_quantity("to_radius", Quantity::length, Segment::radius_range);
    const double sign = turn_sign(r);
    // A missing radius is straight (curvature 0); none at all is Segment::validate's error.
    s.curvature_start_1pm = from ? sign / *from : 0.0;
    s.curvature_end_1pm = to ? sign / *to : 0.0;
    s.grade = r.quantity_or("grade", Quantity::fraction, 0.0);
    s.width_m = r.optional_quantity("width", Quantity::length);
    s.bank_rad = r.quantity_or("bank", Quantity::angle, 0.0);
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

TrackFile read_track_file(const std::string& file) {
  const auto shared = std::make_shared<const Document>(load_document(file));
  const Document& doc = *shared;
  // Positions are indexed only if an error asks for one: a long track's file is mostly segments.
  TrackFile out{Track{}, SourceMap(shared)};
  Track& t = out.track;
  auto check = [&](std::optional<Violation> v, std::string_view prefix = {}) {
    if (v) throw out.sources.error(v->under(prefix));
  };
  Reader r(doc, doc.root, "");
  r.keys({"format", "name", "closed", "start_speed", "altitude", "ambient", "mesh", "segments",
          "sectors", "centerline", "curvature", "width", "line", "wind", "trim_zones"});
  {
    const Node& n = r.require("format");
    if (r.node_quantity(n, Quantity::number, "format") != 1.0)
      r.fail(n, "unsupported format " + n.scalar + " (this lapwing reads format 1)", "format");
  }
  t.file = file;
  t.id = std::filesystem::path(file).stem().string();
  t.name = r.string("name");
  t.closed = r.boolean_or("closed", true);
  if (const Node* n = r.get("start_speed")) {
    // The key given at all on a closed track (Track::validate: a start speed other than 0).
    if (t.closed)
      r.fail(*n, "start_speed applies to open tracks only (closed: false)", "start_speed");
    t.start_speed_mps = r.node_quantity(*n, Quantity::speed, "start_speed");
  }
  t.air.altitude_m = r.quantity_or("altitude", Quantity::length, 0.0);
  if (r.has("ambient")) {
    Reader a = r.map("ambient");
    t.air.temperature_k = a.optional_quantity("temperature", Quantity::temperature);
    t.air.pressure_pa = a.optional_quantity("pressure", Quantity::pressure);
    t.air.relative_humidity = a.quantity_or("humidity", Quantity::fraction, 0.0);
    a.finish();
  }
  t.mesh_m = r.quantity_or("mesh", Quantity::length, 0.5);
  const int forms = int(r.has("segments")) + int(r.has("centerline")) + int(r.has("curvature"));
  if (forms != 1) r.fail(r.node(), "give exactly one of segments, centerline, curvature");
  // A data file named inside the track file is found from the track file's folder.
  auto data_file = [&](Reader& m) {
    const Node& n = m.require("file");
    const std::string f = m.node_string(n, m.child_path("file"));
    const std::filesystem::path p =
        std::filesystem::path(f).is_absolute() ? std::filesystem::path(f) : doc.directory / f;
    // One that cannot be read is this key's error, with the reason (no such file, a folder).
    if (const auto why = unreadable(p.string())) m.fail(n, p.string() + ": " + *why, "file");
    return p.string();
  };
  if (r.has("centerline")) {
    Reader c = r.map("centerline");
    c.keys({"file", "smoothing", "elevation_smoothing", "source_verdict"});
    CenterlineOptions o;
    const std::string f = data_file(c);
    // The data-quality verdict of the data the points were made from (`track line` writes its
    // source's): the track's own verdict is held to it at best.
    const std::string source_verdict =
        c.has("source_verdict") ? c.choice("source_verdict", {"good", "usable", "poor"}) : "";
    // `smoothing: auto` (the default) lets generalised cross-validation choose; a length
    // overrides, in the file's range (the fit takes any positive length).
    if (const Node* sm = c.get("smoothing");
        sm && !(sm->kind == Node::Kind::scalar && sm->scalar == "auto"))
      o.smoothing_m = c.node_quantity(*sm, Quantity::length, c.child_path("smoothing"),
                                      CenterlineOptions::file_smoothing_range);
    if (c.has("elevation_smoothing"))
      o.elevation_smoothing_m = c.quantity("elevation_smoothing", Quantity::length,
                                           CenterlineOptions::file_elevation_smoothing_range);
    c.finish();
    ProfileFile data = read_centerline_file(f, t.closed, o);
    t.profile = std::move(data.profile);
    t.profile->source_verdict = source_verdict;
    out.sources.data("centerline", f, std::move(data.lines));
  } else if (r.has("curvature")) {
    Reader c = r.map("curvature");
    c.keys({"file", "source_spacing"});
    const std::string f = data_file(c);
    // The spacing of the data the rows were resampled from (a log's: `track from-log`), which
    // the data-quality verdict judges instead of the rows'.
    const std::optional<double> source_spacing =
        c.has("source_spacing") ? std::optional<double>(c.quantity(
                                      "source_spacing", Quantity::length, source_spacing_range))
                                : std::nullopt;
    c.finish();
    ProfileFile data = read_curvature_file(f);
    t.profile = std::move(data.profile);
    if (source_spacing) t.profile->source_spacing_m = *source_spacing;
    out.sources.data("curvature", f, std::move(data.lines));
  } else {
    const Node& segs = r.require("segments");
    if (segs.kind != Node::Kind::sequence || segs.items.empty())
      r.fail(segs, "expected a non-empty list of segments", "segments");
    for (std::size_t i = 0; i < segs.items.size(); ++i)
      t.segments.push_back(
          read_segment(doc, segs.items[i], "segments[" + std::to_string(i) + "]", out.sources));
  }
  t.width_m = r.optional_quantity("width", Quantity::length);
  if (r.has("line")) {
    // The racing line to lap (path/racing_line.hpp); its rules are LineSpec::validate's.
    Reader l = r.map("line");
    l.keys({"method", "vehicle_width", "margin"});
    LineSpec spec;
    const std::string method = l.choice("method", {"min-curvature", "min-time"}, "min-curvature");
    spec.method =
        method == "min-time" ? LineSpec::Method::min_time : LineSpec::Method::min_curvature;
    spec.vehicle_width_m = l.quantity_or("vehicle_width", Quantity::length, spec.vehicle_width_m);
    spec.margin_m = l.quantity_or("margin", Quantity::length, spec.margin_m);
    l.finish();
    t.line = spec;
  }
  if (r.has("wind")) {
    // The wind's rules are Wind::validate's.
    Reader w = r.map("wind");
    w.keys({"speed", "from"});
    Wind wind;
    wind.speed_mps = w.quantity("speed", Quantity::speed);
    wind.from_rad = w.quantity("from", Quantity::angle);
    w.finish();
    t.wind = wind;
  }
  if (const Node* zones = r.get("trim_zones")) {
    // A list of [start, end] pairs (the form is the reader's; order and bounds are
    // Track::validate's).
    if (zones->kind != Node::Kind::sequence)
      r.fail(*zones, "expected a list of [start, end] pairs", "trim_zones");
    for (std::size_t i = 0; i < zones->items.size(); ++i) {
      const Node& z = zones->items[i];
      const std::string at = "trim_zones[" + std::to_string(i) + "]";
      if (z.kind != Node::Kind::sequence || z.items.size() != 2)
        throw InputError(doc.file, z.mark, "expected a pair [start, end]", at);
      t.trim_zones.push_back({r.node_quantity(z.items[0], Quantity::length, at + "[0]"),
                              r.node_quantity(z.items[1], Quantity::length, at + "[1]")});
    }
  }
  if (r.has("sectors")) {
    t.sectors_m = r.quantities("sectors", Quantity::length);
  }
  check(t.validate());
  r.finish();
  if (t.line) {
    // The line over the path just read: what every command laps. Its errors (no widths, a
    // track narrower than the vehicle and its margins) are the `line` key's.
    try {
      lay_racing_line(t);
    } catch (const InvalidInput& e) {
      if (e.subject() != t.subject()) throw;
      throw out.sources.error(e.violation());
    }
  }
  return out;
}

Track load_track(const std::string& file) {
  return read_track_file(file).track;
}

}  // namespace lapwing
