// benchtau: rendering a measurement as a table and as JSON.
#include "src/cli/measure_report.h"

#include <fmt/format.h>

#include <cmath>

#include "src/cli/json_writer.h"
#include "src/core/engineering.h"

namespace benchtau::cli {
namespace {

std::string node_label(const Capture& c, const std::optional<std::size_t>& k) {
  return k ? fmt::format("\"{}\"", c.channels[*k].name) : std::string("not captured");
}

std::string stat_row(std::string_view label, const Stat& s, std::string_view unit) {
  auto cell = [&](double v) { return unit == "%" ? format_percent(v, 2) : format_eng(v, unit); };
  return fmt::format("  {:<12} {:>11} {:>11} {:>11} {:>11}\n", label, cell(s.mean), cell(s.std),
                     cell(s.min), cell(s.max));
}

// Plain digits: "+1234" or "+3.42", never an exponent.
std::string ppm_text(double v, bool sign) {
  const bool big = std::fabs(v) >= 100.0;
  if (sign) return big ? fmt::format("{:+.0f}", v) : fmt::format("{:+.2f}", v);
  return big ? fmt::format("{:.0f}", v) : fmt::format("{:.2f}", v);
}

std::string rate_text(const TimeBase& t) {
  return t.dt_s > 0.0 ? format_eng(1.0 / t.dt_s, "S/s") : std::string("unknown rate");
}

}  // namespace

std::string measure_table(const MeasureReport& r, bool per_cycle) {
  const Capture& c = r.capture;
  const Measurement& m = r.measurement;
  const Summary& s = m.summary;
  std::string out;
  out += fmt::format("{}: {} samples at {}, {} long\n", c.source, c.samples(), rate_text(c.time),
                     format_eng(c.duration_s(), "s"));
  out += fmt::format("  output pin {}, capacitor node {}, control pin {}\n",
                     node_label(c, r.nodes.out), node_label(c, r.nodes.cap),
                     node_label(c, r.nodes.ctl));
  if (!r.notes.empty()) {
    out += "read as\n";
    for (const std::string& n : r.notes) out += fmt::format("  {}\n", n);
  }
  if (s.cycles > 0) {
    out +=
        fmt::format("\n{} steady cycle{}, edges from the {}\n", s.cycles, s.cycles == 1 ? "" : "s",
                    m.edge_node == "out"
                        ? (r.nodes.cap ? "output pin, timed on the capacitor node" : "output pin")
                        : "capacitor node's turnarounds");
    out += fmt::format("  {:<12} {:>11} {:>11} {:>11} {:>11}\n", "", "mean", "std", "min", "max");
    out += stat_row("period", s.period_s, "s");
    out += stat_row("high time", s.high_s, "s");
    out += stat_row("low time", s.low_s, "s");
    out += stat_row("duty", s.duty, "%");
    if (r.nodes.cap) {
      out += stat_row("cap max", s.cap_max_V, "V");
      out += stat_row("cap min", s.cap_min_V, "V");
    }
    if (r.nodes.ctl) out += stat_row("control", s.ctl_V, "V");
    out += fmt::format("  frequency {}; cycle-to-cycle jitter {} RMS\n",
                       format_eng(s.frequency_Hz, "Hz"), format_eng(s.jitter_c2c_s, "s"));
    if (s.drift.known) {
      const bool significant = std::fabs(s.drift.ppm_per_s) > 2.0 * s.drift.sigma_ppm_per_s;
      out +=
          fmt::format("  period drift {} ppm/s +/- {} (1 sigma){}\n",
                      ppm_text(s.drift.ppm_per_s, true), ppm_text(s.drift.sigma_ppm_per_s, false),
                      significant ? "" : ", not significant over this record");
    }
    if (!std::isnan(s.out_low_V)) {
      out += fmt::format("  output levels {} low, {} high\n", format_eng(s.out_low_V, "V"),
                         format_eng(s.out_high_V, "V"));
    }
  }
  if (per_cycle && !m.cycles.empty()) {
    out += fmt::format("\n  {:>4} {:>11} {:>11} {:>11} {:>11} {:>8} {:>9} {:>9}\n", "#", "start",
                       "period", "high", "low", "duty", "cap max", "cap min");
    for (std::size_t i = 0; i < m.cycles.size(); ++i) {
      const Cycle& cy = m.cycles[i];
      out += fmt::format("  {:>4} {:>11} {:>11} {:>11} {:>11} {:>8} {:>9} {:>9}{}\n", i + 1,
                         format_eng(cy.start_s, "s"), format_eng(cy.period_s, "s"),
                         format_eng(cy.high_s, "s"), format_eng(cy.low_s, "s"),
                         format_percent(cy.duty), format_eng(cy.cap_max_V, "V"),
                         format_eng(cy.cap_min_V, "V"), cy.startup ? "  start-up" : "");
    }
  }
  if (!m.findings.empty()) out += "\nfindings\n" + finding_lines(m.findings);
  return out;
}

std::string finding_lines(const Findings& findings) {
  std::string out;
  for (const Finding& f : findings) {
    out += fmt::format("  {:<8} {}: {}\n", severity_name(f.severity), f.code, f.message);
  }
  return out;
}

namespace {

void stat_json(JsonWriter& j, std::string_view name, const Stat& s) {
  j.key(name).begin_object();
  j.key("mean").value(s.mean).key("std").value(s.std).key("min").value(s.min).key("max").value(
      s.max);
  j.end_object();
}

void node_json(JsonWriter& j, std::string_view name, const Capture& c,
               const std::optional<std::size_t>& k) {
  j.key(name);
  if (k) {
    j.value(c.channels[*k].name);
  } else {
    j.null();
  }
}

}  // namespace

void summary_json(JsonWriter& j, const Measurement& m) {
  const Summary& s = m.summary;
  j.begin_object();
  j.key("cycles").value(s.cycles);
  stat_json(j, "period_s", s.period_s);
  stat_json(j, "high_s", s.high_s);
  stat_json(j, "low_s", s.low_s);
  stat_json(j, "duty", s.duty);
  stat_json(j, "cap_max_V", s.cap_max_V);
  stat_json(j, "cap_min_V", s.cap_min_V);
  stat_json(j, "ctl_V", s.ctl_V);
  j.key("frequency_Hz").value(s.frequency_Hz);
  j.key("jitter_c2c_s").value(s.jitter_c2c_s);
  j.key("drift").begin_object();
  j.key("known").value(s.drift.known);
  j.key("ppm_per_s").value(s.drift.known ? s.drift.ppm_per_s : NAN);
  j.key("sigma_ppm_per_s").value(s.drift.known ? s.drift.sigma_ppm_per_s : NAN);
  j.end_object();
  j.key("out_low_V").value(s.out_low_V);
  j.key("out_high_V").value(s.out_high_V);
  j.key("min_samples_per_segment").value(m.min_samples_per_segment);
  j.end_object();
}

void findings_json(JsonWriter& j, const Findings& findings) {
  j.begin_array();
  for (const Finding& f : findings) {
    j.begin_object();
    j.key("code").value(f.code).key("severity").value(severity_name(f.severity));
    j.key("message").value(f.message);
    j.end_object();
  }
  j.end_array();
}

std::string measure_json(const MeasureReport& r) {
  const Capture& c = r.capture;
  const Measurement& m = r.measurement;
  JsonWriter j;
  j.begin_object();
  j.key("schema").value("benchtau-measure-1");
  j.key("source").value(c.source);
  j.key("capture").begin_object();
  j.key("samples").value(c.samples());
  j.key("sample_interval_s").value(c.time.dt_s);
  j.key("duration_s").value(c.duration_s());
  j.key("time_origin").value(c.time_origin);
  j.key("channels").begin_array();
  for (const Channel& ch : c.channels) {
    j.begin_object();
    j.key("name").value(ch.name).key("unit").value(ch.unit).key("column").value(ch.column);
    j.key("missing").value(ch.missing);
    j.end_object();
  }
  j.end_array();
  j.end_object();
  j.key("nodes").begin_object();
  node_json(j, "out", c, r.nodes.out);
  node_json(j, "cap", c, r.nodes.cap);
  node_json(j, "ctl", c, r.nodes.ctl);
  j.end_object();
  j.key("edge_node");
  if (m.edge_node.empty()) {
    j.null();
  } else {
    j.value(m.edge_node);
  }
  j.key("summary");
  summary_json(j, m);
  j.key("cycles").begin_array();
  for (const Cycle& cy : m.cycles) {
    j.begin_object();
    j.key("start_s").value(cy.start_s).key("period_s").value(cy.period_s);
    j.key("high_s").value(cy.high_s).key("low_s").value(cy.low_s).key("duty").value(cy.duty);
    j.key("cap_max_V").value(cy.cap_max_V).key("cap_min_V").value(cy.cap_min_V);
    j.key("ctl_high_V").value(cy.ctl_high_V).key("ctl_low_V").value(cy.ctl_low_V);
    j.key("startup").value(cy.startup);
    j.end_object();
  }
  j.end_array();
  j.key("findings");
  findings_json(j, m.findings);
  j.key("notes").begin_array();
  for (const std::string& n : r.notes) j.value(n);
  j.end_array();
  j.end_object();
  return j.str();
}

}  // namespace benchtau::cli
