"""The rating checker on a measured duty log of 1,000,000 samples, against the same rules by hand.

The log is invented: a press cycle of 20 s sampled at 1 kHz (50 cycles): idle, a pressure ramp, holds
above the continuous rating (intermittent stretches), a short spike, flow and speed that dip with the
pressure, oil warming through the log, inlet pressure with noise. The datasheet is an invented gear pump
with single stated efficiencies (no performance table), an intermittent rating with a longest stretch and
a share of the cycle, inlet, viscosity, temperature and shaft-torque limits.

References, computing the same comparisons the checker reports (count outside, worst value, stretch
lengths and share, the Walther viscosity at each sample's temperature, torque, RMS power):

* one numpy pass over the arrays (``p > limit`` masks, stretch edges by ``np.diff`` of the mask and
  lengths from a cumulative sum of durations), the checker held to at most 10 times its time;
* a plain Python loop over the samples (lists of floats, so no numpy scalars in the loop) doing the same
  rules sample by sample, run on a 100,000-sample slice and scaled by 10; the checker must be at least 100
  times faster.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from sheetpump.checks import check
from sheetpump.datasheet import Datasheet
from sheetpump.duty import Application, Duty, Oil
from sheetpump.physics import fluid
from sheetpump.suction import SuctionLine

from .common import compare, median_time, row

N = 1_000_000
DT = 1e-3  # s, 1 kHz logger
BAR = 1e5


def invented_log(n: int = N) -> Duty:
    rng = np.random.default_rng(7)
    t = np.arange(n) * DT
    phase = (t % 20.0) / 20.0
    p = np.select([phase < 0.3, phase < 0.4, phase < 0.55, phase < 0.56, phase < 0.8],
                  [20.0, 20.0 + (phase - 0.3) * 2300.0, 265.0, 305.0, 180.0], 40.0) * BAR
    p = np.maximum(p + rng.normal(0.0, 2.0 * BAR, n), 0.0)
    speed = 1500.0 / 60.0 - (p / (300 * BAR)) * 0.5 + rng.normal(0.0, 0.05, n)
    flow = np.where(phase < 0.3, 10.0, 38.0) / 60000.0 + rng.normal(0.0, 0.1 / 60000.0, n)
    temp = 273.15 + 35.0 + 20.0 * t / t[-1] + rng.normal(0.0, 0.2, n)
    inlet = 0.95e5 + rng.normal(0.0, 0.01e5, n)
    duration = np.full(n, DT)
    return Duty(duration=duration, pressure=p, flow=np.abs(flow), speed=speed, temperature=temp,
                inlet_pressure=inlet, start=t, wraps=True, source="series")


DATASHEET = Datasheet(
    "Invented Hydraulics", "GX-28", 28e-6, 500 / 60, 3000 / 60, 250e5, 300e5,
    pressure_intermittent=280e5, intermittent_max_duration=5.0, intermittent_max_share=0.2,
    inlet_pressure_min=0.8e5, inlet_pressure_max=3e5, viscosity_min=10e-6, viscosity_max=100e-6,
    viscosity_min_short=8e-6, viscosity_max_cold_start=1000e-6, temperature_min=253.15,
    temperature_max=353.15, torque_max=160.0, volumetric_efficiency=0.93, total_efficiency=0.85)
OIL = Oil(46e-6, 313.15, 6.8e-6, 373.15)  # an ISO VG 46 mineral oil (invented)


#: An invented suction line: 0.3 m lift, 1.2 m of 32 mm, K1 = 1100 and K∞ = 1.3 (entrance, elbow, ball valve).
LINE = SuctionLine(0.032, 1.2, 0.3, 101325.0, 1100.0, 1.3, "entrance, elbow 90, ball valve")


def _application(duty: Duty, line: SuctionLine | None = None) -> Application:
    return Application("invented press", duty, OIL, relief_setting=260e5, suction=line,
                       cold_start_temperature=278.15 if line is not None else None)


def numpy_line(duty: Duty, ds: Datasheet = DATASHEET, line: SuctionLine = LINE) -> dict[str, Any]:
    """The suction line's inlet pressure by hand in numpy (the flow stays laminar: 64/Re), and its rules."""
    out = numpy_rules(duty, ds)
    nu = fluid.viscosity_at(duty.temperature, OIL.nu1, OIL.t1, OIL.nu2, OIL.t2)
    q = ds.displacement * duty.speed
    v = q / (math.pi * line.diameter**2 / 4)
    re = v * line.diameter / nu
    head = 0.5 * OIL.density_15 * v * v
    inlet = (line.reservoir_pressure - OIL.density_15 * 9.80665 * line.lift
             - (64 / re * line.length / line.diameter + line.k_re / re + line.k_inf + 1) * head)
    out["inlet"] = int(np.count_nonzero((inlet < ds.inlet_pressure_min) | (inlet > ds.inlet_pressure_max)))
    out["velocity"] = int(np.count_nonzero(v > 1.2)), float(inlet.min()), float(re.max())
    return out


