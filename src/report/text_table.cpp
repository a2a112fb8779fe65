#include "lapwing/report/text_table.hpp"

#include <algorithm>

#include "lapwing/base/format.hpp"

namespace lapwing {

namespace {
bool continuation(char c) {
  return (static_cast<unsigned char>(c) & 0xC0) == 0x80;
}
}  // namespace

std::size_t display_width(const std::string& s) {
  return static_cast<std::size_t>(
      std::count_if(s.begin(), s.end(), [](char c) { return !continuation(c); }));
}

std::string shorten_middle(const std::string& s, std::size_t max) {
  const std::size_t n = display_width(s);
  if (n <= max || max < 3) return s;
  // Byte offset of code point k.
  auto offset = [&s](std::size_t k) {
    std::size_t seen = 0;
    for (std::size_t i = 0; i < s.size(); ++i)
      if (!continuation(s[i]) && seen++ == k) return i;
    return s.size();
  };
  const std::size_t keep = max - 1, head = (keep + 1) / 2, tail = keep - head;
  return s.substr(0, offset(head)) + "\xE2\x80\xA6" + s.substr(offset(n - tail));
}

std::string text_table(const std::vector<std::string>& header,
                       const std::vector<std::vector<std::string>>& rows) {
  std::vector<std::size_t> width(header.size(), 0);
  for (std::size_t c = 0; c < header.size(); ++c) width[c] = display_width(header[c]);
  for (const auto& r : rows)
    for (std::size_t c = 0; c < r.size() && c < width.size(); ++c)
      width[c] = std::max(width[c], display_width(r[c]));
  auto line = [&](const std::vector<std::string>& r) {
    std::string o;
    for (std::size_t c = 0; c < width.size(); ++c) {
      const std::string cell = c < r.size() ? r[c] : "";
      const std::string pad(width[c] - display_width(cell), ' ');
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
