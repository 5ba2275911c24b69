#include "spoolstep/benchrun/report.hpp"

#include <algorithm>
#include <cmath>
#include <fstream>
#include <system_error>

#include <fmt/format.h>

#include "spoolstep/machine_file/machine_file.hpp"

namespace spoolstep::benchrun {

const char* const kSafetyCaution =
    "spoolstep is not a safety-rated control system. A bench run shows what the logic does to a "
    "model of the machine; it proves nothing about the real machine. Emergency stop and safety "
    "functions must be hardwired and designed to ISO 13849-1 / IEC 62061, ISO 4413 and local codes. "
    "Commissioning is done by qualified people; defer to local codes and licensed practice.";

namespace {

std::string escape(const std::string& s) {
  std::string out;
  for (char c : s) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      default: out += c;
    }
  }
  return out;
}

// A colour-blind-safe qualitative palette (Okabe and Ito).
const char* const kColours[] = {"#0072B2", "#D55E00", "#009E73", "#CC79A7",
                                "#E69F00", "#56B4E9", "#000000", "#F0E442"};

struct Series {
  std::string label;
  const std::vector<double>* values;
};

std::string nice(double v) { return fmt::format("{:.4g}", v); }

// One line plot as inline SVG; all series share the time axis.
std::string svg_plot(const std::string& title, const std::string& unit, const std::vector<double>& t,
                     const std::vector<Series>& series) {
  const double w = 900, h = 230, left = 60, right = 170, top = 24, bottom = 30;
  const double pw = w - left - right, ph = h - top - bottom;
  double lo = 1e300, hi = -1e300;
  for (const Series& s : series) {
    for (double v : *s.values) { lo = std::min(lo, v); hi = std::max(hi, v); }
  }
  if (lo > hi) { lo = 0; hi = 1; }
  if (hi - lo < 1e-12) { hi += 0.5; lo -= 0.5; }
  const double pad = (hi - lo) * 0.05;
  lo -= pad;
  hi += pad;
  const double t0 = t.empty() ? 0 : t.front(), t1 = t.empty() || t.back() <= t0 ? t0 + 1 : t.back();
  auto X = [&](double x) { return left + (x - t0) / (t1 - t0) * pw; };
  auto Y = [&](double y) { return top + (hi - y) / (hi - lo) * ph; };
  std::string svg = fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {} {}\" width=\"{}\" height=\"{}\" role=\"img\">"
      "<title>{}</title><rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" fill=\"#fff\" stroke=\"#999\"/>"
      "<text x=\"{}\" y=\"16\" font-size=\"13\" font-weight=\"bold\">{}{}</text>",
      w, h, w, h, escape(title), left, top, pw, ph, left, escape(title), unit.empty() ? "" : " [" + escape(unit) + "]");
  for (int k = 0; k <= 4; ++k) {
    double y = lo + (hi - lo) * k / 4.0;
    if (std::fabs(y) < (hi - lo) * 1e-6) y = 0.0;  // print 0, not a rounding residue
    svg += fmt::format("<line x1=\"{}\" x2=\"{}\" y1=\"{:.1f}\" y2=\"{:.1f}\" stroke=\"#eee\"/>"
                       "<text x=\"{}\" y=\"{:.1f}\" font-size=\"10\" text-anchor=\"end\">{}</text>",
                       left, left + pw, Y(y), Y(y), left - 4, Y(y) + 3, nice(y));
    const double x = t0 + (t1 - t0) * k / 4.0;
    svg += fmt::format("<text x=\"{:.1f}\" y=\"{}\" font-size=\"10\" text-anchor=\"middle\">{} s</text>", X(x),
                       top + ph + 14, nice(x));
  }
  for (std::size_t s = 0; s < series.size(); ++s) {
    const auto& v = *series[s].values;
    std::string points;
    const std::size_t n = std::min(v.size(), t.size());
    for (std::size_t i = 0; i < n; ++i) points += fmt::format("{:.1f},{:.1f} ", X(t[i]), Y(v[i]));
    const char* colour = kColours[s % (sizeof(kColours) / sizeof(kColours[0]))];
    svg += fmt::format("<polyline fill=\"none\" stroke=\"{}\" stroke-width=\"1.3\" points=\"{}\"/>", colour, points);
    svg += fmt::format("<rect x=\"{}\" y=\"{}\" width=\"10\" height=\"3\" fill=\"{}\"/><text x=\"{}\" y=\"{}\" font-size=\"11\">{}</text>",
                       left + pw + 10, top + 8 + 15 * s, colour, left + pw + 24, top + 12 + 15 * s, escape(series[s].label));
  }
  return svg + "</svg>\n";
}

