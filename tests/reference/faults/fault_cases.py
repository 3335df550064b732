# benchtau: the invented boards of the fault check and one seeded fault drawn for each case.
"""Boards and cases for the ngspice fault check.

A board is one circuit at one supply and period, with its nominal parts, their tolerances and
kinds, and the nodes a technician probed. A case is one built board: every part drawn within
its tolerance (a healthy board) or all but one drawn so and one seeded fault put in (capacitance
lost, a leakage resistance across the timing capacitor, one resistor drifted high, a load on
the control pin). Every draw comes from a fixed seed, so each run writes the same cases.

All boards and values are invented for this check.
"""
import dataclasses
import math

import numpy as np

# Kinds and tolerances as the design file names them. Part tolerances by kind are common
# practice of the trade (from memory): metal film 1 %, carbon film 5 %, film 5 %,
# electrolytic 20 %.
METAL_FILM = ("metal-film", 0.01)
CARBON_FILM = ("carbon-film", 0.05)
FILM = ("film", 0.05)
ELECTROLYTIC = ("electrolytic", 0.20)


@dataclasses.dataclass(frozen=True)
class Part:
    ref: str
    role: str
    value: float  # ohm or farad, nominal
    kind: str
    tolerance: float  # fraction
    rated_V: float = 0.0  # capacitors only


@dataclasses.dataclass(frozen=True)
class Board:
    name: str  # short label, also the case label's prefix
    circuit: str  # "two-resistor", "output-resistor", "diode-steered"
    supply_V: float
    parts: tuple
    probe_ctl: bool  # the control pin was captured too
    samples_per_period: int  # the fewest samples a period the scope's rate was set for
    drifting_ref: str  # the resistor that drifts in this board's drift case
    drift_range: tuple  # fractions (low, high) of the drift put in
    leak_range: tuple  # leakage as multiples of the charging resistance (low, high)


def _r(ref, role, value, kind):
    return Part(ref, role, value, kind[0], kind[1])


def _c(ref, value, kind, rated_V):
    return Part(ref, "timing-cap", value, kind[0], kind[1], rated_V)


# The diode-steered boards' steering diode: the piecewise-linear diode of
# timer_behavioural.lib at its defaults (0.6 V behind 10 ohm), which is also benchtau's.
DIODE_VF_V = 0.6
DIODE_OHM = 10.0

# Nine invented boards: three circuits, supplies 5 V to 15 V, periods about 100 us to 2 s.
# Drift ranges start where the drift can no longer hide inside the tolerances of the parts it
# trades against (a carbon-film board needs more); leakage ranges keep the capacitor's charge
# target well above the upper threshold, so that the faulty board still oscillates.
BOARDS = (
    Board("two-resistor-5V-100us", "two-resistor", 5.0,
          (_r("R1", "upper", 1e3, METAL_FILM), _r("R2", "lower", 6.8e3, METAL_FILM),
           _c("C1", 10e-9, FILM, 50.0)), False, 400, "R1", (0.15, 0.40), (4.0, 12.0)),
    Board("two-resistor-12V-12ms", "two-resistor", 12.0,
          (_r("R1", "upper", 10e3, METAL_FILM), _r("R2", "lower", 33e3, METAL_FILM),
           _c("C1", 220e-9, FILM, 63.0)), True, 400, "R2", (0.15, 0.40), (4.0, 12.0)),
    Board("two-resistor-15V-1.7s", "two-resistor", 15.0,
          (_r("R1", "upper", 47e3, CARBON_FILM), _r("R2", "lower", 100e3, CARBON_FILM),
           _c("C1", 10e-6, ELECTROLYTIC, 25.0)), False, 200, "R1", (0.25, 0.40), (4.0, 12.0)),
    Board("output-resistor-9V-110us", "output-resistor", 9.0,
          (_r("R1", "timing-res", 5.6e3, METAL_FILM), _c("C1", 10e-9, FILM, 50.0)), True, 400,
          "R1", (0.15, 0.40), (8.0, 20.0)),
    Board("output-resistor-12V-80ms", "output-resistor", 12.0,
          (_r("R1", "timing-res", 100e3, METAL_FILM), _c("C1", 470e-9, FILM, 63.0)), False,
          200, "R1", (0.15, 0.40), (8.0, 20.0)),
    Board("output-resistor-15V-1.7s", "output-resistor", 15.0,
          (_r("R1", "timing-res", 470e3, METAL_FILM), _c("C1", 2.2e-6, FILM, 63.0)), False,
          400, "R1", (0.15, 0.40), (8.0, 20.0)),
    Board("diode-steered-5V-1.1ms", "diode-steered", 5.0,
          (_r("R1", "upper", 10e3, METAL_FILM), _r("R2", "lower", 10e3, METAL_FILM),
           _c("C1", 68e-9, FILM, 50.0)), False, 400, "R2", (0.15, 0.40), (6.0, 15.0)),
    Board("diode-steered-9V-100us", "diode-steered", 9.0,
          (_r("R1", "upper", 4.7e3, METAL_FILM), _r("R2", "lower", 6.8e3, METAL_FILM),
           _c("C1", 12e-9, FILM, 50.0)), False, 200, "R1", (0.15, 0.40), (6.0, 15.0)),
    Board("diode-steered-12V-1.8s", "diode-steered", 12.0,
          (_r("R1", "upper", 100e3, METAL_FILM), _r("R2", "lower", 150e3, METAL_FILM),
           _c("C1", 10e-6, ELECTROLYTIC, 25.0)), True, 400, "R2", (0.15, 0.40), (6.0, 15.0)),
)

