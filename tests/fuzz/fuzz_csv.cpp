// Fuzz target: the CSV reader (io/csv.hpp) and the data files read through it: a curvature
// profile and a centerline (io/track_data.hpp), open and closed.
#include "fuzz_support.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/io/track_data.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace lapwing;
  const std::string file = fuzz::as_file(data, size, "data.csv");
  fuzz::input_errors_only([&] {
    const CsvTable t = read_csv(file, 2);
    if (!t.names.empty()) require_increasing(t, t.names.front());
  });
  fuzz::input_errors_only([&] { read_curvature_file(file); });
  // The first byte picks open or closed: both paths of the fit see every input.
  fuzz::input_errors_only(
      [&] { read_centerline_file(file, size > 0 && (data[0] & 1), CenterlineOptions{}); });
  return 0;
}
