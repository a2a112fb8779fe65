// correlate's and fit's files: the keys of README, "Correlating with your data", undefined
// figures as null (never a NaN in a file), and the fit's words.
#include <doctest/doctest.h>

#include <cmath>
#include <limits>

#include "lapwing/model/air.hpp"
#include "lapwing/report/correlate_report.hpp"
#include "test_support.hpp"

using namespace lapwing;

namespace {

FitResult two_parameters(bool covariance) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  FitResult r;
  r.params = {FitParameter::grip, FitParameter::balance};
  r.values = {1.02, -0.01};
  r.std_errors = covariance ? std::vector<double>{0.001, 0.002} : std::vector<double>{nan, nan};
  r.correlation = covariance ? std::vector<std::vector<double>>{{1.0, 0.95}, {0.95, 1.0}}
                             : std::vector<std::vector<double>>{{nan, nan}, {nan, nan}};
  r.covariance_found = covariance;
  r.alignments = r.final_alignments = {Alignment{7.0, 1.0, 0.99}};
  r.rms_before_mps = {2.0};
  r.rms_after_mps = {0.5};
  r.rms_before_mps_all = 2.0;
  r.rms_after_mps_all = 0.5;
  r.inseparable.push_back({0, 1, covariance ? 0.95 : nan, "more data"});
  return r;
}

}  // namespace

TEST_CASE(
    "fit.json names each parameter's scale (the balance's shift) and writes null for a "
    "figure not found") {
  // ISO 2533's sea level: 1.2250 kg/m3 (the standard's own table).
  const std::vector<Air> airs{make_air(AirSpec{})};
  const std::string found =
      fit_json("car", "medium", {"a.csv"}, {"Track"}, airs, two_parameters(true));
  CHECK(found.find("\"grip\": {\n      \"scale\": 1.02") != std::string::npos);
  CHECK(found.find("\"shift\": -0.01") != std::string::npos);
  // 2 and 0.5 m/s are 7.2 and 1.8 km/h, give or take the last digit of a division by 1/3.6.
  // The air each log's laps were solved in, as run states it (README, "Correlating with your
  // data"): its density and its text.
  for (const std::string key :
       {"\"rms_before_kph\": 7.", "\"rms_after_kph\": 1.", "\"correlation\"", "\"not_separable\"",
        "\"offset_m\": 7", "\"air_density_kg_m3\": 1.225",
        "\"air\": \"1.2250 kg/m3 (ISO 2533 at 0 m)\""})
    CHECK_MESSAGE(found.find(key) != std::string::npos, key);
  // Without a covariance: null, not a NaN (JSON has none; the writer throws on one).
  const std::string none =
      fit_json("car", "medium", {"a.csv"}, {"Track"}, airs, two_parameters(false));
  CHECK(none.find("\"std_error\": null") != std::string::npos);
  CHECK(none.find("nan") == std::string::npos);
  CHECK(fit_text(two_parameters(false), {"a.csv"}).find("no standard errors") != std::string::npos);
  CHECK(fit_text(two_parameters(true), {"a.csv"})
            .find("warning: grip and balance are not separable by these logs (correlation "
                  "0.950); to separate them: more data") != std::string::npos);
}

TEST_CASE("a fitted value reads as a factor, the balance as a shift in %") {
  CHECK(fit_value_text(FitParameter::cda, 1.05) == "x1.0500");
  CHECK(fit_value_text(FitParameter::balance, -0.012) == "-1.20 % (added)");
}

TEST_CASE("the headline's coverage reads 100.0 % only when the log covers the whole track") {
  // 0.5 m short of Cairnholt's 3 799.5 m is 99.987 %, which one decimal rounds to 100.0: beside
  // "over the 3799.0 m the log covers" it read as whole. At most 99.9 % when any is missing.
  const Circuit c = test::bundled_circuit("tracks/cairnholt.yaml");
  Correlation k;
  k.coverage = 3799.0 / 3799.5;
  CHECK(correlate_text(c, k).find("99.9 % of the track covered") != std::string::npos);
  k.coverage = 1.0;
  CHECK(correlate_text(c, k).find("100.0 % of the track covered") != std::string::npos);
  k.coverage = 0.5;
  CHECK(correlate_text(c, k).find("50.0 % of the track covered") != std::string::npos);
}
