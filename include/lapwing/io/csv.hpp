// Strict CSV reading for data files (centerlines, curvature profiles, logs): a header line of
// column names (after any '#' comment lines), commas between fields, numbers in every field of a
// column read (a column not read may hold anything). A field in double quotes is its text, a
// doubled quote inside one quote (RFC 4180, section 2). BOM and CRLF are accepted; a file that
// looks semicolon- or tab-separated, a column named twice, a wrong field count, a non-number or a
// byte that is not UTF-8 is an InputError with file, line and column (a header that was commented
// out with '#' is named as such). Read line by line (large logs are streamed, not slurped).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "lapwing/base/error.hpp"

namespace lapwing {

struct CsvTable {
  std::string file;
  std::vector<std::string> names;            // as written, or the text of a quoted name
  std::vector<std::vector<double>> columns;  // one per name (NaN for a field not a number)
  // Per column, the first field that is no number (empty, or text), refused when the column is
  // read: a column lapwing does not read may hold anything (a logger's marker or lap column).
  struct BadField {
    int line = 0, col = 0;
    std::string text;
  };
  std::vector<std::optional<BadField>> bad;
  std::vector<int> lines;  // file line of each row (for later errors)
  int header_line = 1;     // file line of the header

  std::size_t rows() const { return lines.size(); }
  /// Index of column `name`, or -1.
  int find(const std::string& name) const;
  /// The column named `name`; an InputError (line 1, naming the columns there are) if absent,
  /// or at its first field that is no number.
  const std::vector<double>& column(const std::string& name) const;
  /// Where row `row`'s field of column `name` stands in the file: its line, and the column its
  /// field starts at. The table keeps no field's place (a log of a million rows would keep
  /// one for each), so the line is read again from the file for an error; where it cannot be
  /// (not a regular file, or no longer the same line), or no such column, column 1.
  Mark at(std::size_t row, const std::string& name) const;
};

/// Reads `file`. `min_rows` rows at least (an InputError otherwise).
CsvTable read_csv(const std::string& file, std::size_t min_rows = 10);

/// Errors for a column that must increase strictly (distance, time) and for consecutive rows
/// equal in all of `columns` (duplicate points).
void require_increasing(const CsvTable& t, const std::string& column);
void require_no_duplicates(const CsvTable& t, const std::vector<std::string>& columns);

/// A rule the library found about the table's data (an InvalidInput pointing at "COLUMN[i]",
/// row i) as the file's error at that row's line (the file as a whole when no row is named).
InputError row_error(const CsvTable& t, const InvalidInput& e);

}  // namespace lapwing
