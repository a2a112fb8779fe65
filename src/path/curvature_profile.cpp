#include "lapwing/path/curvature_profile.hpp"

#include <cmath>

#include "lapwing/base/error.hpp"

namespace lapwing {

void integrate_path(const std::vector<double>& s, const std::vector<double>& k,
                    std::vector<double>& x, std::vector<double>& y, std::vector<double>* heading) {
  const std::size_t n = s.size();
  x.assign(n, 0.0);
  y.assign(n, 0.0);
  double th = 0.0;
  if (heading) heading->assign(n, 0.0);
  for (std::size_t i = 1; i < n; ++i) {
    const double ds = s[i] - s[i - 1];
    const double th1 = th + 0.5 * (k[i - 1] + k[i]) * ds;
    const double mid = 0.5 * (th + th1);
    x[i] = x[i - 1] + ds * std::cos(mid);
    y[i] = y[i - 1] + ds * std::sin(mid);
    th = th1;
    if (heading) (*heading)[i] = th;
  }
}

PathProfile profile_from_curvature(std::string source, const std::vector<double>& d,
                                   std::vector<double> curvature, std::vector<double> grade) {
  auto row = [](const char* column, std::size_t i) {
    return std::string(column) + "[" + std::to_string(i) + "]";
  };
  if (grade.empty()) grade.assign(d.size(), 0.0);
  require_valid(FirstViolation()
                    .rule(d.size() >= 2, "distance_m", "a curvature profile needs at least 2 rows")
                    .rule(curvature.size() == d.size() && grade.size() == d.size(), "curvature_1pm",
                          "distance_m, curvature_1pm and grade differ in length")
                    .order("distance_m", d, true)
                    .result(),
                source);
  PathProfile p;
  p.source = PathProfile::Source::curvature;
  p.data_file = std::move(source);
  p.s_m.resize(d.size());
  for (std::size_t i = 0; i < d.size(); ++i) p.s_m[i] = d[i] - d[0];
  if (p.s_m.back() > PathProfile::max_length_m)
    throw InvalidInput(p.data_file, broken_rule("", "the profile is longer than 200 km",
                                                row("distance_m", d.size() - 1)));
  p.curvature_1pm = std::move(curvature);
  for (std::size_t i = 0; i < p.curvature_1pm.size(); ++i)
    if (!(std::abs(p.curvature_1pm[i]) <= max_curvature_1pm))
      throw InvalidInput(p.data_file, broken_rule("", "curvature beyond 1/m (a radius under 1 m)",
                                                  row("curvature_1pm", i)));
  p.grade = std::move(grade);
  for (std::size_t i = 0; i < p.grade.size(); ++i)
    if (std::abs(p.grade[i]) > 0.5)
      throw InvalidInput(p.data_file, broken_rule("", "grade beyond +-50 %", row("grade", i)));
  integrate_path(p.s_m, p.curvature_1pm, p.x_m, p.y_m, nullptr);
  p.elevation_m.assign(d.size(), 0.0);
  for (std::size_t i = 1; i < d.size(); ++i)
    p.elevation_m[i] =
        p.elevation_m[i - 1] + 0.5 * (p.grade[i - 1] + p.grade[i]) * (p.s_m[i] - p.s_m[i - 1]);
  return p;
}

}  // namespace lapwing
