#include "lapwing/io/json.hpp"

#include <cassert>
#include <cmath>
#include <cstdio>
#include <stdexcept>

#include "lapwing/base/format.hpp"
#include "lapwing/base/text.hpp"

namespace lapwing {

std::string json_quote(std::string_view s) {
  // JSON text is UTF-8 (RFC 8259, 8.1): a byte that is not (a file name's, say) becomes U+FFFD.
  const std::string text = valid_utf8(s);
  std::string o = "\"";
  for (char c : text) {
    switch (c) {
      case '"':
        o += "\\\"";
        break;
      case '\\':
        o += "\\\\";
        break;
      case '\n':
        o += "\\n";
        break;
      case '\t':
        o += "\\t";
        break;
      case '\r':
        o += "\\r";
        break;
      default:
        if (static_cast<unsigned char>(c) < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          o += buf;
        } else {
          o += c;
        }
    }
  }
  return o + "\"";
}

void JsonWriter::newline() {
  out_ += '\n';
  out_.append(2 * stack_.size(), ' ');
}

void JsonWriter::before_value() {
  if (after_key_) {
    after_key_ = false;
    return;
  }
  if (stack_.empty()) return;
  assert(!stack_.back().object && "JsonWriter: a value in an object needs a key");
  if (!stack_.back().empty) out_ += ",";
  newline();
  stack_.back().empty = false;
}

JsonWriter& JsonWriter::key(std::string_view k) {
  assert(!stack_.empty() && stack_.back().object);
  if (!stack_.back().empty) out_ += ",";
  newline();
  stack_.back().empty = false;
  out_ += json_quote(k);
  out_ += ": ";
  after_key_ = true;
  return *this;
}

JsonWriter& JsonWriter::begin_object() {
  before_value();
  out_ += "{";
  stack_.push_back({true});
  return *this;
}

JsonWriter& JsonWriter::end_object() {
  assert(!stack_.empty() && stack_.back().object);
  const bool empty = stack_.back().empty;
  stack_.pop_back();
  if (!empty) newline();
  out_ += "}";
  return *this;
}

JsonWriter& JsonWriter::begin_array() {
  before_value();
  out_ += "[";
  stack_.push_back({false});
  return *this;
}

JsonWriter& JsonWriter::end_array() {
  assert(!stack_.empty() && !stack_.back().object);
  const bool empty = stack_.back().empty;
  stack_.pop_back();
  if (!empty) newline();
  out_ += "]";
  return *this;
}

JsonWriter& JsonWriter::value(double v) {
  before_value();
  out_ += format_number(v);
  return *this;
}

JsonWriter& JsonWriter::value(int v) {
  before_value();
  out_ += std::to_string(v);
  return *this;
}

JsonWriter& JsonWriter::value(bool v) {
  before_value();
  out_ += v ? "true" : "false";
  return *this;
}

JsonWriter& JsonWriter::value(std::string_view s) {
  before_value();
  out_ += json_quote(s);
  return *this;
}

JsonWriter& JsonWriter::null() {
  before_value();
  out_ += "null";
  return *this;
}

JsonWriter& JsonWriter::numbers(const std::vector<double>& v) {
  before_value();
  out_ += "[";
  for (std::size_t i = 0; i < v.size(); ++i) {
    if (i) out_ += ", ";
    out_ += format_number(v[i]);
  }
  out_ += "]";
  return *this;
}

std::string JsonWriter::str() const {
  assert(stack_.empty() && "JsonWriter: unclosed container");
  return out_ + "\n";
}

}  // namespace lapwing
