#include "lapwing/path/racing_line.hpp"

#include <Eigen/Sparse>

#include <algorithm>
#include <cassert>
#include <cmath>
#include <cstdio>

#include "lapwing/base/error.hpp"
#include "lapwing/path/box_qp.hpp"

namespace lapwing {

namespace {

// Index of the neighbours of i (wrapping on a closed path).
struct Around {
  std::size_t m, i, p;
};
Around around(std::size_t i, std::size_t n) {
  return {(i + n - 1) % n, i, (i + 1) % n};
}

// Rows of the curvature: every point of a closed path, the interior ones of an open path.
std::size_t first_row(bool closed) {
  return closed ? 0 : 1;
}
std::size_t end_row(bool closed, std::size_t n) {
  return closed ? n : n - 1;
}

}  // namespace

// kappa = 4 C / S^(3/2), C = X1 Y2 - Y1 X2, S = X1^2 + Y1^2 (racing_line.hpp), and its
// derivatives by the positions of the three points.
LocalCurvature local_curvature(double xm, double xi, double xp, double ym, double yi, double yp) {
  const double x1 = xp - xm, y1 = yp - ym, x2 = xp - 2 * xi + xm, y2 = yp - 2 * yi + ym;
  const double c = x1 * y2 - y1 * x2, s = x1 * x1 + y1 * y1;
  const double s32 = 1.0 / (s * std::sqrt(s)), s52 = s32 / s;
  LocalCurvature l;
  l.kappa = 4 * c * s32;
  // d kappa / d(X1, Y1, X2, Y2); d(S^(-3/2))/dX1 = -3 X1 S^(-5/2).
  const double k_x1 = 4 * (y2 * s32 - 3 * c * x1 * s52);
  const double k_y1 = 4 * (-x2 * s32 - 3 * c * y1 * s52);
  const double k_x2 = 4 * (-y1 * s32), k_y2 = 4 * (x1 * s32);
  // X1 = x_{i+1} - x_{i-1}; X2 = x_{i+1} - 2 x_i + x_{i-1}.
  l.d_dx[0] = -k_x1 + k_x2, l.d_dx[1] = -2 * k_x2, l.d_dx[2] = k_x1 + k_x2;
  l.d_dy[0] = -k_y1 + k_y2, l.d_dy[1] = -2 * k_y2, l.d_dy[2] = k_y1 + k_y2;
  return l;
}

namespace {

struct State {
  std::vector<double> x, y, kappa;
  double objective = 0.0;
};

State evaluate(const LineReference& ref, const std::vector<double>& alpha,
               const std::vector<double>& w) {
  const std::size_t n = ref.size();
  State st;
  st.x.resize(n);
  st.y.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    st.x[i] = ref.x_m[i] - alpha[i] * std::sin(ref.heading_rad[i]);
    st.y[i] = ref.y_m[i] + alpha[i] * std::cos(ref.heading_rad[i]);
  }
  st.kappa.assign(n, 0.0);
  for (std::size_t i = first_row(ref.closed); i < end_row(ref.closed, n); ++i) {
    const Around a = around(i, n);
    st.kappa[i] =
        local_curvature(st.x[a.m], st.x[a.i], st.x[a.p], st.y[a.m], st.y[a.i], st.y[a.p]).kappa;
    st.objective += w[i] * st.kappa[i] * st.kappa[i];
  }
  return st;
}

// Each linearised step is solved to 0.1 mm (the line is wanted to 1 cm), in at most 20
// projected-Newton steps: its answer is only the next point to linearise about, and the outer
// loop converges all the same. Measured on Saltmere Flats (6 km, 14 m wide): the same line and
// lap in 0.29 s instead of 0.57 s with up to 200 steps (a step costs one banded LDLT).
constexpr double qp_tolerance_m = 1e-4;
constexpr int qp_max_steps = 20;
// The damping starts at 1e-6 of J'WJ's mean diagonal, falls tenfold per accepted step and stops
// at 1e-12 of it: small enough that a step along a nearly flat direction (a straight's lateral
// place between two gentle bends) is taken nearly whole, so that max |d alpha| < 1 cm comes in
// a handful of linearisations (measured: 7 or 8 on the bundled circuits; at 1e-9 Saltmere Flats
// took 60, creeping along such a direction), while the system stays positive definite.
constexpr double mu_start_relative = 1e-6, mu_min_relative = 1e-12;

std::string metres(double v, int decimals) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

}  // namespace

