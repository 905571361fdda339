// The invented demo building. Areas, people and gains are invented, in the usual range for
// European offices (10 m² per person, chilled panels over a third to half of the ceiling).
#include "model/building.h"

namespace dewmargin::sim {

surface_physics physics_of(surface_kind kind) {
  switch (kind) {
    case surface_kind::metal_ceiling:
      return {10.8, 0.85, 180.0, 720.0};
    case surface_kind::slab_floor:
      return {7.0, 0.55, 5400.0, 14400.0};
  }
  return {10.8, 0.85, 180.0, 720.0};
}

namespace {

zone_physics zone(std::string id, std::string loop, double floor_m2, double height_m, double surface_m2, double people,
                  double solar_w_m2, double ua_w_k, double ach) {
  zone_physics z;
  z.id = std::move(id);
  z.loop = std::move(loop);
  z.floor_m2 = floor_m2;
  z.height_m = height_m;
  z.surface_m2 = surface_m2;
  z.design_people = people;
  z.supply_air_l_s = 10.0 * people;
  z.solar_peak_w_m2 = solar_w_m2;
  z.envelope_ua_w_k = ua_w_k;
  z.infiltration_ach = ach;
  return z;
}

}  // namespace

building quayside_four() {
  building b;
  b.name = "quayside-four";
  // Ground floor: the lobby (cooled slab, entrance doors) and a meeting room.
  zone_physics lobby = zone("g-lobby", "slab-lobby", 260.0, 4.5, 230.0, 8.0, 10.0, 300.0, 0.5);
  lobby.surface = surface_kind::slab_floor;
  lobby.supply_air_l_s = 260.0;  // 1 L/s per m² for a lobby: more than its few people need
  b.zones.push_back(lobby);
  b.zones.push_back(zone("g-meeting", "ceiling-south", 60.0, 3.0, 25.0, 10.0, 20.0, 60.0, 0.2));
  // First floor: open plan north and south, a pantry with a kettle and dishwasher.
  b.zones.push_back(zone("l1-north-open", "ceiling-north", 220.0, 2.8, 75.0, 22.0, 8.0, 180.0, 0.15));
  zone_physics pantry = zone("l1-north-pantry", "ceiling-north", 30.0, 2.8, 10.0, 2.0, 8.0, 30.0, 0.15);
  pantry.supply_air_l_s = 40.0;
  pantry.extra_moisture_g_h = 300.0;  // invented: kettles and a dishwasher around lunch
  b.zones.push_back(pantry);
  b.zones.push_back(zone("l1-south-open", "ceiling-south", 220.0, 2.8, 95.0, 22.0, 25.0, 200.0, 0.15));
  // Second floor: cellular offices north, a meeting room and open plan south.
  b.zones.push_back(zone("l2-north-offices", "ceiling-north", 180.0, 2.8, 60.0, 14.0, 8.0, 150.0, 0.15));
  b.zones.push_back(zone("l2-south-meeting", "ceiling-south", 45.0, 2.8, 20.0, 8.0, 25.0, 50.0, 0.15));
  b.zones.push_back(zone("l2-south-open", "ceiling-south", 180.0, 2.8, 80.0, 18.0, 25.0, 160.0, 0.15));
  // Third floor, under the roof: more conduction, a little more infiltration.
  b.zones.push_back(zone("l3-north-open", "ceiling-north", 220.0, 2.8, 85.0, 22.0, 10.0, 250.0, 0.2));
  b.zones.push_back(zone("l3-south-open", "ceiling-south", 220.0, 2.8, 105.0, 22.0, 28.0, 270.0, 0.2));

  b.loops = {
      {"ceiling-north", 16.0, 2.0, 240.0}, {"ceiling-south", 16.0, 2.4, 240.0}, {"slab-lobby", 19.0, 1.2, 240.0}};
  b.doas = {"doas-roof", 11.0, 8.0, 18.0, 300.0};
  return b;
}

}  // namespace dewmargin::sim
