#include "lapwing/path/mesh.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>
#include <memory>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/memory.hpp"
#include "lapwing/base/units.hpp"

namespace lapwing {

namespace {

// Five-point Gauss-Legendre rule on [-1, 1] (Abramowitz & Stegun 25.4.30): exact for polynomials
// of degree 9; over a mesh step the heading is a quadratic of tiny span, so the error is at
// round-off level.
constexpr std::array<double, 5> gl_nodes{-0.9061798459386640, -0.5384693101056831, 0.0,
                                         0.5384693101056831, 0.9061798459386640};
constexpr std::array<double, 5> gl_weights{0.2369268850561891, 0.4786286704993665,
                                           0.5688888888888889, 0.4786286704993665,
                                           0.2369268850561891};

// The cosine and sine of a turn |psi| <= small_turn_rad by their Taylor series (Abramowitz &
// Stegun 4.3.65-66; from memory): the first term left out, psi^12 / 12! and psi^11 / 11!, is below
// 3e-19 there, under a unit in the last place of either.
constexpr double small_turn_rad = 0.1;
struct TurnBy {
  double cos, sin;
};
inline TurnBy small_turn(double psi) {
  const double p2 = psi * psi;
  const double c =
      1.0 -
      p2 / 2.0 * (1.0 - p2 / 12.0 * (1.0 - p2 / 30.0 * (1.0 - p2 / 56.0 * (1.0 - p2 / 90.0))));
  const double s =
      psi * (1.0 - p2 / 6.0 * (1.0 - p2 / 20.0 * (1.0 - p2 / 42.0 * (1.0 - p2 / 72.0))));
  return {c, s};
}

// Walks the segments, giving position, heading and elevation at increasing distances.
class Walker {
 public:
  /// Where a segment starts: position, elevation and heading.
  struct Start {
    double x, y, z, heading;
  };

  /// A walk from the track's start, each segment walked to its end before the next.
  explicit Walker(const Track& t) : track_(t) { segment_changed(); }
  /// A walk that takes each segment's start from `starts` (segment_walk) instead of walking
  /// the segment before to its end: it may start anywhere, and where it passes a point it
  /// finds the same state as any other such walk that steps to that point from the same
  /// segment start the same way.
  Walker(const Track& t, const std::vector<Start>& starts) : track_(t), starts_(&starts) {
    enter(0);
  }

  struct State {
    double x, y, heading, curvature, elevation, grade, width, bank;
  };

  /// The start of every segment, each walked whole from the last (one step for a straight or an
  /// arc, pieces of at most max_piece_m for a clothoid), and the state at the track's end.
  struct Walk {
    std::vector<Start> starts;
    State end;
  };
  static Walk segment_walk(const Track& t) {
    Walker w(t);
    Walk out;
    out.starts.reserve(t.segments.size());
    out.starts.push_back({0.0, 0.0, 0.0, 0.0});
    // The steps at() takes from one segment to the next on its way to the track's end, so that
    // `end` is what a walk from the start to the end finds (closure() reads it).
    for (std::size_t k = 0; k + 1 < t.segments.size(); ++k) {
      w.advance_to(w.seg().length_m);
      w.next_segment();
      out.starts.push_back({w.x_, w.y_, w.z_, w.heading0_});
    }
    out.end = w.at(t.length_m());
    return out;
  }

  /// segment_walk(t).end.elevation alone, without the positions: the same rises (rise) in the
  /// same order, to the last bit.
  static double end_elevation(const Track& t) {
    double z = 0.0, seg_start = 0.0;
    for (std::size_t k = 0; k + 1 < t.segments.size(); ++k) {
      z += rise(t.segments[k], 0.0, t.segments[k].length_m);
      seg_start += t.segments[k].length_m;
    }
    // at(length): the last segment from its start to max(0, length - its start).
    z += rise(t.segments.back(), 0.0, std::max(0.0, t.length_m() - seg_start));
    return z;
  }