std::vector<double> discrete_curvature(const std::vector<double>& x, const std::vector<double>& y,
                                       bool closed) {
  const std::size_t n = x.size();
  std::vector<double> k(n, 0.0);
  for (std::size_t i = first_row(closed); i < end_row(closed, n); ++i) {
    const Around a = around(i, n);
    k[i] = local_curvature(x[a.m], x[a.i], x[a.p], y[a.m], y[a.i], y[a.p]).kappa;
  }
  if (!closed && n >= 3) k.front() = k[1], k.back() = k[n - 2];
  return k;
}

LineReference line_reference(const Track& track, double spacing_m) {
  if (track.profile && track.profile->source == PathProfile::Source::curvature)
    throw InvalidInput(
        track.subject(),
        broken_rule("line",
                    "a racing line needs the track's edges; a curvature profile has none (it is "
                    "already a driven line): give a centerline with width_left_m,width_right_m "
                    "instead"));
  if (!track.has_widths())
    throw InvalidInput(
        track.subject(),
        broken_rule("line", track.profile
                                ? "a racing line needs the track's widths: the centerline's CSV "
                                  "has no width_left_m,width_right_m columns"
                                : "a racing line needs the track's widths: give width at track "
                                  "level or on every segment"));
  Track described = track;
  described.line_path.reset();
  const Mesh m = build_mesh(described, spacing_m);
  LineReference r;
  r.subject = track.subject();
  r.closed = m.closed;
  r.spacing_m = m.step_m;
  const std::size_t n = m.closed ? m.size() - 1 : m.size();
  r.s_m.assign(m.s_m.begin(), m.s_m.begin() + static_cast<std::ptrdiff_t>(n));
  r.x_m.assign(m.x_m.begin(), m.x_m.begin() + static_cast<std::ptrdiff_t>(n));
  r.y_m.assign(m.y_m.begin(), m.y_m.begin() + static_cast<std::ptrdiff_t>(n));
  r.heading_rad.assign(m.heading_rad.begin(),
                       m.heading_rad.begin() + static_cast<std::ptrdiff_t>(n));
  r.width_left_m.assign(m.width_left_m.begin(),
                        m.width_left_m.begin() + static_cast<std::ptrdiff_t>(n));
  r.width_right_m.assign(m.width_right_m.begin(),
                         m.width_right_m.begin() + static_cast<std::ptrdiff_t>(n));
  r.elevation_m.resize(n);
  for (std::size_t i = 0; i < n; ++i) r.elevation_m[i] = m.elevation_at(i);
  // Where the file gives the narrowest point's width; a file with a line of its own (`line:`,
  // its vehicle and margin) keeps that key, the line asked for there.
  if (n > 0 && !track.line) {
    const double at = r.s_m[r.narrowest()];
    if (track.profile) {
      r.narrowest_key = "centerline";
      r.narrowest_detail = " (the data's widths smoothed over " +
                           metres(track.profile->smoothing_m, 1) +
                           " m: a narrowing shorter than that reads wider than surveyed)";
    } else {
      r.narrowest_key = "width";
      double end = 0.0;
      for (std::size_t k = 0; k < track.segments.size(); ++k) {
        end += track.segments[k].length_m;
        if (at <= end + 1e-9) {
          if (track.segments[k].width_m)
            r.narrowest_key = "segments[" + std::to_string(k) + "].width";
          break;
        }
      }
    }
  }
  return r;
}

