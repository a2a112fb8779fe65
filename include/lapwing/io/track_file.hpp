// Reading a track file (README, "Track") into a Track, with its data files.
#pragma once

#include <string>

#include "lapwing/io/source_map.hpp"
#include "lapwing/model/track.hpp"

namespace lapwing {

/// A track read from its file, with where each of its values stands in the file.
struct TrackFile {
  Track track;
  SourceMap sources;
};

/// Reads a track file (and the data file it names) and checks it (Track::validate). Throws
/// InputError at the place of the first problem: FILE:LINE:COL: error: ... (key.path).
TrackFile read_track_file(const std::string& file);

/// The track alone.
Track load_track(const std::string& file);

}  // namespace lapwing
