#include "lapwing/model/car.hpp"

namespace lapwing {

int Car::config_index(const std::string& n) const {
  for (std::size_t i = 0; i < configs.size(); ++i)
    if (configs[i].name == n) return static_cast<int>(i);
  return -1;
}

std::vector<std::string> Car::config_names() const {
  std::vector<std::string> v;
  for (const auto& c : configs) v.push_back(c.name);
  return v;
}

Car Car::configured(std::size_t index) const {
  Car c = *this;
  const AeroConfig& a = configs.at(index);
  c.mass_kg = a.mass_kg.value_or(mass_kg);
  c.inertia_factor = a.inertia_factor.value_or(inertia_factor);
  c.cg_height_m = a.cg_height_m.value_or(cg_height_m);
  c.front_weight = a.front_weight.value_or(front_weight);
  c.drag_height_m = a.drag_height_m.value_or(drag_height_m);
  c.configs = {a};
  return c;
}

}  // namespace lapwing
