// WGS-84 positions to a local tangent plane (east, north, up), for GPS centerlines.
// Constants and formulas: NIMA TR8350.2, Department of Defense World Geodetic System 1984.
#pragma once

#include <array>

namespace lapwing::wgs84 {

inline constexpr double semi_major_m = 6378137.0;
inline constexpr double flattening = 1.0 / 298.257223563;
inline constexpr double eccentricity_sq = flattening * (2.0 - flattening);

/// Geodetic latitude, longitude (deg) and ellipsoidal height (m) to Earth-centred Earth-fixed
/// x, y, z (m):  N = a / sqrt(1 - e^2 sin^2(lat)),  x = (N + h) cos(lat) cos(lon),
/// y = (N + h) cos(lat) sin(lon),  z = (N (1 - e^2) + h) sin(lat).
std::array<double, 3> to_ecef(double lat_deg, double lon_deg, double height_m);

/// ECEF point to east, north, up (m) in the tangent plane at a reference geodetic position.
std::array<double, 3> to_enu(const std::array<double, 3>& ecef, double ref_lat_deg,
                             double ref_lon_deg, double ref_height_m);

}  // namespace lapwing::wgs84
