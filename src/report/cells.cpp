#include "lapwing/report/cells.hpp"

#include "lapwing/base/format.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing {

namespace {
// Percent with one decimal, or "-" where undefined.
std::string percent_or_dash(const std::optional<double>& v) {
  return v ? fixed(100 * *v, 1) : std::string("-");
}

// "alone / with the drag moment", or "-" without downforce (neither is defined then).
std::string aero_balance_cell(const std::optional<double>& plain,
                              const std::optional<double>& eff) {
  return plain ? fixed(100 * *plain, 1) + " / " + percent_or_dash(eff) : std::string("-");
}

}  // namespace

std::string id_list(const std::vector<int>& ids) {
  std::string o;
  for (int id : ids) o += (o.empty() ? "" : ", ") + std::to_string(id);
  return o.empty() ? "-" : o;
}

std::vector<std::string> balance_cells(const BalanceSummary& b) {
  return {fixed(100 * b.static_front_share, 1),
          aero_balance_cell(b.aero_balance_150, b.aero_balance_eff_150),
          aero_balance_cell(b.aero_balance_250, b.aero_balance_eff_250),
          b.has_fast_acceleration ? fixed(100 * b.lowest_front_share_fast, 1) + " at " +
                                        fixed(b.lowest_front_share_at_m, 0) + " m"
                                  : std::string("-"),
          id_list(b.front_limited_corners),
          fixed(b.front_limited_length_m, 0)};
}

std::string window_result_name(const BalanceWindowResult& r) {
  switch (window_result(r)) {
    case WindowResult::pass:
      return "pass";
    case WindowResult::fail:
      return "fail";
    case WindowResult::not_reached:
      break;
  }
  return "not reached";
}

std::string window_text(const BalanceWindow& w) {
  return fixed(100 * w.front_share_min, 1) + "-" + fixed(100 * w.front_share_max, 1) +
         " % front above " + fixed(units::to_kph(w.above_mps), 0) + " km/h, > " +
         fixed(balance_window_lateral_g, 1) + " g lateral";
}

std::string window_where(const BalanceWindowResult& r) {
  if (r.worst_corner) return "corner " + std::to_string(r.worst_corner);
  return r.next_corner ? "straight to " + std::to_string(r.next_corner) : "straight to the line";
}

std::string window_worst(const BalanceWindowResult& r) {
  if (!(r.time_s > 0.0)) return "-";
  const std::string at = " at " + fixed(r.worst_at_m, 0) + " m (" + window_where(r) + ", " +
                         std::string(phase_name(r.worst_phase)) + ", " +
                         fixed(units::to_kph(r.worst_speed_mps), 0) + " km/h)";
  if (r.pass) return fixed(100 * r.margin, 1) + " points to spare" + at;
  return fixed(100 * std::abs(r.worst_excursion), 1) +
         (r.worst_excursion < 0 ? " points below" : " points above") + at;
}

std::vector<std::string> window_header() {
  return {"window",    "front % in window", "worst point",
          "outside %", "braking / drive %", "moves points"};
}

std::vector<std::string> window_cells(const BalanceWindowResult& r) {
  const bool tested = r.time_s > 0.0;
  const bool both = r.braking_share && r.accelerating_share;
  return {window_result_name(r),
          tested ? fixed(100 * r.lowest_share, 1) + "-" + fixed(100 * r.highest_share, 1)
                 : std::string("-"),
          window_worst(r),
          tested ? fixed(100 * r.outside_fraction, 1) : std::string("-"),
          (r.braking_share ? fixed(100 * *r.braking_share, 1) : std::string("-")) + " / " +
              (r.accelerating_share ? fixed(100 * *r.accelerating_share, 1) : std::string("-")),
          both ? fixed(100 * (*r.braking_share - *r.accelerating_share), 1) : std::string("-")};
}

std::string axle_cell(const CornerResult& c) {
  return label(c.entry_axle) + "/" + label(c.apex_axle) + "/" + label(c.exit_axle);
}

std::string balance_index_cell(const CornerResult& c) {
  return signed_fixed(c.entry_balance_index, 3) + "/" + signed_fixed(c.apex_balance_index, 3) +
         "/" + signed_fixed(c.exit_balance_index, 3);
}

std::string axle_legend() {
  return "axle: the one using more of its grip (front - rear usage beside it); both within +-" +
         fixed(axle_neutral_band, 2);
}

}  // namespace lapwing
