// The report page: one self-contained HTML document, well-formed as XML (every element closed,
// attributes quoted, only the five XML entities), with inline CSS and SVG and no script, link,
// image or font from anywhere else. Laid out for A4 portrait; the bands are told apart by
// lightness and by pattern as well as by hue, so the page reads in greyscale too.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>

#include "dewmargin/caution.h"
#include "dewmargin/report/report_data.h"
#include "dewmargin/version.h"

namespace dewmargin::report {
namespace {

// Chart geometry (SVG user units; the SVG scales to the page width).
constexpr double k_width = 720.0;
constexpr double k_left = 44.0;
constexpr double k_right = 8.0;
constexpr double k_plot_w = k_width - k_left - k_right;

std::string esc(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (const char c : text) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

std::string fmt(const char* f, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

std::string num(double v) { return fmt("%.1f", v); }

std::string utc(timestamp t) { return format_iso8601_utc(t).substr(0, 16).replace(10, 1, " "); }

std::string duration_text(double s) {
  if (s < 60.0) return fmt("%.0f s", s);
  const auto minutes = static_cast<long long>(std::llround(s / 60.0));
  if (minutes < 60) return std::to_string(minutes) + " min";
  const long long h = minutes / 60;
  const long long m = minutes % 60;
  if (h < 48) return std::to_string(h) + " h " + (m < 10 ? "0" : "") + std::to_string(m) + " min";
  return fmt("%.1f days", s / 86400.0);
}

const char* k_band_label[k_band_count] = {"safe", "tight", "alarm", "condensing", "unknown"};
// Fill of each band's shading (safe: none). Lightness falls with severity; unknown is hatched.
const char* k_band_fill[k_band_count] = {"none", "#f1e4b3", "#dd9a5b", "url(#dm-wet)", "url(#dm-hatch)"};

struct y_scale {
  double lo;
  double hi;
  double top;
  double height;
  [[nodiscard]] double y(double v) const { return top + height - (std::clamp(v, lo, hi) - lo) / (hi - lo) * height; }
};

double nice_step(double span, int ticks) {
  const double raw = span / std::max(1, ticks);
  for (const double s : {0.1, 0.2, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0}) {
    if (s >= raw) return s;
  }
  return 100.0;
}

class svg_chart {
 public:
  svg_chart(const series_layout& layout, double height) : layout_(layout), height_(height) {}

  [[nodiscard]] double x(timestamp t) const {
    const double span = std::chrono::duration<double>(layout_.until - layout_.since).count();
    const double at = std::chrono::duration<double>(t - layout_.since).count();
    return k_left + std::clamp(at / span, 0.0, 1.0) * k_plot_w;
  }
  [[nodiscard]] double bucket_x(std::size_t i) const { return x(layout_.start_of(i)); }
  [[nodiscard]] double bucket_mid(std::size_t i) const {
    return (x(layout_.start_of(i)) + x(std::min(layout_.start_of(i + 1), layout_.until))) / 2.0;
  }

  std::string open(const std::string& label) const {
    return "<svg class=\"chart\" viewBox=\"0 0 " + num(k_width) + " " + num(height_) + "\" role=\"img\" aria-label=\"" +
           esc(label) + "\">\n";
  }

  // Time ticks along the bottom of the plot area.
  std::string time_axis(double plot_top, double plot_bottom) const {
    static constexpr int k_steps_min[] = {15, 30, 60, 120, 180, 360, 720, 1440, 2880, 10080, 20160, 43200};
    const double span_min = std::chrono::duration<double>(layout_.until - layout_.since).count() / 60.0;
    int step = k_steps_min[std::size(k_steps_min) - 1];
    for (const int s : k_steps_min) {
      if (span_min / s <= 8.0) {
        step = s;
        break;
      }
    }
    const bool dates = step >= 1440;
    std::string out;
    const std::int64_t step_ms = static_cast<std::int64_t>(step) * 60'000;
    std::int64_t t = (to_unix_ms(layout_.since) / step_ms + 1) * step_ms;
    if (to_unix_ms(layout_.since) % step_ms == 0) t = to_unix_ms(layout_.since);
    for (; t <= to_unix_ms(layout_.until); t += step_ms) {
      const double px = x(from_unix_ms(t));
      const std::string iso = format_iso8601_utc(from_unix_ms(t));
      const std::string label = dates ? iso.substr(5, 5) : iso.substr(11, 5);
      out += "<line class=\"grid\" x1=\"" + num(px) + "\" y1=\"" + num(plot_top) + "\" x2=\"" + num(px) + "\" y2=\"" +
             num(plot_bottom) + "\"/>";
      const char* anchor = px > k_left + k_plot_w - 14 ? "end" : (px < k_left + 14 ? "start" : "middle");
      out += "<text class=\"tick\" x=\"" + num(px) + "\" y=\"" + num(plot_bottom + 11) + "\" text-anchor=\"" + anchor +
             "\">" + label + "</text>\n";
    }
    return out;
  }

  std::string value_axis(const y_scale& s, const char* unit) const {
    std::string out;
    const double step = nice_step(s.hi - s.lo, 4);
    for (double v = std::ceil(s.lo / step) * step; v <= s.hi + 1e-9; v += step) {
      const double py = s.y(v);
      out += "<line class=\"grid\" x1=\"" + num(k_left) + "\" y1=\"" + num(py) + "\" x2=\"" + num(k_left + k_plot_w) +
             "\" y2=\"" + num(py) + "\"/>";
      out += "<text class=\"tick\" x=\"" + num(k_left - 4) + "\" y=\"" + num(py + 3) + "\" text-anchor=\"end\">" +
             fmt(step < 1.0 ? "%.1f" : "%.0f", std::abs(v) < 1e-9 ? 0.0 : v) + "</text>\n";
    }
    out += "<text class=\"unit\" x=\"2\" y=\"" + num(s.top + 8) + "\">" + unit + "</text>\n";
    return out;
  }

  // A polyline per run of buckets that have a value; a gap breaks the line.
  template <typename Value>
  std::string lines(const std::vector<zone_period>& buckets, const y_scale& s, const char* cls, Value value) const {
    std::string out;
    std::string points;
    const auto flush = [&] {
      if (!points.empty()) out += "<polyline class=\"" + std::string(cls) + "\" points=\"" + points + "\"/>\n";
      points.clear();
    };
    for (std::size_t i = 0; i < buckets.size(); ++i) {
      const std::optional<double> v = value(buckets[i]);
      if (!v) {
        flush();
        continue;
      }
      if (!points.empty()) points += ' ';
      points += num(bucket_mid(i)) + "," + num(s.y(*v));
    }
    flush();
    return out;
  }

 private:
  series_layout layout_;
  double height_;
};

std::string svg_defs() {
  // Patterns are defined in each SVG (ids repeat across SVGs, which browsers resolve per document:
  // the definitions are identical, so whichever is found draws the same).
  return "<defs><pattern id=\"dm-hatch\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
         "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#e4e4e4\"/><line x1=\"0\" y1=\"0\" "
         "x2=\"0\" y2=\"6\" stroke=\"#8a8a8a\" stroke-width=\"2\"/></pattern>"
         "<pattern id=\"dm-wet\" width=\"5\" height=\"5\" patternUnits=\"userSpaceOnUse\"><rect width=\"5\" "
         "height=\"5\" fill=\"#35578f\"/><circle cx=\"2.5\" cy=\"2.5\" r=\"1\" fill=\"#c9d6ec\"/></pattern></defs>\n";
}

std::string margin_chart(const report_data& d, const zone_report& z) {
  constexpr double k_height = 160.0;
  constexpr double k_lane = 16.0;  // marker lane at the top
  const svg_chart c(d.layout, k_height);
  const auto& buckets = z.series.buckets();
  double lo = -1.0;
  double hi = 4.0;
  if (z.thresholds) hi = std::max(hi, z.thresholds->margin_warn_k + 1.5);
  for (const auto& b : buckets) {
    if (b.min_margin_k) lo = std::min(lo, *b.min_margin_k);
    if (b.max_margin_k) hi = std::max(hi, std::min(*b.max_margin_k, 15.0));
  }
  lo = std::floor(lo);
  hi = std::ceil(hi);
  const y_scale s{lo, hi, k_lane + 4.0, k_height - k_lane - 20.0};
  const double bottom = s.top + s.height;
  std::string out = c.open("margin of zone " + z.review.zone);
  out += svg_defs();
  // Band shading from the band events (exact), one worst band per pixel column so that a year
  // of short visits stays a small drawing; merged across neighbouring columns of the same band.
  constexpr int k_columns = static_cast<int>(k_plot_w);
  std::vector<int> column(k_columns, -1);  // band severity, -1: nothing to shade
  for (const auto& span : z.review.spans) {
    if (!span.b || *span.b == band::safe) continue;
    const int first = std::clamp(static_cast<int>(c.x(span.from) - k_left), 0, k_columns - 1);
    const int last = std::clamp(static_cast<int>(std::ceil(c.x(span.to) - k_left)) - 1, first, k_columns - 1);
    for (int col = first; col <= last; ++col) column[col] = std::max(column[col], band_severity(*span.b));
  }
  for (int i = 0; i < k_columns;) {
    int j = i + 1;
    while (j < k_columns && column[j] == column[i]) ++j;
    if (column[i] > 0) {
      out += "<rect x=\"" + num(k_left + i) + "\" y=\"" + num(s.top) + "\" width=\"" + num(j - i) + "\" height=\"" +
             num(s.height) + "\" fill=\"" + k_band_fill[column[i]] + "\"><title>" + k_band_label[column[i]] +
             "</title></rect>\n";
    }
    i = j;
  }
  out += c.value_axis(s, "K");
  out += c.time_axis(s.top, bottom);
  out += "<line class=\"zero\" x1=\"" + num(k_left) + "\" y1=\"" + num(s.y(0)) + "\" x2=\"" + num(k_left + k_plot_w) +
         "\" y2=\"" + num(s.y(0)) + "\"/>\n";
  if (z.thresholds) {
    out += "<line class=\"warn\" x1=\"" + num(k_left) + "\" y1=\"" + num(s.y(z.thresholds->margin_warn_k)) +
           "\" x2=\"" + num(k_left + k_plot_w) + "\" y2=\"" + num(s.y(z.thresholds->margin_warn_k)) + "\"/>\n";
    out += "<line class=\"alarmline\" x1=\"" + num(k_left) + "\" y1=\"" + num(s.y(z.thresholds->margin_alarm_k)) +
           "\" x2=\"" + num(k_left + k_plot_w) + "\" y2=\"" + num(s.y(z.thresholds->margin_alarm_k)) + "\"/>\n";
  }
  out += c.lines(buckets, s, "spread", [](const zone_period& b) { return b.max_margin_k; });
  // A white halo keeps the margin line readable over the dark condensing shading.
  out += c.lines(buckets, s, "halo", [](const zone_period& b) { return b.min_margin_k; });
  out += c.lines(buckets, s, "margin", [](const zone_period& b) { return b.min_margin_k; });
  // Markers lane: shelving bars, acknowledgements, valve actions.
  out += "<rect class=\"lane\" x=\"" + num(k_left) + "\" y=\"1\" width=\"" + num(k_plot_w) + "\" height=\"" +
         num(k_lane) + "\"/>\n";
  for (const auto& m : z.review.markers) {
    const double px = c.x(m.at);
    const std::string title = "<title>" +
                              std::string(m.kind == marker_kind::ack            ? "acknowledged"
                                          : m.kind == marker_kind::shelve       ? "shelved"
                                          : m.kind == marker_kind::valve_closed ? "valve closed"
                                                                                : "valve opened") +
                              " " + utc(m.at) + "</title>";
    switch (m.kind) {
      case marker_kind::shelve:
        out += "<rect class=\"shelf\" x=\"" + num(px) + "\" y=\"3\" width=\"" + num(std::max(2.0, c.x(m.end) - px)) +
               "\" height=\"4\">" + title + "</rect>\n";
        break;
      case marker_kind::ack:
        out += "<circle class=\"ack\" cx=\"" + num(px) + "\" cy=\"12\" r=\"3\">" + title + "</circle>\n";
        break;
      case marker_kind::valve_closed:
        out += "<path class=\"vclosed\" d=\"M" + num(px - 3.5) + ",9 L" + num(px + 3.5) + ",9 L" + num(px) +
               ",16 Z\">" + title + "</path>\n";
        break;
      case marker_kind::valve_opened:
        out += "<path class=\"vopen\" d=\"M" + num(px - 3.5) + ",16 L" + num(px + 3.5) + ",16 L" + num(px) + ",9 Z\">" +
               title + "</path>\n";
        break;
    }
  }
  out += "<rect class=\"frame\" x=\"" + num(k_left) + "\" y=\"" + num(s.top) + "\" width=\"" + num(k_plot_w) +
         "\" height=\"" + num(s.height) + "\"/>\n";
  out += "</svg>\n";
  return out;
}

std::string temperature_chart(const report_data& d, const zone_report& z) {
  constexpr double k_height = 90.0;
  const svg_chart c(d.layout, k_height);
  const auto& buckets = z.series.buckets();
  std::optional<double> lo;
  std::optional<double> hi;
  for (const auto& b : buckets) {
    for (const auto& v : {b.max_dew_point_c, b.min_surface_c}) {
      if (!v) continue;
      lo = lo ? std::min(*lo, *v) : *v;
      hi = hi ? std::max(*hi, *v) : *v;
    }
  }
  const y_scale s{std::floor(lo.value_or(10.0) - 0.5), std::ceil(hi.value_or(20.0) + 0.5), 6.0, k_height - 24.0};
  std::string out = c.open("dew point and coldest surface of zone " + z.review.zone);
  out += c.value_axis(s, "°C");
  out += c.time_axis(s.top, s.top + s.height);
  out += c.lines(buckets, s, "surface", [](const zone_period& b) { return b.min_surface_c; });
  out += c.lines(buckets, s, "dewpoint", [](const zone_period& b) { return b.max_dew_point_c; });
  out += "<rect class=\"frame\" x=\"" + num(k_left) + "\" y=\"" + num(s.top) + "\" width=\"" + num(k_plot_w) +
         "\" height=\"" + num(s.height) + "\"/>\n</svg>\n";
  return out;
}

std::string loop_chart(const report_data& d, const loop_review& l, const std::optional<setpoint_config>& sp) {
  constexpr double k_height = 110.0;
  const svg_chart c(d.layout, k_height);
  double lo = sp ? sp->min_c - 1.0 : 14.0;
  double hi = sp ? sp->max_c + 1.0 : 22.0;
  for (const auto& st : l.steps) {
    lo = std::min(lo, st.setpoint_c - 0.5);
    hi = std::max(hi, st.setpoint_c + 0.5);
  }
  for (const auto& m : l.supply_c) {
    if (const auto v = m.value()) {
      lo = std::min(lo, *v - 0.5);
      hi = std::max(hi, *v + 0.5);
    }
  }
  const y_scale s{std::floor(lo), std::ceil(hi), 6.0, k_height - 24.0};
  std::string out = c.open("setpoint and supply of loop " + l.loop);
  out += c.value_axis(s, "°C");
  out += c.time_axis(s.top, s.top + s.height);
  if (sp) {
    for (const double v : {sp->min_c, sp->max_c}) {
      out += "<line class=\"limit\" x1=\"" + num(k_left) + "\" y1=\"" + num(s.y(v)) + "\" x2=\"" +
             num(k_left + k_plot_w) + "\" y2=\"" + num(s.y(v)) + "\"/>\n";
    }
  }
  // Supply: mean of the loop's zones per bucket.
  std::string points;
  std::string supply;
  for (std::size_t i = 0; i < l.supply_c.size(); ++i) {
    const auto v = l.supply_c[i].value();
    if (!v) {
      if (!points.empty()) supply += "<polyline class=\"supply\" points=\"" + points + "\"/>\n";
      points.clear();
      continue;
    }
    if (!points.empty()) points += ' ';
    points += num(c.bucket_mid(i)) + "," + num(s.y(*v));
  }
  if (!points.empty()) supply += "<polyline class=\"supply\" points=\"" + points + "\"/>\n";
  out += supply;
  // Setpoint: a step line through the setpoint events. Thinned to one point per pixel column
  // (the last value of the column) so that thousands of small steps stay a small file.
  std::string steps;
  std::optional<double> current = l.setpoint_at_start_c;
  double last_x = k_left;
  if (current) steps = num(k_left) + "," + num(s.y(*current));
  for (const auto& st : l.steps) {
    const double px = c.x(st.at);
    if (current && px - last_x >= 1.0) {
      steps += (steps.empty() ? "" : " ") + num(px) + "," + num(s.y(*current));
      last_x = px;
    }
    if (!current || px - last_x >= 1.0 || steps.empty()) {
      steps += (steps.empty() ? "" : " ") + num(px) + "," + num(s.y(st.setpoint_c));
    }
    current = st.setpoint_c;
  }
  if (current) steps += (steps.empty() ? "" : " ") + num(k_left + k_plot_w) + "," + num(s.y(*current));
  if (!steps.empty()) out += "<polyline class=\"setpoint\" points=\"" + steps + "\"/>\n";
  out += "<rect class=\"frame\" x=\"" + num(k_left) + "\" y=\"" + num(s.top) + "\" width=\"" + num(k_plot_w) +
         "\" height=\"" + num(s.height) + "\"/>\n</svg>\n";
  return out;
}

const char* k_css = R"css(
@page { size: A4; margin: 12mm 12mm 14mm 12mm; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Liberation Sans", Arial, sans-serif; font-size: 9.5pt; color: #1d1d1d;
       margin: 0 auto; padding: 0 18px; max-width: 1180px; line-height: 1.35;
       -webkit-print-color-adjust: exact; print-color-adjust: exact; }
@media print { body { max-width: none; padding: 0; } }
h1 { font-size: 17pt; margin: 0 0 1mm 0; letter-spacing: 0.2px; }
h1 .mark { display: inline-block; width: 9pt; height: 9pt; border: 2.5pt solid #35578f; border-radius: 50%;
           margin-right: 5pt; vertical-align: 1pt; }
h2 { font-size: 12pt; border-bottom: 1.5pt solid #1d1d1d; padding-bottom: 1pt; margin: 5mm 0 2mm 0; }
h3 { font-size: 10.5pt; margin: 0 0 1mm 0; }
.meta { color: #444; font-size: 8.5pt; margin-bottom: 2mm; }
.verdict { border-left: 4pt solid #35578f; background: #eef2f8; padding: 2mm 3mm; margin: 2mm 0 3mm 0; }
table { border-collapse: collapse; width: 100%; margin: 1mm 0 2mm 0; font-size: 8.5pt; }
th, td { border-bottom: 0.5pt solid #bbb; padding: 1pt 4pt; text-align: left; vertical-align: top; }
th { background: #ececec; font-weight: bold; }
td.n, th.n { text-align: right; font-variant-numeric: tabular-nums; }
.over { font-weight: bold; }
.over::after { content: " \25B2"; font-size: 7pt; }
.zone, .loop { break-inside: avoid; page-break-inside: avoid; margin-bottom: 4mm; }
.chart { width: 100%; height: auto; display: block; }
.chart .grid { stroke: #d6d6d6; stroke-width: 0.6; }
.chart .tick { font-size: 8.5px; fill: #444; }
.chart .unit { font-size: 8.5px; fill: #444; font-weight: bold; }
.chart .frame { fill: none; stroke: #777; stroke-width: 0.8; }
.chart .lane { fill: #f7f7f7; stroke: none; }
.chart .zero { stroke: #1d1d1d; stroke-width: 1.2; }
.chart .warn { stroke: #6b6b6b; stroke-width: 1; stroke-dasharray: 6 3; }
.chart .alarmline { stroke: #1d1d1d; stroke-width: 1; stroke-dasharray: 2 2; }
.chart .halo { fill: none; stroke: #ffffff; stroke-width: 3.6; stroke-linejoin: round; }
.chart .margin { fill: none; stroke: #111; stroke-width: 1.5; stroke-linejoin: round; }
.chart .spread { fill: none; stroke: #9a9a9a; stroke-width: 0.7; }
.chart .dewpoint { fill: none; stroke: #35578f; stroke-width: 1.4; stroke-dasharray: 5 2; }
.chart .surface { fill: none; stroke: #111; stroke-width: 1.3; }
.chart .setpoint { fill: none; stroke: #111; stroke-width: 1.4; }
.chart .supply { fill: none; stroke: #35578f; stroke-width: 1.1; stroke-dasharray: 1.5 1.5; }
.chart .limit { stroke: #888; stroke-width: 0.8; stroke-dasharray: 8 3; }
.chart .shelf { fill: #ffffff; stroke: #111; stroke-width: 0.8; }
.chart .ack { fill: #ffffff; stroke: #111; stroke-width: 1.2; }
.chart .vclosed { fill: #111; }
.chart .vopen { fill: #ffffff; stroke: #111; stroke-width: 1; }
.legend { font-size: 8pt; color: #333; margin: 1mm 0 3mm 0; }
.legend span { margin-right: 8pt; white-space: nowrap; }
.sw { display: inline-block; width: 14pt; height: 8pt; border: 0.5pt solid #777; vertical-align: -1pt; margin-right: 2pt; }
.two { display: flex; gap: 4mm; }
.two > div { flex: 1; }
.caution { margin-top: 6mm; border: 1pt solid #1d1d1d; padding: 2mm 3mm; font-size: 8.5pt; break-inside: avoid; }
.small { font-size: 8pt; color: #444; }
)css";

std::string legend() {
  return "<div class=\"legend\">"
         "<span><i class=\"sw\" style=\"background:#f1e4b3\"></i>tight</span>"
         "<span><i class=\"sw\" style=\"background:#dd9a5b\"></i>alarm</span>"
         "<span><i class=\"sw\" style=\"background:radial-gradient(circle,#c9d6ec 30%,#35578f 35%);background-size:4pt "
         "4pt\"></i>condensing</span>"
         "<span><i class=\"sw\" style=\"background:repeating-linear-gradient(45deg,#e4e4e4 0 2pt,#8a8a8a 2pt "
         "3pt)\"></i>unknown</span>"
         "<span>━ lowest margin per point</span><span>╌ warn threshold</span><span>┈ alarm threshold</span>"
         "<span>○ acknowledged</span><span>▭ shelved</span><span>▼ valve closed</span><span>△ valve opened</span>"
         "<span>lower chart: ━ coldest surface, ╍ dew point</span></div>\n";
}

std::string cell(const std::string& text, bool numeric = false, bool over = false) {
  std::string cls;
  if (numeric) cls = "n";
  if (over) cls += cls.empty() ? "over" : " over";
  return cls.empty() ? "<td>" + text + "</td>" : "<td class=\"" + cls + "\">" + text + "</td>";
}

std::string zone_table(const zone_report& z) {
  const zone_review& r = z.review;
  double total = r.no_data_s;
  for (const double s : r.band_s) total += s;
  std::string out = "<table><tr>";
  for (const char* b : k_band_label) out += std::string("<th class=\"n\">") + b + "</th>";
  out += "<th class=\"n\">no data</th></tr><tr>";
  const auto share = [&](double s) {
    return duration_text(s) + (total > 0 ? " (" + fmt("%.1f", 100.0 * s / total) + " %)" : "");
  };
  for (const double s : r.band_s) out += cell(share(s), true);
  out += cell(share(r.no_data_s), true) + "</tr></table>\n";

  const zone_period& t = z.series.total();
  out +=
      "<table><tr><th>worst margin</th><th class=\"n\">alarms raised</th><th class=\"n\">time to acknowledge "
      "(median / longest)</th><th>longest condensing episode</th><th class=\"n\">stale-input time</th></tr><tr>";
  out += cell(t.min_margin_k ? fmt("%+.2f K", *t.min_margin_k) + " at " + utc(t.min_margin_at) : "no margin known");
  out += cell(
      std::to_string(r.raises.size()) +
          (r.unacknowledged_at_end > 0 ? " (" + std::to_string(r.unacknowledged_at_end) + " not acknowledged)" : ""),
      true);
  const auto median = r.median_ack_s();
  out += cell(median ? duration_text(*median) + " / " + duration_text(*r.longest_ack_s()) : "–", true);
  const condensing_episode* longest = r.longest_condensing();
  out += cell(longest ? duration_text(longest->duration_s) + " from " + utc(longest->start) +
                            (longest->ended ? "" : " (not ended)")
                      : "none");
  out += cell(duration_text(r.stale_input_s), true) + "</tr></table>\n";

  if (!r.condensing.empty()) {
    out +=
        "<table><tr><th>condensing from</th><th class=\"n\">lasted</th><th class=\"n\">warning time (first "
        "alarm before it)</th></tr>";
    std::size_t shown = 0;
    for (const auto& c : r.condensing) {
      if (++shown > 12) break;
      out +=
          "<tr>" + cell(utc(c.start)) + cell(duration_text(c.duration_s) + (c.ended ? "" : " (not ended)"), true) +
          cell(c.warning_s > 0 ? duration_text(c.warning_s) : "none: straight to condensing", true, c.warning_s <= 0) +
          "</tr>";
    }
    out += "</table>\n";
    if (r.condensing.size() > 12) {
      out += "<p class=\"small\">… and " + std::to_string(r.condensing.size() - 12) + " more episodes.</p>\n";
    }
  }
  return out;
}

std::string alarm_table(const alarm_figures& a) {
  std::string out =
      "<table><tr><th>figure (ISA-18.2 / EEMUA 191 terms)</th><th class=\"n\">this period</th>"
      "<th class=\"n\">published target (one operator)</th></tr>";
  const auto row = [&](const std::string& what, const std::string& value, const std::string& target, bool over) {
    out += "<tr>" + cell(what) + cell(value, true, over) + cell(target, true) + "</tr>";
  };
  row("alarms raised", std::to_string(a.alarms), "–", false);
  row("alarms per day, average", fmt("%.1f", a.per_day_avg), "about 150", a.per_day_avg > k_target_alarms_per_day);
  row("alarms per day, peak", std::to_string(a.per_day_peak) + " (" + utc(a.peak_day).substr(0, 10) + ")", "about 150",
      a.per_day_peak > k_target_alarms_per_day);
  row("alarms per 10 minutes, average", fmt("%.2f", a.per_10min_avg), "about 1",
      a.per_10min_avg > k_target_alarms_per_10min);
  row("alarms per 10 minutes, peak", std::to_string(a.per_10min_peak) + " (" + utc(a.peak_10min) + ")",
      "≤ 10 (more is a flood)", a.per_10min_peak > k_flood_start_alarms);
  row("10-minute periods in flood",
      fmt("%.2f %%", a.flood_pct) + " (" + std::to_string(a.flood_periods) + " of " + std::to_string(a.periods_10min) +
          "; " + std::to_string(a.floods) + " floods)",
      "&lt; 1 %", a.flood_pct >= k_target_flood_pct);
  row("chattering alarms (3 or more in one minute)",
      std::to_string(a.chattering_sources) + " sources, " + std::to_string(a.chattering_episodes) + " episodes", "0",
      a.chattering_sources > 0);
  row("stale alarms (active over 24 h)", std::to_string(a.stale_alarms), "0", a.stale_alarms > 0);
  row("shelved", std::to_string(a.shelved), "–", false);
  row("suppressed by design", std::to_string(a.suppressed), "–", false);
  out += "</table>\n";
  if (!a.top_sources.empty()) {
    out += "<table><tr><th>most frequent sources</th><th class=\"n\">alarms</th><th class=\"n\">share</th></tr>";
    for (const auto& s : a.top_sources) {
      out += "<tr>" + cell(esc(s.source)) + cell(std::to_string(s.alarms), true) +
             cell(fmt("%.1f %%", s.share_pct), true) + "</tr>";
    }
    out += "</table>\n";
  }
  return out;
}

std::string mould_table(const report_data& d) {
  std::string out =
      "<table><tr><th>zone</th><th class=\"n\">hours with surface RH ≥ 80 %</th><th class=\"n\">longest "
      "run</th><th class=\"n\">highest surface RH</th><th class=\"n\">mean surface RH</th></tr>";
  for (const auto& z : d.zones) {
    const zone_period& t = z.series.total();
    const bool several_days = t.mould_longest_min >= 3 * 1440;
    out += "<tr>" + cell(esc(z.review.zone)) + cell(fmt("%.1f", t.mould_minutes / 60.0), true) +
           cell(t.mould_longest_min > 0 ? duration_text(t.mould_longest_min * 60.0) : "–", true, several_days) +
           cell(t.max_surface_rh_pct ? fmt("%.0f %%", *t.max_surface_rh_pct) : "–", true) +
           cell(t.mean_surface_rh_pct.value() ? fmt("%.0f %%", *t.mean_surface_rh_pct.value()) : "–", true) + "</tr>";
  }
  out += "</table>\n";
  return out;
}

// The thresholds when every zone has the same ones (one line instead of a table).
std::optional<band_thresholds> uniform_thresholds(const report_data& d) {
  if (d.zones.empty() || !d.zones.front().thresholds) return std::nullopt;
  const band_thresholds& f = *d.zones.front().thresholds;
  for (const auto& z : d.zones) {
    if (!z.thresholds) return std::nullopt;
    const band_thresholds& t = *z.thresholds;
    if (t.margin_warn_k != f.margin_warn_k || t.margin_alarm_k != f.margin_alarm_k ||
        t.hysteresis_k != f.hysteresis_k || t.confirm_s != f.confirm_s || t.stale_after_s != f.stale_after_s) {
      return std::nullopt;
    }
  }
  return f;
}

}  // namespace

std::string verdict_text(const report_data& d) {
  int condensing_zones = 0;
  double condensing_s = 0.0;
  const condensing_episode* longest = nullptr;
  std::string longest_zone;
  int without_warning = 0;
  int episodes = 0;
  std::vector<double> acks;
  for (const auto& z : d.zones) {
    const double s = z.review.band_s[static_cast<std::size_t>(band_severity(band::condensing))];
    if (!z.review.condensing.empty()) ++condensing_zones;
    condensing_s += s;
    for (const auto& c : z.review.condensing) {
      ++episodes;
      if (c.warning_s <= 0) ++without_warning;
      if (longest == nullptr || c.duration_s > longest->duration_s) {
        longest = &c;
        longest_zone = z.review.zone;
      }
    }
    acks.insert(acks.end(), z.review.ack_delays_s.begin(), z.review.ack_delays_s.end());
  }
  std::string v;
  if (episodes == 0) {
    v = "No zone reached the dew point in this period (" + std::to_string(d.zones.size()) + " zones). ";
  } else {
    v = std::to_string(condensing_zones) + " of " + std::to_string(d.zones.size()) +
        " zones reached the dew point, for " + duration_text(condensing_s) + " in total (zone time) in " +
        std::to_string(episodes) + " episodes; the longest lasted " + duration_text(longest->duration_s) + " in " +
        longest_zone + " from " + utc(longest->start) + ". ";
    v += without_warning == 0 ? "Every episode was preceded by an alarm. "
                              : std::to_string(without_warning) + " of them came without an earlier alarm. ";
  }
  v += std::to_string(d.alarms.alarms) + " alarms were raised (" + fmt("%.1f", d.alarms.per_day_avg) +
       " a day; target about 150)";
  if (!acks.empty()) {
    std::sort(acks.begin(), acks.end());
    v += ", acknowledged after " + duration_text(acks[acks.size() / 2]) + " (median)";
  }
  v += d.alarms.flood_pct > 0 ? "; " + fmt("%.1f", d.alarms.flood_pct) + " % of 10-minute periods were in flood. "
                              : "; no alarm flood. ";
  double worst_run_min = 0;
  std::string worst_run_zone;
  for (const auto& z : d.zones) {
    if (z.series.total().mould_longest_min > worst_run_min) {
      worst_run_min = z.series.total().mould_longest_min;
      worst_run_zone = z.review.zone;
    }
  }
  v += worst_run_min > 0 ? "Surface RH stayed at or above 80 % for up to " + duration_text(worst_run_min * 60.0) +
                               " (" + worst_run_zone + ")" + (worst_run_min >= 3 * 1440 ? ": a mould risk." : ".")
                         : "Surface RH never reached 80 %.";
  return v;
}

std::string render_html(const report_data& d) {
  std::string out;
  out.reserve(64 * 1024 + d.zones.size() * 40 * 1024);
  out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n";
  out += "<title>dewmargin review: " + esc(d.site) + ", " + utc(d.since) + " to " + utc(d.until) + " UTC</title>\n";
  out += "<style>" + std::string(k_css) + "</style>\n</head>\n<body>\n";
  out += "<h1><span class=\"mark\"></span>Dew-margin review: " + esc(d.site) + "</h1>\n";
  out += "<div class=\"meta\">Period " + utc(d.since) + " to " + utc(d.until) + " UTC (" +
         fmt("%.1f", std::chrono::duration<double>(d.until - d.since).count() / 86400.0) + " days) · generated " +
         utc(d.generated_at) + " UTC by dewmargin " + k_version + " · database " + esc(d.db_label) + " (schema v" +
         std::to_string(d.schema_version) + ") · chart points of " + std::to_string(d.layout.bucket.count()) +
         " min, each the lowest margin of its minutes</div>\n";
  out += "<p class=\"verdict\">" + esc(verdict_text(d)) + "</p>\n";

  out += "<h2>Thresholds in force</h2>\n";
  if (!d.has_settings) {
    out +=
        "<p>Not known: the report was made without <code>--config</code>, so the charts show no threshold lines "
        "and the loops no supply temperature. Bands, alarms and margins are as the service recorded them.</p>\n";
  } else if (const auto all = uniform_thresholds(d)) {
    const band_thresholds& u = *all;
    out += "<p>All " + std::to_string(d.zones.size()) + " zones: <b>tight</b> below " + fmt("%.2f K", u.margin_warn_k) +
           " of margin, <b>alarm</b> below " + fmt("%.2f K", u.margin_alarm_k) +
           ", <b>condensing</b> at 0 K or a wet switch; hysteresis " + fmt("%.2f K", u.hysteresis_k) +
           ", confirmed over " + fmt("%.0f s", u.confirm_s) + "; inputs stale after " + fmt("%.0f s", u.stale_after_s) +
           ". <span class=\"small\">From " + esc(d.config_label) +
           " as it is now (the history does not record earlier thresholds).</span></p>\n";
  } else {
    out += "<p class=\"small\">From " + esc(d.config_label) +
           " as it is now (the history does not record earlier thresholds).</p>\n<table><tr><th>zone</th><th "
           "class=\"n\">warn below</th><th class=\"n\">alarm below</th><th class=\"n\">hysteresis</th><th "
           "class=\"n\">confirm</th><th class=\"n\">stale after</th></tr>";
    for (const auto& z : d.zones) {
      if (!z.thresholds) {
        out += "<tr>" + cell(esc(z.review.zone)) + "<td colspan=\"5\">not in the config</td></tr>";
        continue;
      }
      const auto& t = *z.thresholds;
      out += "<tr>" + cell(esc(z.review.zone)) + cell(fmt("%.2f K", t.margin_warn_k), true) +
             cell(fmt("%.2f K", t.margin_alarm_k), true) + cell(fmt("%.2f K", t.hysteresis_k), true) +
             cell(fmt("%.0f s", t.confirm_s), true) + cell(fmt("%.0f s", t.stale_after_s), true) + "</tr>";
    }
    out += "</table>\n";
  }

  out += "<div class=\"two\"><div><h2>Alarm system</h2>\n" + alarm_table(d.alarms) + "</div>\n";
  out += "<div><h2>Mould risk</h2>\n" + mould_table(d) +
         "<p class=\"small\">Surface RH: the room air's vapour pressure over the saturation pressure at the coldest "
         "surface, per minute. EN ISO 13788 (as summarised in BS 5250 Annex D) takes surface RH that stays at or "
         "above 80 % for several days as a mould risk; runs of 3 days or more are marked ▲ (our reading of "
         "\"several days\"). Zones without a surface sensor have no surface RH.</p></div></div>\n";

  out += "<h2>Zones</h2>\n" + legend();
  for (const auto& z : d.zones) {
    out += "<div class=\"zone\"><h3>Zone " + esc(z.review.zone) + "</h3>\n";
    out += margin_chart(d, z);
    out += temperature_chart(d, z);
    out += zone_table(z);
    out += "</div>\n";
  }
  if (!d.loops.empty()) {
    out +=
        "<h2>Loops: supply setpoint</h2>\n<p class=\"small\">━ setpoint (from the service's setpoint events), ┈ "
        "measured supply (mean of the loop's zones; needs --config), ╌ setpoint limits.</p>\n";
    for (const auto& l : d.loops) {
      std::optional<setpoint_config> sp;
      if (const auto it = d.setpoints.find(l.loop); it != d.setpoints.end()) sp = it->second;
      out += "<div class=\"loop\"><h3>Loop " + esc(l.loop) + "</h3>\n" + loop_chart(d, l, sp);
      double total = 0;
      for (const auto& [k, s] : l.limited_s) total += s;
      out += "<table><tr><th>setpoint limited by</th><th class=\"n\">time</th></tr>";
      for (const auto& [k, s] : l.limited_s) {
        const std::string what = k == "none"   ? "nothing (dew point + margin)"
                                 : k == "max"  ? "the maximum (fail-safe or high dew point)"
                                 : k == "min"  ? "the minimum"
                                 : k == "rate" ? "the fall rate"
                                               : k;
        out += "<tr>" + cell(esc(what)) +
               cell(duration_text(s) + fmt(" (%.0f %%)", total > 0 ? 100 * s / total : 0), true) + "</tr>";
      }
      out +=
          "</table>\n<table><tr><th>most frequent reasons (# stands for a number)</th><th class=\"n\">time</th></tr>";
      std::size_t shown = 0;
      for (const auto& [reason, s] : l.reasons_s) {
        if (++shown > 5) break;
        out += "<tr>" + cell(esc(reason.empty() ? "(none given)" : reason)) + cell(duration_text(s), true) + "</tr>";
      }
      out += "</table></div>\n";
    }
  }

  out += "<div class=\"caution\">" + esc(k_caution) + "</div>\n";
  out +=
      "<p class=\"small\">Times are UTC. Band times and the shading come from the band events (to the second); "
      "the margin line from the samples. Samples older than the roll-up age are hourly: their points are hours.</p>\n";
  out += "</body>\n</html>\n";
  return out;
}

}  // namespace dewmargin::report
