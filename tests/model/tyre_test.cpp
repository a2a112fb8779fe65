// Tyre model: load sensitivity as README, "Physics and assumptions" defines it (tyres), and the
// friction ellipse.
#include <doctest/doctest.h>

#include <cmath>

#include "lapwing/model/tyre.hpp"
#include "test_support.hpp"

using namespace lapwing;
using lapwing::test::near;

TEST_CASE(
    "mu falls by load_sensitivity per +100 % of load, not below 0.1 mu0 (README, \"Physics\")") {
  const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.08, 2.0, 0.33, 0.0});
  CHECK(t.mu_factor(1600.0) == 1.0);
  CHECK(near(t.mu_factor(3200.0), 0.92, 1e-12));
  CHECK(near(t.mu_factor(800.0), 1.04, 1e-12));
  CHECK(t.mu_factor(1e7) == TyreModel::floor_fraction);
  // Whole-car peak force: mu(N/4) N.
  CHECK(near(t.fy_max(4 * 3200.0), 1.7 * 0.92 * 4 * 3200.0, 1e-12));
}

TEST_CASE("the ellipse leaves (1 - r^n)^(1/n) of Fx_max at lateral ratio r") {
  for (double n : {2.0, 1.5, 3.0}) {
    const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.0, n, 0.33, 0.0});
    for (double r : {0.0, 0.3, 0.8, 0.999}) {
      const double left = t.long_share_left(r);
      CHECK(near(left, std::pow(1 - std::pow(r, n), 1 / n), 1e-12));
      CHECK(near(t.usage(left, r), 1.0, 1e-12));  // on the boundary
    }
    CHECK(t.long_share_left(1.0) == 0.0);
    CHECK(t.long_share_left(1.2) == 0.0);
  }
}

TEST_CASE("the least axle load for a lateral force is the smaller root of mu(L/2) L = Fy") {
  // Round trip through the axle's peak force (README, "Physics"), mu_lat0 (1 - s (L/2 - Fn) / Fn)
  // L: with and without load sensitivity, and on the floor of 0.1 mu0 beyond the parabola's top.
  for (const double s : {0.0, 0.08, 0.3}) {
    const TyreModel t(Tyres{1.5, 1.7, 1600.0, s, 2.0, 0.33, 0.0});
    for (const double load : {200.0, 1600.0, 3200.0, 6000.0}) {
      const double fy = t.axle_limits(load).fy_max;
      CHECK(near(t.axle_load_for_lateral(fy), load, 1e-12));
      CHECK(near(t.axle_load_for_lateral(-fy), load, 1e-12));
    }
  }
  // s = 0.3: the peak is at L = (1 + s) Fn / s (per axle 2 Fn (1 + s) / (2 s)), where
  // mu_lat0 L (1 + s) / 2 = 1.7 x 6933 x 0.65 = 7661 N; more than that needs the floor's load.
  const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.3, 2.0, 0.33, 0.0});
  CHECK(near(t.axle_load_for_lateral(9000.0), 9000.0 / (0.1 * 1.7), 1e-12));
}

TEST_CASE("tyres name the first value out of its range (README, \"Car\", tyres)") {
  const Tyres good{1.5, 1.7, 1600.0, 0.08, 2.0, 0.33, 0.012};
  CHECK(test::describe(good.validate()) == "none");
  struct Case {
    void (*spoil)(Tyres&);
    const char* want;
  };
  const Case cases[] = {
      {[](Tyres& t) { t.mu_long = 0.0; }, "mu_long: value 0 is out of range: must be (0, 3]"},
      {[](Tyres& t) { t.mu_lat = std::nan(""); },
       "mu_lat: value nan is out of range: must be (0, 3]"},
      {[](Tyres& t) { t.nominal_load_n = -1.0; },
       "nominal_load: value -1 is out of range: must be >= 1 in SI units"},
      // A subnormal load (a robustness campaign's: the search's internal error, not an input
      // error) is below the floor too.
      {[](Tyres& t) { t.nominal_load_n = 5e-324; },
       "nominal_load: value 4.94065645841e-324 is out of range: must be >= 1 in SI units"},
      {[](Tyres& t) { t.load_sensitivity = 1.0; },
       "load_sensitivity: value 1 is out of range: must be [0, 1)"},
      {[](Tyres& t) { t.ellipse_exponent = 0.5; },
       "ellipse_exponent: value 0.5 is out of range: must be [1, 10]"},
      {[](Tyres& t) { t.rolling_radius_m = 2.5; },
       "rolling_radius: value 2.5 is out of range: must be [0.05, 2] in SI units"},
      {[](Tyres& t) { t.rolling_resistance = 0.2; },
       "rolling_resistance: value 0.2 is out of range: must be [0, 0.1]"},
  };
  for (const Case& c : cases) {
    Tyres t = good;
    c.spoil(t);
    CHECK(test::describe(t.validate()) == c.want);
  }
  // The first in the file's order: mu_long before rolling_radius.
  Tyres two = good;
  two.rolling_radius_m = 0.0;
  two.mu_long = 9.0;
  CHECK(two.validate()->field == "mu_long");
}

