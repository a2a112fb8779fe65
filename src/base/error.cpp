#include "lapwing/base/error.hpp"

#include <sstream>

#include "lapwing/base/text.hpp"

namespace lapwing {

namespace {
std::string format_input_error(const std::string& file, Mark mark, const std::string& what,
                               const std::string& key_path) {
  // Built with a stream: GCC 12 warns falsely (-Wrestrict) on chains of string '+'.
  // One printable line whatever the file's name, value or key holds (printable(): a quoted "\n"
  // in a key or value, a byte that is not UTF-8).
  std::ostringstream os;
  os << printable(file);
  if (mark.line > 0) os << ':' << mark.line << ':' << mark.col;
  os << ": error: " << printable(what);
  if (!key_path.empty()) os << " (" << printable(key_path) << ')';
  return os.str();
}
}  // namespace

InputError::InputError(std::string file, Mark mark, std::string what, std::string key_path)
    : std::runtime_error(format_input_error(file, mark, what, key_path)),
      file_(std::move(file)),
      mark_(mark),
      message_(std::move(what)),
      key_path_(std::move(key_path)) {}

InvalidInput::InvalidInput(std::string subject, Violation violation)
    : std::runtime_error(
          format_input_error(subject, Mark{}, violation.message(),
                             violation.field.empty() ? violation.at : violation.field)),
      subject_(std::move(subject)),
      violation_(std::move(violation)) {}

void require_valid(const std::optional<Violation>& v, const std::string& subject) {
  if (v) throw InvalidInput(subject, *v);
}

CannotMove cannot_move_in(const CannotMove& e, const std::string& track_name,
                          const std::string& track_file, const std::string& config) {
  std::ostringstream os;
  os << "track " << track_name << " (" << track_file << "), config " << config << ": " << e.what();
  return CannotMove(os.str());
}

}  // namespace lapwing
