// lapwing's whole library in one include: every public header of every layer, lowest layer first
// (DEVELOPERS.md, the layers). Link lapwing::core with it. A program that needs one part can
// include that layer's headers alone and link its target (lapwing::<layer>).
//
//   #include "lapwing/lapwing.hpp"
//   const lapwing::Car car = lapwing::load_car("car.yaml");
//
// The library's own sources never include this header (tests/layers_test.sh checks), and it names
// every header under include/lapwing/<layer>/ (the same test checks that too).
#pragma once

// base
#include "lapwing/base/big_blocks.hpp"
#include "lapwing/base/error.hpp"
#include "lapwing/base/ellipse_shape.hpp"
#include "lapwing/base/exp_ratio.hpp"
#include "lapwing/base/fft.hpp"
#include "lapwing/base/fixed_power.hpp"
#include "lapwing/base/once_per_key.hpp"
#include "lapwing/base/format.hpp"
#include "lapwing/base/halves.hpp"
#include "lapwing/base/hash.hpp"
#include "lapwing/base/interpolate.hpp"
#include "lapwing/base/memory.hpp"
#include "lapwing/base/named_value.hpp"
#include "lapwing/base/range.hpp"
#include "lapwing/base/text.hpp"
#include "lapwing/base/units.hpp"
#include "lapwing/base/version.hpp"
#include "lapwing/base/violation.hpp"

// model
#include "lapwing/model/aero.hpp"
#include "lapwing/model/air.hpp"
#include "lapwing/model/car.hpp"
#include "lapwing/model/loads.hpp"
#include "lapwing/model/powertrain.hpp"
#include "lapwing/model/track.hpp"
#include "lapwing/model/tyre.hpp"

// path
#include "lapwing/path/box_qp.hpp"
#include "lapwing/path/centerline.hpp"
#include "lapwing/path/corners.hpp"
#include "lapwing/path/curvature_profile.hpp"
#include "lapwing/path/geodesy.hpp"
#include "lapwing/path/log_curvature.hpp"
#include "lapwing/path/logged_speed.hpp"
#include "lapwing/path/mesh.hpp"
#include "lapwing/path/racing_line.hpp"
#include "lapwing/path/smoothing.hpp"

// io
#include "lapwing/io/car_file.hpp"
#include "lapwing/io/csv.hpp"
#include "lapwing/io/csv_writer.hpp"
#include "lapwing/io/document.hpp"
#include "lapwing/io/input_file.hpp"
#include "lapwing/io/json.hpp"
#include "lapwing/io/line_track.hpp"
#include "lapwing/io/log_file.hpp"
#include "lapwing/io/output.hpp"
#include "lapwing/io/source_map.hpp"
#include "lapwing/io/track_data.hpp"
#include "lapwing/io/track_file.hpp"

// solve
#include "lapwing/solve/axle.hpp"
#include "lapwing/solve/envelope.hpp"
#include "lapwing/solve/level_tables.hpp"
#include "lapwing/solve/solver.hpp"
#include "lapwing/solve/summary.hpp"

// study
#include "lapwing/study/check_summary.hpp"
#include "lapwing/study/circuit.hpp"
#include "lapwing/study/compare.hpp"
#include "lapwing/study/correlate.hpp"
#include "lapwing/study/fit.hpp"
#include "lapwing/study/memory.hpp"
#include "lapwing/study/min_time_line.hpp"
#include "lapwing/study/sweep.hpp"
#include "lapwing/study/thread_pool.hpp"
#include "lapwing/study/track_quality.hpp"
#include "lapwing/study/trade.hpp"

// store
#include "lapwing/store/sweep_store.hpp"

// report
#include "lapwing/report/cells.hpp"
#include "lapwing/report/check_report.hpp"
#include "lapwing/report/compare_report.hpp"
#include "lapwing/report/correlate_report.hpp"
#include "lapwing/report/html_report.hpp"
#include "lapwing/report/labels.hpp"
#include "lapwing/report/lap_files.hpp"
#include "lapwing/report/lap_text.hpp"
#include "lapwing/report/svg.hpp"
#include "lapwing/report/text_table.hpp"
#include "lapwing/report/track_quality_text.hpp"
#include "lapwing/report/trade_report.hpp"
#include "lapwing/report/verdict.hpp"
