#include "lapwing/report/labels.hpp"

namespace lapwing {

std::string label(CornerLimit limit) {
  switch (limit) {
    case CornerLimit::grip:
      return "grip";
    case CornerLimit::power:
      return "power";
    case CornerLimit::braking:
      return "braking";
  }
  return "grip";
}

std::string label(Axle axle) {
  switch (axle) {
    case Axle::front:
      return "front";
    case Axle::rear:
      return "rear";
    case Axle::both:
      return "both";
  }
  return "both";
}

std::string label(PieceKind kind) {
  switch (kind) {
    case PieceKind::corner:
      return "corner";
    case PieceKind::straight:
      return "straight";
  }
  return "corner";
}

}  // namespace lapwing