def numpy_rules(duty: Duty, ds: Datasheet = DATASHEET) -> dict[str, Any]:
    """The checker's comparisons in one numpy pass over the arrays."""
    p, n, q, temp, inlet, dur = (duty.pressure, duty.speed, duty.flow, duty.temperature,
                                 duty.inlet_pressure, duty.duration)
    cycle = dur.sum()
    out: dict[str, Any] = {}
    running = n > 0
    out["speed.min"] = int(np.count_nonzero(running & (n < ds.speed_min))), n.min()
    out["speed.max"] = int(np.count_nonzero(n > ds.speed_max)), n.max()
    above = p > ds.pressure_continuous
    edges = np.diff(np.concatenate(([0], above.view(np.int8), [0])))
    first, stop = np.flatnonzero(edges == 1), np.flatnonzero(edges == -1)
    cum = np.concatenate(([0.0], np.cumsum(dur)))
    length = cum[stop] - cum[first]
    if duty.wraps and first.size > 1 and first[0] == 0 and stop[-1] == len(p):
        length = np.concatenate(([length[0] + length[-1]], length[1:-1]))
    out["pressure.intermittent"] = int(np.count_nonzero(above & (p > ds.pressure_intermittent)))
    out["pressure.intermittent-duration"] = length.max() if length.size else 0.0
    out["pressure.intermittent-share"] = length.sum() / cycle
    out["pressure.peak"] = int(np.count_nonzero(p > ds.pressure_peak)), p.max()
    delivered = (ds.displacement * ds.volumetric_efficiency) * n
    out["flow.delivered"] = int(np.count_nonzero((q > 0) & (delivered < q))), np.min(delivered - q)
    out["inlet"] = int(np.count_nonzero((inlet < ds.inlet_pressure_min) | (inlet > ds.inlet_pressure_max)))
    nu = fluid.viscosity_at(temp, OIL.nu1, OIL.t1, OIL.nu2, OIL.t2)
    out["viscosity"] = int(np.count_nonzero(running & ((nu < ds.viscosity_min) | (nu > ds.viscosity_max))))
    out["temperature"] = int(np.count_nonzero((temp < ds.temperature_min) | (temp > ds.temperature_max)))
    eta_hm = ds.total_efficiency / ds.volumetric_efficiency
    torque = (ds.displacement / (2 * math.pi * eta_hm)) * p
    out["torque.max"] = int(np.count_nonzero(torque > ds.torque_max)), torque.max()
    power = torque * (2 * math.pi * n)
    out["drive"] = math.sqrt(np.dot(power * power, dur) / cycle), power.max()
    return out


