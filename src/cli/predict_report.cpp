// benchtau: rendering a prediction, its spread and its design findings as a table and as JSON.
#include "src/cli/predict_report.h"

#include <fmt/format.h>

#include <cmath>

#include "src/cli/json_writer.h"
#include "src/core/engineering.h"

namespace benchtau::cli {
namespace {

bool is_mono(const Design& d) { return d.kind == CircuitKind::monostable; }

std::string V(double v) { return format_eng(v, "V"); }

struct Row {
  Output output;
  const char* label;
  const char* unit;  // "%" for a fraction shown as a percentage
};

constexpr Row kRows[] = {
    {Output::high_s, "high time", "s"}, {Output::low_s, "low time", "s"},
    {Output::period_s, "period", "s"},  {Output::frequency_Hz, "frequency", "Hz"},
    {Output::duty, "duty", "%"},        {Output::cap_max_V, "cap max", "V"},
    {Output::cap_min_V, "cap min", "V"}};

const char* label_of(const Row& r, bool mono) {
  if (mono && r.output == Output::high_s) return "pulse";
  if (mono && r.output == Output::low_s) return "recovery";
  return r.label;
}

std::string cell(double v, const char* unit) {
  return std::string(unit) == "%" ? format_percent(v, 2) : format_eng(v, unit);
}

std::string tolerance_text(const Variation& v) {
  const double up = (v.high - v.nominal) / v.nominal, down = (v.nominal - v.low) / v.nominal;
  if (v.field != nullptr && std::fabs(up - down) < 1e-9) {
    return fmt::format("+/- {}", format_percent(up, up < 0.01 ? 2 : 0));
  }
  return fmt::format("{} to {}", format_eng(v.low, ""), format_eng(v.high, ""));
}

std::string part_text(const Design& d, const Variation& v) {
  for (const Part& p : d.parts) {
    if (p.ref != v.name) continue;
    const bool diode = p.role == PartRole::diode || p.role == PartRole::led;
    const char* unit = diode ? "V" : (p.role == PartRole::timing_cap ? "F" : "ohm");
    return fmt::format("{} {} {}", p.ref, format_eng(v.nominal, unit), tolerance_text(v));
  }
  return fmt::format("{} {} ({})", v.name, format_eng(v.nominal, ""), tolerance_text(v));
}

void heading(std::string& out, const PredictReport& r) {
  const Design& d = r.design;
  out += fmt::format("{}: {}\n", d.source, d.name.empty() ? "(unnamed design)" : d.name);
  out += fmt::format("  {}, {} timer, {} supply; control {}, reset to {}\n",
                     circuit_kind_name(d.kind), family_name(d.family), format_eng(d.supply_V, "V"),
                     control_wiring_name(d.control),
                     d.reset == ResetWiring::supply ? "the supply"
                     : d.reset == ResetWiring::open ? "nothing (open)"
                                                    : reset_wiring_name(d.reset));
  std::string varied;
  for (const Variation& v : r.variations) {
    if (v.field == nullptr) continue;
    varied += (varied.empty() ? "" : ", ") + part_text(d, v);
  }
  if (!varied.empty()) out += fmt::format("  parts: {}\n", varied);
}

void nominal_section(std::string& out, const PredictReport& r) {
  const CyclePrediction& p = r.nominal;
  const bool mono = is_mono(r.design);
  const OutputValues v = outputs_of(p);
  out += "\nnominal\n";
  for (const Row& row : kRows) {
    if (std::isnan(v[static_cast<std::size_t>(row.output)])) continue;
    out += fmt::format("  {:<14} {:>10}\n", label_of(row, mono),
                       cell(v[static_cast<std::size_t>(row.output)], row.unit));
  }
  out += fmt::format("  {:<14} {:>10} high, {} low\n", "control pin", format_eng(p.ctl_high_V, "V"),
                     format_eng(p.ctl_low_V, "V"));
  out += fmt::format("  {:<14} {:>10} high, {} low\n", "output", format_eng(p.out_high_V, "V"),
                     format_eng(p.out_low_V, "V"));
}

void stop_section(std::string& out, const CyclePrediction& p, double reset_threshold_V) {
  out += fmt::format("\n{}\n", describe_stop(p));
  if (p.stop == Stop::no_timing_path || p.stop == Stop::unsupported_wiring) return;
  out += fmt::format("  {:<12} toward {}, upper threshold {}\n", "charging", V(p.high.target_V),
                     V(p.ctl_high_V));
  out += fmt::format("  {:<12} toward {}, lower threshold {}\n", "discharging", V(p.low.target_V),
                     V(0.5 * p.ctl_low_V));
  out += fmt::format("  {:<12} {} at its lowest, threshold {}\n", "reset pin", V(p.reset_min_V),
                     V(reset_threshold_V));
}

void spread_section(std::string& out, const PredictReport& r) {
  const bool mono = is_mono(r.design);
  const CornerSpread* k = r.corners;
  const MonteCarlo* mc = r.monte_carlo;
  if (k == nullptr) return;
  out += fmt::format("\nspread over the tolerances\n  {} worst-case corners ({})\n", k->corners,
                     k->exhaustive ? "every part at either end of its tolerance"
                                   : "by the signs of each part's effect: more than 12 parts");
  if (mc != nullptr) {
    out += fmt::format(
        "  {} Monte Carlo draws (seed {}), each part a normal with its tolerance "
        "at {:g} sigma\n  and truncated there (common practice){}\n",
        mc->draws, mc->seed, kSigmasPerTolerance,
        r.chip_spread ? "; the timer's own figures within their spreads" : "");
  }
  out += fmt::format("  {:<14} {:>11} {:>11}", "", "corner min", "corner max");
  if (mc != nullptr) out += fmt::format(" {:>11} {:>11}", "mean", "std");
  out += "\n";
  for (const Row& row : kRows) {
    const auto i = static_cast<std::size_t>(row.output);
    if (std::isnan(k->range[i].min)) continue;
    out += fmt::format("  {:<14} {:>11} {:>11}", label_of(row, mono),
                       cell(k->range[i].min, row.unit), cell(k->range[i].max, row.unit));
    if (mc != nullptr) {
      out += fmt::format(" {:>11} {:>11}", cell(mc->outputs[i].mean, row.unit),
                         cell(mc->outputs[i].std, row.unit));
    }
    out += "\n";
  }
  if (mc == nullptr) return;
  out += fmt::format("\nMonte Carlo percentiles\n  {:<14}", "");
  for (double q : kPercentiles) out += fmt::format(" {:>10}", fmt::format("{:g} %", q));
  out += "\n";
  for (const Row& row : kRows) {
    const auto i = static_cast<std::size_t>(row.output);
    if (mc->outputs[i].count == 0) continue;
    out += fmt::format("  {:<14}", label_of(row, mono));
    for (double v : mc->outputs[i].percentile) out += fmt::format(" {:>10}", cell(v, row.unit));
    out += "\n";
  }
  if (mc->stopped == 0) {
    out += "  every draw oscillates\n";
  } else {
    out += fmt::format("  {} of {} draws do not oscillate ({})\n", mc->stopped, mc->draws,
                       format_percent(mc->stopped_fraction(), 3));
  }
}

void findings_section(std::string& out, const Findings& findings) {
  bool any = false;
  for (const Finding& f : findings) {
    if (f.code == "no_oscillation") continue;  // said above, in full
    if (!any) out += "\nfindings\n";
    any = true;
    out += fmt::format("  {:<8} {}: {}\n", severity_name(f.severity), f.code, f.message);
  }
}

}  // namespace

std::string predict_table(const PredictReport& r) {
  std::string out;
  heading(out, r);
  if (r.nominal.oscillates) {
    nominal_section(out, r);
    spread_section(out, r);
  } else {
    stop_section(out, r.nominal, r.design.figures.reset_threshold_V);
  }
  findings_section(out, r.findings);
  return out;
}

namespace {

void range_json(JsonWriter& j, const CornerSpread& k) {
  j.key("corners").begin_object();
  j.key("method").value(k.exhaustive ? "every-corner" : "sensitivity-signs");
  j.key("varying").value(k.varying);
  j.key("count").value(k.corners);
  j.key("stopped").value(k.stopped);
  for (std::size_t i = 0; i < kOutputs; ++i) {
    j.key(output_key(static_cast<Output>(i))).begin_object();
    j.key("min").value(k.range[i].min).key("max").value(k.range[i].max);
    j.end_object();
  }
  j.end_object();
}

void monte_carlo_json(JsonWriter& j, const MonteCarlo& mc, bool chip_spread) {
  j.key("monte_carlo").begin_object();
  j.key("draws").value(mc.draws);
  j.key("seed").value(static_cast<double>(mc.seed));
  j.key("chip_spread").value(chip_spread);
  j.key("sigmas_per_tolerance").value(kSigmasPerTolerance);
  j.key("stopped").value(mc.stopped);
  j.key("stopped_fraction").value(mc.stopped_fraction());
  for (std::size_t i = 0; i < kOutputs; ++i) {
    const OutputStats& s = mc.outputs[i];
    j.key(output_key(static_cast<Output>(i))).begin_object();
    j.key("count").value(s.count).key("mean").value(s.mean).key("std").value(s.std);
    j.key("percentiles").begin_object();
    for (std::size_t q = 0; q < kPercentiles.size(); ++q) {
      j.key(fmt::format("{:g}", kPercentiles[q])).value(s.percentile[q]);
    }
    j.end_object();
    j.end_object();
  }
  j.end_object();
}

}  // namespace

std::string predict_json(const PredictReport& r) {
  const Design& d = r.design;
  const CyclePrediction& p = r.nominal;
  JsonWriter j;
  j.begin_object();
  j.key("schema").value("benchtau-predict-1");
  j.key("source").value(d.source);
  j.key("design").begin_object();
  j.key("name").value(d.name).key("kind").value(circuit_kind_name(d.kind));
  j.key("family").value(family_name(d.family)).key("supply_V").value(d.supply_V);
  j.key("control").value(control_wiring_name(d.control));
  j.key("reset").value(reset_wiring_name(d.reset));
  j.end_object();
  j.key("oscillates").value(p.oscillates);
  if (!p.oscillates) j.key("reason").value(describe_stop(p));
  const OutputValues v = outputs_of(p);
  j.key("nominal").begin_object();
  for (std::size_t i = 0; i < kOutputs; ++i) j.key(output_key(static_cast<Output>(i))).value(v[i]);
  const bool nodes =
      p.oscillates || (p.stop != Stop::no_timing_path && p.stop != Stop::unsupported_wiring);
  const double nan = std::nan("");
  j.key("ctl_high_V").value(nodes ? p.ctl_high_V : nan);
  j.key("ctl_low_V").value(nodes ? p.ctl_low_V : nan);
  j.key("out_high_V").value(p.oscillates ? p.out_high_V : nan);
  j.key("out_low_V").value(p.oscillates ? p.out_low_V : nan);
  j.key("charge_target_V").value(nodes ? p.high.target_V : nan);
  j.key("discharge_target_V").value(nodes ? p.low.target_V : nan);
  j.key("reset_min_V").value(p.reset_min_V);
  j.key("marginal").value(p.marginal);
  j.key("deciding_figure");
  if (p.marginal) {
    j.value(p.deciding_figure);
  } else {
    j.null();
  }
  j.end_object();
  j.key("variations").begin_array();
  for (const Variation& x : r.variations) {
    j.begin_object();
    j.key("name").value(x.name).key("nominal").value(x.nominal);
    j.key("low").value(x.low).key("high").value(x.high);
    j.end_object();
  }
  j.end_array();
  if (r.corners != nullptr) {
    range_json(j, *r.corners);
  } else {
    j.key("corners").null();
  }
  if (r.monte_carlo != nullptr) {
    monte_carlo_json(j, *r.monte_carlo, r.chip_spread);
  } else {
    j.key("monte_carlo").null();
  }
  j.key("findings").begin_array();
  for (const Finding& f : r.findings) {
    j.begin_object();
    j.key("code").value(f.code).key("severity").value(severity_name(f.severity));
    j.key("message").value(f.message);
    j.end_object();
  }
  j.end_array();
  j.end_object();
  return j.str();
}

}  // namespace benchtau::cli
