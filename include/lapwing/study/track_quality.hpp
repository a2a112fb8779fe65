// A verdict on a track's data: how far its points are apart, how noisy they are, and how much
// the lap moves when the smoothing is halved or doubled (the strength lambda: its length
// x 2^(-1/6) and x 2^(1/6) for a centerline's third-order fit, x 2^(-1/4) and x 2^(1/4) for a
// log's second-order one). GCV's choice of lambda is uncertain by a factor of a few (its minimum
// is flat in log lambda), so a lap that moves much within that range rests on the guess.
//
// Verdict (stated in README, "Tracks from data"):
//   good    spacing <= 5 m  and spread <= 1 %
//   usable  spacing <= 10 m and spread <= 2 %
//   poor    otherwise (points over 10 m apart cannot draw a hairpin; a spread over 2 % means
//           the lap depends on the smoothing more than on the car)
// spread = (lap at half strength - lap at double strength) / lap, in absolute value.
// Segment tracks are exact (good); a curvature profile is taken as given, judged by its spacing
// (or by its source's, when it was resampled from data further apart: a log's rows). A
// centerline made from other data (a racing line `track line` wrote) reads no better than that
// data's verdict, which it carries (`centerline: {source_verdict}`).
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "lapwing/model/car.hpp"
#include "lapwing/study/circuit.hpp"

namespace lapwing {

inline constexpr double quality_good_spacing_m = 5.0;
inline constexpr double quality_usable_spacing_m = 10.0;
inline constexpr double quality_good_spread = 0.01;
inline constexpr double quality_usable_spread = 0.02;

enum class Verdict { good, usable, poor };
std::string_view verdict_name(Verdict v);
Verdict verdict_of(std::optional<double> spacing_m, std::optional<double> spread);
/// The verdict named `name` (`good`, `usable`, `poor`); none for any other text.
std::optional<Verdict> verdict_named(std::string_view name);

/// A data track refitted at half and at double its smoothing strength and laid out (its racing
/// line laid again over each): the variants every config of a quality study laps. Empty for
/// segment tracks and curvature profiles.
struct SmoothingVariants {
  double half_length_m = 0.0, double_length_m = 0.0;  // the smoothing lengths of the variants
  std::optional<Circuit> half, twice;  // absent when the variant cannot be laid out (a note)
  std::vector<std::string> notes;
};
SmoothingVariants smoothing_variants(const Circuit& circuit);

struct TrackQuality {
  std::string track_id, track_name, config;
  PathProfile::Source source = PathProfile::Source::centerline;
  bool segments = false;            // exact geometry: no data to judge
  std::optional<double> spacing_m;  // the data's median point (or row) spacing
  bool source_spacing = false;      // a curvature profile's: its source's (a log's rows)
  // A centerline made from other data (`track line`): that data's verdict, which `verdict`
  // is held to at best (PathProfile::source_verdict).
  std::optional<Verdict> source_verdict;
  std::optional<double> noise_m;    // a centerline's: GCV's estimate (auto) or the fit's
                                    // residual rms (a length given)
  bool noise_estimated = false;     // noise_m is GCV's estimate
  double smoothing_m = 0.0;
  bool smoothing_auto = false;
  std::optional<double> lap_s, lap_half_s, lap_double_s;  // half and double strength
  std::optional<double> spread;                           // |half - double| / lap
  Verdict verdict = Verdict::good;
  std::vector<std::string> notes;  // variants that could not be solved, and why
};

/// The verdict on `circuit` for one configured car (`config` its name), with the lap on the
/// circuit itself `lap_s` (already solved by the caller) and the variants' laps.
TrackQuality assess_track(const Circuit& circuit, const SmoothingVariants& variants,
                          const ConfiguredCar& configured_car, const std::string& config,
                          double lap_s);

/// The verdict on `circuit`'s data alone: its spacing, noise and any source verdict, without
/// the lap spread (which needs a car; `spread` stays empty): what `track line` without --car
/// can say of its source.
TrackQuality assess_track_data(const Circuit& circuit);

/// The worst verdict of several (check: one per config).
Verdict worst(const std::vector<TrackQuality>& qualities);

}  // namespace lapwing
