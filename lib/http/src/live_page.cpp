#include "live_page.h"

namespace dewmargin::http_detail {

// Kept readable rather than minified: a commissioning agent may view the source.
// Order and words follow `dewmargin watch`: worst band first (unknown, condensing, alarm,
// tight, safe), then the lowest margin. Columns hide on narrow screens in watch's order.
const std::string& live_page_html() {
  static const std::string page = R"PAGE(<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>dewmargin live</title>
<style>
  :root { --bg:#f6f7f9; --fg:#1d2430; --muted:#5b6678; --line:#d9dee6;
          --safe:#1f7a4d; --tight:#9a6a00; --alarm:#c0262d; --wet:#ffffff; --wetbg:#b0172a; --unknown:#6d3fa8; }
  @media (prefers-color-scheme: dark) {
    :root { --bg:#14181f; --fg:#e6e9ee; --muted:#9aa4b5; --line:#2b3340;
            --safe:#4cc38a; --tight:#e0b341; --alarm:#ff6b6b; --wetbg:#d62839; --unknown:#b48cf2; }
  }
  * { box-sizing: border-box; }
  body { margin:0; font:15px/1.35 system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; background:var(--bg); color:var(--fg); }
  header { padding:10px 12px; border-bottom:1px solid var(--line); position:sticky; top:0; background:var(--bg); z-index:1; }
  h1 { font-size:17px; margin:0 0 4px 0; }
  .sub { color:var(--muted); font-size:13px; }
  .counts span { display:inline-block; margin-right:10px; font-weight:600; }
  .stale { color:var(--alarm); font-weight:700; }
  main { padding:6px 6px 24px 6px; overflow-x:auto; }
  table { border-collapse:collapse; width:100%; font-variant-numeric: tabular-nums; }
  th, td { padding:6px 6px; border-bottom:1px solid var(--line); text-align:right; white-space:nowrap; }
  th { font-size:12px; color:var(--muted); font-weight:600; position:sticky; top:0; }
  th.l, td.l { text-align:left; }
  td.zone { font-weight:600; max-width:14em; overflow:hidden; text-overflow:ellipsis; }
  .band { font-weight:700; border-radius:4px; padding:2px 6px; }
  .b-safe { color:var(--safe); } .b-tight { color:var(--tight); } .b-alarm { color:var(--alarm); }
  .b-condensing { color:var(--wet); background:var(--wetbg); } .b-unknown { color:var(--unknown); }
  .a-active { color:var(--alarm); font-weight:700; } .a-latched { color:var(--alarm); }
  .a-acked { color:var(--tight); } .a-shelved, .a-suppr { color:var(--muted); font-style:italic; }
  .margin { font-weight:700; font-size:16px; }
  svg.spark { display:block; }
  .why { color:var(--muted); font-size:12px; text-align:left; white-space:normal; min-width:10em; }
  footer { color:var(--muted); font-size:12px; padding:8px 12px; }
  @media (max-width: 760px) { .c-why, .c-age, .c-water { display:none; } }
  @media (max-width: 560px) { .c-dew, .c-surf, .c-wet { display:none; } td.zone { max-width:9em; } }
  @media (max-width: 400px) {
    .c-valve { display:none; } svg.spark { width:44px; } th, td { padding:6px 3px; }
    td.zone { max-width:7.5em; font-size:14px; } .band { font-size:12px; padding:1px 3px; } .margin { font-size:15px; }
  }
  .zero { opacity:.45; }
</style>
</head>
<body>
<header>
  <h1 id="title">dewmargin live</h1>
  <div class="counts" id="counts"></div>
  <div class="sub" id="status">loading...</div>
</header>
<main>
<table>
  <thead><tr>
    <th class="l">zone</th><th class="l">band</th><th>margin K</th><th class="c-spark l">last hour</th>
    <th class="c-dew">dew °C</th><th class="c-surf">surface °C</th><th class="c-water">water °C</th>
    <th class="c-wet">to wet</th><th class="c-valve l">valve</th><th class="l">alarm</th><th class="c-age">age</th>
    <th class="c-why l">why held</th>
  </tr></thead>
  <tbody id="rows"></tbody>
</table>
</main>
<footer>dewmargin supervises; it is not a safety device. Updates every 2 s. Margin = coldest surface (or supply water) − dew point.</footer>
<script>
"use strict";
const BANDS = ["safe", "tight", "alarm", "condensing", "unknown"];
const severity = b => { const i = BANDS.indexOf(b); return i < 0 ? 4 : i; };
const series = new Map();   // zone -> [[ms, margin|null], ...]
let token = sessionStorage.getItem("dewmargin-token") || "";
let lastOk = null;
let historyAt = 0;

function el(tag, cls, text) {
  const e = document.createElement(tag);
  if (cls) e.className = cls;
  if (text !== undefined) e.textContent = text;
  return e;
}
async function api(path) {
  const headers = token ? { "Authorization": "Bearer " + token } : {};
  const r = await fetch(path, { headers, cache: "no-store" });
  if (r.status === 401) {
    const t = window.prompt("This dewmargin asks for its access token:");
    if (t) { token = t.trim(); sessionStorage.setItem("dewmargin-token", token); }
    throw new Error("token required");
  }
  if (!r.ok) throw new Error(path + ": HTTP " + r.status);
  return r.json();
}
const fix = (v, d) => (v === null || v === undefined) ? "–" : Number(v).toFixed(d);
function minutes(m) {
  if (m === null || m === undefined) return "–";
  if (m < 10) return Math.max(0, m).toFixed(1) + " min";
  if (m < 120) return m.toFixed(0) + " min";
  return (m / 60).toFixed(0) + " h";
}
function age(ms) {
  const s = Math.round(ms / 1000);
  if (s < -5) return "ahead";
  if (s < 60) return Math.max(0, s) + " s";
  if (s < 3600) return Math.floor(s / 60) + " min";
  if (s < 86400) return Math.floor(s / 3600) + " h";
  return Math.floor(s / 86400) + " d";
}
function alarmOf(a) {
  if (!a) return ["–", ""];
  if (a.shelved_until) return ["shelved", "a-shelved"];
  if (a.suppressed_by) return ["suppressed", "a-suppr"];
  if (a.active) return a.acknowledged ? ["acked", "a-acked"] : ["ACTIVE", "a-active"];
  if (!a.acknowledged) return ["latched", "a-latched"];
  return ["–", ""];
}
// Inline SVG sparkline of the margin; the zero line (condensation) is drawn when in range.
function spark(points) {
  const w = 120, h = 28, ns = "http://www.w3.org/2000/svg";
  const svg = document.createElementNS(ns, "svg");
  svg.setAttribute("class", "spark"); svg.setAttribute("width", w); svg.setAttribute("height", h);
  svg.setAttribute("viewBox", "0 0 " + w + " " + h);
  const known = points.filter(p => p[1] !== null);
  if (known.length < 2) return svg;
  const t1 = points[points.length - 1][0], t0 = t1 - 3600e3;
  let lo = Math.min(0, ...known.map(p => p[1])), hi = Math.max(...known.map(p => p[1]), 1);
  const x = t => (Math.max(t0, t) - t0) / 3600e3 * (w - 2) + 1;
  const y = v => h - 2 - (v - lo) / (hi - lo) * (h - 4);
  const zero = document.createElementNS(ns, "line");
  zero.setAttribute("x1", 0); zero.setAttribute("x2", w); zero.setAttribute("y1", y(0)); zero.setAttribute("y2", y(0));
  zero.setAttribute("stroke", "var(--alarm)"); zero.setAttribute("stroke-dasharray", "2 2"); zero.setAttribute("stroke-width", "1");
  svg.appendChild(zero);
  let d = "", pen = false;
  for (const p of points) {
    if (p[0] < t0) continue;
    if (p[1] === null) { pen = false; continue; }
    d += (pen ? "L" : "M") + x(p[0]).toFixed(1) + " " + y(p[1]).toFixed(1);
    pen = true;
  }
  const path = document.createElementNS(ns, "path");
  path.setAttribute("d", d); path.setAttribute("fill", "none");
  path.setAttribute("stroke", "currentColor"); path.setAttribute("stroke-width", "1.5");
  svg.appendChild(path);
  return svg;
}
function remember(z) {
  if (!z.ts) return;
  const t = Date.parse(z.ts);
  const s = series.get(z.zone) || [];
  if (!s.length || s[s.length - 1][0] < t) s.push([t, z.margin_k]);
  while (s.length && s[0][0] < t - 3600e3) s.shift();
  series.set(z.zone, s);
}
function render(zones) {
  zones.sort((a, b) => severity(b.band) - severity(a.band) ||
    ((a.margin_k === null) - (b.margin_k === null)) || (a.margin_k - b.margin_k) || (a.zone < b.zone ? -1 : 1));
  const counts = [0, 0, 0, 0, 0];
  const rows = document.getElementById("rows");
  // Ages count back from the site's newest state, in the service's own clock (right on
  // event time too, and whatever this device's clock says).
  const newest = Math.max(...zones.map(z => z.ts ? Date.parse(z.ts) : -Infinity));
  const frag = document.createDocumentFragment();
  for (const z of zones) {
    counts[severity(z.band)]++;
    remember(z);
    const tr = el("tr");
    tr.dataset.zone = z.zone;
    tr.appendChild(el("td", "l zone", z.zone));
    const band = el("td", "l"); band.appendChild(el("span", "band b-" + (BANDS.includes(z.band) ? z.band : "unknown"), z.band)); tr.appendChild(band);
    tr.appendChild(el("td", "margin b-" + z.band, fix(z.margin_k, 2)));
    const sp = el("td", "c-spark l b-" + z.band); sp.appendChild(spark(series.get(z.zone) || [])); tr.appendChild(sp);
    tr.appendChild(el("td", "c-dew", fix(z.dew_point_c, 1)));
    tr.appendChild(el("td", "c-surf", fix(z.surface_min_c, 1)));
    tr.appendChild(el("td", "c-water", fix(z.supply_c, 1)));
    tr.appendChild(el("td", "c-wet", minutes(z.minutes_to_condensation)));
    tr.appendChild(el("td", "c-valve l", (z.valve || "–") + (z.valve_hold ? " *" : "")));
    const [atext, acls] = alarmOf(z.alarm);
    tr.appendChild(el("td", "l " + acls, atext));
    tr.appendChild(el("td", "c-age", z.ts ? age(newest - Date.parse(z.ts)) : "–"));
    let why = z.valve_hold || "";
    if (!why && z.alarm && z.alarm.suppressed_by) why = "alarm suppressed by " + z.alarm.suppressed_by;
    if (!why && z.alarm && z.alarm.shelved_until) why = "shelved until " + z.alarm.shelved_until;
    tr.appendChild(el("td", "c-why why", why));
    frag.appendChild(tr);
  }
  rows.replaceChildren(frag);
  const c = document.getElementById("counts");
  c.replaceChildren();
  for (let i = 4; i >= 0; i--) {
    c.appendChild(el("span", "b-" + BANDS[i] + (counts[i] ? "" : " zero"), BANDS[i] + " " + counts[i]));
  }
  if (zones.length && zones[0].site) {
    document.getElementById("title").textContent = "dewmargin live – " + zones[0].site;
    document.title = "dewmargin – " + zones[0].site;
  }
}
async function refreshHistory() {
  const h = await api("/api/margin-history");
  for (const [zone, pts] of Object.entries(h.zones)) series.set(zone, pts);
  historyAt = Date.now();
}
async function tick() {
  const status = document.getElementById("status");
  try {
    if (Date.now() - historyAt > 60000) await refreshHistory();
    const zones = await api("/api/zones");
    render(zones);
    lastOk = new Date();
    status.className = "sub";
    status.textContent = zones.length + " zones · updated " + lastOk.toLocaleTimeString();
  } catch (e) {
    status.className = "sub stale";
    status.textContent = "no answer from the service" + (lastOk ? " since " + lastOk.toLocaleTimeString() : "") + " (" + e.message + ")";
  }
  setTimeout(tick, 2000);
}
tick();
</script>
</body>
</html>
)PAGE";
  return page;
}

}  // namespace dewmargin::http_detail
