// The loads on the road (model/loads.hpp): lateral load transfer per axle against the moment
// balance it comes from (Milliken & Milliken, Race Car Vehicle Dynamics, ch. 18; from memory,
// REFERENCES "Load transfer, banking, wind"), the banked road's loads and the airspeed.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/units.hpp"
#include "lapwing/model/loads.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

namespace {
Car rolling_car(double track_front, double track_rear, double k_front, double z_front,
                double z_rear) {
  Car car = test::plain_car(700.0);
  car.cg_height_m = 0.35;
  car.front_weight = 0.45;
  car.roll = RollGeometry{track_front, track_rear, k_front, z_front, z_rear};
  return car;
}
}  // namespace

TEST_CASE("a car without roll geometry has no lateral load transfer (the default)") {
  const TransferPerNewton d = lateral_transfer_per_n(test::plain_car());
  CHECK(d.front == 0.0);
  CHECK(d.rear == 0.0);
}

TEST_CASE("with roll centres on the ground the front transfer is m a_y h k_f / t_f (RCVD 18)") {
  const Car car = rolling_car(1.6, 1.5, 0.55, 0.0, 0.0);
  const double fy = 700.0 * 12.0;  // m a_y at 12 m/s^2
  const TransferPerNewton d = lateral_transfer_per_n(car);
  // Exact up to rounding: the same products in another order (1e-14).
  CHECK(near(d.front * fy, fy * 0.35 * 0.55 / 1.6, 1e-14));
  CHECK(near(d.rear * fy, fy * 0.35 * 0.45 / 1.5, 1e-14));
}

TEST_CASE("the transfers add up to m a_y h / t for equal tracks, whatever the roll centres") {
  // Moments about the ground line (RCVD ch. 18): dFz_f t_f + dFz_r t_r = F_y h, the roll
  // centres only moving the share between the axles (rounding only: 1e-14).
  for (const double zf : {0.0, 0.03, 0.12})
    for (const double zr : {0.0, 0.06, 0.2})
      for (const double kf : {0.0, 0.4, 0.7, 1.0}) {
        const Car car = rolling_car(1.55, 1.55, kf, zf, zr);
        const double fy = 700.0 * 9.0;
        const TransferPerNewton d = lateral_transfer_per_n(car);
        CHECK(near((d.front + d.rear) * fy, fy * 0.35 / 1.55, 1e-14));
      }
  // Unequal tracks: the moments, not the forces, add up.
  const Car car = rolling_car(1.62, 1.48, 0.6, 0.05, 0.09);
  const TransferPerNewton d = lateral_transfer_per_n(car);
  CHECK(near(d.front * 1.62 + d.rear * 1.48, 0.35, 1e-14));
}

TEST_CASE("the roll-centre terms follow RCVD 18 written out") {
  // dFz_f / F_y = (h_ra k_f + (b / L) z_f) / t_f with b / L = f, h_ra = h - (f z_f + (1-f) z_r).
  const Car car = rolling_car(1.6, 1.5, 0.55, 0.05, 0.1);
  const double h_ra = 0.35 - (0.45 * 0.05 + 0.55 * 0.1);  // 0.2725 m
  const TransferPerNewton d = lateral_transfer_per_n(car);
  CHECK(near(d.front, (0.2725 * 0.55 + 0.45 * 0.05) / 1.6, 1e-14));
  CHECK(near(d.rear, (h_ra * 0.45 + 0.55 * 0.1) / 1.5, 1e-14));
}

TEST_CASE("a banked road's loads resolve gravity and the turn normal to it and along it") {
  // REFERENCES, banked road: N = m (g cos b + v^2 k sin b), F_y = m (v^2 k cos b - g sin b).
  const double m = 800.0, w = m * units::g0, u = 900.0, k = 1.0 / 60.0, b = 12 * units::deg;
  const Road r{1.0, 0.0, std::cos(b), std::sin(b), 0.0};
  const BodyLoads l = body_loads(m, w, u, k, r);
  CHECK(near(l.normal_n, m * (units::g0 * std::cos(b) + u * k * std::sin(b)), 1e-14));
  CHECK(near(l.lateral_n, m * (u * k * std::cos(b) - units::g0 * std::sin(b)), 1e-14));
  // Flat and level: the weight and m v^2 k, exactly.
  const BodyLoads flat = body_loads(m, w, u, k, Road{});
  CHECK(flat.normal_n == w);
  CHECK(flat.lateral_n == m * u * k);
}

TEST_CASE("the aero forces take the airspeed v + w along the path") {
  const AirspeedSquared still = airspeed_squared(400.0, 0.0);
  CHECK(still.drag == 400.0);
  CHECK(still.lift == 400.0);
  const AirspeedSquared head = airspeed_squared(400.0, 5.0);  // 20 m/s into 5 m/s
  CHECK(near(head.drag, 625.0, 1e-15));
  CHECK(near(head.lift, 625.0, 1e-15));
  // A tail wind faster than the car pushes it: drag (v + w) |v + w| < 0, downforce still > 0.
  const AirspeedSquared tail = airspeed_squared(4.0, -5.0);
  CHECK(near(tail.drag, -9.0, 1e-15));
  CHECK(near(tail.lift, 9.0, 1e-15));
}
