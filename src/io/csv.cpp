#include "lapwing/io/csv.hpp"

#include <filesystem>
#include <fstream>
#include <limits>

#include "lapwing/base/error.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/text.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/io/input_file.hpp"

namespace lapwing {

int CsvTable::find(const std::string& name) const {
  for (std::size_t i = 0; i < names.size(); ++i)
    if (names[i] == name) return static_cast<int>(i);
  return -1;
}

const std::vector<double>& CsvTable::column(const std::string& name) const {
  const int i = find(name);
  if (i < 0) {
    std::string have;
    for (const auto& n : names) have += (have.empty() ? "" : ", ") + n;
    throw InputError(file, Mark{1, 1}, "no column '" + name + "' (the header has " + have + ")");
  }
  const auto c = static_cast<std::size_t>(i);
  if (c < bad.size() && bad[c])
    throw InputError(file, Mark{bad[c]->line, bad[c]->col},
                     "'" + bad[c]->text + "' is not a number (column " + name + ")");
  return columns[c];
}

namespace {
// The fields of a line, and the column each starts at (from 1). A field whose first character
// other than blanks is a double quote is quoted (RFC 4180, section 2): its text runs to the
// quote that closes it, a doubled quote standing for one, commas included; blanks may follow.
// `unclosed`: the column of a quote that is not closed on the line, or of text after a closing
// quote (0: none).
std::vector<std::string> split(const std::string& line, std::vector<int>& starts,
                               int* unclosed = nullptr) {
  std::vector<std::string> out;
  starts.clear();
  if (unclosed) *unclosed = 0;
  std::size_t at = 0;
  while (true) {
    starts.push_back(static_cast<int>(at) + 1);
    std::size_t q = at;
    while (q < line.size() && (line[q] == ' ' || line[q] == '\t')) ++q;
    if (q < line.size() && line[q] == '"') {
      std::string text;
      std::size_t i = q + 1;
      bool closed = false;
      for (; i < line.size(); ++i) {
        if (line[i] != '"') {
          text.push_back(line[i]);
        } else if (i + 1 < line.size() && line[i + 1] == '"') {
          text.push_back('"');
          ++i;
        } else {
          closed = true;
          ++i;
          break;
        }
      }
      while (i < line.size() && (line[i] == ' ' || line[i] == '\t')) ++i;
      if (unclosed && *unclosed == 0 && (!closed || (i < line.size() && line[i] != ',')))
        *unclosed = static_cast<int>(closed ? i : q) + 1;
      out.push_back(text);
      const std::size_t comma = line.find(',', i);
      if (comma == std::string::npos) break;
      at = comma + 1;
      continue;
    }
    const std::size_t comma = line.find(',', at);
    out.push_back(line.substr(at, comma == std::string::npos ? std::string::npos : comma - at));
    if (comma == std::string::npos) break;
    at = comma + 1;
  }
  return out;
}
std::string trim(std::string s) {
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.pop_back();
  std::size_t i = 0;
  while (i < s.size() && (s[i] == ' ' || s[i] == '\t')) ++i;
  return s.substr(i);
}
// Whether `text` reads as a header of `fields` column names: as many comma-separated fields,
// none empty and none a number.
bool looks_like_header(const std::string& text, std::size_t fields) {
  std::vector<int> starts;
  const auto names = split(text, starts);
  if (names.size() != fields || fields < 2) return false;
  for (const auto& name : names) {
    const std::string n = trim(name);
    if (n.empty() || parse_number(n)) return false;
  }
  return true;
}
// The next line of `in` into `line` (without its '\n'); false at the end of the file. Read byte
// by byte from the stream's buffer, so that a NUL byte (a binary file), a line longer than
// max_line_bytes or a file beyond max_data_bytes is refused as soon as it is met: a file with no
// line ends (/dev/zero) or no end (a pipe) is not read for ever. `read` counts the bytes so far.
bool next_line(std::istream& in, std::string& line, std::size_t& read, const std::string& file,
               int n) {
  line.clear();
  std::streambuf& buf = *in.rdbuf();
  bool any = false;
  for (int c = buf.sbumpc(); c != std::char_traits<char>::eof(); c = buf.sbumpc()) {
    any = true;
    if (++read > max_data_bytes)
      throw InputError(
          file, Mark{n, static_cast<int>(line.size()) + 1},
          "the file is larger than " + mib_text(max_data_bytes) + " (lapwing's largest data file)");
    if (c == '\n') return true;
    if (c == 0)
      throw InputError(file, Mark{n, static_cast<int>(line.size()) + 1},
                       "a NUL byte (byte " + std::to_string(read) + "): not a text file");
    if (line.size() >= max_line_bytes)
      throw InputError(file, Mark{n, 1},
                       "the line is longer than " + mib_text(max_line_bytes) +
                           " (lapwing's longest CSV row): not a CSV file of numbers");
    line.push_back(static_cast<char>(c));
  }
  return any;
}
}  // namespace

Mark CsvTable::at(std::size_t row, const std::string& name) const {
  const Mark line_only{row < lines.size() ? lines[row] : header_line, 1};
  const int c = find(name);
  std::error_code ec;
  if (c < 0 || row >= lines.size() || !std::filesystem::is_regular_file(file, ec)) return line_only;
  std::ifstream in(file, std::ios::binary);
  std::string line;
  std::size_t read = 0;
  try {
    for (int n = 1; n <= lines[row]; ++n)
      if (!next_line(in, line, read, file, n)) return line_only;
  } catch (const InputError&) {
    return line_only;
  }
  if (!line.empty() && line.back() == '\r') line.pop_back();
  std::vector<int> starts;
  const auto fields = split(line, starts);
  if (fields.size() != names.size()) return line_only;  // the file changed since it was read
  return Mark{lines[row], starts[static_cast<std::size_t>(c)]};
}

CsvTable read_csv(const std::string& file, std::size_t min_rows) {
  std::ifstream in = open_input(file);
  CsvTable t;
  t.file = file;
  std::string line;
  int n = 0;
  std::vector<int> starts;
  // The last comment line before the header, and its line: when the header turns out to be
  // numbers, a comment that reads like a header is the likely one ('#x_m,y_m').
  std::string last_comment;
  int last_comment_line = 0;
  std::size_t read = 0;
  while (next_line(in, line, read, file, n + 1)) {
    ++n;
    if (!line.empty() && line.back() == '\r') line.pop_back();
    // A CR inside a line: lines that end with a CR alone (old Mac text), read as one line that
    // was all comments or one long header (a robustness campaign's finding: "the file has no
    // header line"). Named at the first.
    if (const std::size_t cr = line.find('\r'); cr != std::string::npos)
      throw InputError(file, Mark{n, static_cast<int>(cr) + 1}, lone_cr_message);
    int bom = 0;  // bytes of a BOM taken off the line (columns count from the file's first byte)
    if (n == 1 && line.rfind("\xEF\xBB\xBF", 0) == 0) line.erase(0, bom = 3);  // UTF-8 BOM
    // Text is UTF-8: a byte that is not is refused where it stands (a name read from the header
    // goes into JSON and YAML outputs, which must be UTF-8).
    if (const auto bad = invalid_utf8_at(line))
      throw InputError(file, Mark{n, static_cast<int>(*bad) + 1 + bom},
                       invalid_utf8_message(line, *bad));
    if (line.empty()) continue;
    if (t.names.empty() && line[0] == '#') {  // comment lines before the header
      last_comment = line;
      last_comment_line = n;
      continue;
    }
    if (t.names.empty()) {
      if (line.find(',') == std::string::npos) {
        if (line.find(';') != std::string::npos)
          throw InputError(file, Mark{n, 1},
                           "the file looks semicolon-separated; lapwing reads commas");
        if (line.find('\t') != std::string::npos)
          throw InputError(file, Mark{n, 1}, "the file looks tab-separated; lapwing reads commas");
      }
      int unclosed = 0;
      const auto header = split(line, starts, &unclosed);
      if (unclosed)
        throw InputError(file, Mark{n, unclosed + bom},
                         "a quoted column name must end with its closing quote before the next "
                         "comma (a quote inside one is doubled: RFC 4180)");
      for (auto name : header) {
        name = trim(name);
        if (name.empty() || parse_number(name)) {
          std::string hint;
          if (!last_comment.empty() && looks_like_header(last_comment.substr(1), header.size()))
            hint = "; line " + std::to_string(last_comment_line) + " ('" + last_comment +
                   "') looks like the header but was read as a comment because it starts with "
                   "'#': remove the '#'";
          throw InputError(
              file, Mark{n, 1},
              "the first line must be a header of column names (got '" + line + "')" + hint);
        }
        // Two columns of one name: which one a reader takes would be a guess.
        if (const int first = t.find(name); first >= 0)
          throw InputError(file, Mark{n, starts[t.names.size()] + bom},
                           "column '" + name + "' is named twice (columns " +
                               std::to_string(first + 1) + " and " +
                               std::to_string(t.names.size() + 1) + ")");
        t.names.push_back(name);
      }
      t.header_line = n;
      t.columns.resize(t.names.size());
      t.bad.resize(t.names.size());
      continue;
    }
    int unclosed = 0;
    const auto fields = split(line, starts, &unclosed);
    if (unclosed)
      throw InputError(file, Mark{n, unclosed},
                       "a quoted field must end with its closing quote before the next comma (a "
                       "quote inside one is doubled: RFC 4180)");
    if (fields.size() != t.names.size())
      throw InputError(file, Mark{n, 1},
                       "expected " + std::to_string(t.names.size()) + " fields, got " +
                           std::to_string(fields.size()));
    for (std::size_t c = 0; c < fields.size(); ++c) {
      const auto v = parse_number(fields[c]);
      // No number: refused when the column is read (CsvTable::column), at its first such field.
      if (!v && !t.bad[c]) t.bad[c] = CsvTable::BadField{n, starts[c], trim(fields[c])};
      t.columns[c].push_back(v ? *v : std::numeric_limits<double>::quiet_NaN());
    }
    t.lines.push_back(n);
  }
  if (t.names.empty())
    throw InputError(file, Mark{1, 1},
                     n == 0 ? "the file is empty" : "the file has no header line (only comments)");
  if (t.rows() < min_rows)
    throw InputError(file, Mark{n, 1},
                     "only " + std::to_string(t.rows()) + " data rows; at least " +
                         std::to_string(min_rows) + " are needed");
  return t;
}

void require_increasing(const CsvTable& t, const std::string& column) {
  const auto& v = t.column(column);
  const int c = t.find(column);
  for (std::size_t i = 1; i < v.size(); ++i)
    if (!(v[i] > v[i - 1]))
      throw InputError(t.file, t.at(i, column),
                       column + " must increase strictly: " + format_readable(v[i]) + " after " +
                           format_readable(v[i - 1]) + " (column " + std::to_string(c + 1) + ")");
}

void require_no_duplicates(const CsvTable& t, const std::vector<std::string>& columns) {
  std::vector<const std::vector<double>*> cols;
  for (const auto& c : columns) cols.push_back(&t.column(c));
  for (std::size_t i = 1; i < t.rows(); ++i) {
    bool same = true;
    for (const auto* c : cols) same = same && (*c)[i] == (*c)[i - 1];
    if (same)
      throw InputError(
          t.file, Mark{t.lines[i], 1},
          "duplicate consecutive point (the same as line " + std::to_string(t.lines[i - 1]) + ")");
  }
}

InputError row_error(const CsvTable& t, const InvalidInput& e) {
  // The data row "COLUMN[i]" the violation points at is the table's row i.
  const std::string& where = e.violation().where();
  const std::optional<std::size_t> i = last_index(where);
  // A rule of the data as a whole names the header, the nearest place to it; a row's, the
  // field of its column where the path names one of the table's.
  const Mark mark = i && *i < t.lines.size() ? t.at(*i, where.substr(0, where.find('[')))
                                             : Mark{t.header_line, 1};
  return InputError(t.file, mark, e.message());
}

}  // namespace lapwing