TEST_CASE("an axle's capacity with lateral transfer: each tyre at its own load (RCVD 18)") {
  // Linear load sensitivity: mu(Fz) Fz summed over Fz = L/2 -+ d is the equal-load capacity
  // less 2 mu0 s d^2 / Fn (REFERENCES: the loss grows as d^2; the algebra is in tyre.hpp).
  const Tyres spec{1.5, 1.7, 2000.0, 0.1, 2.0, 0.3, 0.0};
  const TyreModel t(spec);
  const double load = 5000.0, d = 900.0;
  const TyreModel::Limits even = t.axle_limits(load);
  const TyreModel::Limits moved = t.axle_limits(load, d);
  const double loss = 2.0 * 0.1 * d * d / 2000.0;  // per unit mu0
  CHECK(near(moved.fy_max, even.fy_max - 1.7 * loss, 1e-12));
  CHECK(near(moved.fx_max, even.fx_max - 1.5 * loss, 1e-12));
  // Without load sensitivity the transfer changes nothing (rounding only), lifted wheel or not.
  const TyreModel flat(Tyres{1.5, 1.7, 2000.0, 0.0, 2.0, 0.3, 0.0});
  for (const double dd : {0.0, 900.0, 2500.0, 4000.0})
    CHECK(near(flat.axle_limits(load, dd).fy_max, 1.7 * load, 1e-14));
  // Beyond L/2 the inner tyre has lifted: the outer carries L alone, mu(L) L.
  CHECK(near(t.axle_limits(load, 3000.0).fy_max, 1.7 * load * (1 - 0.1 * (load - 2000) / 2000),
             1e-12));
}

TEST_CASE("the least axle load for a lateral force inverts the capacity with transfer") {
  const TyreModel t(Tyres{1.5, 1.7, 2000.0, 0.1, 2.0, 0.3, 0.0});
  for (const double d : {0.0, 400.0, 1500.0}) {
    for (const double fy : {2000.0, 6000.0, 9000.0}) {
      const double load = t.axle_load_for_lateral(fy, d);
      // The capacity at that load is the force asked for (root of a quadratic: 1e-10).
      CHECK(near(t.axle_limits(load, d).fy_max, fy, 1e-10));
    }
  }
}

TEST_CASE("the test without powers says 'surely' only where the ellipse leaves the force") {
  // The ellipse (Fx/Fx_max)^n + (Fy/Fy_max)^n <= 1 is the closed form: where surely_leaves says
  // true, axle_long_left (the ellipse with its powers) must leave at least fx. A grid over
  // load, transfer, lateral and longitudinal ratios for exponents below, at and above 2; the
  // test must also answer "surely" on most of the ellipse's inside, or it saves nothing.
  for (const double n : {1.0, 1.5, 2.0, 2.2, 3.0, 6.0}) {
    const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.08, n, 0.33, 0.0});
    int sure = 0, inside = 0;
    for (const double load : {200.0, 1500.0, 3200.0, 9000.0})
      for (const double transfer : {0.0, 300.0, 1200.0, 6000.0})
        for (int i = 0; i <= 20; ++i)
          for (int j = -2; j <= 22; ++j) {
            const TyreModel::Limits lim = t.axle_limits(load, transfer);
            const double fy = lim.fy_max * i / 20.0, fx = lim.fx_max * j / 20.0;
            const double left = t.axle_long_left(load, transfer, fy).left_n;
            const bool ok = t.surely_leaves(load, transfer, fy, fx);
            if (ok) {
              CHECK(left >= fx);
              ++sure;
            }
            if (left >= fx * 1.0001 + 1e-9 * lim.fx_max) ++inside;
          }
    CHECK(sure > inside / 3);
  }
  const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.08, 2.2, 0.33, 0.0});
  CHECK_FALSE(t.surely_leaves(0.0, 0.0, 0.0, 0.0));  // an unloaded axle leaves nothing
}

