#include "lapwing/io/input_file.hpp"

#include <algorithm>
#include <cerrno>
#include <filesystem>
#include <mutex>
#include <system_error>

#include "lapwing/base/error.hpp"

namespace lapwing {

namespace {
// What the file's status says (no file, a folder); the file is not opened.
std::optional<std::string> status_problem(const std::string& file) {
  std::error_code ec;
  const auto status = std::filesystem::status(file, ec);
  // The system's words: "No such file or directory", "Permission denied", ...
  if (ec) return "cannot open the file: " + ec.message();
  if (std::filesystem::is_directory(status)) return std::string("is a directory, not a file");
  return std::nullopt;
}

std::optional<std::string> open_problem(const std::string& file, std::ifstream& in) {
  errno = 0;
  in.open(file, std::ios::binary);
  if (in) return std::nullopt;
  const int e = errno;
  return "cannot open the file" +
         (e != 0 ? ": " + std::generic_category().message(e) : std::string());
}
}  // namespace

std::optional<std::string> unreadable(const std::string& file) {
  if (auto why = status_problem(file)) return why;
  // A regular file is opened to learn whether it can be; a pipe or device is not (opening a
  // pipe twice would take what its writer meant for the reader): its reader finds out.
  std::error_code ec;
  if (!std::filesystem::is_regular_file(file, ec)) return std::nullopt;
  std::ifstream in;
  return open_problem(file, in);
}

std::ifstream open_input(const std::string& file) {
  std::ifstream in;
  auto why = status_problem(file);
  if (!why) why = open_problem(file, in);
  if (why) throw InputError(file, Mark{}, *why);
  note_input(file);
  return in;
}

bool same_file(const std::string& a, const std::string& b) {
  std::error_code e1, e2, e3;
  if (std::filesystem::equivalent(a, b, e3) && !e3) return true;
  const auto ca = std::filesystem::weakly_canonical(a, e1);
  const auto cb = std::filesystem::weakly_canonical(b, e2);
  return !e1 && !e2 && ca == cb;
}

namespace {
// The living ledger (the innermost, when one is made inside another) and the lock over it:
// tracks and logs may be read on worker threads.
std::mutex ledger_mutex;
InputLedger* ledger = nullptr;
}  // namespace

InputLedger::InputLedger() {
  const std::lock_guard lock(ledger_mutex);
  outer_ = ledger;
  ledger = this;
}

InputLedger::~InputLedger() {
  const std::lock_guard lock(ledger_mutex);
  ledger = outer_;
}

void note_input(const std::string& file) {
  std::error_code ec;
  if (!std::filesystem::is_regular_file(file, ec)) return;
  const std::lock_guard lock(ledger_mutex);
  if (!ledger) return;
  auto& files = ledger->files_;
  if (std::find(files.begin(), files.end(), file) == files.end()) files.push_back(file);
}

std::vector<std::string> inputs_read() {
  const std::lock_guard lock(ledger_mutex);
  return ledger ? ledger->files_ : std::vector<std::string>{};
}

std::string mib_text(std::size_t bytes) {
  return std::to_string(bytes >> 20) + " MiB";
}

}  // namespace lapwing
