// Writing CSV files. Each file's columns are one list of name + formatter, and both the header
// and every row are made from that list, so a file cannot have more fields in a row than names
// in its header (STYLE habit 13). Reading data files is csv.hpp's.
#pragma once

#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace lapwing {

/// One column of a CSV file whose rows are `Row`s: its header name and what it appends for a
/// row (one field, without the separator).
template <typename Row>
struct CsvColumn {
  std::string_view name;
  void (*write)(std::string& out, const Row& row);
};

/// Appends a number at full precision: the shortest text that reads back to the same double
/// (format_number; a non-finite value is a bug and throws).
void csv_number(std::string& out, double v);
/// Appends a number, or nothing (an empty field) when the value is undefined (NaN).
void csv_number_or_empty(std::string& out, double v);
/// Appends text as one field, quoted when it holds a comma, a quote or a line break (RFC 4180:
/// a quote inside is doubled).
void csv_text(std::string& out, std::string_view s);

/// The column names, in order.
template <typename Row>
std::vector<std::string> csv_names(std::span<const CsvColumn<Row>> columns) {
  std::vector<std::string> names;
  for (const auto& c : columns) names.emplace_back(c.name);
  return names;
}

/// A CSV text built row by row from one list of columns: the header first, then each row.
template <typename Row>
class CsvWriter {
 public:
  explicit CsvWriter(std::span<const CsvColumn<Row>> columns, std::size_t rows_hint = 0)
      : columns_(columns) {
    out_.reserve(64 + rows_hint * columns.size() * 12);
    for (std::size_t c = 0; c < columns_.size(); ++c) {
      if (c) out_ += ',';
      out_ += columns_[c].name;
    }
    out_ += '\n';
  }
  void add(const Row& row) {
    for (std::size_t c = 0; c < columns_.size(); ++c) {
      if (c) out_ += ',';
      columns_[c].write(out_, row);
    }
    out_ += '\n';
  }
  std::string take() { return std::move(out_); }
  /// Hands the text built so far to `sink` once it holds `chunk` bytes or more, and starts
  /// anew: a long file goes out in pieces and is never held whole. flush(sink, 0) ends it.
  template <typename Sink>
  void flush(const Sink& sink, std::size_t chunk = std::size_t{1} << 16) {
    if (out_.size() < chunk || out_.empty()) return;
    sink(std::string_view(out_));
    out_.clear();
  }

 private:
  std::span<const CsvColumn<Row>> columns_;
  std::string out_;
};

}  // namespace lapwing
