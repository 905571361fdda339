#include "watch_screen.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>

namespace dewmargin::watch {
namespace {

constexpr int k_zone_min = 10;  // below this the zone is shortened only as a last resort
constexpr int k_zone_floor = 6;
constexpr int k_zone_max = 28;
constexpr int k_why_min = 8;
constexpr int k_why_max = 48;

struct column_spec {
  column_id id;
  const char* header;
  int width;
  bool right;  // numbers are right-aligned
};

constexpr std::array<column_spec, 12> k_specs = {{
    {column_id::marker, "", 1, false},
    {column_id::zone, "zone", k_zone_min, false},
    {column_id::band, "band", 10, false},
    {column_id::margin, "margin", 6, true},
    {column_id::dew_point, "dew", 5, true},
    {column_id::surface, "surf", 5, true},
    {column_id::supply, "water", 5, true},
    {column_id::to_wet, "to wet", 6, true},
    {column_id::valve, "valve", 7, false},
    {column_id::alarm, "alarm", 7, false},
    {column_id::age, "age", 5, true},
    {column_id::why, "why held", k_why_min, false},
}};

// First dropped first. Zone, band and margin are never dropped.
constexpr std::array<column_id, 8> k_drop_order = {column_id::why,       column_id::age,     column_id::supply,
                                                   column_id::dew_point, column_id::surface, column_id::to_wet,
                                                   column_id::valve,     column_id::alarm};

const column_spec& spec_of(column_id id) {
  for (const auto& s : k_specs) {
    if (s.id == id) return s;
  }
  return k_specs[0];
}

int total_width(const std::vector<column>& cols) {
  int w = 0;
  for (const auto& c : cols) w += c.width;
  return w + static_cast<int>(cols.size()) - 1;  // one blank between columns
}

// Cuts to `width` code points, marking a cut with "…"; pads to `width`.
std::string fit(const std::string& text, int width, bool right) {
  if (width <= 0) return {};
  std::string out;
  int n = display_width(text);
  if (n > width) {
    int kept = 0;
    std::size_t i = 0;
    while (i < text.size() && kept < width - 1) {
      std::size_t len = 1;
      const auto c = static_cast<unsigned char>(text[i]);
      if (c >= 0xF0)
        len = 4;
      else if (c >= 0xE0)
        len = 3;
      else if (c >= 0xC0)
        len = 2;
      out += text.substr(i, len);
      i += len;
      ++kept;
    }
    out += "…";
    return out;
  }
  const std::string pad(static_cast<std::size_t>(width - n), ' ');
  return right ? pad + text : text + pad;
}

std::string fixed(std::optional<double> v, int decimals) {
  if (!v) return "-";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, *v);
  return buf;
}

const char* band_style(const std::string& band) {
  switch (live::band_severity(band)) {
    case 0:
      return "32";  // safe: green
    case 1:
      return "33";  // tight: yellow
    case 2:
      return "1;31";  // alarm: bold red
    case 3:
      return "1;97;41";  // condensing: white on red
    default:
      return "1;35";  // unknown: bold magenta
  }
}

// One character that tells the band without colour.
const char* band_marker(const std::string& band) {
  switch (live::band_severity(band)) {
    case 0:
      return " ";
    case 1:
      return "~";
    case 2:
      return "!";
    case 3:
      return "#";
    default:
      return "?";
  }
}

const char* alarm_text(live::alarm_display a) {
  switch (a) {
    case live::alarm_display::none:
      return "-";
    case live::alarm_display::active:
      return "ACTIVE";
    case live::alarm_display::acknowledged:
      return "acked";
    case live::alarm_display::latched:
      return "latched";
    case live::alarm_display::shelved:
      return "shelved";
    case live::alarm_display::suppressed:
      return "suppr";
  }
  return "-";
}

const char* alarm_style(live::alarm_display a) {
  switch (a) {
    case live::alarm_display::active:
      return "1;31";
    case live::alarm_display::latched:
      return "31";
    case live::alarm_display::acknowledged:
      return "33";
    case live::alarm_display::shelved:
    case live::alarm_display::suppressed:
      return "36";
    case live::alarm_display::none:
      return "";
  }
  return "";
}

std::string trim_right(std::string s) {
  while (!s.empty() && s.back() == ' ') s.pop_back();
  return s;
}

std::string paint(const std::string& cell, const char* style, bool colour) {
  if (!colour || style == nullptr || *style == '\0') return cell;
  return std::string("\x1b[") + style + "m" + cell + "\x1b[0m";
}

std::string counts_text(const live::band_counts& c) {
  std::string out;
  for (int s = live::k_band_count - 1; s >= 0; --s) {
    if (!out.empty()) out += "  ";
    out += std::string(live::band_name(s)) + " " + std::to_string(c[static_cast<std::size_t>(s)]);
  }
  return out;
}

std::string zone_row(const live::zone_entry& e, const std::vector<column>& cols, const screen_input& in) {
  const live::zone_view& z = e.view;
  const live::alarm_display alarm = live::display_of(z.alarm);
  std::string line;
  for (std::size_t i = 0; i < cols.size(); ++i) {
    const column& c = cols[i];
    const column_spec& s = spec_of(c.id);
    if (i > 0) line += ' ';
    switch (c.id) {
      case column_id::marker:
        line += paint(fit(band_marker(z.band), c.width, false), band_style(z.band), in.colour);
        break;
      case column_id::zone:
        line += fit(z.zone, c.width, false);
        break;
      case column_id::band:
        line += paint(fit(z.band, c.width, false), band_style(z.band), in.colour);
        break;
      case column_id::margin:
        line += paint(fit(fixed(z.margin_k, 2), c.width, true), band_style(z.band), in.colour);
        break;
      case column_id::dew_point:
        line += fit(fixed(z.dew_point_c, 1), c.width, s.right);
        break;
      case column_id::surface:
        line += fit(fixed(z.surface_min_c, 1), c.width, s.right);
        break;
      case column_id::supply:
        line += fit(fixed(z.supply_c, 1), c.width, s.right);
        break;
      case column_id::to_wet:
        line += fit(format_minutes(z.minutes_to_condensation), c.width, s.right);
        break;
      case column_id::valve: {
        std::string v = z.valve.empty() ? "-" : z.valve;
        if (!z.valve_hold.empty()) v += "*";
        line += fit(v, c.width, false);
        break;
      }
      case column_id::alarm:
        line += paint(fit(alarm_text(alarm), c.width, false), alarm_style(alarm), in.colour);
        break;
      case column_id::age: {
        // Behind the site's newest state, both in the service's own clock: right on event
        // time (the demo) and whatever the viewer's clock says.
        const auto newest = in.book->newest_ts(e.site);
        const std::string age = newest && z.ts ? format_age(seconds_between(*z.ts, *newest)) : "-";
        line += fit(age, c.width, true);
        break;
      }
      case column_id::why: {
        std::string why = z.valve_hold;
        if (why.empty() && alarm == live::alarm_display::suppressed && z.alarm.suppressed_by) {
          why = "alarm suppressed by " + *z.alarm.suppressed_by;
        }
        if (why.empty() && alarm == live::alarm_display::shelved && z.alarm.shelved_until) {
          why = "alarm shelved until " + *z.alarm.shelved_until;
        }
        line += fit(why, c.width, false);
        break;
      }
    }
  }
  // Trailing blanks are cut so a narrow terminal never wraps.
  while (!line.empty() && line.back() == ' ') line.pop_back();
  return line;
}

std::string header_row(const std::vector<column>& cols, bool colour) {
  std::string line;
  for (std::size_t i = 0; i < cols.size(); ++i) {
    const column_spec& s = spec_of(cols[i].id);
    if (i > 0) line += ' ';
    line += fit(s.header, cols[i].width, s.right);
  }
  while (!line.empty() && line.back() == ' ') line.pop_back();
  return paint(line, "1", colour);
}

std::string clock_text(timestamp t) {
  const std::string iso = format_iso8601_utc(std::chrono::time_point_cast<std::chrono::seconds>(t));
  return iso.size() >= 20 ? iso.substr(11, 8) + "Z" : iso;
}

std::string site_heading(const live::live_book& book, std::size_t site, int width, bool colour) {
  const live::site_entry& s = book.sites()[site];
  std::string text = "-- " + s.prefix;
  if (s.status) {
    if (!s.status->site.empty()) text += " (" + s.status->site + ")";
    text += ": service " + s.status->state;
  } else {
    text += ": no status";
  }
  text += " | " + counts_text(book.counts(site)) + " ";
  const int n = display_width(text);
  if (n < width) text += std::string(static_cast<std::size_t>(width - n), '-');
  return paint(fit(text, width, false), "1;36", colour);
}

}  // namespace

