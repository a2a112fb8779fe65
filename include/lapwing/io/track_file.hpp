// Reading a track file (README, the track file) into a Track, with its data files.
#pragma once

#include <string>

#include "lapwing/model/track.hpp"

namespace lapwing {

/// Loads and validates a track file. Throws InputError.
Track load_track(const std::string& file);

}  // namespace lapwing
