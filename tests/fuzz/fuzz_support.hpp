// Shared by the fuzz targets (issue 19, deliver 4): the input as a file (the loaders read files,
// and a fuzz target calls them as the program does), and the rule every target checks: bad input
// is answered by InputError or InvalidInput (exit 2), and anything else that escapes a loader
// (an internal error, std::bad_alloc, a standard-library exception) is a finding. Crashes,
// memory errors and undefined behaviour are the sanitizers' to report.
#pragma once

#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>

#include "lapwing/base/error.hpp"

namespace lapwing::fuzz {

/// `size` bytes at `data` written to NAME in a folder of this process's own (made once, under
/// the system's temporary folder; the same name is overwritten by the next input). Its path.
std::string as_file(const std::uint8_t* data, std::size_t size, const std::string& name);

/// The same folder, for files a target writes itself.
std::string scratch(const std::string& name);

/// A finding: the message on stderr, then abort() so that the fuzzer keeps the input.
[[noreturn]] inline void finding(const std::string& what) {
  std::fprintf(stderr, "lapwing fuzz finding: %s\n", what.c_str());
  std::abort();
}

/// Runs `f`; bad input's own errors are the expected answer, anything else a finding.
template <typename F>
void input_errors_only(F&& f) {
  try {
    f();
  } catch (const InputError&) {
  } catch (const InvalidInput&) {
  } catch (const std::exception& e) {
    finding(std::string("an exception bad input should not raise: ") + e.what());
  }
}

}  // namespace lapwing::fuzz
