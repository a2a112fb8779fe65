#include "lapwing/io/csv_writer.hpp"

#include <cmath>

#include "lapwing/base/format.hpp"

namespace lapwing {

void csv_number(std::string& out, double v) {
  append_number(out, v);
}

void csv_number_or_empty(std::string& out, double v) {
  if (!std::isnan(v)) append_number(out, v);
}

void csv_text(std::string& out, std::string_view s) {
  if (s.find_first_of(",\"\r\n") == std::string_view::npos) {
    out += s;
    return;
  }
  out += '"';
  for (char c : s) {
    if (c == '"') out += '"';
    out += c;
  }
  out += '"';
}

}  // namespace lapwing
