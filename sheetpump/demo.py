"""The bundled demo: an invented baling press and four invented suppliers' gear pumps.

Everything here is invented for the demonstration — the machine, the suppliers, the pumps and their
figures. The datasheets are filled-in sheetpump templates, as a user would fill them, in each
supplier's own units (one in inch-pound units). Their performance tables are generated from Wilson
loss models with invented coefficients, rounded as a printed datasheet would round them.

What the demo is meant to show:

* **Marrow & Tepp MT-G28** — measured at three speeds and two oil viscosities: every duty pressure
  is within its ratings, but it warns: the press's 250 bar relief setting is above its 230 bar
  continuous rating, where a stalled press would hold it. Ranked first on cost.
* **Quillfeather QF-175** (inch-pound datasheet) — its intermittent rating allows only 10 % of the
  cycle above continuous pressure; the press spends 17.5 % there, so it fails although every
  pressure is inside its intermittent rating; and at the cold start its inlet is starved.
* **Orrin Gearworks OG-22** — cheap, but too small: after its leakage it delivers less than the
  fast approach, the compaction and the return need.
* **Sandlow SL-32** — passes every rating it states, at a higher price and more energy; it warns
  because its maximum inlet pressure is not stated and its table (one speed, one viscosity) is
  extrapolated to the duty.

Two invented series for the same press (:data:`SERIES`, one in inch-pound units) show ``sheetpump select``:
the demo writes the selection of their sizes beside the comparison of the four pumps
(``sheetpump compare`` also takes series workbooks: each stands for its proposed size).

:func:`write_inputs` and :func:`write_series` write the workbooks (the same generator writes the committed copies under
``workbooks/demo/``); :func:`run` checks and compares them into a folder.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .physics.wilson import WilsonModel
from .units import FLOW, POWER, PRESSURE, TORQUE, from_si, to_si

__all__ = ["APPLICATION_FILE", "PUMPS", "SERIES", "DemoResult", "run", "write_inputs", "write_series"]

APPLICATION_FILE = "baling-press.xlsx"

MACHINE: dict[str, tuple[Any, ...]] = {
    "name": ("Hollin Vale HV-4 baling press (invented)",),
    "drive_speed": (1470, "rpm"),  # a 4-pole 50 Hz motor under load
    "rotation": ("clockwise",),
    "motor_standard": ("IEC",),
    "relief_setting": (250, "bar"),
    "overshoot": (10, "%"),
    "oil_name": ("ISO VG 46 mineral oil",),
    "oil_grade": ("46",),
    "oil_viscosity_index": (100,),
    "oil_density": (870, "kg/m^3"),
    "oil_temperature": (50, "degC"),
    "cold_start_temperature": (5, "degC"),
    "cleanliness": ("17/15/12",),
    "inlet_pressure": (0.92, "bara"),
    "cycles_per_hour": (90,),
    "hours_per_year": (3000,),
    "evaluation_years": (8,),
    "energy_price": (0.22,),
    "currency": ("EUR",),
    "flow_margin": (5, "%"),
    "pressure_margin": (0, "%"),
    "speed_margin": (0, "%"),
    "suction_lift": (0.3, "m"),  # the pump sits on the tank lid, its inlet 0.3 m above the lowest oil level
    "suction_length": (1.2, "m"),
    "suction_diameter": (32, "mm"),
    "suction_fittings": ("entrance, elbow 90, ball valve",),
}

# name, duration [s], pressure [bar], flow [L/min], speed [rpm] (empty: drive speed),
# temperature [degC], inlet pressure [bara] (empty: the machine's)
DUTY: list[list[Any]] = [
    ["unload", 8, 12, 0, None, 45, None],
    ["fast approach", 6, 55, 36, None, 48, None],
    ["compact", 10, 185, 33, None, 52, None],
    ["final press", 4, 238, 18, None, 55, None],
    ["hold", 3, 242, 2, None, 55, None],
    ["decompress", 1, 90, 0, None, 55, None],
    ["return", 8, 70, 36, None, 50, None],
]


@dataclass(frozen=True)
class _Pump:
    file: str
    values: dict[str, tuple[Any, ...]]
    model: WilsonModel
    speeds_rpm: tuple[float, ...]
    viscosities_cst: tuple[float, ...]
    pressures: tuple[float, ...]  # in the datasheet's pressure unit
    units: dict[str, str]  # pressure, flow, power or torque, speed, viscosity units of the table
    power_column: str  # "input power" or "torque"


def _identity(supplier: str, model: str, note: str) -> dict[str, tuple[Any, ...]]:
    return {"supplier": (supplier,), "model": (model,),
            "source_note": (f"invented demo data ({note})",)}


PUMPS: tuple[_Pump, ...] = (
    _Pump(
        "marrow-tepp-mt-g28.xlsx",
        {**_identity("Marrow & Tepp Hydraulics", "MT-G28", "catalogue sheet 4.2, invented"),
         "displacement": (28.0, "cm^3/rev"), "speed_min": (500, "rpm"), "speed_max": (3000, "rpm"),
         "speed_rated": (1500, "rpm"), "pressure_continuous": (230, "bar"), "pressure_intermittent": (260, "bar"),
         "intermittent_max_duration": (15, "s"), "intermittent_max_share": (20, "%"), "pressure_peak": (280, "bar"),
         "inlet_pressure_min": (0.8, "bara"), "inlet_pressure_max": (3, "bara"),
         "viscosity_min": (10, "mm^2/s"), "viscosity_max": (300, "mm^2/s"), "viscosity_min_short": (8, "mm^2/s"),
         "viscosity_max_cold_start": (1000, "mm^2/s"), "temperature_min": (-20, "degC"),
         "temperature_max": (80, "degC"), "cleanliness": ("19/17/14",), "rotation": ("clockwise",),
         "torque_max": (180, "N*m"), "teeth": (12,), "price": (540,), "mass": (6.2, "kg"), "noise": (66,)},
        WilsonModel(28e-6, c_s=1.2e-8, c_f=0.045, c_v=9.0e4, t_c=0.9),
        (1000.0, 1500.0, 2000.0), (20.0, 46.0), (10, 50, 100, 150, 200, 250),
        {"pressure": "bar", "flow": "L/min", "power": "kW", "speed": "rpm", "viscosity": "mm^2/s"},
        "input power",
    ),
    _Pump(
        "quillfeather-qf-175.xlsx",
        {**_identity("Quillfeather Fluid Power", "QF-175", "inch-pound catalogue, invented"),
         "displacement": (1.75, "in^3/rev"), "speed_min": (600, "rpm"), "speed_max": (3400, "rpm"),
         "speed_rated": (1800, "rpm"), "pressure_continuous": (3200, "psi"), "pressure_intermittent": (3700, "psi"),
         "intermittent_max_duration": (10, "s"), "intermittent_max_share": (10, "%"),
         "pressure_peak": (4000, "psi"), "inlet_pressure_min": (12.5, "psia"), "inlet_pressure_max": (44, "psia"),
         "viscosity_min": (10, "cSt"), "viscosity_max": (400, "cSt"), "viscosity_min_short": (7, "cSt"),
         "viscosity_max_cold_start": (1600, "cSt"), "temperature_min": (-4, "degF"),
         "temperature_max": (180, "degF"), "cleanliness": ("18/16/13",), "rotation": ("clockwise",),
         "torque_max": (110, "lbf*ft"), "teeth": (11,), "price": (495,), "mass": (14.5, "lb"), "noise": (68,)},
        WilsonModel(28.68e-6, c_s=1.5e-8, c_f=0.05, c_v=1.1e5, t_c=1.2),
        (1800.0,), (32.0,), (150, 750, 1500, 2250, 3000, 3600),
        {"pressure": "psi", "flow": "gpm", "power": "hp", "speed": "rpm", "viscosity": "cSt"},
        "input power",
    ),
    _Pump(
        "orrin-og-22.xlsx",
        {**_identity("Orrin Gearworks", "OG-22", "price list 2026, invented"),
         "displacement": (22.0, "cm^3/rev"), "speed_min": (600, "rpm"), "speed_max": (3000, "rpm"),
         "pressure_continuous": (250, "bar"), "pressure_intermittent": (270, "bar"),
         "intermittent_max_duration": (20, "s"), "intermittent_max_share": (25, "%"), "pressure_peak": (290, "bar"),
         "inlet_pressure_min": (0.8, "bara"), "viscosity_min": (10, "mm^2/s"), "viscosity_max": (250, "mm^2/s"),
         "viscosity_min_short": (8, "mm^2/s"), "viscosity_max_cold_start": (800, "mm^2/s"),
         "temperature_min": (-15, "degC"), "temperature_max": (80, "degC"), "cleanliness": ("18/16/13",),
         "rotation": ("clockwise",), "teeth": (10,), "price": (310,), "mass": (4.9, "kg"), "noise": (70,)},
        WilsonModel(22e-6, c_s=1.6e-8, c_f=0.05, c_v=1.0e5, t_c=0.8),
        (1500.0,), (32.0,), (10, 50, 100, 150, 200, 250),
        {"pressure": "bar", "flow": "L/min", "power": "kW", "speed": "rpm", "viscosity": "mm^2/s"},
        "input power",
    ),
    _Pump(
        "sandlow-sl-32.xlsx",
        {**_identity("Sandlow Pumpen", "SL-32", "data sheet rev. C, invented"),
         "displacement": (32.0, "cm^3/rev"), "speed_min": (400, "rpm"), "speed_max": (2800, "rpm"),
         "speed_rated": (1500, "rpm"), "speed_min_high_pressure": (800, "rpm"),
         "high_pressure_threshold": (200, "bar"), "pressure_continuous": (250, "bar"),
         "pressure_intermittent": (280, "bar"),
         "intermittent_max_duration": (20, "s"), "intermittent_max_share": (20, "%"), "pressure_peak": (300, "bar"),
         "inlet_pressure_min": (0.7, "bara"), "viscosity_min": (12, "mm^2/s"), "viscosity_max": (300, "mm^2/s"),
         "viscosity_min_short": (8, "mm^2/s"), "viscosity_max_cold_start": (1000, "mm^2/s"),
         "temperature_min": (-20, "degC"), "temperature_max": (90, "degC"), "cleanliness": ("20/18/15",),
         "rotation": ("either",), "torque_max": (220, "N*m"), "teeth": (13,), "price": (780,), "mass": (8.1, "kg"),
         "noise": (64,)},
        WilsonModel(32e-6, c_s=1.1e-8, c_f=0.05, c_v=1.0e5, t_c=1.1),
        (1500.0,), (32.0,), (10, 50, 100, 150, 200, 250, 280),
        {"pressure": "bar", "flow": "L/min", "torque": "N*m", "speed": "rpm", "viscosity": "mm^2/s"},
        "torque",
    ),
)


#: Density of the suppliers' test oil [kg/m³] (invented), turning their tables' viscosities into μ.
TEST_OIL_DENSITY = 870.0

def _table(pump: _Pump) -> tuple[list[str], list[list[Any]]]:
    """The performance table: header texts and rows, rounded as a printed datasheet would be."""
    u = pump.units
    headers = [f"pressure [{u['pressure']}]", f"flow [{u['flow']}]",
               f"input power [{u['power']}]" if "power" in u else "input power [kW]",
               f"torque [{u['torque']}]" if "torque" in u else "torque [N*m]",
               f"speed [{u['speed']}]", f"viscosity [{u['viscosity']}]"]
    rows: list[list[Any]] = []
    for nu_cst in pump.viscosities_cst:
        mu = nu_cst * 1e-6 * TEST_OIL_DENSITY
        for n_rpm in pump.speeds_rpm:
            for p in pump.pressures:
                p_si = float(to_si(f"{p} {u['pressure']}", PRESSURE, "pressure"))
                pred = pump.model.predict(n_rpm / 60.0, p_si, mu)
                flow = round(float(from_si(float(pred.flow), FLOW, u["flow"])), 2)
                if pump.power_column == "input power":
                    power = round(float(from_si(float(pred.input_power), POWER, u["power"])), 2)
                    rows.append([p, flow, power, None, n_rpm, nu_cst])
                else:
                    torque = round(float(from_si(float(pred.torque), TORQUE, u["torque"])), 1)
                    rows.append([p, flow, None, torque, n_rpm, nu_cst])
    return headers, rows


@dataclass(frozen=True)
class _Series:
    """An invented series: Series-sheet values (key -> (unit, per-size values; one value: every size)) and
    the frames whose reference size has a generated performance table (model -> Wilson model)."""

    file: str
    values: dict[str, tuple[str | None, list[Any]]]
    tables: dict[str, WilsonModel]


#: Two invented series for the same press (see the module docstring of :mod:`sheetpump.selection`).
#:
#: * **Brenlow BG2** (metric, 6 sizes in two frames, a performance table per frame scaled to its other
#:   sizes): 16, 20 and 25 cm³/rev deliver too little (25 x 1.47 = 36.8 L/min even without leakage, below
#:   37.8 L/min); 36 cm³/rev is rated lower (a wider gear in the same frame); 28 cm³/rev is proposed;
#:   32 cm³/rev, next up, draws more flow through the press's suction line than its inlet allows at the
#:   5 °C cold start (bigger is not safer on the suction side).
#: * **Tollbridge TX** (inch-pound, 8 sizes, stated efficiencies): up to 1.5 in³/rev too little flow;
#:   1.75 in³/rev delivers enough but its frame allows only 10 % of the cycle above its continuous rating
#:   (the press spends 17.5 % there); 2.0 in³/rev, in the stronger frame, is proposed; 2.5 in³/rev
#:   starves at the cold start.
SERIES: tuple[_Series, ...] = (
    _Series(
        "series-brenlow-bg2.xlsx",
        {"supplier": (None, ["Brenlow Fluidtechnik"]), "series": (None, ["BG2"]),
         "model": (None, ["BG2-16", "BG2-20", "BG2-25", "BG2-28", "BG2-32", "BG2-36"]),
         "frame": (None, ["2A", "2A", "2A", "2B", "2B", "2B"]),
         "source_note": (None, ["invented demo data (series catalogue, invented)"]),
         "displacement": ("cm^3/rev", [16, 20, 25, 28, 32, 36]),
         "speed_min": ("rpm", [500]), "speed_max": ("rpm", [3500, 3300, 3000, 3000, 2800, 2500]),
         "speed_rated": ("rpm", [1500]),
         "pressure_continuous": ("bar", [250, 250, 250, 250, 250, 210]),
         "pressure_intermittent": ("bar", [275, 275, 275, 275, 275, 230]),
         "intermittent_max_duration": ("s", [15]), "intermittent_max_share": ("%", [20]),
         "pressure_peak": ("bar", [290, 290, 290, 290, 290, 250]),
         "inlet_pressure_min": ("bara", [0.8]), "inlet_pressure_max": ("bara", [3]),
         "viscosity_min": ("mm^2/s", [10]), "viscosity_max": ("mm^2/s", [300]),
         "viscosity_min_short": ("mm^2/s", [8]), "viscosity_max_cold_start": ("mm^2/s", [1000]),
         "temperature_min": ("degC", [-20]), "temperature_max": ("degC", [80]),
         "cleanliness": (None, ["19/17/14"]), "rotation": (None, ["clockwise"]),
         "teeth": (None, [12]), "price": ("currency", [280, 300, 320, 360, 390, 420]),
         "mass": ("kg", [4.1, 4.5, 5.0, 6.0, 6.5, 7.0]), "noise": ("dB(A)", [64, 65, 66, 66, 67, 68])},
        {"BG2-20": WilsonModel(20e-6, c_s=1.2e-8, c_f=0.045, c_v=9.0e4, t_c=0.7),
         "BG2-32": WilsonModel(32e-6, c_s=1.2e-8, c_f=0.045, c_v=9.0e4, t_c=1.0)},
    ),
    _Series(
        "series-tollbridge-tx.xlsx",
        {"supplier": (None, ["Tollbridge Pump Co."]), "series": (None, ["TX"]),
         "model": (None, ["TX-060", "TX-080", "TX-100", "TX-125", "TX-150", "TX-175", "TX-200", "TX-250"]),
         "frame": (None, ["1", "1", "1", "2", "2", "2", "3", "3"]),
         "source_note": (None, ["invented demo data (inch-pound catalogue, invented)"]),
         "displacement": ("in^3/rev", [0.6, 0.8, 1.0, 1.25, 1.5, 1.75, 2.0, 2.5]),
         "speed_min": ("rpm", [600]), "speed_max": ("rpm", [3600, 3600, 3400, 3400, 3200, 3000, 3000, 2800]),
         "pressure_continuous": ("psi", [3600, 3600, 3600, 3600, 3600, 3300, 3600, 3600]),
         "pressure_intermittent": ("psi", [3900, 3900, 3900, 3900, 3900, 3700, 3900, 3900]),
         "intermittent_max_duration": ("s", [10, 10, 10, 10, 10, 10, 20, 20]),
         "intermittent_max_share": ("%", [10, 10, 10, 10, 10, 10, 20, 20]),
         "pressure_peak": ("psi", [4200, 4200, 4200, 4200, 4200, 4100, 4300, 4300]),
         "inlet_pressure_min": ("psia", [11.0]),
         "viscosity_min": ("cSt", [10]), "viscosity_max": ("cSt", [400]), "viscosity_min_short": ("cSt", [7]),
         "viscosity_max_cold_start": ("cSt", [1600]),
         "temperature_min": ("degF", [-4]), "temperature_max": ("degF", [180]),
         "cleanliness": (None, ["18/16/13"]), "rotation": (None, ["either"]),
         "volumetric_efficiency": ("%", [90]), "total_efficiency": ("%", [80]),
         "price": ("currency", [230, 250, 275, 300, 330, 360, 420, 470]),
         "mass": ("lb", [7.5, 8.2, 9.0, 10.8, 11.9, 13.0, 16.5, 18.8])},
        {},
    ),
)


def _series_table(series: _Series) -> list[list[Any]]:
    """Performance rows (model, pressure [bar], flow [L/min], input power [kW], -, speed, viscosity) of each
    frame's reference size, rounded as a printed catalogue would round them."""
    rows: list[list[Any]] = []
    for model, wilson in series.tables.items():
        for nu_cst in (20.0, 46.0):
            for n_rpm in (1000.0, 1500.0, 2000.0):
                for p_bar in (10, 50, 100, 150, 200, 250):
                    pred = wilson.predict(n_rpm / 60.0, p_bar * 1e5, nu_cst * 1e-6 * TEST_OIL_DENSITY)
                    rows.append([model, p_bar, round(float(pred.flow) * 60000, 2),
                                 round(float(pred.input_power) / 1000, 2), None, n_rpm, nu_cst])
    return rows