TEST_CASE("the least axle load for a lateral force with a transfer past the tyre's vertex") {
  // s = 0.08, Fn = 1600 N: one tyre's force mu0 Fz (1 - s (Fz - Fn) / Fn) peaks at
  // Fn (1 + s) / (2 s) = 10.8 kN. With d = 9 kN moved to the outer tyre (2 d = 18 kN, past that
  // vertex) the two-tyre equation mu0 (L (1 + s) - s (L^2 / 2 + 2 d^2) / Fn) = |fy| has no
  // root for |fy| = 8 kN (b^2 - 4 a c = 1.1664 - 1.31 < 0), but the outer tyre alone holds it
  // at a load below 2 d: mu0 L (1 - s (L - Fn) / Fn) = |fy|, the smaller root of
  // (s / Fn) L^2 - (1 + s) L + |fy| / mu0 = 0 (quadratic formula): L = 6720 N with mu0 = 1.6.
  // The floor's load |fy| / (0.1 mu0) = 50 kN was returned before.
  const TyreModel t(Tyres{1.6, 1.6, 1600.0, 0.08, 2.0, 0.3, 0.0});
  const double fy = 8000.0, d = 9000.0, s = 0.08, fn = 1600.0;
  const double a = s / fn, b = 1.0 + s, c = fy / 1.6;
  const double load = (b - std::sqrt(b * b - 4.0 * a * c)) / (2.0 * a);
  CHECK(near(load, 6720.0, 1e-3));  // the figure in the comment, rounded
  // 1e-12: the same root in its other form, 2 c / (b + sqrt(b^2 - 4 a c)).
  CHECK(near(t.axle_load_for_lateral(fy, d), load, 1e-12));
  // The axle's own capacity at that load (inner tyre lifted) is fy (1e-12: rounding).
  CHECK(near(t.axle_limits(load, d).fy_max, fy, 1e-12));
}

TEST_CASE("the least axle load for a lateral force is the least: no lower load holds it") {
  // The capacity with transfer (axle_limits: each tyre at its own load, the inner lifted past
  // L / 2 = d) is the closed form the answer inverts; the answer is the least load that holds
  // the force: the capacity there is fy (1e-10, a quadratic's root), and at every load below it
  // (1e-6 less, and 400 loads from 0 up) it is short of fy (the floor's load aside, where the
  // formulas' parabolas reach no root).
  // A robustness campaign's narrow-tracked car had the two-tyre root (19.6 kN) where the outer
  // tyre alone held its 4.7 kN at 2.95 kN (fy 4726.96 N, d 9373.31 N, the Pellion's tyres).
  const TyreModel t(Tyres{1.55, 1.70, 1600.0, 0.08, 2.2, 0.33, 0.012});
  const double floor_per_n = 0.1 * 1.70;
  int checked = 0;
  for (const double fy : {500.0, 2000.0, 4726.96, 8000.0, 12000.0, 18000.0})
    for (const double d : {100.0, 1000.0, 3000.0, 6000.0, 9373.31, 15000.0}) {
      CAPTURE(fy);
      CAPTURE(d);
      const double load = t.axle_load_for_lateral(fy, d);
      if (near(load, fy / floor_per_n, 1e-12)) continue;  // the floor's load
      ++checked;
      CHECK(near(t.axle_limits(load, d).fy_max, fy, 1e-10));
      // No lower load holds it: 1e-6 below, and at 400 loads from 0 up to it.
      CHECK(t.axle_limits(load * (1.0 - 1e-6), d).fy_max < fy);
      for (int k = 1; k < 400; ++k) CHECK(t.axle_limits(load * k / 400.0, d).fy_max < fy);
    }
  CHECK(checked >= 30);
  const double load = t.axle_load_for_lateral(4726.96, 9373.31);
  CHECK(load < 2.0 * 9373.31);  // the inner tyre lifted
  CHECK(load < 3000.0);
}

