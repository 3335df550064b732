// benchtau: rendering a diagnosis as a table and as JSON.
#include "src/cli/fit_report.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "src/cli/fit_changes.h"
#include "src/cli/json_writer.h"
#include "src/cli/measure_report.h"
#include "src/core/engineering.h"

namespace benchtau::cli {
namespace {

// Rows of cells printed in columns: each column as wide as its widest cell, numbers to the
// right; the last column is never padded (it may be a sentence).
enum class Align { left, right };

std::string columns(const std::vector<std::vector<std::string>>& rows,
                    const std::vector<Align>& align) {
  std::vector<std::size_t> width(align.size(), 0);
  for (const auto& row : rows) {
    for (std::size_t k = 0; k < row.size(); ++k) width[k] = std::max(width[k], row[k].size());
  }
  std::string out;
  for (const auto& row : rows) {
    std::string line = " ";
    for (std::size_t k = 0; k < row.size(); ++k) {
      const bool last = k + 1 == row.size();
      line += k == 0 ? " " : "  ";
      if (align[k] == Align::right) {
        line += fmt::format("{:>{}}", row[k], width[k]);
      } else {
        line += last ? row[k] : fmt::format("{:<{}}", row[k], width[k]);
      }
    }
    while (!line.empty() && line.back() == ' ') line.pop_back();
    out += line + "\n";
  }
  return out;
}

// The words for the table: the JSON names with spaces ("no-oscillation" -> "no oscillation").
std::string words(std::string_view name) {
  std::string s(name);
  std::replace(s.begin(), s.end(), '-', ' ');
  return s;
}
std::string verdict_words(Verdict v) { return words(verdict_name(v)); }
std::string status_words(PartStatus s) { return words(part_status_name(s)); }
std::string kind_words(SuspectKind k) { return words(suspect_kind_name(k)); }

// "+/- 1 %", "+/- 0.5 %"; "-" when the part has no tolerance (a fault outside the parts list).
std::string tolerance_text(double tolerance) {
  if (std::isnan(tolerance)) return "-";
  return fmt::format("+/- {:.3g} %", 100.0 * tolerance);
}

std::string deviation_text(double deviation) {
  if (std::isnan(deviation)) return "-";
  const double percent = 100.0 * deviation;
  if (std::fabs(percent) < 0.05) return "0.0 %";  // no "-0.0 %"
  return fmt::format("{:+.1f} %", percent);
}

// A probability as a percentage; never "100.0 %" or "0.0 %" for what is only nearly so.
std::string probability_text(double p) {
  if (p > 0.9995) return "> 99.9 %";
  if (p < 0.0005) return "< 0.1 %";
  return format_percent(p, 1);
}

std::string design_name(const Design& d) { return d.name.empty() ? "(unnamed design)" : d.name; }

std::string capture_line(const BoardCapture& c) {
  const Summary& s = c.measurement.summary;
  const std::string change = change_text(c.change);
  std::string line = c.label;
  if (!change.empty()) line += fmt::format(" ({})", change);
  if (s.cycles == 0) return line + ": no steady cycle";
  return line + fmt::format(": {} steady cycle{}, period {}", s.cycles, s.cycles == 1 ? "" : "s",
                            format_eng(s.period_s.mean, "s"));
}

void heading(std::string& out, const FitReport& r) {
  const Diagnosis& d = r.diagnosis;
  out += fmt::format("{}: {}", design_name(r.design), verdict_words(d.verdict));
  out += d.reason.empty() ? "\n" : fmt::format(" - {}\n", d.reason);
  out += fmt::format("  design {}; {} capture{}{}\n", r.design.source, r.captures.size(),
                     r.captures.size() == 1 ? "" : "s",
                     d.mode.empty() ? "" : fmt::format(", {}", d.mode));
  for (std::size_t i = 0; i < r.captures.size(); ++i) {
    out += fmt::format("  {}  {}\n", i + 1, capture_line(r.captures[i]));
    if (i < r.notes.size()) {
      for (const std::string& n : r.notes[i]) out += fmt::format("     read as: {}\n", n);
    }
  }
}

void parts_section(std::string& out, const Diagnosis& d) {
  if (d.parts.empty()) return;
  out += "\nparts under the leading explanation";
  if (!std::isnan(d.chi2_per_dof)) {
    out += fmt::format(" (chi-square per degree of freedom {:.3g})", d.chi2_per_dof);
  }
  out += "\n";
  std::vector<std::vector<std::string>> rows{
      {"part", "nominal", "tolerance", "fitted", "+/- sigma", "deviation", "from data", "status"}};
  for (const FittedPart& p : d.parts) {
    rows.push_back({p.ref, format_eng(p.nominal, p.unit), tolerance_text(p.tolerance),
                    format_eng(p.fitted, p.unit), format_eng(p.sigma, p.unit),
                    deviation_text(p.deviation), format_percent(p.data_share, 0),
                    std::string(status_words(p.status))});
  }
  out += columns(rows, {Align::left, Align::right, Align::right, Align::right, Align::right,
                        Align::right, Align::right, Align::left});
}

// The supply (one per capture) and the timer's own figures, under the leading explanation. The
// supply always shows; a chip figure only when the fit moved it beyond two of its prior's sigmas
// (the rest sit where the design or the family puts them, and --json lists them).
void figures_section(std::string& out, const Diagnosis& d) {
  std::vector<std::vector<std::string>> rows{
      {"figure", "nominal", "fitted", "+/- sigma", "from data", "status"}};
  std::size_t left_out = 0;
  for (const FittedPart& f : d.figures) {
    const bool supply = f.ref.starts_with("supply");
    if (!supply && f.status == PartStatus::in_spec) {
      ++left_out;
      continue;
    }
    rows.push_back({f.ref, format_eng(f.nominal, f.unit), format_eng(f.fitted, f.unit),
                    format_eng(f.sigma, f.unit), format_percent(f.data_share, 0),
                    f.status == PartStatus::in_spec ? "as expected" : "off its prior"});
  }
  if (rows.size() == 1) return;
  out += "\nsupply and timer figures as fitted\n";
  out += columns(
      rows, {Align::left, Align::right, Align::right, Align::right, Align::right, Align::left});
  if (left_out > 0) {
    out += fmt::format("  {} more timer figure{} as expected: --json lists them\n", left_out,
                       left_out == 1 ? "" : "s");
  }
}

// The explanations in one ranking: "all parts in tolerance" takes its place among the suspects.
void explanations_section(std::string& out, const Diagnosis& d) {
  if (d.suspects.empty() && !(d.healthy_probability > 0.0)) return;
  out += "\nexplanations, most probable first\n";
  std::vector<std::vector<std::string>> rows;
  bool healthy_shown = false, any_prior = false;
  auto healthy_row = [&] {  // no prior marker: a space keeps the percentages aligned
    rows.push_back(
        {probability_text(d.healthy_probability) + " ", "all parts", "in tolerance", ""});
    healthy_shown = true;
  };
  for (const Suspect& s : d.suspects) {
    if (!healthy_shown && d.healthy_probability >= s.probability) healthy_row();
    any_prior = any_prior || s.ranked_by_prior;
    rows.push_back({probability_text(s.probability) + (s.ranked_by_prior ? "*" : " "), s.ref,
                    std::string(kind_words(s.kind)), s.sentence});
  }
  if (!healthy_shown) healthy_row();
  out += columns(rows, {Align::right, Align::left, Align::left, Align::left});
  if (any_prior) {
    out += "  * ranked above the next by the priors: the data does not tell them apart\n";
  }
}

void lines_section(std::string& out, std::string_view title, const std::vector<std::string>& v) {
  if (v.empty()) return;
  out += fmt::format("\n{}\n", title);
  for (const std::string& s : v) out += fmt::format("  {}\n", s);
}

void findings_section(std::string& out, const FitReport& r) {
  for (const BoardCapture& c : r.captures) {
    if (c.measurement.findings.empty()) continue;
    out += fmt::format("\nfindings from {}\n", c.label);
    out += finding_lines(c.measurement.findings);
  }
}

std::string_view unit_of(const Design& design, const std::string& ref) {
  for (const Part& p : design.parts) {
    if (p.ref == ref) return p.role == PartRole::timing_cap ? "F" : "ohm";
  }
  return "";
}

void replacement_section(std::string& out, const FitReport& r) {
  const Diagnosis& d = r.diagnosis;
  if (!d.replacement) return;
  const Replacement& p = *d.replacement;
  const std::string_view unit = unit_of(r.design, p.ref);
  out += "\nreplacement\n";
  if (!p.sentence.empty()) {
    out += fmt::format("  {}\n", p.sentence);
    return;
  }
  out += fmt::format("  {} {} ({}; {} would be exact): period {} against the design's {}\n", p.ref,
                     format_eng(p.preferred, unit), p.series, format_eng(p.exact, unit),
                     format_eng(p.period_s, "s"), format_eng(p.design_period_s, "s"));
}

std::string_view phase_words(Phase p) { return p == Phase::charging ? "charging" : "discharging"; }

void phase_line(std::string& out, const PhaseFit& f) {
  if (f.status != FitStatus::ok) {
    out += fmt::format("  {}, all segments together: {}\n", phase_words(f.phase),
                       status_name(f.status));
    return;
  }
  out += fmt::format("  {}, {} segment{} together: tau {} +/- {} toward {}\n", phase_words(f.phase),
                     f.segments.size(), f.segments.size() == 1 ? "" : "s",
                     format_eng(f.tau_s.value, "s"), format_eng(f.tau_s.sigma, "s"),
                     format_eng(f.vinf_V.value, "V"));
}

void segments_section(std::string& out, const BoardCapture& c) {
  out += fmt::format("\nsegment fits, {}\n", c.label);
  if (!c.segments) {
    out += "  not fitted: the capacitor node was not captured\n";
    return;
  }
  const SegmentFitResult& f = *c.segments;
  if (f.segments.empty()) {
    out += "  no whole segment to fit\n";
    return;
  }
  std::vector<std::vector<std::string>> rows{
      {"#", "phase", "start", "tau", "+/- sigma", "toward", "from", "to", "status"}};
  for (std::size_t i = 0; i < f.segments.size(); ++i) {
    const SegmentFit& s = f.segments[i];
    rows.push_back({fmt::format("{}", i + 1), std::string(phase_words(s.window.phase)),
                    format_eng(s.window.start_s, "s"), format_eng(s.tau_s.value, "s"),
                    format_eng(s.tau_s.sigma, "s"), format_eng(s.vinf_V.value, "V"),
                    format_eng(s.start_V.value, "V"), format_eng(s.end_V.value, "V"),
                    std::string(status_name(s.status))});
  }
  out += columns(rows, {Align::right, Align::left, Align::right, Align::right, Align::right,
                        Align::right, Align::right, Align::right, Align::left});
  phase_line(out, f.charging);
  phase_line(out, f.discharging);
  out += fmt::format("  noise {} RMS\n", format_eng(f.noise_sigma_V, "V"));
}

}  // namespace

std::string fit_table(const FitReport& r, bool per_cycle) {
  const Diagnosis& d = r.diagnosis;
  std::string out;
  heading(out, r);
  parts_section(out, d);
  figures_section(out, d);
  explanations_section(out, d);
  lines_section(out, "fixed by the data", d.fixed);
  lines_section(out, "cannot be separated", d.unseparated);
  findings_section(out, r);
  lines_section(out, "measure next", d.next);
  replacement_section(out, r);
  if (!d.next.empty() || d.replacement) {
    out +=
        "\nBefore you measure in circuit or lift a part: power off, unplug a mains-powered board, "
        "and discharge its capacitors (benchtau safety has the rest; local codes and licensed "
        "practice come first).\n";
  }
  if (per_cycle) {
    for (const BoardCapture& c : r.captures) segments_section(out, c);
  }
  return out;
}

namespace {

void optional_text(JsonWriter& j, std::string_view key, const std::string& s) {
  j.key(key);
  if (s.empty()) {
    j.null();
  } else {
    j.value(s);
  }
}

void node_json(JsonWriter& j, std::string_view key, const BoardCapture& c,
               const std::optional<std::size_t>& k) {
  j.key(key);
  if (k && c.capture != nullptr) {
    j.value(c.capture->channels[*k].name);
  } else {
    j.null();
  }
}

void estimate_json(JsonWriter& j, std::string_view key, const Estimate& e) {
  j.key(key).begin_object();
  j.key("value").value(e.value).key("sigma").value(e.sigma);
  j.end_object();
}

void phase_json(JsonWriter& j, std::string_view key, const PhaseFit& f) {
  j.key(key).begin_object();
  j.key("status").value(status_name(f.status));
  j.key("segments").value(f.segments.size());
  estimate_json(j, "tau_s", f.tau_s);
  estimate_json(j, "vinf_V", f.vinf_V);
  estimate_json(j, "start_V", f.start_V);
  estimate_json(j, "end_V", f.end_V);
  j.key("rms_V").value(f.rms_V);
  j.end_object();
}

void segments_json(JsonWriter& j, const SegmentFitResult& f, bool per_cycle) {
  j.begin_object();
  j.key("noise_sigma_V").value(f.noise_sigma_V);
  j.key("rms_V").value(f.rms_V);
  phase_json(j, "charging", f.charging);
  phase_json(j, "discharging", f.discharging);
  if (per_cycle) {
    j.key("per_segment").begin_array();
    for (const SegmentFit& s : f.segments) {
      j.begin_object();
      j.key("phase").value(phase_words(s.window.phase));
      j.key("start_s").value(s.window.start_s).key("end_s").value(s.window.end_s);
      j.key("status").value(status_name(s.status));
      estimate_json(j, "tau_s", s.tau_s);
      estimate_json(j, "vinf_V", s.vinf_V);
      estimate_json(j, "start_V", s.start_V);
      estimate_json(j, "end_V", s.end_V);
      j.key("rms_V").value(s.rms_V);
      j.end_object();
    }
    j.end_array();
  }
  j.end_object();
}

void measurement_json(JsonWriter& j, const FitReport& r, std::size_t i, bool per_cycle) {
  const BoardCapture& c = r.captures[i];
  j.begin_object();
  j.key("label").value(c.label);
  j.key("change").begin_object();
  j.key("supply_V");
  if (c.change.supply_V) {
    j.value(*c.change.supply_V);
  } else {
    j.null();
  }
  optional_text(j, "across_ref", c.change.across_ref);
  j.key("across_ohm").value(c.change.across_ref.empty() ? NAN : c.change.across_ohm);
  j.end_object();
  j.key("nodes").begin_object();
  node_json(j, "out", c, c.nodes.out);
  node_json(j, "cap", c, c.nodes.cap);
  node_json(j, "ctl", c, c.nodes.ctl);
  j.end_object();
  optional_text(j, "edge_node", c.measurement.edge_node);
  j.key("summary");
  summary_json(j, c.measurement);
  j.key("findings");
  findings_json(j, c.measurement.findings);
  j.key("notes").begin_array();
  if (i < r.notes.size()) {
    for (const std::string& n : r.notes[i]) j.value(n);
  }
  j.end_array();
  j.key("segments");
  if (c.segments) {
    segments_json(j, *c.segments, per_cycle);
  } else {
    j.null();
  }
  j.end_object();
}

void fitted_json(JsonWriter& j, std::string_view key, const std::vector<FittedPart>& parts) {
  j.key(key).begin_array();
  for (const FittedPart& p : parts) {
    j.begin_object();
    j.key("ref").value(p.ref).key("unit").value(p.unit);
    j.key("nominal").value(p.nominal).key("tolerance").value(p.tolerance);
    j.key("fitted").value(p.fitted).key("sigma").value(p.sigma);
    j.key("deviation").value(p.deviation).key("data_share").value(p.data_share);
    j.key("status").value(part_status_name(p.status));
    j.end_object();
  }
  j.end_array();
}

void strings_json(JsonWriter& j, std::string_view key, const std::vector<std::string>& v) {
  j.key(key).begin_array();
  for (const std::string& s : v) j.value(s);
  j.end_array();
}

}  // namespace

std::string fit_json(const FitReport& r, bool per_cycle) {
  const Diagnosis& d = r.diagnosis;
  JsonWriter j;
  j.begin_object();
  j.key("schema").value("benchtau-fit-1");
  j.key("design").begin_object();
  j.key("source").value(r.design.source).key("name").value(r.design.name);
  j.end_object();
  j.key("verdict").value(verdict_name(d.verdict));
  j.key("reason").value(d.reason);
  optional_text(j, "mode", d.mode);
  j.key("healthy_probability").value(d.healthy_probability);
  j.key("chi2_per_dof").value(d.chi2_per_dof);
  fitted_json(j, "parts", d.parts);
  fitted_json(j, "figures", d.figures);
  j.key("suspects").begin_array();
  for (const Suspect& s : d.suspects) {
    j.begin_object();
    j.key("ref").value(s.ref).key("kind").value(suspect_kind_name(s.kind));
    j.key("probability").value(s.probability).key("sentence").value(s.sentence);
    j.key("fitted").value(s.fitted).key("sigma").value(s.sigma).key("unit").value(s.unit);
    j.key("ranked_by_prior").value(s.ranked_by_prior);
    j.end_object();
  }
  j.end_array();
  strings_json(j, "fixed", d.fixed);
  strings_json(j, "unseparated", d.unseparated);
  strings_json(j, "next", d.next);
  j.key("replacement");
  if (d.replacement) {
    const Replacement& p = *d.replacement;
    j.begin_object();
    j.key("ref").value(p.ref).key("series").value(p.series);
    j.key("exact").value(p.exact).key("preferred").value(p.preferred);
    j.key("period_s").value(p.period_s).key("design_period_s").value(p.design_period_s);
    j.key("sentence").value(p.sentence);
    j.end_object();
  } else {
    j.null();
  }
  j.key("measurements").begin_array();
  for (std::size_t i = 0; i < r.captures.size(); ++i) measurement_json(j, r, i, per_cycle);
  j.end_array();
  j.end_object();
  return j.str();
}

}  // namespace benchtau::cli