int display_width(const std::string& utf8) {
  int n = 0;
  for (const char ch : utf8) {
    if ((static_cast<unsigned char>(ch) & 0xC0) != 0x80) ++n;
  }
  return n;
}

std::string format_age(double seconds) {
  if (seconds < -5.0) return "ahead";  // the sender's clock is ahead of ours
  const double s = std::max(0.0, seconds);
  char buf[16];
  if (s < 60.0)
    std::snprintf(buf, sizeof buf, "%ds", static_cast<int>(s));
  else if (s < 3600.0)
    std::snprintf(buf, sizeof buf, "%dm", static_cast<int>(s / 60.0));
  else if (s < 86400.0)
    std::snprintf(buf, sizeof buf, "%dh", static_cast<int>(s / 3600.0));
  else if (s < 86400.0 * 100)
    std::snprintf(buf, sizeof buf, "%dd", static_cast<int>(s / 86400.0));
  else
    return ">99d";
  return buf;
}

std::string format_minutes(std::optional<double> minutes) {
  if (!minutes) return "-";
  const double m = *minutes;
  char buf[16];
  if (m < 10.0)
    std::snprintf(buf, sizeof buf, "%.1fm", std::max(0.0, m));
  else if (m < 120.0)
    std::snprintf(buf, sizeof buf, "%.0fm", m);
  else if (m < 60.0 * 100)
    std::snprintf(buf, sizeof buf, "%.0fh", m / 60.0);
  else
    return ">99h";
  return buf;
}

