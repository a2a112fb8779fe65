#include "lapwing/report/text_table.hpp"

#include <algorithm>

#include "lapwing/base/format.hpp"

namespace lapwing {

std::string text_table(const std::vector<std::string>& header,
                       const std::vector<std::vector<std::string>>& rows) {
  std::vector<std::size_t> width(header.size(), 0);
  for (std::size_t c = 0; c < header.size(); ++c) width[c] = header[c].size();
  for (const auto& r : rows)
    for (std::size_t c = 0; c < r.size() && c < width.size(); ++c)
      width[c] = std::max(width[c], r[c].size());
  auto line = [&](const std::vector<std::string>& r) {
    std::string o;
    for (std::size_t c = 0; c < width.size(); ++c) {
      const std::string cell = c < r.size() ? r[c] : "";
      const std::string pad(width[c] - cell.size(), ' ');
      if (c) o += "  ";
      o += c == 0 ? cell + pad : pad + cell;
    }
    while (!o.empty() && o.back() == ' ') o.pop_back();
    return o + "\n";
  };
  std::string o = line(header);
  std::size_t total = 0;
  for (auto w : width) total += w;
  o += std::string(total + 2 * (width.size() - 1), '-') + "\n";
  for (const auto& r : rows) o += line(r);
  return o;
}

std::string signed_fixed(double v, int decimals) {
  const std::string t = fixed(v, decimals);
  return (v >= 0 && t.find_first_not_of("0.") != std::string::npos ? "+" : "") + t;
}
}  // namespace lapwing