TEST_CASE("the force an axle has left and its slope with the load: the slope is the derivative") {
  // axle_long_left's slope (the Newton step's, as slope_num / slope_den) against a central
  // difference of its force left, (left(L + h) - left(L - h)) / 2h: for a smooth function the
  // difference's error is h^2 f''' / 6: with h = 1e-3 L it read 5e-5 of the slope at r = 0.95
  // (measured; f''' grows as r -> 1), so h = 1e-5 L, 1e-4 of that, and the difference's
  // rounding (1e-16 of a force of a few kN, over 2h) is below 1e-10 of a slope near 1 N/N: 1e-6
  // allowed. Away from the kinks (an inner tyre at the point of lifting, mu at its floor) and
  // from r = 1, where the slope has no bound.
  for (const double n : {2.0, 2.2, 3.0}) {
    const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.08, n, 0.33, 0.0});
    for (const double load : {1500.0, 3200.0, 9000.0})
      for (const double transfer : {0.0, 300.0})
        for (const double ratio : {0.0, 0.3, 0.7, 0.95}) {
          const double fy = t.axle_limits(load, transfer).fy_max * ratio;
          const TyreModel::LeftAndSlope s = t.axle_long_left(load, transfer, fy);
          REQUIRE(s.slope_den > 0.0);
          const double h = 1e-5 * load;
          const double diff = (t.axle_long_left(load + h, transfer, fy).left_n -
                               t.axle_long_left(load - h, transfer, fy).left_n) /
                              (2.0 * h);
          INFO("n " << n << ", load " << load << ", transfer " << transfer << ", ratio " << ratio);
          CHECK(std::abs(s.per_load() - diff) <= 1e-6 * std::abs(diff) + 1e-9);
        }
  }
  // No load, or the ellipse spent: nothing left and no slope, with a positive denominator.
  const TyreModel t(Tyres{1.5, 1.7, 1600.0, 0.08, 2.2, 0.33, 0.0});
  const TyreModel::LeftAndSlope none = t.axle_long_left(0.0, 0.0, 0.0);
  CHECK(none.left_n == 0.0);
  CHECK(none.per_load() == 0.0);
  const TyreModel::LeftAndSlope spent = t.axle_long_left(3200.0, 0.0, 1e6);
  CHECK(spent.left_n == 0.0);
  CHECK(spent.per_load() == 0.0);
}

namespace {
// The reference for axle_load_holding_lateral, read off the capacity itself (axle_limits(L, d),
// each tyre's mu held at its floor) without its pieces: from load_n down (or, where the axle
// does not hold fy there, up) in steps of load_n / 4000 to the first step whose end changes
// whether it holds, then bisection to 1e-14 of the load. A stretch narrower than a step would be
// missed; the loads below keep the pieces wider than that.
double stretch_least_by_walking(const TyreModel& t, double fy, double d, double load_n) {
  const auto holds = [&](double l) { return t.axle_limits(l, d).fy_max >= fy; };
  const double step = load_n / 4000.0;
  double a = load_n, b = load_n;  // `holds` differs between a (lower) and b (upper)
  if (holds(load_n)) {
    while (a > 0.0 && holds(std::max(a - step, 0.0))) a = std::max(a - step, 0.0);
    if (a == 0.0) return 0.0;
    b = a;
    a = std::max(a - step, 0.0);
  } else {
    while (!holds(b + step)) b += step;
    a = b;
    b += step;
  }
  while (b - a > 1e-14 * b) {
    const double m = 0.5 * (a + b);
    (holds(m) ? b : a) = m;
  }
  return b;
}
}  // namespace