std::vector<column> choose_columns(int width, int longest_zone) {
  std::vector<column> cols;
  for (const auto& s : k_specs) cols.push_back({s.id, s.width});
  const auto drop = [&](column_id id) {
    cols.erase(std::remove_if(cols.begin(), cols.end(), [&](const column& c) { return c.id == id; }), cols.end());
  };
  const auto zone = [&]() -> column& {
    return *std::find_if(cols.begin(), cols.end(), [](const column& c) { return c.id == column_id::zone; });
  };
  for (column_id id : k_drop_order) {
    if (total_width(cols) <= width) break;
    drop(id);
  }
  if (total_width(cols) > width) zone().width = std::max(k_zone_floor, k_zone_min - (total_width(cols) - width));
  // Room to spare: the zone column grows to its longest name, then "why" takes the rest.
  int spare = width - total_width(cols);
  const int zone_want = std::min(k_zone_max, std::max(k_zone_min, longest_zone));
  if (spare > 0 && zone().width < zone_want) {
    const int grow = std::min(spare, zone_want - zone().width);
    zone().width += grow;
    spare -= grow;
  }
  const bool has_why = std::any_of(cols.begin(), cols.end(), [](const column& c) { return c.id == column_id::why; });
  if (has_why) {
    auto& why = cols.back();
    why.width = std::min(k_why_max, why.width + std::max(0, spare));
  }
  return cols;
}

std::vector<std::string> compose_screen(const screen_input& in) {
  std::vector<std::string> lines;
  const live::live_book& book = *in.book;
  const auto zones = book.zones_worst_first();
  int longest = 4;
  for (const auto* z : zones) longest = std::max(longest, display_width(z->view.zone));
  const auto cols = choose_columns(in.width, longest);

  // Header: where from, whether connected, and the counts per band.
  std::string title = "dewmargin watch | " + in.broker + " | " + in.connection + " | " + clock_text(in.now);
  lines.push_back(paint(trim_right(fit(title, in.width, false)), "1", in.colour));
  std::string summary = counts_text(book.counts());
  if (book.sites().size() == 1) {
    const auto& status = book.sites().front().status;
    summary += status ? " | service " + status->state : std::string(" | no service status");
  } else {
    summary += " | " + std::to_string(book.sites().size()) + " sites";
  }
  summary += " | K, °C";
  lines.push_back(trim_right(fit(summary, in.width, false)));
  lines.push_back(header_row(cols, in.colour));

  const bool interactive = !in.prompt.empty();
  const int footer = interactive ? 2 : 0;
  const bool grouped = book.sites().size() > 1;
  // Rows for zones and (with several sites) one heading per site.
  std::vector<std::string> body;
  std::optional<std::size_t> current_site;
  const auto room = [&]() -> std::optional<int> {
    if (!in.height) return std::nullopt;
    return *in.height - static_cast<int>(lines.size()) - footer;
  };
  const std::optional<int> rows = room();
  for (const auto* z : zones) {
    if (grouped && current_site != z->site) {
      // Sites without any zone get their heading too, in prefix order.
      const std::size_t from = current_site ? *current_site + 1 : 0;
      for (std::size_t s = from; s <= z->site; ++s) body.push_back(site_heading(book, s, in.width, in.colour));
      current_site = z->site;
    }
    body.push_back(zone_row(*z, cols, in));
  }
  if (grouped) {
    const std::size_t from = current_site ? *current_site + 1 : 0;
    for (std::size_t s = from; s < book.sites().size(); ++s) body.push_back(site_heading(book, s, in.width, in.colour));
  }
  if (zones.empty()) {
    std::string prefixes;
    for (const auto& s : book.sites()) prefixes += (prefixes.empty() ? "" : ", ") + s.prefix;
    body.push_back(trim_right(
        fit("no zone states under " + prefixes + " (is the service running, is the prefix right?)", in.width, false)));
  }
  if (rows && static_cast<int>(body.size()) > *rows) {
    // Worst first: what does not fit are the best zones.
    const int keep = std::max(0, *rows - 1);
    const std::size_t hidden = body.size() - static_cast<std::size_t>(keep);
    body.resize(static_cast<std::size_t>(keep));
    body.push_back(trim_right(
        fit("... " + std::to_string(hidden) + " more rows below (better zones); enlarge the window", in.width, false)));
  }
  lines.insert(lines.end(), body.begin(), body.end());

  if (interactive) {
    if (in.height) {
      while (static_cast<int>(lines.size()) < *in.height - footer) lines.emplace_back();
    }
    lines.push_back(trim_right(fit(in.message, in.width, false)));
    lines.push_back(trim_right(fit(in.prompt, in.width, false)));
  }
  return lines;
}

}  // namespace dewmargin::watch