// The step timeline: one coloured band per active step.
std::string svg_steps(const PlotCollector& plots, const core::MachineConfig& machine) {
  const int column = find_signal(plots.signals(), "step");
  if (column < 0 || plots.times().empty()) return "";
  const auto& t = plots.times();
  const auto& v = plots.series()[static_cast<std::size_t>(column)];
  const double w = 900, left = 60, right = 170, pw = w - left - right, h = 70;
  const double t0 = t.front(), t1 = t.back() > t0 ? t.back() : t0 + 1;
  auto X = [&](double x) { return left + (x - t0) / (t1 - t0) * pw; };
  std::string svg = fmt::format("<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 {} {}\" width=\"{}\" height=\"{}\">"
                                "<text x=\"{}\" y=\"14\" font-size=\"13\" font-weight=\"bold\">Step timeline</text>",
                                w, h, w, h, left);
  std::size_t start = 0;
  const std::size_t n = std::min(t.size(), v.size());
  for (std::size_t i = 1; i <= n; ++i) {
    if (i < n && v[i] == v[start]) continue;
    const auto step = static_cast<std::size_t>(v[start]);
    const double x0 = X(t[start]), x1 = X(t[i < n ? i : n - 1]);
    const char* colour = kColours[step % (sizeof(kColours) / sizeof(kColours[0]))];
    const std::string name = step < machine.step_count ? std::string(machine_file::name_view(machine.steps[step].name)) : "?";
    svg += fmt::format("<rect x=\"{:.1f}\" y=\"22\" width=\"{:.1f}\" height=\"22\" fill=\"{}\" fill-opacity=\"0.35\" stroke=\"#666\" stroke-width=\"0.3\"><title>{}</title></rect>",
                       x0, std::max(0.5, x1 - x0), colour, escape(name));
    if (x1 - x0 > 40) svg += fmt::format("<text x=\"{:.1f}\" y=\"37\" font-size=\"10\">{}</text>", x0 + 2, escape(name));
    start = i;
  }
  svg += fmt::format("<text x=\"{}\" y=\"60\" font-size=\"10\">{} s</text><text x=\"{}\" y=\"60\" font-size=\"10\" text-anchor=\"end\">{} s</text></svg>\n",
                     left, nice(t0), left + pw, nice(t1));
  return svg;
}

std::vector<Series> pick(const PlotCollector& plots, const std::function<bool(const Signal&)>& want, std::string& unit) {
  std::vector<Series> out;
  for (std::size_t i = 0; i < plots.signals().size(); ++i) {
    const Signal& s = plots.signals()[i];
    if (!want(s)) continue;
    if (out.empty()) unit = s.unit;
    else if (unit != s.unit) unit = "";
    out.push_back(Series{s.name, &plots.series()[i]});
  }
  return out;
}

}  // namespace

nlohmann::json summary_json(const RunReport& r) {
  nlohmann::json j;
  j["format"] = "spoolstep-run-summary/1";
  j["machine"] = r.machine_path;
  j["scenario"] = r.scenario_path;
  j["duration_s"] = r.duration_s;
  j["scans"] = r.scans;
  j["completed"] = r.completed;
  if (!r.run_error.empty()) j["run_error"] = r.run_error;
  // What the numbers in trace.csv's state and step columns stand for.
  if (r.plots != nullptr) {
    nlohmann::json names = nlohmann::json::object();
    for (const Signal& s : r.plots->signals()) {
      if (!s.value_names.empty()) names[s.name] = s.value_names;
    }
    j["value_names"] = std::move(names);
  }
  bool all = r.completed;
  j["expectations"] = nlohmann::json::array();
  for (const ExpectationResult& e : r.expectations) {
    j["expectations"].push_back({{"name", e.name}, {"kind", e.kind}, {"passed", e.passed}, {"detail", e.detail}});
    all = all && e.passed;
  }
  j["passed"] = all;
  j["faults"] = nlohmann::json::array();
  for (const FaultEntry& f : r.faults) {
    j["faults"].push_back({{"t_s", f.t_s}, {"stop_category", f.category}, {"what", f.text}});
  }
  j["notices"] = nlohmann::json::array();
  for (const NoticeEntry& n : r.notices) j["notices"].push_back({{"t_s", n.t_s}, {"what", n.text}});
  nlohmann::json figures;
  if (r.figures != nullptr) {
    figures["cycle_times_s"] = r.figures->cycle_times_s();
    for (const auto& p : r.figures->peak_pressures())
      figures["peak_pressure"][p.signal] = {{"value", p.value}, {"unit", p.unit}, {"at_s", p.at_s}};
    for (const auto& p : r.figures->top_speeds())
      figures["max_speed"][p.signal] = {{"value", p.value}, {"unit", p.unit}, {"at_s", p.at_s}};
  }
  j["figures"] = figures;
  j["caution"] = kSafetyCaution;
  return j;
}