RacingLine min_curvature_line(const LineReference& ref, const LineOptions& o,
                              const std::vector<double>& start) {
  const std::size_t n = ref.size();
  assert(n >= 5 && ref.width_left_m.size() == n && ref.width_right_m.size() == n);
  assert(o.weights.empty() || o.weights.size() == n);
  assert(start.empty() || start.size() == n);
  RacingLine line;
  line.lower_m.resize(n);
  line.upper_m.resize(n);
  const double keep = 0.5 * o.vehicle_width_m + o.margin_m;
  for (std::size_t i = 0; i < n; ++i) {
    line.lower_m[i] = -(ref.width_right_m[i] - keep);
    line.upper_m[i] = ref.width_left_m[i] - keep;
  }
  // No room somewhere: named at the narrowest point.
  if (const std::size_t i = ref.narrowest(); line.lower_m[i] > line.upper_m[i])
    throw InvalidInput(
        ref.subject,
        broken_rule(ref.narrowest_key, "the track is " + metres(ref.width_m(i), 2) + " m wide at " +
                                           metres(ref.s_m[i], 1) + " m, its narrowest" +
                                           ref.narrowest_detail + ", less than the vehicle's " +
                                           metres(o.vehicle_width_m, 2) + " m and a margin of " +
                                           metres(o.margin_m, 2) + " m each side"));
  const std::vector<double> w = o.weights.empty() ? std::vector<double>(n, 1.0) : o.weights;
  std::vector<double> alpha(n);
  for (std::size_t i = 0; i < n; ++i)
    alpha[i] = std::clamp(start.empty() ? 0.0 : start[i], line.lower_m[i], line.upper_m[i]);
  State st = evaluate(ref, alpha, w);

  const auto N = static_cast<Eigen::Index>(n);
  const std::size_t rows = end_row(ref.closed, n) - first_row(ref.closed);
  Eigen::VectorXd lo(N), hi(N);
  double mu = -1.0, mu_min = 0.0;
  for (line.iterations = 0; line.iterations < o.max_iterations; ++line.iterations) {
    // J (rows x n) and the weighted residual.
    std::vector<Eigen::Triplet<double>> t;
    t.reserve(3 * rows);
    Eigen::VectorXd wk(static_cast<Eigen::Index>(rows));
    std::vector<double> sw(rows);
    for (std::size_t r = 0; r < rows; ++r) {
      const std::size_t i = r + first_row(ref.closed);
      const Around a = around(i, n);
      const LocalCurvature l =
          local_curvature(st.x[a.m], st.x[a.i], st.x[a.p], st.y[a.m], st.y[a.i], st.y[a.p]);
      sw[r] = std::sqrt(w[i]);
      wk[static_cast<Eigen::Index>(r)] = sw[r] * l.kappa;
      const std::size_t idx[3] = {a.m, a.i, a.p};
      for (int k = 0; k < 3; ++k) {
        // d kappa / d alpha_j = d kappa / dx_j (-sin theta_j) + d kappa / dy_j cos theta_j.
        const double th = ref.heading_rad[idx[k]];
        t.emplace_back(static_cast<Eigen::Index>(r), static_cast<Eigen::Index>(idx[k]),
                       sw[r] * (-l.d_dx[k] * std::sin(th) + l.d_dy[k] * std::cos(th)));
      }
    }
    Eigen::SparseMatrix<double> j(static_cast<Eigen::Index>(rows), N);
    j.setFromTriplets(t.begin(), t.end());
    Eigen::SparseMatrix<double> h = j.transpose() * j;
    const Eigen::VectorXd g = j.transpose() * wk;
    if (mu < 0.0) {
      // Damping relative to the problem's own scale: the mean diagonal of J'WJ.
      const double scale = h.diagonal().mean();
      mu = mu_start_relative * scale;
      mu_min = mu_min_relative * scale;
    }
    for (Eigen::Index i = 0; i < N; ++i) {
      lo[i] = line.lower_m[static_cast<std::size_t>(i)] - alpha[static_cast<std::size_t>(i)];
      hi[i] = line.upper_m[static_cast<std::size_t>(i)] - alpha[static_cast<std::size_t>(i)];
    }
    Eigen::SparseMatrix<double> eye(N, N);
    eye.setIdentity();
    // 1/2 d'(J'WJ + mu I)d + (J'W kappa)'d is half the linearised sum (plus the damping).
    const BoxQpResult qp = solve_box_qp(h + mu * eye, g, lo, hi, Eigen::VectorXd::Zero(N),
                                        qp_tolerance_m, qp_max_steps);
    std::vector<double> next(n);
    for (std::size_t i = 0; i < n; ++i)
      next[i] = std::clamp(alpha[i] + qp.x[static_cast<Eigen::Index>(i)], line.lower_m[i],
                           line.upper_m[i]);
    const State cand = evaluate(ref, next, w);
    const double step = qp.x.cwiseAbs().maxCoeff();
    if (cand.objective <= st.objective) {
      alpha = next;
      st = cand;
      const bool least_damped = mu <= mu_min;
      mu = std::max(mu / 10.0, mu_min);
      // Converged: a whole linearised step (its QP solved, not cut short) below the tolerance,
      // taken at the least damping. A step under the tolerance at a higher damping is the
      // damping's, not the line's: on a track of gentle bends only (radii of 500 m and more)
      // the first step, at 1e-6 of the scale, moved the line by 4 mm and it stopped on the
      // centerline, where offsets of metres lower the sum (a helper's finding).
      if (step < o.tolerance_m && qp.converged && least_damped) {
        line.converged = true;
        ++line.iterations;
        break;
      }
    } else {
      // The linearisation overreached: a shorter, steeper-damped step. When no damping gives a
      // lower sum, the line is where the sum is least to the precision of the arithmetic.
      mu *= 4.0;
      if (step < o.tolerance_m || mu > 1e12 * mu_min) {
        line.converged = true;
        ++line.iterations;
        break;
      }
    }
  }
  line.offset_m = alpha;
  line.x_m = st.x;
  line.y_m = st.y;
  line.curvature_1pm = discrete_curvature(st.x, st.y, ref.closed);
  line.objective = st.objective;
  return line;
}

