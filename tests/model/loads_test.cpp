// The loads on the road (model/loads.hpp): the normal load, the resistance along the path, the
// axle loads (moments about the rear contact patch; REFERENCES, load transfer) and the aero part
// of them with the drag moment, against hand-worked states.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/base/units.hpp"
#include "lapwing/model/loads.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE("the normal load is the weight's component across the road plus the downforce") {
  // N = W cos(theta) + DF (REFERENCES, banked road with no bank: N = m g cos + downforce).
  const double w = 700.0 * units::g0, c = 1.0 / std::sqrt(1.0 + 0.1 * 0.1);
  CHECK(near(normal_load_n(w, c, 2500.0), 6864.655 * c + 2500.0, 1e-12));
  CHECK(normal_load_n(w, 1.0, 0.0) == w);
}

TEST_CASE("the resistance is drag, rolling resistance on the normal load, and the grade (1e-12)") {
  // R = D + Crr N + W sin(theta) (Gillespie, Fundamentals of Vehicle Dynamics, ch. 4: rolling
  // resistance proportional to the normal load; the grade's component of the weight).
  // 10 % uphill, 700 kg, 2500 N downforce, 900 N drag, Crr 0.012, by hand:
  const double w = 700.0 * units::g0, c = 1.0 / std::sqrt(1.01), s = 0.1 * c;
  const double n = 6864.655 * c + 2500.0;
  CHECK(near(resistance_n(900.0, 0.012, normal_load_n(w, c, 2500.0), w, s),
             900.0 + 0.012 * n + 6864.655 * s, 1e-12));
  // Downhill the grade pushes: the resistance can be negative.
  CHECK(resistance_n(0.0, 0.0, w, w, -0.2) < 0.0);
}

TEST_CASE("axle loads at a hand-worked state (moments about the rear contact patch; 1e-9)") {
  Car car = test::plain_car(700.0);
  car.front_weight = 0.45;
  car.cg_height_m = 0.3;
  car.wheelbase_m = 3.0;
  car.drag_height_m = 0.5;
  // W = 700 g0 = 6864.655 N. Front = 0.45 W + 0.40 x 3000 - (1000 x 0.5 + 700 x 2 x 0.3) / 3
  //       = 3089.09475 + 1200 - 306.6667 = 3982.428083 N; rear = W + 3000 - front.
  const AxleLoads l = axle_loads(car, 1000.0, 3000.0, 0.40, 1.0, 0.0, 2.0);
  CHECK(near(l.front_n, 3089.09475 + 1200.0 - 920.0 / 3.0, 1e-9));
  CHECK(near(l.rear_n, 6864.655 + 3000.0 - l.front_n, 1e-9));
  // Uphill 5 %: the weight's component along the slope acts at the cg height too.
  const double c = 1 / std::sqrt(1 + 0.0025), s = 0.05 * c;
  const AxleLoads up = axle_loads(car, 0.0, 0.0, 0.4, c, s, 0.0);
  CHECK(near(up.front_n, 6864.655 * (c * 0.45 - s * 0.3 / 3.0), 1e-9));
  // Longitudinal load transfer alone: delta Fz_front = -m a_x h / L (REFERENCES).
  const AxleLoads still = axle_loads(car, 0.0, 0.0, 0.4, 1.0, 0.0, 0.0);
  const AxleLoads accel = axle_loads(car, 0.0, 0.0, 0.4, 1.0, 0.0, 5.0);
  CHECK(near(accel.front_n - still.front_n, -700.0 * 5.0 * 0.3 / 3.0, 1e-9));
}

TEST_CASE("the aero axle loads move D z_D / L from the front to the rear, and add up to DF") {
  // REFERENCES, load transfer: drag D at height z_D takes D z_D / L off the front axle.
  // DF 3000 N at balance 0.42, D 1000 N at 0.45 m, L 2.9 m, by hand:
  const AxleLoads a = aero_axle_loads(3000.0, 0.42, 1000.0, 0.45, 2.9);
  CHECK(near(a.front_n, 1260.0 - 450.0 / 2.9, 1e-12));
  CHECK(near(a.rear_n, 1740.0 + 450.0 / 2.9, 1e-12));
  CHECK(near(a.front_n + a.rear_n, 3000.0, 1e-12));
  // The front is the general axle load's with no weight and no acceleration, to the last bit:
  // one formula, whichever the caller uses.
  AxleForces f;
  f.downforce_n = 3000.0;
  f.balance = 0.42;
  f.drag_n = 1000.0;
  CHECK(axle_loads(AxleGeometry{0.45, 0.3, 0.45, 2.9}, f).front_n == a.front_n);
  // The front share with the drag moment is the aero front load over the downforce.
  CHECK(*aero_balance_with_drag_moment(3000.0, 1000.0, 0.42, 0.45, 2.9) == a.front_n / 3000.0);
}
