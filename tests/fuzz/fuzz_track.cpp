// Fuzz target: the track loader (io/track_file.hpp). A track it accepts must keep the model's
// rules (Track::validate() finds nothing), and one of up to 200 000 mesh points is laid out
// (mesh, closure, corners): a layout may refuse it only by InvalidInput.
#include "fuzz_support.hpp"
#include "lapwing/io/track_file.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/study/circuit.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace lapwing;
  const std::string file = fuzz::as_file(data, size, "track.yaml");
  fuzz::input_errors_only([&] {
    const Track track = load_track(file);
    if (const auto v = track.validate())
      fuzz::finding("accepted a track that breaks " + v->message());
    // 200 000 points: a few ms to lay out; larger meshes are the memory guard's (finding 11).
    if (mesh_point_count(track, track.mesh_m) <= 200000) lay_out(track, make_air(track.air));
  });
  return 0;
}