FAULTS = ("healthy", "healthy-2", "cap-lost", "cap-leakage", "resistor-drift",
          "control-load")


@dataclasses.dataclass
class Case:
    label: str
    board: Board
    fault: str
    values: dict  # ref -> the value put into the simulator
    leak_ohm: float = math.inf  # across the timing capacitor
    control_load_ohm: float = math.inf  # control pin to ground
    # What benchtau fit should name first: ref, kind and the true value of what it fits.
    expected_ref: str = ""
    expected_kind: str = ""
    true_value: float = math.nan
    unit: str = ""
    seed: int = 0


def timing_cap(board):
    return next(p for p in board.parts if p.role == "timing-cap")


def charging_ohm(board, values):
    """The resistance the capacitor charges through (what a leakage competes with)."""
    if board.circuit == "two-resistor":
        return values["R1"] + values["R2"]
    return values["R1"]


def _within_tolerance(rng, part, spread):
    """A built part: "healthy" draws uniformly over +/- 0.8 of the tolerance (a board at the
    edges of its parts' spread); "production" a normal with the tolerance at 3 sigma,
    truncated there (common practice)."""
    if spread == "healthy":
        return part.value * (1.0 + rng.uniform(-0.8, 0.8) * part.tolerance)
    while True:
        d = rng.normal(0.0, part.tolerance / 3.0)
        if abs(d) <= part.tolerance:
            return part.value * (1.0 + d)


def make_case(board_index, fault_index):
    board = BOARDS[board_index]
    fault = FAULTS[fault_index]
    seed = 1000 * board_index + fault_index + 7  # fixed: the same cases every run
    rng = np.random.default_rng(seed)
    spread = "healthy" if fault.startswith("healthy") else "production"
    values = {p.ref: _within_tolerance(rng, p, spread) for p in board.parts}
    case = Case(f"{board.name}-{fault}", board, fault, values, seed=seed)
    cap = timing_cap(board)
    if fault == "cap-lost":
        values[cap.ref] = cap.value * (1.0 - rng.uniform(0.30, 0.50))
        case.expected_ref, case.expected_kind = cap.ref, "value-low"
        case.true_value, case.unit = values[cap.ref], "F"
    elif fault == "cap-leakage":
        case.leak_ohm = rng.uniform(*board.leak_range) * charging_ohm(board, values)
        case.expected_ref, case.expected_kind = f"{cap.ref}-leakage", "leakage"
        case.true_value, case.unit = case.leak_ohm, "ohm"
    elif fault == "resistor-drift":
        ref = board.drifting_ref
        nominal = next(p.value for p in board.parts if p.ref == ref)
        values[ref] = nominal * (1.0 + rng.uniform(*board.drift_range))
        case.expected_ref, case.expected_kind = ref, "value-high"
        case.true_value, case.unit = values[ref], "ohm"
    elif fault == "control-load":
        case.control_load_ohm = math.exp(rng.uniform(math.log(10e3), math.log(100e3)))
        case.expected_ref, case.expected_kind = "control-pin-load", "unexpected-load"
        case.true_value, case.unit = case.control_load_ohm, "ohm"
    return case


def all_cases():
    return [make_case(b, f) for b in range(len(BOARDS)) for f in range(len(FAULTS))]
