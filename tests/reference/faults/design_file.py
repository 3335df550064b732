# benchtau: the design file (TOML) of a fault case: the board as drawn, or as it was built.
"""Design files as README.md's "Design files" section describes them.

The drawn design holds the nominal parts with their tolerances and kinds, as a technician has
it from the schematic: it knows nothing of the fault. The as-built design holds the values that
went into the simulator (and a control-pin load as a load-to-ground resistor), so that
`benchtau predict` on it can be set against ngspice; a leakage across the capacitor has no
place in a design file, so a leaky board has no as-built design.
"""
import math

from fault_cases import DIODE_VF_V
from spice_case import MODEL

PREFIXES = ((1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m"), (1e-6, "u"), (1e-9, "n"),
            (1e-12, "p"))


def engineering(value):
    """A part value as it is printed on a schematic: "10k", "6k8", "2u2", "470n"."""
    for scale, prefix in PREFIXES:
        if value >= scale * (1.0 - 1e-9):
            m = round(value / scale, 6)
            if m == int(m):
                return f"{int(m)}{prefix}"
            whole, frac = f"{m:.6g}".split(".")
            return f"{whole}{prefix or '.'}{frac}"
    return f"{value:.6g}"


def _part_line(part, value, exact):
    shown = f"{value:.12g}" if exact else f'"{engineering(value)}"'
    fields = [f"value = {shown}", f'tolerance = "{100.0 * part.tolerance:g}%"',
              f'kind = "{part.kind}"']
    if part.rated_V:
        fields.append(f"rated_V = {part.rated_V:g}")
    fields.append(f'role = "{part.role}"')
    return f"{part.ref} = {{ {', '.join(fields)} }}"


KIND = {
    "two-resistor": "astable-two-resistor",
    "output-resistor": "astable-output-resistor",
    "diode-steered": "astable-diode-steered",
}


def _text(case, as_built):
    b = case.board
    loaded = as_built and math.isfinite(case.control_load_ohm)
    what = "as built (the simulator's values)" if as_built else "as drawn (nominal parts)"
    lines = [
        f"# Fault check case {case.label}: an invented board, {what}.",
        "# Written by tests/reference/faults/simulate_cases.py.",
        f'name = "{b.name}"',
        f"supply_V = {b.supply_V:g}",
        'family = "bipolar"',
        "",
        "[circuit]",
        f'kind = "{KIND[b.circuit]}"',
        f'control = "{"load-to-ground" if loaded else "decoupled"}"',
        'reset = "supply"',
        "",
        "# The behavioural timer's own figures (tests/reference/spice/timer_behavioural.lib);",
        "# it has no input currents and switches in about 1 ns.",
        "[timer]",
    ]
    lines += [f"{k} = {v:g}" for k, v in MODEL.items()]
    lines += ["threshold_current_A = 0", "trigger_current_A = 0", "propagation_delay_s = 0", "",
              "[parts]"]
    for part in b.parts:
        lines.append(_part_line(part, case.values[part.ref] if as_built else part.value,
                                as_built))
    if b.circuit == "diode-steered":
        # benchtau's diode is vf_V behind 10 ohm, as the netlist's diode_pwl.
        lines.append(f'D1 = {{ vf_V = {DIODE_VF_V:g}, kind = "signal-diode", role = "diode" }}')
    if loaded:
        lines.append(f'R9 = {{ value = {case.control_load_ohm:.12g}, tolerance = "1%", '
                     'kind = "metal-film", role = "control-res" }')
    lines += ["", "# x10 scope probes on every captured node", "[capture]", 'out = "out (V)"',
              'cap = "cap (V)"']
    if b.probe_ctl:
        lines.append('ctl = "ctl (V)"')
    lines += ['out_input_ohm = "10M"', 'cap_input_ohm = "10M"']
    if b.probe_ctl:
        lines.append('ctl_input_ohm = "10M"')
    return "\n".join(lines) + "\n"


def write(path, case, as_built=False):
    """Writes the design; returns False (writing nothing) for an as-built leaky board."""
    if as_built and math.isfinite(case.leak_ohm):
        return False
    with open(path, "w") as f:
        f.write(_text(case, as_built))
    return True
