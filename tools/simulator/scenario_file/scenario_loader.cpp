// The top level of a scenario file: the day, the weather, the schedules and the building,
// then everything that can only be checked with all of it read (docs/scenarios.md).
#include "scenario_file/scenario_loader.h"

#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <sstream>

#include "scenario_file/scenario_reading.h"

namespace dewmargin::sim {
namespace {

using namespace scenario_detail;

const std::vector<std::string> k_top_keys = {"name",    "building", "date",      "start",     "end",      "seed",
                                             "initial", "weather",  "occupancy", "schedules", "incidents"};

// The default occupancy: an office day, people arriving 07:30-09:00, 60 % in over lunch
// 12:00-13:30, leaving 17:00-18:30 (invented, typical of European offices; from memory).
time_series office_day() {
  return time_series({{7.5 * 3600, 0.0},
                      {9.0 * 3600, 1.0},
                      {12.0 * 3600, 1.0},
                      {12.0 * 3600 + 60, 0.6},
                      {13.5 * 3600, 0.6},
                      {13.5 * 3600 + 60, 1.0},
                      {17.0 * 3600, 1.0},
                      {18.5 * 3600, 0.0}});
}

bool read_text_file(const std::filesystem::path& path, std::string& text, std::string& why) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    why = std::string("cannot read: ") + std::strerror(errno);
    return false;
  }
  std::ostringstream s;
  s << in.rdbuf();
  text = s.str();
  return true;
}

// Parses YAML text; a syntax error is reported at its place.
std::optional<YAML::Node> parse_yaml(std::string_view text, const source& src) {
  try {
    return YAML::Load(std::string(text));
  } catch (const YAML::ParserException& e) {
    src.error({e.mark.line + 1, e.mark.column + 1}, "YAML syntax: " + e.msg);
  } catch (const YAML::Exception& e) {
    src.error({}, std::string("YAML: ") + e.what());
  }
  return std::nullopt;
}

std::optional<std::uint64_t> read_seed(const fields& f) {
  const auto t = f.text("seed");
  if (!t) return std::nullopt;
  const bool digits = !t->empty() && t->size() <= 20 && t->find_first_not_of("0123456789") == std::string::npos;
  errno = 0;
  const unsigned long long v = digits ? std::strtoull(t->c_str(), nullptr, 10) : 0;
  if (!digits || errno == ERANGE) {
    f.error_at_value("seed", "'seed' must be a whole number from 0 to 18446744073709551615, got '" + *t + "'");
    return std::nullopt;
  }
  return static_cast<std::uint64_t>(v);
}

void read_initial(const fields& top, initial_state& init) {
  const YAML::Node* n = top.node("initial");
  if (!n) return;
  if (!n->IsMap()) {
    top.error_at_value("initial", "'initial' must be a map, got " + describe(*n));
    return;
  }
  const fields f(*n, "initial", {"air_c", "dew_point_c", "supply_water_c", "slab_c"}, top.src());
  f.number_into("air_c", number_range::between(0.0, 45.0), init.air_c);
  f.number_into("dew_point_c", number_range::between(-20.0, 35.0), init.dew_point_c);
  f.number_into("supply_water_c", number_range::between(5.0, 40.0), init.supply_water_c);
  f.number_into("slab_c", number_range::between(5.0, 40.0), init.slab_c);
  if (init.dew_point_c > init.air_c) {
    f.error_at_value(f.has("dew_point_c") ? "dew_point_c" : "air_c",
                     "initial: the dew point " + number_text(init.dew_point_c) + " °C is above the air " +
                         number_text(init.air_c) + " °C");
  }
}

bool read_weather(const fields& top, scenario& s) {
  if (!top.require("weather")) return false;
  const YAML::Node& n = *top.node("weather");
  if (!n.IsMap()) {
    top.error_at_value("weather", "'weather' must be a map with 'outdoor_c' and 'dew_point_c', got " + describe(n));
    return false;
  }
  const fields f(n, "weather", {"outdoor_c", "dew_point_c"}, top.src());
  const bool has_both = f.require("outdoor_c") & f.require("dew_point_c");
  const auto air = f.series("outdoor_c", number_range::between(-30.0, 50.0));
  const auto dew = f.series("dew_point_c", number_range::between(-40.0, 35.0));
  if (!has_both || !air || !dew) return false;
  s.outdoor_c = *air;
  s.outdoor_dew_point_c = *dew;
  // Air at or above its dew point at every given time (and so in between, both being linear).
  std::vector<double> times;
  for (const auto& p : air->points()) times.push_back(p.first);
  for (const auto& p : dew->points()) times.push_back(p.first);
  for (double t : times) {
    if (dew->at(t) > air->at(t) + 1e-9) {
      f.error_at_value("dew_point_c", "weather: the dew point " + number_text(dew->at(t)) + " °C at " + clock_text(t) +
                                          " is above the outdoor temperature " + number_text(air->at(t)) + " °C");
      return false;
    }
  }
  return true;
}

// Named share schedules (0..1 over the day), with "occupancy" as the default one.
struct schedule_book {
  std::vector<std::pair<std::string, time_series>> named;
  time_series occupancy = office_day();
  std::string file;  // where they were written (for messages)

  const time_series* find(const std::string& name) const {
    for (const auto& [n, s] : named) {
      if (n == name) return &s;
    }
    return nullptr;
  }
  std::vector<std::string> names() const {
    std::vector<std::string> out;
    for (const auto& [n, s] : named) out.push_back(n);
    return out;
  }
};

