// A small JSON writer: keys in the order written, numbers in their shortest round-trip form,
// two-space indentation. Deterministic bytes for the same calls.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace lapwing {

class JsonWriter {
 public:
  JsonWriter& begin_object();
  JsonWriter& end_object();
  JsonWriter& begin_array();
  JsonWriter& end_array();
  JsonWriter& key(std::string_view k);
  JsonWriter& value(double v);
  JsonWriter& value(int v);
  JsonWriter& value(bool v);
  JsonWriter& value(std::string_view s);
  JsonWriter& value(const char* s) { return value(std::string_view(s)); }
  JsonWriter& numbers(const std::vector<double>& v);  // an array of numbers on one line
  JsonWriter& null();
  template <typename T>
  JsonWriter& field(std::string_view k, const T& v) {
    return key(k).value(v);
  }

  /// The text (with a final newline); all containers must be closed.
  std::string str() const;

 private:
  void before_value();
  void newline();
  struct Level {
    bool object;
    bool empty = true;
  };
  std::string out_;
  std::vector<Level> stack_;
  bool after_key_ = false;
};

/// JSON string literal with escapes; always valid UTF-8 (a byte that is not becomes U+FFFD).
std::string json_quote(std::string_view s);

}  // namespace lapwing