  // Advances to distance s (not before the current one) and returns the state there.
  State at(double s) { return at(s, true); }
  /// The same without walking the position (x and y stay at the segment's start): elevation,
  /// heading and the rest are worked as at(s) works them, to the same bits.
  State at(double s, bool positions) {
    // Move into the segment holding s; the last segment holds everything beyond.
    while (!last_segment_ && s >= seg_end_) {
      if (starts_) {
        seg_start_ += seg().length_m;
        enter(seg_ + 1);
        continue;
      }
      advance_to(seg().length_m);
      next_segment();
    }
    if (positions)
      advance_to(std::max(u_, s - seg_start_));
    else
      skip_to(std::max(u_, s - seg_start_));
    return {x_, y_, heading_here(), curvature(u_), z_, seg().grade, width_, bank_};
  }

 private:
  // Into segment k at its start (starts_).
  void enter(std::size_t k) {
    const Start& st = (*starts_)[k];
    seg_ = k;
    u_ = 0.0;
    x_ = st.x;
    y_ = st.y;
    z_ = st.z;
    heading0_ = st.heading;
    segment_changed();
  }
  // On into the next segment from the end of this one (walked to it): its start heading is
  // this one's end heading.
  void next_segment() {
    heading0_ = heading(seg().length_m);
    seg_start_ += seg().length_m;
    ++seg_;
    u_ = 0.0;
    segment_changed();
  }
  // What holds along the whole of the segment now walked, read once on entering it.
  void segment_changed() {
    heading_known_ = false;
    if (track_.segments.empty()) return;  // nothing to walk (Track::validate refuses it)
    const Segment& g = seg();
    seg_end_ = seg_start_ + g.length_m;
    last_segment_ = seg_ + 1 >= track_.segments.size();
    width_ = g.width_m.value_or(track_.width_m.value_or(0.0));
    bank_ = g.signed_bank_rad();
  }
  const Segment& seg() const { return track_.segments[seg_]; }
  // The elevation gained along segment g from u0 to u1 (into it).
  static double rise(const Segment& g, double u0, double u1) { return g.grade * (u1 - u0); }
  // kappa(u) = k0 + (k1 - k0) u / L
  static double curvature_at(const Segment& g, double u) {
    return g.curvature_start_1pm + (g.curvature_end_1pm - g.curvature_start_1pm) * u / g.length_m;
  }
  double curvature(double u) const { return curvature_at(seg(), u); }
  // theta(u) = theta0 + k0 u + (k1 - k0) u^2 / (2 L)
  static double heading_at(const Segment& g, double theta0, double u) {
    return theta0 + g.curvature_start_1pm * u +
           (g.curvature_end_1pm - g.curvature_start_1pm) * u * u / (2.0 * g.length_m);
  }
  double heading(double u) const { return heading_at(seg(), heading0_, u); }
  // heading(u_), kept from the step that reached u_ (worked once a point, not once a use).
  double heading_here() {
    if (!heading_known_) {
      heading_here_ = heading(u_);
      heading_known_ = true;
    }
    return heading_here_;
  }
  // advance_to without the position: the elevation as it adds it, the heading left to
  // heading_here (which advance_to's arcs set to the same heading(u1)).
  void skip_to(double u1) {
    assert(u1 >= u_);
    z_ += rise(seg(), u_, u1);
    if (u1 != u_) heading_known_ = false;
    u_ = u1;
  }

  // Walks on to distance u1 into the current segment.
  void advance_to(double u1) {
    assert(u1 >= u_);
    const Segment& g = seg();
    if (g.curvature_start_1pm == g.curvature_end_1pm) {
      // Straight or arc: the closed form, no quadrature. A straight moves along its heading;
      // an arc of curvature k from heading t0 to t1 moves by ((sin t1 - sin t0) / k,
      // (cos t0 - cos t1) / k) (the integral of (cos t, sin t) ds with dt = k ds). The cosine
      // and sine at a step's end are the next step's start (one sincos a mesh point).
      const double k = g.curvature_start_1pm;
      const Direction d0 = direction(heading_here());
      if (k == 0.0) {
        // A straight's heading(u) is theta0 + 0 u + 0 u^2 / (2 L) for every u >= 0, the same
        // to the last bit (a zero's sign does not depend on u): heading_here() still holds.
        x_ += (u1 - u_) * d0.cos;
        y_ += (u1 - u_) * d0.sin;
      } else {
        const double t1 = heading(u1);
        const Direction d1 = direction(t1);
        x_ += (d1.sin - d0.sin) / k;
        y_ += (d0.cos - d1.cos) / k;
        heading_here_ = t1;
        heading_known_ = true;
      }
      z_ += rise(g, u_, u1);
      u_ = u1;
      return;
    }
    const Plane p = clothoid_walk(g, heading0_, u_, u1, {x_, y_});
    x_ = p.x;
    y_ = p.y;
    z_ += rise(g, u_, u1);
    u_ = u1;
    heading_known_ = false;
  }