schedule_book read_schedules(const fields& top) {
  schedule_book book;
  book.file = top.src().file;
  if (auto o = top.series("occupancy", number_range::between(0.0, 1.0))) book.occupancy = *o;
  for (const auto& e : top.entries("schedules")) {
    if (auto s = read_series(e.value, "schedule '" + e.id + "'", number_range::between(0.0, 1.0), top.src())) {
      book.named.emplace_back(e.id, *s);
    }
  }
  return book;
}

// A schedule named in a zone, or the default; reported where it was named when unknown.
const time_series* look_up(const std::optional<name_ref>& ref, const schedule_book& book, const time_series* fallback,
                           error_list& errors) {
  if (!ref) return fallback;
  if (const time_series* s = book.find(ref->name)) return s;
  std::string message = "schedule '" + ref->name + "' is not defined under 'schedules' in " + book.file;
  if (auto near = nearest_word(ref->name, book.names())) message += "; did you mean '" + *near + "'?";
  errors.add(ref->file, ref->at, message);
  return nullptr;
}

}  // namespace

scenario_load_result load_scenario_text(std::string_view yaml_text, const std::string& file_label,
                                        const std::filesystem::path& base_dir, const site_config& cfg,
                                        const std::string& config_label) {
  scenario_load_result result;
  error_list errors;
  const source src{file_label, &errors};
  const config_view config{cfg, config_label};
  const auto root = parse_yaml(yaml_text, src);
  if (root && !root->IsMap()) {
    src.error(place_of(*root),
              "a scenario must be a map of keys (building, weather, incidents, ...), got " + describe(*root));
  }
  if (!root || !root->IsMap()) {
    result.errors = errors.take();
    return result;
  }
  const fields top(*root, "", k_top_keys, src);
  scenario s;
  s.name = top.text("name").value_or(std::filesystem::path(file_label).stem().string());
  if (const auto d = top.text("date")) {
    if (d->size() != 10 || !parse_iso8601(*d)) {
      top.error_at_value("date", "'date' must be a date YYYY-MM-DD, got '" + *d + "'");
    } else {
      s.date = *d;
    }
  }
  if (const auto t = top.time_of_day("start")) s.start_s = *t;
  if (const auto t = top.time_of_day("end")) s.end_s = *t;
  const bool hours_ok = s.end_s > s.start_s;
  if (!hours_ok) {
    top.error_at_value(top.has("end") ? "end" : "start",
                       "'end' " + clock_text(s.end_s) + " is not after 'start' " + clock_text(s.start_s));
  }
  s.seed = read_seed(top);
  read_initial(top, s.initial);
  read_weather(top, s);
  const schedule_book book = read_schedules(top);
  s.incidents = read_incidents(top, config, s.start_s, hours_ok ? s.end_s : 24.0 * 3600.0);

  // The building: inline, or a file next to the scenario.
  std::optional<building_draft> draft;
  if (top.require("building")) {
    const YAML::Node& b = *top.node("building");
    if (b.IsScalar()) {
      const std::filesystem::path path = base_dir / b.Scalar();
      const std::string label = (std::filesystem::path(file_label).parent_path() / b.Scalar()).string();
      std::string text;
      std::string why;
      if (!read_text_file(path, text, why)) {
        top.error_at_value("building", "building file " + label + ": " + why);
      } else {
        const source bsrc{label, &errors};
        if (const auto broot = parse_yaml(text, bsrc)) draft = read_building(*broot, bsrc, config);
      }
    } else {
      draft = read_building(b, src, config);
    }
  }

  // People and moisture over the day, with the schedules of this day.
  building house;
  if (draft) {
    house.name = draft->name;
    house.loops = draft->loops;
    house.dehumidifiers = draft->dehumidifiers;
    for (auto& d : draft->zones) {
      zone_physics z = std::move(d.physics);
      const time_series* schedule = look_up(d.schedule, book, &book.occupancy, errors);
      if (d.people_series) {
        z.design_people = d.people_series->max_value();
        z.occupancy =
            z.design_people > 0.0 ? d.people_series->scaled(1.0 / z.design_people) : time_series::constant(0.0);
      } else if (schedule) {
        z.design_people = d.people.value_or(0.0);
        z.occupancy = *schedule;
      }
      if (!d.ventilation_given) z.ventilation_l_s = k_ventilation_l_s_per_person * z.design_people;
      static const time_series always = time_series::constant(1.0);
      const time_series* moisture = look_up(d.moisture_schedule, book, &always, errors);
      if (d.moisture_series) {
        z.moisture_g_h = *d.moisture_series;
      } else if (moisture) {
        z.moisture_g_h = moisture->scaled(d.moisture_g_h);
      }
      house.zones.push_back(std::move(z));
    }
    // supply_high without a limit: the loop cannot make water warmer than its design supply.
    for (auto& i : s.incidents) {
      if (i.kind != incident_kind::supply_high || !std::isnan(i.value)) continue;
      for (const auto& l : house.loops) {
        if (l.id == i.target) i.value = l.design_supply_c;
      }
    }
  }
  result.errors = errors.take();
  if (result.errors.empty() && draft) {
    result.house = std::move(house);
    result.day = std::move(s);
  }
  return result;
}

scenario_load_result load_scenario_file(const std::filesystem::path& file, const site_config& cfg,
                                        const std::string& config_label) {
  std::string text;
  std::string why;
  if (!read_text_file(file, text, why)) {
    scenario_load_result r;
    r.errors.push_back({file.string(), 0, 0, why});
    return r;
  }
  return load_scenario_text(text, file.string(), file.parent_path(), cfg, config_label);
}

}  // namespace dewmargin::sim