def write_inputs(folder: str | os.PathLike[str]) -> list[Path]:
    """Write the demo's application and datasheet workbooks into ``folder``; returns their paths."""
    from .files import make_folder
    from .workbooks.templates import DUTY_COLUMNS, write_template

    folder = make_folder(folder)
    paths = [write_template("application", folder / APPLICATION_FILE, MACHINE, DUTY,
                            [c.header for c in DUTY_COLUMNS])]
    for pump in PUMPS:
        headers, rows = _table(pump)
        paths.append(write_template("datasheet", folder / pump.file, pump.values, rows, headers))
    return paths


def write_series(folder: str | os.PathLike[str]) -> list[Path]:
    """Write the demo's series workbooks (:data:`SERIES`) into ``folder``; returns their paths."""
    from .files import make_folder
    from .workbooks.size_series import write_series_template

    folder = make_folder(folder)
    return [write_series_template(folder / s.file, s.values, _series_table(s)) for s in SERIES]


@dataclass(frozen=True)
class DemoResult:
    """Where the demo wrote its files."""

    folder: Path
    inputs: list[Path]
    comparison: Path
    report: Path
    verdicts: dict[str, str]
    selection: Path | None = None
    proposals: dict[str, str | None] | None = None  # series -> proposed model (None: no size passes)