  // A position in the plane.
  struct Plane {
    double x, y;
  };
  // From p at u0 on to u1 along clothoid g (heading theta0 at its start). Apart from the walker
  // (it is handed what it reads), so that the walker's state can stay in registers through a
  // mesh point's step; out of line, as it is the rare and long step. Pieces of at most
  // max_piece_m keep the 5-point rule at round-off level however long the walk (closure() walks
  // whole segments at once).
  [[gnu::noinline]] static Plane clothoid_walk(const Segment& g, double theta0, double u0,
                                               double u1, Plane p) {
    const int pieces = std::max(1, static_cast<int>(std::ceil((u1 - u0) / max_piece_m)));
    const double piece = (u1 - u0) / pieces;
    // Over a piece the heading is theta_c + psi(d), d from the piece's middle c, psi(d) =
    // kappa_c d + q d^2 exactly (q = (k1 - k0) / (2 L)): the nodes' directions are the middle's
    // turned by psi, whose cosine and sine are short series where |psi| is small (one sincos
    // a piece, not five).
    const double q = (g.curvature_end_1pm - g.curvature_start_1pm) / (2.0 * g.length_m);
    for (int j = 0; j < pieces; ++j) {
      const double a = u0 + j * piece;
      const double h = 0.5 * piece, c = a + h;
      const double kc = curvature_at(g, c);
      double cs = 0.0, sn = 0.0;  // sum of w_k cos psi_k and w_k sin psi_k
      if (std::abs(kc) * h + std::abs(q) * h * h <= small_turn_rad) {
        for (std::size_t k = 0; k < gl_nodes.size(); ++k) {
          // The middle node turns by psi = +-0: cos 1 and sin +-0 exactly, which adds w_k to
          // cs and leaves sn as it is (a sum from +0 is never -0).
          if (gl_nodes[k] == 0.0) {
            cs += gl_weights[k];
            continue;
          }
          const double d = h * gl_nodes[k];
          const TurnBy t = small_turn((kc + q * d) * d);
          cs += gl_weights[k] * t.cos;
          sn += gl_weights[k] * t.sin;
        }
      } else {
        for (std::size_t k = 0; k < gl_nodes.size(); ++k) {
          const double d = h * gl_nodes[k], psi = (kc + q * d) * d;
          cs += gl_weights[k] * std::cos(psi);
          sn += gl_weights[k] * std::sin(psi);
        }
      }
      const double th = heading_at(g, theta0, c), ct = std::cos(th), st = std::sin(th);
      p.x += h * (ct * cs - st * sn);
      p.y += h * (st * cs + ct * sn);
    }
    return p;
  }

  // cos and sin of a heading, the last one kept (a step's end is the next one's start).
  struct Direction {
    double cos, sin;
  };
  Direction direction(double th) {
    if (th != last_heading_) {
      last_heading_ = th;
      last_direction_ = {std::cos(th), std::sin(th)};
    }
    return last_direction_;
  }

