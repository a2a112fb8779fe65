// A racing line written as a track of its own (`lapwing track line`): OUT.csv, the line's points
// with the room to each edge measured from the line, and OUT.yaml, a centerline track that names
// it and carries the source track's air, mesh, start speed and sectors (moved to where the line
// passes them). Lapping OUT.yaml laps the line.
#pragma once

#include <optional>
#include <string>

#include "lapwing/model/air.hpp"
#include "lapwing/model/track.hpp"

namespace lapwing {

struct LineTrackFiles {
  std::string yaml, csv;
};

/// `line` is a racing line's profile over `source`'s described path (path/racing_line.hpp);
/// `method` ("min-curvature" or "min-time") and `spec` are said in the file's comment; `air` is
/// what the source track's air became (the air options applied). The CSV's columns: x_m, y_m,
/// z_m when the line climbs anywhere, width_left_m, width_right_m (from the line, > 0).
/// The source's data-quality verdict, when given, is carried as `centerline: {source_verdict}`
/// (the line's own verdict is held to it at best), and `source_quality` (its line of text, as
/// `run` prints it) is said in the comment.
struct SourceQuality {
  std::string verdict;  // good | usable | poor
  std::string text;     // "track data: ...: poor (...)"
};
LineTrackFiles line_track_files(const Track& source, const PathProfile& line, const AirSpec& air,
                                const std::string& method, const LineSpec& spec,
                                const std::string& csv_name,
                                const std::optional<SourceQuality>& source_quality = {});

/// The YAML of a track's air: "altitude: ... m\n" and, when any is given, "ambient: {...}\n".
std::string air_yaml(const AirSpec& air);

}  // namespace lapwing
