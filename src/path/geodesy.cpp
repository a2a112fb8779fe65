#include "lapwing/path/geodesy.hpp"

#include <cmath>

#include "lapwing/base/units.hpp"

namespace lapwing::wgs84 {

std::array<double, 3> to_ecef(double lat_deg, double lon_deg, double h) {
  const double lat = lat_deg * units::deg, lon = lon_deg * units::deg;
  const double s = std::sin(lat), c = std::cos(lat);
  const double n = semi_major_m / std::sqrt(1.0 - eccentricity_sq * s * s);
  return {(n + h) * c * std::cos(lon), (n + h) * c * std::sin(lon),
          (n * (1.0 - eccentricity_sq) + h) * s};
}

std::array<double, 3> to_enu(const std::array<double, 3>& p, double lat0_deg, double lon0_deg,
                             double h0) {
  const auto o = to_ecef(lat0_deg, lon0_deg, h0);
  const double dx = p[0] - o[0], dy = p[1] - o[1], dz = p[2] - o[2];
  const double lat = lat0_deg * units::deg, lon = lon0_deg * units::deg;
  const double sl = std::sin(lat), cl = std::cos(lat), so = std::sin(lon), co = std::cos(lon);
  return {-so * dx + co * dy, -sl * co * dx - sl * so * dy + cl * dz,
          cl * co * dx + cl * so * dy + sl * dz};
}

}  // namespace lapwing::wgs84
