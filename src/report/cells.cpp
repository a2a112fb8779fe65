#include "lapwing/report/cells.hpp"

#include "lapwing/base/format.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing {

namespace {
// Percent with one decimal, or "-" where undefined.
std::string percent_or_dash(const std::optional<double>& v) {
  return v ? fixed(100 * *v, 1) : std::string("-");
}

}  // namespace

std::string id_list(const std::vector<int>& ids) {
  std::string o;
  for (int id : ids) o += (o.empty() ? "" : ", ") + std::to_string(id);
  return o.empty() ? "-" : o;
}

std::vector<std::string> balance_cells(const BalanceSummary& b) {
  return {fixed(100 * b.static_front_share, 1),
          fixed(100 * b.aero_balance_150, 1) + " / " + percent_or_dash(b.aero_balance_eff_150),
          fixed(100 * b.aero_balance_250, 1) + " / " + percent_or_dash(b.aero_balance_eff_250),
          b.has_fast_acceleration ? fixed(100 * b.lowest_front_share_fast, 1) + " at " +
                                        fixed(b.lowest_front_share_at_m, 0) + " m"
                                  : std::string("-"),
          id_list(b.front_limited_corners),
          fixed(b.front_limited_length_m, 0)};
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
