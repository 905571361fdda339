#pragma once
// What `dewmargin watch` draws, as plain lines of text: pure, so the layout, the order and
// the dropping of columns are unit-tested without a terminal (tests/unit/test_watch_screen.cpp).
//
// Columns, left to right: marker, zone, band, margin (K), dew point, coldest surface,
// supply water (°C), minutes to condensation ("to wet"), valve ('*' when held), alarm,
// age of the state (how far it is behind the site's newest state, in the service's own
// clock), and why the valve is held. At 80 columns all but "why" fit. When the
// terminal is narrower they drop in this order: why, age, supply, dew point, surface,
// to wet, valve, alarm; zone, band and margin always stay (the zone name is shortened
// last; 26 columns is the least that holds them). When wider, the zone column grows to the longest name, then "why"
// appears.
#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "dewmargin/live_book.h"

namespace dewmargin::watch {

enum class column_id { marker, zone, band, margin, dew_point, surface, supply, to_wet, valve, alarm, age, why };

struct column {
  column_id id;
  int width;
};

// The columns that fit `width` terminal columns; `longest_zone` is the longest zone name.
std::vector<column> choose_columns(int width, int longest_zone);

struct screen_input {
  const live::live_book* book = nullptr;
  timestamp now;  // wall clock, for the age column and the header
  int width = 80;
  std::optional<int> height;  // rows available; none: everything (--once)
  bool colour = false;
  std::string broker;      // shown in the header
  std::string connection;  // "connected", "connecting", "lost: ..."
  std::string message;     // answer to the last command, or an error (interactive)
  std::string prompt;      // the command line (interactive); empty: no footer
};

// The whole screen, one string per terminal row, none longer than `width` columns.
std::vector<std::string> compose_screen(const screen_input& in);

// Helpers shared with the tests.
std::string format_age(double seconds);                     // "12s", "4m", "3h", "2d"
std::string format_minutes(std::optional<double> minutes);  // "0.5m", "12m", "3h", "-"
int display_width(const std::string& utf8);                 // code points (ids are narrow text)

}  // namespace dewmargin::watch
