// The command line's commands: each parses nothing itself (main does), calls the library, and
// prints. Kept apart from main so that main is only option parsing and error mapping.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace lapwing::cli {

struct CheckOptions {
  std::string car;
  std::vector<std::string> tracks;
  std::string json;
};

struct RunOptions {
  std::string car;
  std::string track;
  std::string config;
  std::string out;
};

int check(const CheckOptions& o);
int run(const RunOptions& o);

}  // namespace lapwing::cli