RacingLine with_offsets(const LineReference& ref, RacingLine line) {
  const State st = evaluate(ref, line.offset_m, std::vector<double>(ref.size(), 1.0));
  line.x_m = st.x;
  line.y_m = st.y;
  line.curvature_1pm = discrete_curvature(st.x, st.y, ref.closed);
  return line;
}

PathProfile line_profile(const LineReference& ref, const RacingLine& line) {
  const std::size_t n = ref.size();
  PathProfile p;
  p.source = PathProfile::Source::line;
  p.x_m = line.x_m;
  p.y_m = line.y_m;
  p.curvature_1pm = line.curvature_1pm;
  p.elevation_m = ref.elevation_m;
  p.offset_m = line.offset_m;
  p.reference_s_m = ref.s_m;
  p.line_iterations = line.iterations;
  p.width_left_m.resize(n);
  p.width_right_m.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    p.width_left_m[i] = ref.width_left_m[i] - line.offset_m[i];
    p.width_right_m[i] = ref.width_right_m[i] + line.offset_m[i];
  }
  if (ref.closed)
    for (auto* v : {&p.x_m, &p.y_m, &p.curvature_1pm, &p.elevation_m, &p.offset_m, &p.width_left_m,
                    &p.width_right_m})
      v->push_back(v->front());
  if (ref.closed) p.reference_s_m.push_back(ref.s_m.back() + ref.spacing_m);
  const std::size_t m = p.x_m.size();
  p.s_m.assign(m, 0.0);
  for (std::size_t i = 1; i < m; ++i)
    p.s_m[i] = p.s_m[i - 1] + std::hypot(p.x_m[i] - p.x_m[i - 1], p.y_m[i] - p.y_m[i - 1]);
  // Grade: the elevation's slope along the line (central differences; one-sided at an open
  // line's ends, periodic on a closed one).
  p.grade.assign(m, 0.0);
  for (std::size_t i = 0; i < m; ++i) {
    std::size_t a = i == 0 ? 0 : i - 1, b = i + 1 == m ? i : i + 1;
    double ds = p.s_m[b] - p.s_m[a];
    double dz = p.elevation_m[b] - p.elevation_m[a];
    if (ref.closed && (i == 0 || i + 1 == m)) {
      // Across the start: the sample before the last (m - 2) and the one after the first (1).
      ds = (p.s_m[m - 1] - p.s_m[m - 2]) + p.s_m[1];
      dz = p.elevation_m[1] - p.elevation_m[m - 2];
    }
    p.grade[i] = ds > 0.0 ? dz / ds : 0.0;
  }
  return p;
}

void lay_racing_line(Track& track) {
  assert(track.line);
  LineOptions o;
  o.vehicle_width_m = track.line->vehicle_width_m;
  o.margin_m = track.line->margin_m;
  const LineReference ref = line_reference(track);
  track.line_path = line_profile(ref, min_curvature_line(ref, o));
}

}  // namespace lapwing