TEST_CASE("the load stretch that holds a lateral force around the axle's load, floor included") {
  // axle_load_holding_lateral against a walk along the capacity itself (above): the least load
  // of the stretch around load_n over which the axle holds fy, or the least above load_n where
  // it does not hold it there. Load sensitivities up to 0.95 put a tyre on its floor (0.1 mu0)
  // within the loads asked; transfers up to 9 kN lift the inner tyre. 1e-9 of the load: the
  // answer is a quadratic's root, the walk's bisection stops at 1e-14.
  int on_floor = 0, checked = 0;
  for (const double s : {0.0, 0.08, 0.3, 0.625, 0.95}) {
    const TyreModel t(Tyres{1.204, 1.826, 1828.0, s, 1.43, 0.33, 0.0});
    for (const double d : {0.0, 300.0, 1500.0, 4000.0, 9000.0})
      for (const double fy : {500.0, 3000.0, 6000.0, 9000.0})
        for (const double load : {2000.0, 7000.0, 12000.0, 25000.0}) {
          CAPTURE(s);
          CAPTURE(d);
          CAPTURE(fy);
          CAPTURE(load);
          const double got = t.axle_load_holding_lateral(fy, d, load);
          CHECK(near(got, stretch_least_by_walking(t, fy, d, load), 1e-9));
          // The axle holds fy there, to the root's rounding.
          CHECK(near(t.axle_limits(got, d).fy_max, fy, 1e-9));
          on_floor += 0.5 * got + d > t.floor_onset_load_n();
          ++checked;
        }
  }
  CHECK(checked == 400);
  CHECK(on_floor > 20);  // the floor's pieces are exercised
}

TEST_CASE("a front axle whose outer tyre is on its floor holds its lateral force at its load") {
  // A monotonicity campaign's invented front-heavy, rear-driven car (mu_lat 1.826, nominal load
  // 1 828 N, load sensitivity 0.625) at 31.86 km/h on a 15 m arc: the front axle's static load
  // (0.619 of 1 196 kg) carries its share of m v^2 / R with 3 001 N of transfer per g of lateral
  // acceleration (`lapwing check`'s figure for that car), its outer tyre past the floor's load.
  // The least load of the stretch it is in is where the inner tyre's parabola and the outer's
  // floor line together hold the force: some 6.1 kN (the campaign's scan of the tyre law in 10 N
  // steps: 6 140 N). The parabolas' floor load, |fy| / (0.1 mu0) = 21.2 kN, was read before:
  // above the axle's load, a front bound of -4.9 g on a lap that braked every 9 m on the arc.
  const TyreModel t(Tyres{1.204, 1.826, 1828.0, 0.625, 1.43, 0.33, 0.0121});
  const double g = 9.80665, v = 31.86 / 3.6;
  const double fy_total = 1196.0 * v * v / 15.0;
  const double fy = 0.619 * fy_total, d = 3001.0 / (1196.0 * g) * fy_total;
  const double load = 0.619 * 1196.0 * g;
  REQUIRE(t.axle_limits(load, d).fy_max > fy);       // the axle holds it at its load
  REQUIRE(0.5 * load + d > t.floor_onset_load_n());  // its outer tyre on the floor
  const double least = t.axle_load_holding_lateral(fy, d, load);
  CHECK(least > 6130.0);
  CHECK(least < 6150.0);
  CHECK(near(least, stretch_least_by_walking(t, fy, d, load), 1e-9));
  CHECK(near(t.axle_load_for_lateral(fy, d), fy / (0.1 * 1.826), 1e-12));  // the old reading
}

TEST_CASE("the load stretch that holds a lateral force where no tyre is on its floor") {
  // A second reader's case: past a tyre's vertex the capacity also grows again where the inner
  // tyre touches down (L = 2 d), so the loads that hold a force are more than one stretch with
  // no tyre on its floor (mu0 1, Fn 2 000 N, s 0.9: the floor from 4 000 N a tyre, the outer's
  // at L = 5 000 N; d 1 500 N, fy 1 900 N: stretches from some 1 627, 3 604 and 5 093 N). At
  // 4 000 N the axle is in the second: its least, 3 603.6 N (the reader's reference), not the
  // parabolas' least load of all, 1 626.8 N, where the old reading put the front bound.
  const TyreModel t(Tyres{1.0, 1.0, 2000.0, 0.9, 2.0, 0.3, 0.0});
  const double fy = 1900.0, d = 1500.0, load = 4000.0;
  REQUIRE(0.5 * load + d < t.floor_onset_load_n());  // the outer tyre off its floor
  const double least = t.axle_load_holding_lateral(fy, d, load);
  CHECK(near(least, 3603.58, 1e-5));
  CHECK(near(least, stretch_least_by_walking(t, fy, d, load), 1e-9));
  CHECK(near(t.axle_load_for_lateral(fy, d), 1626.79, 1e-5));
  // Just below the stretch the axle does not hold the force.
  CHECK(t.axle_limits(least * (1.0 - 1e-6), d).fy_max < fy);
}
