// The outputs' words for the library's enums, as README, "Output files" documents them: the
// corners CSV's and summary.json's `limit` and `*_axle`, compare.json's `pieces[].kind`.
#include <doctest/doctest.h>

#include <string>

#include "lapwing/report/labels.hpp"

using namespace lapwing;

TEST_CASE(
    "every corner limit, axle and piece kind has its documented word (README, \"Output files\")") {
  CHECK(label(CornerLimit::grip) == "grip");
  CHECK(label(CornerLimit::power) == "power");
  CHECK(label(CornerLimit::braking) == "braking");
  CHECK(label(Axle::front) == "front");
  CHECK(label(Axle::rear) == "rear");
  CHECK(label(Axle::both) == "both");
  CHECK(label(PieceKind::corner) == "corner");
  CHECK(label(PieceKind::straight) == "straight");
}