def _new_folder(base: Path) -> Path:
    candidate, n = base, 1
    while candidate.exists():
        n += 1
        candidate = base.with_name(f"{base.name}-{n}")
    return candidate


def run(folder: str | os.PathLike[str] | None = None) -> DemoResult:
    """Write the demo inputs, check every pump and write the comparison and a report into ``folder``.

    Without ``folder`` a new folder ``sheetpump-demo`` (or ``-2``, ``-3`` …) in the current directory.
    """
    from .files import atomic_write
    from .pipeline import compare_files, select_files
    from .reports.text import text_report

    out = Path(folder) if folder is not None else _new_folder(Path.cwd() / "sheetpump-demo")
    inputs = write_inputs(out / "inputs")
    comparison = out / "comparison.xlsx"
    comp = compare_files(str(inputs[0]), [str(p) for p in inputs[1:]], comparison)
    series_paths = write_series(out / "inputs")
    selection = out / "selection.xlsx"
    sel = select_files(str(inputs[0]), [str(p) for p in series_paths], output=selection).selection
    report = out / "report.txt"
    atomic_write(report, text_report(comp, strict=False))  # the report ends with the caution
    return DemoResult(out, inputs, comparison, report,
                      {c.datasheet.label: c.result.verdict for c in comp.candidates}, selection,
                      {ch.series.name: ch.choice.datasheet.model if ch.choice else None for ch in sel.choices})
