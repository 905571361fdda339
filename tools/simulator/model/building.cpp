#include "model/building.h"

namespace dewmargin::sim {

const char* surface_kind_name(surface_kind k) {
  switch (k) {
    case surface_kind::ceiling_panel:
      return "ceiling_panel";
    case surface_kind::slab:
      return "slab";
    case surface_kind::wall_panel:
      return "wall_panel";
  }
  return "surface";
}

// clang-format off
// | kind          | heat transfer | water share | τ full flow | τ no flow | source |
// |---------------|---------------|-------------|-------------|-----------|--------|
// | ceiling_panel | 10.8 W/(m² K) | 0.85        | 3 min       | 12 min    | coefficient: EN 1264-5 / ISO 11855, cooling ceiling (from memory); the rest common practice, no source (a metal panel sits close to its water) |
// | slab          | 7.0 W/(m² K)  | 0.55        | 90 min      | 4 h       | coefficient: same standards, cooling floor (from memory); the rest common practice, no source (a screed does not follow its water closely) |
// | wall_panel    | 8.0 W/(m² K)  | 0.75        | 8 min       | 30 min    | coefficient: same standards, cooling wall (from memory); the rest common practice, no source (capillary mats in plaster) |
// clang-format on
surface_physics default_physics(surface_kind kind) {
  switch (kind) {
    case surface_kind::ceiling_panel:
      return {10.8, 0.85, 180.0, 720.0};
    case surface_kind::slab:
      return {7.0, 0.55, 5400.0, 14400.0};
    case surface_kind::wall_panel:
      return {8.0, 0.75, 480.0, 1800.0};
  }
  return {10.8, 0.85, 180.0, 720.0};
}

}  // namespace dewmargin::sim
