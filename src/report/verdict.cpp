#include "lapwing/report/verdict.hpp"

#include <cmath>

#include "lapwing/base/format.hpp"
#include "lapwing/report/cells.hpp"
#include "lapwing/report/text_table.hpp"

namespace lapwing {

std::string verdict_sentence(const Comparison::PerTrack& pt,
                             const std::vector<std::string>& names) {
  const auto& best = pt.entries[pt.best];
  if (pt.entries.size() < 2)
    return names[pt.best] + ": " + fixed(best.run.summary.lap_time_s, 3) + " s (the only config)";
  // The runner-up's delta to the winner, split where it is made: what the winner gains there.
  const TimeSplit& s = pt.entries[pt.runner_up].split;
  const std::string how = fixed(pt.margin_s, 3) == fixed(0.0, 3) ? " ties with " : " wins by ";
  return names[pt.best] + how + (how == " wins by " ? fixed(pt.margin_s, 3) + " s over " : "") +
         names[pt.runner_up] + ": " + signed_fixed(s.corners_s, 3) + " s in corners, " +
         signed_fixed(s.braking_s, 3) + " s under braking, " + signed_fixed(s.straights_s, 3) +
         " s on straights";
}

std::string balance_verdict(const Comparison::PerTrack& pt, const std::vector<std::string>& names) {
  const auto& winner = pt.entries[pt.best].run.summary.balance.window;
  if (!winner) return "";
  auto window = [&](std::size_t k) -> const BalanceWindowResult& {
    return *pt.entries[k].run.summary.balance.window;
  };
  // The winner in full; the others grouped by result, a failure with its size and place.
  std::string o = "balance window " + window_text(winner->window) + ": " + names[pt.best];
  const std::string result = window_result_name(*winner);
  if (result == "not reached")
    o += " never reaches it (never above its speed while cornering)";
  else
    o += (result == "pass" ? " passes, " : " fails, ") + window_worst(*winner);
  std::string passing, failing, unreached;
  for (std::size_t k = 0; k < pt.entries.size(); ++k) {
    if (k == pt.best) continue;
    const BalanceWindowResult& r = window(k);
    const std::string rk = window_result_name(r);
    if (rk == "pass")
      passing += (passing.empty() ? "" : ", ") + names[k];
    else if (rk == "fail")
      failing += (failing.empty() ? "" : ", ") + names[k] + " (" +
                 fixed(100 * std::abs(r.worst_excursion), 1) +
                 (r.worst_excursion < 0 ? " below, " : " above, ") + window_where(r) + ")";
    else
      unreached += (unreached.empty() ? "" : ", ") + names[k];
  }
  if (!passing.empty()) o += "; also passing: " + passing;
  if (!failing.empty()) o += "; failing: " + failing;
  if (!unreached.empty()) o += "; not reaching it: " + unreached;
  return o;
}

}  // namespace lapwing