std::string report_html(const RunReport& r) {
  std::string html =
      "<!DOCTYPE html><html lang=\"en\"><head><meta charset=\"utf-8\"><title>spoolstep bench run</title>"
      "<style>body{font-family:sans-serif;max-width:960px;margin:1em auto;color:#222}"
      "table{border-collapse:collapse;margin:.5em 0}td,th{border:1px solid #bbb;padding:3px 8px;text-align:left;font-size:13px}"
      ".pass{color:#006400;font-weight:bold}.fail{color:#b00000;font-weight:bold}"
      ".caution{border:2px solid #b00000;padding:.6em;background:#fff5f5}</style></head><body>\n";
  html += "<h1>spoolstep bench run</h1>\n";
  html += "<p class=\"caution\"><strong>Caution.</strong> " + escape(kSafetyCaution) + "</p>\n";
  html += fmt::format("<table><tr><th>machine file</th><td>{}</td></tr><tr><th>scenario</th><td>{}</td></tr>"
                      "<tr><th>description</th><td>{}</td></tr><tr><th>simulated</th><td>{:.3f} s, {} scans</td></tr></table>\n",
                      escape(r.machine_path), escape(r.scenario_path), escape(r.scenario_description), r.duration_s, r.scans);
  if (!r.run_error.empty()) html += "<p class=\"fail\">The run stopped early: " + escape(r.run_error) + "</p>\n";
  html += "<h2>Expectations</h2><table><tr><th>result</th><th>expectation</th><th>kind</th><th>observed</th></tr>\n";
  for (const ExpectationResult& e : r.expectations) {
    html += fmt::format("<tr><td class=\"{}\">{}</td><td>{}</td><td>{}</td><td>{}</td></tr>\n", e.passed ? "pass" : "fail",
                        e.passed ? "pass" : "FAIL", escape(e.name), e.kind, escape(e.detail));
  }
  html += "</table>\n";
  html += "<h2>Faults raised</h2>\n";
  if (r.faults.empty()) {
    html += "<p>None.</p>\n";
  } else {
    html += "<table><tr><th>time</th><th>stop category</th><th>fault</th></tr>\n";
    for (const FaultEntry& f : r.faults) {
      html += fmt::format("<tr><td>{:.3f} s</td><td>{}</td><td>{}</td></tr>\n", f.t_s, f.category, escape(f.text));
    }
    html += "</table>\n";
  }
  if (!r.notices.empty()) {
    html += "<h2>Notices: operator actions the core refused, and two-hand releases</h2>\n<table><tr><th>time</th><th>notice</th></tr>\n";
    for (const NoticeEntry& n : r.notices) {
      html += fmt::format("<tr><td>{:.3f} s</td><td>{}</td></tr>\n", n.t_s, escape(n.text));
    }
    html += "</table>\n";
  }
  if (r.figures != nullptr) {
    html += "<h2>Key figures</h2><table><tr><th>figure</th><th>value</th></tr>\n";
    for (double c : r.figures->cycle_times_s()) html += fmt::format("<tr><td>cycle time</td><td>{:.3f} s</td></tr>\n", c);
    for (const auto& p : r.figures->peak_pressures())
      html += fmt::format("<tr><td>peak {}</td><td>{} {} at {:.3f} s</td></tr>\n", escape(p.signal), nice(p.value), escape(p.unit), p.at_s);
    for (const auto& p : r.figures->top_speeds())
      html += fmt::format("<tr><td>max speed {}</td><td>{} {} at {:.3f} s</td></tr>\n", escape(p.signal), nice(p.value), escape(p.unit), p.at_s);
    html += "</table>\n";
  }
  if (r.plots != nullptr && r.machine != nullptr) {
    const PlotCollector& p = *r.plots;
    html += "<h2>Plots</h2>\n" + svg_steps(p, *r.machine);
    std::string unit;
    auto positions = pick(p, [](const Signal& s) { return s.group == SignalGroup::kPosition; }, unit);
    if (!positions.empty()) html += svg_plot("Positions", unit, p.times(), positions);
    auto pressures = pick(p, [](const Signal& s) { return s.group == SignalGroup::kPressure || (s.group == SignalGroup::kInput && is_pressure_unit(s.unit)); }, unit);
    if (!pressures.empty()) html += svg_plot("Pressures", unit, p.times(), pressures);
    auto commands = pick(p, [](const Signal& s) { return s.group == SignalGroup::kCommand || s.group == SignalGroup::kSpool; }, unit);
    if (!commands.empty()) html += svg_plot("Valve commands and spool positions", "-1..1", p.times(), commands);
    auto currents = pick(p, [](const Signal& s) { return s.group == SignalGroup::kOutput && s.kind == SignalKind::kAnalog; }, unit);
    if (!currents.empty()) html += svg_plot("Proportional outputs", unit, p.times(), currents);
    auto velocities = pick(p, [](const Signal& s) { return s.group == SignalGroup::kVelocity; }, unit);
    if (!velocities.empty()) html += svg_plot("Velocities", unit, p.times(), velocities);
  }
  html += "<p style=\"font-size:11px;color:#666\">Written by spoolstep. Trace: trace.csv; digital I/O and steps: io.vcd; figures: summary.json.</p>\n";
  html += "</body></html>\n";
  return html;
}

}  // namespace spoolstep::benchrun