def loop_rules(p: list[float], n: list[float], q: list[float], temp: list[float], inlet: list[float],
               dur: list[float], ds: Datasheet = DATASHEET) -> dict[str, Any]:
    """The same rules in a plain Python loop, sample by sample."""
    a, b = fluid.walther_coefficients(OIL.nu1, OIL.t1, OIL.nu2, OIL.t2)
    eta_hm = ds.total_efficiency / ds.volumetric_efficiency
    cycle = sum(dur)
    slow = fast = peak = inter = flow_bad = inlet_bad = visc_bad = temp_bad = torque_bad = 0
    n_min, n_max, p_max, t_max = math.inf, -math.inf, -math.inf, -math.inf
    stretches: list[float] = []
    run = 0.0
    energy2 = 0.0
    power_max = -math.inf
    for pi, ni, qi, ti, ii, di in zip(p, n, q, temp, inlet, dur, strict=True):
        n_min, n_max, p_max = min(n_min, ni), max(n_max, ni), max(p_max, pi)
        if ni > 0 and ni < ds.speed_min:
            slow += 1
        if ni > ds.speed_max:
            fast += 1
        if pi > ds.pressure_continuous:
            run += di
            if pi > ds.pressure_intermittent:
                inter += 1
        elif run:
            stretches.append(run)
            run = 0.0
        if pi > ds.pressure_peak:
            peak += 1
        if qi > 0 and ds.displacement * ds.volumetric_efficiency * ni < qi:
            flow_bad += 1
        if ii < ds.inlet_pressure_min or ii > ds.inlet_pressure_max:
            inlet_bad += 1
        nu = (10.0 ** (10.0 ** (a - b * math.log10(ti))) - 0.7) * 1e-6
        if ni > 0 and (nu < ds.viscosity_min or nu > ds.viscosity_max):
            visc_bad += 1
        if ti < ds.temperature_min or ti > ds.temperature_max:
            temp_bad += 1
        torque = ds.displacement * pi / (2 * math.pi * eta_hm)
        t_max = max(t_max, torque)
        if torque > ds.torque_max:
            torque_bad += 1
        power = torque * 2 * math.pi * ni
        power_max = max(power_max, power)
        energy2 += power * power * di
    if run:
        stretches.append(run)
    return {"speed": (slow, fast, n_min, n_max), "pressure": (inter, peak, p_max, max(stretches, default=0.0),
            sum(stretches) / cycle), "flow": flow_bad, "inlet": inlet_bad, "viscosity": visc_bad,
            "temperature": temp_bad, "torque": (torque_bad, t_max), "drive": (math.sqrt(energy2 / cycle), power_max)}


def run() -> list[dict[str, Any]]:
    duty = invented_log()
    app = _application(duty)
    result = check(DATASHEET, app)
    by_rule = {f.rule: f for f in result.findings}
    ref = numpy_rules(duty)
    # the references compute what the checker reports (a cross-check, not a test)
    assert by_rule["pressure.peak"].count == ref["pressure.peak"][0]
    assert math.isclose(by_rule["pressure.intermittent-duration"].measured, ref["pressure.intermittent-duration"])
    assert math.isclose(result.drive.rms_power, ref["drive"][0], rel_tol=1e-9)

    ours, theirs = compare(lambda: check(DATASHEET, app), lambda: numpy_rules(duty), repeat=7)
    rows = [row("check() on a 1e6-sample duty log", ours, theirs, "one numpy pass, same rules", at_most=10)]

    app_line = _application(duty, LINE)
    with_line = check(DATASHEET, app_line)
    ref_line = numpy_line(duty)
    assert ref_line["velocity"][2] < 2000  # laminar throughout: the hand formula holds
    lowest = next(f for f in with_line.findings if f.rule == "inlet.min").measured
    assert math.isclose(lowest, ref_line["velocity"][1], rel_tol=1e-9)
    ours_line, theirs_line = compare(lambda: check(DATASHEET, app_line), lambda: numpy_line(duty), repeat=7)
    rows.append(row("check() with a suction line, 1e6 samples", ours_line, theirs_line,
                    "one numpy pass, same rules and line", at_most=10))

    m = N // 10
    lists = [a[:m].tolist() for a in (duty.pressure, duty.speed, duty.flow, duty.temperature,
                                      duty.inlet_pressure, duty.duration)]
    loop = median_time(lambda: loop_rules(*lists), repeat=3) * (N / m)
    rows.append(row("check() on a 1e6-sample duty log", ours, loop, "plain Python loop", at_least_faster=100,
                    note="the Python loop ran on a 100,000-sample slice (lists of floats), time scaled by 10"))
    return rows
