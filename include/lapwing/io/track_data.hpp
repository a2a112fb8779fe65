// A track's data files (CSV): a surveyed or GPS centerline, read and handed to the fit
// (path/centerline.hpp), or a curvature profile taken as given (path/curvature_profile.hpp).
// An error of the data names its file and line.
#pragma once

#include <string>
#include <vector>

#include "lapwing/model/track.hpp"
#include "lapwing/path/centerline.hpp"

namespace lapwing {

/// A profile read from its data file, and the file line of each of the file's data rows (so
/// that a rule found later about a point names its line, SourceMap::data).
struct ProfileFile {
  PathProfile profile;
  std::vector<int> lines;
};

/// A CSV of x_m,y_m[,z_m] or lat_deg,lon_deg[,alt_m] (WGS-84, projected to the tangent plane at
/// the first point), fitted (fit_centerline). Columns it does not read are named in the
/// profile's notes. Throws InputError at the file's line.
ProfileFile read_centerline_file(const std::string& csv_file, bool closed,
                                 const CenterlineOptions& options);
/// A CSV of distance_m,curvature_1pm[,grade,bank_deg] taken as given (profile_from_curvature).
/// A closed profile's last row is the lap's end (the mesh checks its heading).
ProfileFile read_curvature_file(const std::string& csv_file);

/// The profiles alone.
PathProfile import_centerline(const std::string& csv_file, bool closed,
                              const CenterlineOptions& options);
PathProfile import_curvature(const std::string& csv_file);

}  // namespace lapwing