  static constexpr double max_piece_m = 1.0;
  double last_heading_ = std::numeric_limits<double>::quiet_NaN();
  Direction last_direction_{1.0, 0.0};
  const Track& track_;
  const std::vector<Start>* starts_ = nullptr;
  std::size_t seg_ = 0;
  double seg_start_ = 0.0;  // distance at the segment's start
  double seg_end_ = 0.0;    // seg_start_ + its length: where at() moves on to the next
  bool last_segment_ = false;
  double width_ = 0.0, bank_ = 0.0;  // the segment's width and signed bank
  double heading_here_ = 0.0;        // heading(u_) where heading_known_
  bool heading_known_ = false;
  double u_ = 0.0;  // distance into the segment already walked
  double x_ = 0.0, y_ = 0.0, z_ = 0.0, heading0_ = 0.0;
};

double wrap_angle(double a) {
  a = std::fmod(a, 2 * units::pi);
  if (a > units::pi) a -= 2 * units::pi;
  if (a <= -units::pi) a += 2 * units::pi;
  return a;
}

// A segment track's closure from the state at its end (its start is the origin, heading 0).
Closure closure_at(const Walker::State& end) {
  return {std::hypot(end.x, end.y), wrap_angle(end.heading), end.elevation, end.heading};
}

}  // namespace

namespace {

double turning_of(const PathProfile& p) {
  double th = 0.0;
  for (std::size_t i = 1; i < p.s_m.size(); ++i)
    th += 0.5 * (p.curvature_1pm[i - 1] + p.curvature_1pm[i]) * (p.s_m[i] - p.s_m[i - 1]);
  return th;
}

}  // namespace

const PathProfile* lapped_profile(const Track& track) {
  if (track.line_path) return &*track.line_path;
  if (track.profile) return &*track.profile;
  return nullptr;
}

std::vector<double> lapped_sectors_m(const Track& track) {
  if (!track.line_path) return track.sectors_m;
  const PathProfile& l = *track.line_path;
  std::vector<double> out;
  for (double s : track.sectors_m) out.push_back(interpolate(l.reference_s_m, l.s_m, s));
  return out;
}

Closure closure(const Track& track) {
  if (const PathProfile* lapped = lapped_profile(track)) {
    const PathProfile& p = *lapped;
    const double turning = turning_of(p);
    // A closed centerline's fitted loop ends where it starts by construction: the gap that
    // tells is the data's, from the last point to the first.
    const bool data_gap = track.closed && p.source == PathProfile::Source::centerline;
    return {data_gap ? p.data_closure_gap_m
                     : std::hypot(p.x_m.back() - p.x_m.front(), p.y_m.back() - p.y_m.front()),
            wrap_angle(turning), p.elevation_m.back() - p.elevation_m.front(), turning};
  }
  return closure_at(Walker::segment_walk(track).end);
}

double closure_position_tolerance_m(const Track& track) {
  const double by_length = closure_position_fraction * track.length_m();
  const PathProfile* p = lapped_profile(track);
  if (!p) return by_length;
  if (p->source == PathProfile::Source::curvature) return std::numeric_limits<double>::infinity();
  return std::max(closure_spacings * p->point_spacing_m, by_length);
}

double closure_elevation_tolerance_m(const Track& track) {
  return std::max(closure_elevation_floor_m, closure_elevation_fraction * track.length_m());
}

std::vector<std::string> track_warnings(const Track& track) {
  std::vector<std::string> out;
  if (track.closed) {
    const PathProfile* lapped = lapped_profile(track);
    // A segment track's warning reads the elevation gap alone: no positions walked for it.
    const Closure c =
        lapped ? closure(track) : Closure{0.0, 0.0, Walker::end_elevation(track), 0.0};
    const double length = track.length_m();
    if (lapped && lapped->source == PathProfile::Source::curvature) {
      const double tolerance = closure_position_fraction * length;
      if (c.position_gap_m > tolerance)
        out.push_back("the closed curvature profile's end is " + fixed(c.position_gap_m, 1) +
                      " m from its start (tolerance " + fixed(100 * closure_position_fraction, 1) +
                      " % of the length = " + fixed(tolerance, 1) +
                      " m), where a closed lap ends where it starts; likely rows missing at an "
                      "end (a cut or truncated export: the lap is then that much short), or a "
                      "distance or curvature column that reads long or short");
    }
    const double tolerance = closure_elevation_tolerance_m(track);
    if (std::abs(c.elevation_gap_m) > tolerance)
      out.push_back(
          "the closed lap ends " + fixed(std::abs(c.elevation_gap_m), 2) + " m " +
          (c.elevation_gap_m > 0 ? "above" : "below") + " its start (tolerance max(" +
          fixed(closure_elevation_floor_m, 0) + " m, " +
          fixed(100 * closure_elevation_fraction, 1) +
          " % of the length) = " + fixed(tolerance, 2) + " m): every lap " +
          (c.elevation_gap_m > 0 ? "climbs" : "descends") +
          " that much net, which no circuit does; likely a grade typed with the wrong sign, or "
          "grades or heights that do not add up");
  }
  if (track.profile)
    for (const std::string& w : track.profile->warnings) out.push_back(w);
  // A mesh coarser than the coarsest of the convergence tables (README, "Performance": lap
  // times within 9e-4 at 2 m) steps over a tight corner in a point or two: a robustness
  // campaign's 10 m mesh read an apex of Brannock Park at half its grip limit, and lap times
  // were off by a percent either way, with nothing said.
  if (track.mesh_m > coarsest_checked_mesh_m)
    out.push_back("the mesh step, " + format_number(track.mesh_m) + " m, is coarser than " +
                  format_number(coarsest_checked_mesh_m) +
                  " m, the coarsest whose convergence lapwing shows: lap times can be off by a "
                  "percent and a tight corner's speed by far more; give a mesh of 2 m or finer");
  return out;
}

namespace {

// A closed track must close: the error states the gap and the tolerance, at the path's key.
void check_closure(const Track& track, const Closure& c) {
  const double position_tolerance = closure_position_tolerance_m(track);
  const bool position_bad = c.position_gap_m > position_tolerance;
  const bool heading_bad = std::abs(c.heading_gap_rad) > closure_heading_deg * units::deg;
  if (!position_bad && !heading_bad) return;
  std::ostringstream os;
  os.precision(4);
  Violation v;
  const PathProfile* lapped = lapped_profile(track);
  v.field = track.line_path ? "line" : track.path_key();
  if (!lapped) {
    os << "closed track does not close: the end is " << c.position_gap_m << " m from the start"
       << " and its heading differs by " << c.heading_gap_rad / units::deg << " deg (tolerance "
       << closure_position_fraction * 100 << " % of the length = " << position_tolerance << " m, "
       << closure_heading_deg << " deg)";
  } else if (position_bad) {
    // Only a centerline's position is checked: the fit closes its loop itself (periodic), so
    // the data's gap is what can fail.
    // The sentence names the last point where it says {point}: a loader, by its file and line.
    const PathProfile& p = *lapped;
    v.point = v.field + ".points[" + std::to_string(p.last_point_index) + "]";
    v.point_text = "data point " + std::to_string(p.last_point_index + 1) + " of " + p.data_file;
    os << "closed centerline does not close: its last point ({point}) is " << c.position_gap_m
       << " m from its first (tolerance max(" << closure_spacings << " x the point spacing of "
       << p.point_spacing_m << " m, " << closure_position_fraction * 100
       << " % of the length) = " << position_tolerance
       << " m); add the missing points, or set closed: false";
  } else {
    os << "closed "
       << (lapped->source == PathProfile::Source::centerline ? "centerline"
           : lapped->source == PathProfile::Source::line     ? "racing line"
                                                             : "curvature profile")
       << " does not close: its heading at the end differs by " << c.heading_gap_rad / units::deg
       << " deg from a whole number of turns (tolerance " << closure_heading_deg
       << " deg); its end is " << c.position_gap_m << " m from its start";
  }
  v.rule = os.str();
  throw InvalidInput(track.subject(), std::move(v));
}

}  // namespace

std::optional<PointRun> longest_straight(const Mesh& mesh, double straight_below_1pm) {
  PointRun best, run;
  bool in = false;
  for (std::size_t i = 0; i < mesh.size(); ++i) {
    if (std::abs(mesh.curvature_1pm[i]) < straight_below_1pm) {
      if (!in) run.first = i;
      run.last = i;
      in = true;
      if (run.last - run.first > best.last - best.first) best = run;
    } else {
      in = false;
    }
  }
  if (best.last == best.first) return std::nullopt;
  return best;
}

// A mesh of at least this many points lays out its two halves on two threads: a thread's start
// and join (some 25 microseconds here, measured) against some 100 ns a point.
constexpr std::size_t points_apart = 20000;

std::size_t mesh_point_count(const Track& track, double step_m) {
  return std::max<std::size_t>(2,
                               static_cast<std::size_t>(std::llround(track.length_m() / step_m))) +
         1;
}

DescribedBank::DescribedBank(const Track& track) : track_(track) {
  for (double l = 0.0; const auto& g : track.segments) segment_end_m_.push_back(l += g.length_m);
}

double DescribedBank::at(double s) const {
  if (track_.profile) {
    const PathProfile& p = *track_.profile;
    return p.bank_rad.empty() ? 0.0 : interpolate(p.s_m, p.bank_rad, s);
  }
  if (segment_end_m_.empty()) return 0.0;
  const auto k = static_cast<std::size_t>(
      std::upper_bound(segment_end_m_.begin(), segment_end_m_.end(), s) - segment_end_m_.begin());
  return track_.segments[std::min(k, segment_end_m_.size() - 1)].signed_bank_rad();
}

void require_positions(const Mesh& mesh, const char* reader) {
  if (!mesh.has_positions())
    throw std::logic_error(std::string(reader) +
                           " reads the mesh's positions, and it was laid out without them");
}

Mesh build_mesh(const Track& track, double step_m, unsigned threads, MeshPositions positions) {
  require_valid(track.validate(), track.subject());
  require_valid(
      FirstViolation().range("step_m", step_m, Track::mesh_range, Quantity::length).result(),
      "mesh step");
  const double length = track.length_m();
  const PathProfile* lapped = lapped_profile(track);
  // A segment track's walk to each segment's start, which also finds where its end is.
  std::optional<Walker::Walk> segments;
  if (!lapped) segments = Walker::segment_walk(track);
  if (track.closed) check_closure(track, segments ? closure_at(segments->end) : closure(track));
  const std::size_t n = mesh_point_count(track, step_m) - 1;
  Mesh m;
  m.closed = track.closed;
  m.length_m = length;
  m.step_m = length / static_cast<double>(n);
  // A level segment track has no grade or elevation and an unbanked one no bank (Mesh: empty,
  // read as 0): those are not laid out at all (a profile's are, and kept where not all 0).
  const bool graded = lapped || std::any_of(track.segments.begin(), track.segments.end(),
                                            [](const Segment& g) { return g.grade != 0.0; });
  const bool bank =
      lapped || std::any_of(track.segments.begin(), track.segments.end(),
                            [](const Segment& g) { return g.signed_bank_rad() != 0.0; });
  // A long mesh is laid out on two threads where there are two (the halves are the same either
  // way); its buffers are made ready on both.
  if (threads == 0) threads = n + 1 >= points_apart && usable_processors() >= 2 ? 2 : 1;
  const std::unique_ptr<SecondThread> second =
      threads >= 2 ? SecondThread::try_start() : nullptr;  // none to be had: one thread
  const bool xy = positions == MeshPositions::laid_out;
  const bool headings = xy || track.wind.has_value();
  resize_ready({&m.s_m, &m.curvature_1pm}, n + 1, second.get());
  if (xy) resize_ready({&m.x_m, &m.y_m}, n + 1, second.get());
  if (headings) resize_ready({&m.heading_rad}, n + 1, second.get());
  if (graded) resize_ready({&m.grade, &m.elevation_m}, n + 1, second.get());
  if (bank) resize_ready({&m.bank_rad}, n + 1, second.get());
  m.trim_zone.assign(n + 1, 1);
  const bool widths = track.has_widths() || (lapped && !lapped->width_left_m.empty());
  if (widths)
    for (auto* v : {&m.width_left_m, &m.width_right_m}) v->resize(n + 1);
  if (lapped) {
    // From the profile's samples: curvature, grade, position and elevation linear between
    // them; heading integrated from the curvature from the first chord's direction.
    const PathProfile& p = *lapped;
    AxisWalk walk(p.s_m);
    double heading = std::atan2(p.y_m[1] - p.y_m[0], p.x_m[1] - p.x_m[0]);
    for (std::size_t i = 0; i <= n; ++i) {
      const double s = (i == n) ? length : static_cast<double>(i) * m.step_m;
      const Bracket b = walk.at(s);
      m.s_m[i] = s;
      if (xy) {
        m.x_m[i] = at(p.x_m, b);
        m.y_m[i] = at(p.y_m, b);
      }
      m.curvature_1pm[i] = at(p.curvature_1pm, b);
      m.grade[i] = at(p.grade, b);
      m.elevation_m[i] = at(p.elevation_m, b);
      if (widths) {
        m.width_left_m[i] = at(p.width_left_m, b);
        m.width_right_m[i] = at(p.width_right_m, b);
      }
      if (i) heading += 0.5 * (m.curvature_1pm[i - 1] + m.curvature_1pm[i]) * m.step_m;
      if (headings) m.heading_rad[i] = heading;
    }
  }
  if (!lapped) {
    // Segments: each point walked from its segment's start (Walker::segment_walk), point by
    // point; the points in two halves, each with a walk of its own (on two threads for a long
    // mesh). A point's state depends on its segment's start and the steps the walk took to it
    // in the segment alone: the halves are always the same, so the mesh is whatever the
    // threads.
    const std::vector<Walker::Start>& starts = segments->starts;
    const auto points = [&](std::size_t lo, std::size_t hi) {
      Walker w(track, starts);
      for (std::size_t i = lo; i < hi; ++i) {
        const double s = (i == n) ? length : static_cast<double>(i) * m.step_m;
        const auto st = w.at(s, xy);
        m.s_m[i] = s;
        if (xy) {
          m.x_m[i] = st.x;
          m.y_m[i] = st.y;
        }
        if (headings) m.heading_rad[i] = st.heading;
        m.curvature_1pm[i] = st.curvature;
        if (graded) {
          m.elevation_m[i] = st.elevation;
          m.grade[i] = st.grade;
        }
        if (bank) m.bank_rad[i] = st.bank;
        if (widths) m.width_left_m[i] = m.width_right_m[i] = 0.5 * st.width;
      }
    };
    in_halves(n + 1, second.get(), points);
  }
  if (lapped) {
    // Bank and trim zones are given along the described path: a racing line reads them where
    // it passes (its reference distance), as it does the sectors.
    const bool line = track.line_path.has_value();
    const DescribedBank described_bank(track);
    for (std::size_t i = 0; i <= n; ++i) {
      const double s = line ? interpolate(lapped->s_m, lapped->reference_s_m, m.s_m[i]) : m.s_m[i];
      m.bank_rad[i] = described_bank.at(s);
    }
  }
  if (!track.trim_zones.empty()) {
    const bool line = track.line_path.has_value();
    for (std::size_t i = 0; i <= n; ++i) {
      const double s = line ? interpolate(lapped->s_m, lapped->reference_s_m, m.s_m[i]) : m.s_m[i];
      m.trim_zone[i] =
          std::any_of(track.trim_zones.begin(), track.trim_zones.end(),
                      [s](const TrimZone& z) { return s >= z.start_m && s < z.end_m; });
    }
  }
  if (track.closed) {
    // One lap: the last point is the first again (the closure gap is within tolerance).
    m.curvature_1pm[n] = m.curvature_1pm[0];
    if (graded) m.grade[n] = m.grade[0];
    if (bank) m.bank_rad[n] = m.bank_rad[0];
    m.trim_zone[n] = m.trim_zone[0];
  }
  // A flat track keeps no bank and no elevation, and still air no head wind (Mesh: empty, read
  // as 0). The storage goes with a new vector: `= {}` would assign an empty list and keep it.
  const auto zero = [](const std::vector<double>& v) {
    return std::all_of(v.begin(), v.end(), [](double x) { return x == 0.0; });
  };
  if (zero(m.bank_rad)) m.bank_rad = std::vector<double>();
  if (zero(m.elevation_m)) m.elevation_m = std::vector<double>();
  if (zero(m.grade)) m.grade = std::vector<double>();
  if (track.wind) {
    m.head_wind_mps.resize(n + 1);
    for (std::size_t i = 0; i <= n; ++i)
      m.head_wind_mps[i] = track.wind->head_mps(m.heading_rad[i]);
  }
  return m;
}

}  // namespace lapwing
