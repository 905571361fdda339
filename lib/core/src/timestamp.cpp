#include "dewmargin/timestamp.h"

#include <cstdio>

namespace dewmargin {
namespace {

// Days from 1970-01-01 to a civil date, and back (H. Hinnant's public-domain algorithms).
std::int64_t days_from_civil(std::int64_t y, unsigned m, unsigned d) {
  y -= m <= 2;
  const std::int64_t era = (y >= 0 ? y : y - 399) / 400;
  const auto yoe = static_cast<unsigned>(y - era * 400);
  const unsigned doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
  const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
  return era * 146097 + static_cast<std::int64_t>(doe) - 719468;
}

void civil_from_days(std::int64_t z, std::int64_t& y, unsigned& m, unsigned& d) {
  z += 719468;
  const std::int64_t era = (z >= 0 ? z : z - 146096) / 146097;
  const auto doe = static_cast<unsigned>(z - era * 146097);
  const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
  y = static_cast<std::int64_t>(yoe) + era * 400;
  const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
  const unsigned mp = (5 * doy + 2) / 153;
  d = doy - (153 * mp + 2) / 5 + 1;
  m = mp < 10 ? mp + 3 : mp - 9;
  y += m <= 2;
}

bool read_digits(std::string_view s, std::size_t& pos, std::size_t count, int& out) {
  if (pos + count > s.size()) return false;
  int v = 0;
  for (std::size_t i = 0; i < count; ++i) {
    const char c = s[pos + i];
    if (c < '0' || c > '9') return false;
    v = v * 10 + (c - '0');
  }
  out = v;
  pos += count;
  return true;
}

bool expect(std::string_view s, std::size_t& pos, char c) {
  if (pos < s.size() && s[pos] == c) {
    ++pos;
    return true;
  }
  return false;
}

unsigned days_in_month(int y, int m) {
  static constexpr unsigned k_days[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  const bool leap = (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
  return m == 2 && leap ? 29 : k_days[m - 1];
}

}  // namespace

std::string format_iso8601_utc(timestamp t) {
  const std::int64_t ms_total = to_unix_ms(t);
  std::int64_t days = ms_total / 86400000;
  std::int64_t ms_of_day = ms_total % 86400000;
  if (ms_of_day < 0) {
    ms_of_day += 86400000;
    --days;
  }
  std::int64_t y = 0;
  unsigned m = 0, d = 0;
  civil_from_days(days, y, m, d);
  const auto hh = static_cast<int>(ms_of_day / 3600000);
  const auto mm = static_cast<int>(ms_of_day / 60000 % 60);
  const auto ss = static_cast<int>(ms_of_day / 1000 % 60);
  const auto ms = static_cast<int>(ms_of_day % 1000);
  char buf[40];
  if (ms == 0) {
    std::snprintf(buf, sizeof buf, "%04lld-%02u-%02uT%02d:%02d:%02dZ", static_cast<long long>(y), m, d, hh, mm, ss);
  } else {
    std::snprintf(buf, sizeof buf, "%04lld-%02u-%02uT%02d:%02d:%02d.%03dZ", static_cast<long long>(y), m, d, hh, mm,
                  ss, ms);
  }
  return buf;
}

result<timestamp> parse_iso8601(std::string_view s) {
  const auto fail = [&] {
    return make_error(error_code::parse_error,
                      "'" + std::string(s) + "' is not an ISO 8601 time (e.g. 2026-07-14T13:00:00Z or 2026-07-14)");
  };
  std::size_t pos = 0;
  int y = 0, mo = 0, d = 0, h = 0, mi = 0, sec = 0;
  if (!read_digits(s, pos, 4, y) || !expect(s, pos, '-') || !read_digits(s, pos, 2, mo) || !expect(s, pos, '-') ||
      !read_digits(s, pos, 2, d)) {
    return fail();
  }
  if (mo < 1 || mo > 12 || d < 1 || static_cast<unsigned>(d) > days_in_month(y, mo)) return fail();
  std::int64_t ms = 0;
  std::int64_t offset_min = 0;
  if (pos < s.size()) {
    if (s[pos] != 'T' && s[pos] != 't' && s[pos] != ' ') return fail();
    ++pos;
    if (!read_digits(s, pos, 2, h) || !expect(s, pos, ':') || !read_digits(s, pos, 2, mi)) return fail();
    if (expect(s, pos, ':') && !read_digits(s, pos, 2, sec)) return fail();
    if (h > 23 || mi > 59 || sec > 60) return fail();
    if (expect(s, pos, '.') || expect(s, pos, ',')) {
      int scale = 100;
      std::size_t digits = 0;
      while (pos < s.size() && s[pos] >= '0' && s[pos] <= '9') {
        ms += (s[pos] - '0') * scale;
        scale /= 10;
        ++pos;
        ++digits;
      }
      if (digits == 0) return fail();
    }
    if (pos < s.size()) {
      if (s[pos] == 'Z' || s[pos] == 'z') {
        ++pos;
      } else if (s[pos] == '+' || s[pos] == '-') {
        const int sign = s[pos] == '+' ? 1 : -1;
        ++pos;
        int oh = 0, om = 0;
        if (!read_digits(s, pos, 2, oh)) return fail();
        expect(s, pos, ':');
        if (!read_digits(s, pos, 2, om)) return fail();
        offset_min = sign * (oh * 60 + om);
      } else {
        return fail();
      }
    }
    if (pos != s.size()) return fail();
  }
  const std::int64_t days = days_from_civil(y, static_cast<unsigned>(mo), static_cast<unsigned>(d));
  const std::int64_t total_ms = ((days * 24 + h) * 60 + mi - offset_min) * 60000 + sec * 1000LL + ms;
  return from_unix_ms(total_ms);
}

}  // namespace dewmargin
