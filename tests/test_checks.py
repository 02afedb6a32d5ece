"""Tests of the rating checker (sheetpump.checks) and the performance answer (sheetpump.performance).

Every pump, supplier and machine here is invented. Datasheets are built in SI; the imperial one is
written in psi, in³/rev, °F, lbf·ft … and converted with a fresh pint registry (the outside reference, not
sheetpump's own unit code).
"""

from __future__ import annotations

import dataclasses
import math
import types

import numpy as np
import pint
import pytest

from sheetpump import performance
from sheetpump.checks import FAIL, INFO, PASS, WARN, CheckSettings, check, stretches
from sheetpump.codes import cleanliness_code
from sheetpump.datasheet import Datasheet, PerformanceTable
from sheetpump.duty import Application, Duty, Oil
from sheetpump.errors import InputError, Where

Q_ = pint.UnitRegistry().Quantity  # outside reference for the imperial datasheet

EPS = 1e-9  # "just inside" / "just outside": a relative step far below any rating's precision

# An invented ISO VG 46 mineral oil: 46 mm²/s at 40 °C, 6.8 mm²/s at 100 °C.
OIL = Oil(46e-6, 313.15, 6.8e-6, 373.15, density_15=870.0, name="invented VG 46")


def metric_pump(**changes: object) -> Datasheet:
    """Invented 'Ostwind Fluidtechnik GZ-28', stated in metric units, converted by hand to SI."""
    ds = Datasheet(
        supplier="Ostwind Fluidtechnik (invented)", model="GZ-28",
        displacement=28e-6,  # 28 cm³/rev
        speed_min=600 / 60, speed_max=3000 / 60,  # rpm -> rev/s
        pressure_continuous=250e5, pressure_peak=300e5,  # bar -> Pa
        pressure_intermittent=280e5, intermittent_max_duration=10.0, intermittent_max_share=0.2,
        speed_min_high_pressure=1000 / 60, high_pressure_threshold=200e5,
        inlet_pressure_min=0.8e5, inlet_pressure_max=3e5,
        viscosity_min=10e-6, viscosity_max=100e-6, viscosity_min_short=8e-6, viscosity_max_cold_start=1000e-6,
        temperature_min=273.15 - 20, temperature_max=273.15 + 80,
        rotation="clockwise", cleanliness="20/18/15", torque_max=150.0,
        volumetric_efficiency=0.95, total_efficiency=0.85, file="gz28.xlsx",
        sources={"pressure_peak": Where("gz28.xlsx", "Ratings", "C9", "pressure_peak")},
    )
    return dataclasses.replace(ds, **changes)


def imperial_pump(**changes: object) -> Datasheet:
    """Invented 'Prairie Gearworks PG-1.7', stated in US units, converted to SI with pint."""
    si = {
        "displacement": Q_(1.7, "in**3").to("m**3").m,  # per revolution
        "speed_min": Q_(500, "1/min").to("1/s").m,
        "speed_max": Q_(3200, "1/min").to("1/s").m,
        "pressure_continuous": Q_(3600, "psi").to("Pa").m,
        "pressure_intermittent": Q_(3900, "psi").to("Pa").m,
        "pressure_peak": Q_(4300, "psi").to("Pa").m,
        "high_pressure_threshold": Q_(3000, "psi").to("Pa").m,
        "speed_min_high_pressure": Q_(900, "1/min").to("1/s").m,
        "inlet_pressure_min": Q_(11.6, "psi").to("Pa").m,  # absolute
        "inlet_pressure_max": Q_(43.5, "psi").to("Pa").m,
        "temperature_min": Q_(-4.0, "degF").to("K").m,
        "temperature_max": Q_(176.0, "degF").to("K").m,
        "torque_max": Q_(110, "lbf*ft").to("N*m").m,
        "viscosity_min": Q_(10, "mm**2/s").to("m**2/s").m,
        "viscosity_max": Q_(100, "mm**2/s").to("m**2/s").m,
        "viscosity_min_short": Q_(8, "mm**2/s").to("m**2/s").m,
        "viscosity_max_cold_start": Q_(1000, "mm**2/s").to("m**2/s").m,
    }
    ds = Datasheet(supplier="Prairie Gearworks (invented)", model="PG-1.7", pressure_peak=si.pop("pressure_peak"),
                   displacement=si.pop("displacement"), speed_min=si.pop("speed_min"),
                   speed_max=si.pop("speed_max"), pressure_continuous=si.pop("pressure_continuous"),
                   intermittent_max_duration=10.0, intermittent_max_share=0.2, rotation="cw",
                   cleanliness="19/17/14", volumetric_efficiency=0.94, total_efficiency=0.84, **si)
    return dataclasses.replace(ds, **changes)


PUMPS = {"metric": metric_pump, "imperial": imperial_pump}


def duty(rows: list[tuple[str, float, float, float, float, float, float]], wraps: bool = True) -> Duty:
    """Segments as (name, duration s, pressure Pa, flow m³/s, speed rev/s, temperature K, inlet Pa abs)."""
    cols = list(zip(*rows, strict=True))
    return Duty(duration=np.array(cols[1], float), pressure=np.array(cols[2], float),
                flow=np.array(cols[3], float), speed=np.array(cols[4], float),
                temperature=np.array(cols[5], float), inlet_pressure=np.array(cols[6], float),
                names=tuple(cols[0]), wraps=wraps,
                rows=tuple(Where("app.xlsx", "Duty", f"A{i + 5}") for i in range(len(rows))))


def quiet(ds: Datasheet, **over: float) -> list:
    """One comfortable segment inside every rating of ``ds``, with some values overridden."""
    seg = dict(name="run", duration=30.0, pressure=0.5 * ds.pressure_continuous, flow=1e-5,
               speed=0.5 * (ds.speed_min + ds.speed_max), temperature=323.15, inlet=1e5)
    seg.update(over)
    return [(seg["name"], seg["duration"], seg["pressure"], seg["flow"], seg["speed"], seg["temperature"],
             seg["inlet"])]


def app_for(d: Duty, **changes: object) -> Application:
    base = Application("invented baler", d, OIL, relief_setting=200e5, overshoot=0.1, rotation="clockwise",
                       cleanliness="18/16/13", file="app.xlsx")
    return dataclasses.replace(base, **changes)


def finding(result, rule: str):
    found = [f for f in result.findings if f.rule == rule]
    assert len(found) == 1, f"{rule}: {[f.rule for f in result.findings]}"
    return found[0]


def severity(ds: Datasheet, rule: str, app_changes: dict | None = None, **seg: float) -> str:
    return finding(check(ds, app_for(duty(quiet(ds, **seg)), **(app_changes or {}))), rule).severity


# --------------------------------------------------------------------------------------------------
# Every rule at its boundary: just inside, exactly at, just outside (metric and imperial datasheets)

BOUNDARY = [
    # rule, segment field, datasheet field, upper limit?
    ("speed.max", "speed", "speed_max", True),
    ("speed.min", "speed", "speed_min", False),
    ("inlet.min", "inlet", "inlet_pressure_min", False),
    ("inlet.max", "inlet", "inlet_pressure_max", True),
    ("temperature.min", "temperature", "temperature_min", False),
    ("temperature.max", "temperature", "temperature_max", True),
    ("pressure.peak", "pressure", "pressure_peak", True),
]


@pytest.mark.parametrize("system", sorted(PUMPS))
@pytest.mark.parametrize(("rule", "seg_field", "ds_field", "upper"), BOUNDARY)
def test_limit_boundary(system, rule, seg_field, ds_field, upper):
    ds = PUMPS[system]()
    limit = getattr(ds, ds_field)
    outside = 1 + EPS if upper else 1 - EPS
    inside = 1 - EPS if upper else 1 + EPS
    # a rule's limit is inclusive ("at or below"): at the limit passes (common practice for ratings)
    assert severity(ds, rule, **{seg_field: limit * inside}) == PASS
    assert severity(ds, rule, **{seg_field: limit}) == PASS
    assert severity(ds, rule, **{seg_field: limit * outside}) == FAIL


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_continuous_boundary_without_intermittent_rating(system):
    ds = PUMPS[system](pressure_intermittent=None)
    p = ds.pressure_continuous
    assert severity(ds, "pressure.continuous", pressure=p * (1 - EPS)) == PASS
    assert severity(ds, "pressure.continuous", pressure=p) == PASS
    assert severity(ds, "pressure.continuous", pressure=p * (1 + EPS)) == FAIL


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_intermittent_rating_boundary(system):
    # a 5 s stretch above continuous inside a 60 s cycle (within 10 s and 20 % of the cycle)
    ds = PUMPS[system]()
    for factor, want in ((1 - EPS, PASS), (1.0, PASS), (1 + EPS, FAIL)):
        rows = [("low", 55.0, 0.5 * ds.pressure_continuous, 1e-5, 25.0, 323.15, 1e5),
                ("high", 5.0, ds.pressure_intermittent * factor, 1e-5, 25.0, 323.15, 1e5)]
        r = check(ds, app_for(duty(rows)))
        assert finding(r, "pressure.intermittent").severity == want
        assert finding(r, "pressure.continuous").severity == INFO  # judged as intermittent instead


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_high_pressure_minimum_speed_boundary(system):
    ds = PUMPS[system]()
    hp = ds.high_pressure_threshold * 1.01
    n = ds.speed_min_high_pressure
    for factor, want in ((1 + EPS, PASS), (1.0, PASS), (1 - EPS, FAIL)):
        assert severity(ds, "speed.min-high-pressure", pressure=hp, speed=n * factor) == want
    # at the threshold pressure itself the higher minimum does not apply ("above a stated pressure")
    r = check(ds, app_for(duty(quiet(ds, pressure=ds.high_pressure_threshold, speed=n * 0.9))))
    assert finding(r, "speed.min-high-pressure").severity == INFO


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_relief_boundary(system):
    ds = PUMPS[system]()
    overshoot = 0.25
    at = ds.pressure_peak / (1 + overshoot)
    for factor, want in ((1 - EPS, PASS), (1.0, PASS), (1 + EPS, FAIL)):
        got = severity(ds, "pressure.relief", {"relief_setting": at * factor, "overshoot": overshoot})
        assert got == want, factor


def test_pressure_margin_tightens_the_peak_rating():
    ds = metric_pump()
    limit = ds.pressure_peak * (1 - 0.25)  # 300 bar less a 25 % margin = 225 bar
    assert limit == pytest.approx(225e5)
    # 270 bar is 10 % inside the peak rating but outside it with the margin
    r = check(ds, app_for(duty(quiet(ds, pressure=limit, duration=1.0) + quiet(ds, pressure=1e5)),
                          pressure_margin=0.25))
    assert finding(r, "pressure.peak").severity == PASS
    r = check(ds, app_for(duty(quiet(ds, pressure=limit * (1 + EPS), duration=1.0)), pressure_margin=0.25))
    assert finding(r, "pressure.peak").severity == FAIL


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_delivered_flow_boundary(system):
    ds = PUMPS[system]()
    n = 1500 / 60
    q = ds.displacement * n * ds.volumetric_efficiency  # Q_e = V·n·η_v (DESIGN §4, ISO 4391)
    for factor, want in ((1 - EPS, PASS), (1.0, PASS), (1 + EPS, FAIL)):
        assert severity(ds, "flow.delivered", speed=n, flow=q * factor) == want
    # with a 25 % flow margin the required flow is raised: Q_need = Q·1.25
    assert severity(ds, "flow.delivered", {"flow_margin": 0.25}, speed=n, flow=q / 1.25) == PASS
    assert severity(ds, "flow.delivered", {"flow_margin": 0.25}, speed=n, flow=q / 1.25 * (1 + EPS)) == FAIL


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_torque_boundary(system):
    ds = PUMPS[system]()
    p = 0.5 * ds.pressure_continuous
    eta_hm = ds.total_efficiency / ds.volumetric_efficiency  # η_t = η_v·η_hm (ISO 4391)
    torque = ds.displacement * p / (2 * math.pi * eta_hm)  # T = V·Δp/(2π·η_hm), DESIGN §4
    for factor, want in ((1 + EPS, PASS), (1.0, PASS), (1 - EPS, FAIL)):
        assert severity(dataclasses.replace(ds, torque_max=torque * factor), "torque.max", pressure=p) == want


@pytest.mark.parametrize("system", sorted(PUMPS))
def test_viscosity_window_boundaries(system):
    from sheetpump.physics.fluid import viscosity_at

    ds = PUMPS[system]()
    t = 333.15
    nu = viscosity_at(t, OIL.nu1, OIL.t1, OIL.nu2, OIL.t2)
    # lower end: continuous minimum, then the short-term minimum gives a warning, below it a failure
    for limit_factor, want in ((1 - EPS, PASS), (1.0, PASS), (1 + EPS, WARN)):
        d = dataclasses.replace(ds, viscosity_min=nu * limit_factor, viscosity_min_short=nu * 0.5)
        assert severity(d, "viscosity.min", temperature=t) == want
    d = dataclasses.replace(ds, viscosity_min=nu * 2, viscosity_min_short=nu * (1 + EPS))
    assert severity(d, "viscosity.min", temperature=t) == FAIL
    d = dataclasses.replace(ds, viscosity_min=nu * 2, viscosity_min_short=nu)
    assert severity(d, "viscosity.min", temperature=t) == WARN
    # upper end: continuous maximum, then up to the cold-start maximum a warning, above it a failure
    for limit_factor, want in ((1 + EPS, PASS), (1.0, PASS), (1 - EPS, WARN)):
        d = dataclasses.replace(ds, viscosity_max=nu * limit_factor, viscosity_max_cold_start=nu * 2)
        assert severity(d, "viscosity.max", temperature=t) == want
    d = dataclasses.replace(ds, viscosity_max=nu / 2, viscosity_max_cold_start=nu * (1 - EPS))
    assert severity(d, "viscosity.max", temperature=t) == FAIL


def test_viscosity_follows_astm_d341_chart():
    # The VG 46 oil at 40 °C is 46 mm²/s by its definition (ISO 3448): the window check sees that value.
    ds = metric_pump(viscosity_min=46e-6 * (1 + 1e-6))
    f = finding(check(ds, app_for(duty(quiet(ds, temperature=313.15)))), "viscosity.min")
    assert f.measured == pytest.approx(46e-6, rel=1e-6)
    assert f.severity == WARN


def test_cold_start_viscosity():
    from sheetpump.physics.fluid import viscosity_at

    t = 273.15 - 10
    nu = viscosity_at(t, OIL.nu1, OIL.t1, OIL.nu2, OIL.t2)
    d = duty(quiet(metric_pump()))
    for factor, want in ((1 + EPS, PASS), (1.0, PASS), (1 - EPS, FAIL)):
        r = check(metric_pump(viscosity_max_cold_start=nu * factor), app_for(d, cold_start_temperature=t))
        assert finding(r, "viscosity.cold-start").severity == want


@pytest.mark.parametrize(("system_code", "want"), [
    ("17/16/13", PASS),  # each number ≤ the required one (ISO 4406: a lower number is cleaner)
    ("18/16/13", PASS),  # exactly at
    ("18/17/13", FAIL),  # one number worse is enough to fail
    ("16/14/14", FAIL),
    ("-/15/12", WARN),   # microscope count: first number not given, so not fully proven
])
def test_cleanliness_number_by_number(system_code, want):
    ds = metric_pump(cleanliness="18/16/13")
    r = check(ds, app_for(duty(quiet(ds)), cleanliness=system_code))
    assert finding(r, "cleanliness").severity == want


def test_cleanliness_requirement_without_first_number():
    ds = metric_pump(cleanliness="-/16/13")
    assert finding(check(ds, app_for(duty(quiet(ds)), cleanliness="21/16/13")), "cleanliness").severity == PASS
    assert finding(check(ds, app_for(duty(quiet(ds)), cleanliness="21/16/14")), "cleanliness").severity == FAIL


def test_cleanliness_parse_and_bad_code():
    assert cleanliness_code("20/18/15") == (20, 18, 15)
    ds = metric_pump(cleanliness="NAS 7", sources={"cleanliness": Where("gz28.xlsx", "Ratings", "C20")})
    with pytest.raises(InputError) as exc:
        check(ds, app_for(duty(quiet(ds))))
    assert "Ratings!C20" in str(exc.value)


@pytest.mark.parametrize(("pump", "drive", "want"), [
    ("clockwise", "clockwise", PASS), ("clockwise", "counter-clockwise", FAIL), ("either", "ccw", PASS),
    ("counter-clockwise", "either", FAIL),  # a one-way pump cannot serve a drive that turns both ways
])
def test_rotation(pump, drive, want):
    ds = metric_pump(rotation=pump)
    assert severity(ds, "rotation", {"rotation": drive}) == want


def test_rotation_not_checked_when_not_stated():
    ds = metric_pump(rotation=None)
    found = [f for f in check(ds, app_for(duty(quiet(ds)))).findings if f.rule == "rotation"]
    assert [f.severity for f in found] == ["not checked"]
    assert "states no direction of rotation" in found[0].message and found[0].where.field == "rotation"


def test_imperial_display_round_trips_through_pint():
    ds = imperial_pump(pressure_intermittent=None)
    import json

    from sheetpump.comparison import compare
    from sheetpump.reports.json_report import json_report

    doc = json.loads(json_report(compare([ds], app_for(duty(quiet(ds))), CheckSettings(units="imperial"))))
    cont = next(f for f in doc["pumps"][0]["findings"] if f["rule"] == "pressure.continuous")
    assert cont["limit"]["unit"] == "psi"
    assert cont["limit"]["value"] == pytest.approx(3600, rel=1e-12)  # the datasheet's own number


# --------------------------------------------------------------------------------------------------
# Intermittent pressure


def _p_rows(segments: list[tuple[float, float]], ds: Datasheet) -> list:
    return [(f"s{i}", t, p, 1e-5, 25.0, 323.15, 1e5) for i, (t, p) in enumerate(segments)]


def test_one_long_stretch():
    ds = metric_pump()
    rows = _p_rows([(20, 100e5), (12, 270e5), (28, 100e5)], ds)
    r = check(ds, app_for(duty(rows)))
    f = finding(r, "pressure.intermittent-duration")
    assert (f.severity, f.measured, f.segment) == (FAIL, 12.0, "s1")
    assert finding(r, "pressure.intermittent-share").measured == pytest.approx(12 / 60)


def test_several_short_stretches_add_up():
    ds = metric_pump()
    # five 3 s stretches in a 60 s cycle: each within 10 s, together 25 % > 20 %
    rows = _p_rows([(3, 270e5), (9, 100e5)] * 5, ds)
    r = check(ds, app_for(duty(rows)))
    assert finding(r, "pressure.intermittent-duration").severity == PASS
    share = finding(r, "pressure.intermittent-share")
    assert share.severity == FAIL
    assert share.measured == pytest.approx(15 / 60)


def test_share_boundary():
    ds = metric_pump()
    rows = _p_rows([(6, 270e5), (24, 100e5), (6, 270e5), (24, 100e5)], ds)  # 12 s of 60 s = 20 %
    assert finding(check(ds, app_for(duty(rows))), "pressure.intermittent-share").severity == PASS
    rows = _p_rows([(6, 270e5), (23.9, 100e5), (6, 270e5), (24, 100e5)], ds)
    assert finding(check(ds, app_for(duty(rows))), "pressure.intermittent-share").severity == FAIL


def test_stretch_split_across_segments_counts_once():
    ds = metric_pump()
    # 6 s at 260 bar then 6 s at 275 bar: each alone within 10 s, together one 12 s stretch
    rows = _p_rows([(20, 100e5), (6, 260e5), (6, 275e5), (28, 100e5)], ds)
    f = finding(check(ds, app_for(duty(rows))), "pressure.intermittent-duration")
    assert (f.severity, f.measured, f.segment) == (FAIL, 12.0, "s1 … s2")
    rows = _p_rows([(20, 100e5), (5, 260e5), (5, 275e5), (30, 100e5)], ds)  # exactly 10 s: at the limit
    assert finding(check(ds, app_for(duty(rows))), "pressure.intermittent-duration").severity == PASS


def test_stretch_wraps_round_the_cycle():
    ds = metric_pump()
    rows = _p_rows([(4, 270e5), (49, 100e5), (7, 270e5)], ds)
    f = finding(check(ds, app_for(duty(rows, wraps=True))), "pressure.intermittent-duration")
    assert (f.severity, f.measured) == (FAIL, 11.0)  # 7 s at the end + 4 s at the start
    assert f.segment == "s2 … s0"
    f = finding(check(ds, app_for(duty(rows, wraps=False))), "pressure.intermittent-duration")
    assert (f.severity, f.measured) == (PASS, 7.0)


def test_whole_cycle_above_continuous_never_ends():
    ds = metric_pump()
    rows = _p_rows([(4, 270e5), (5, 260e5)], ds)
    f = finding(check(ds, app_for(duty(rows, wraps=True))), "pressure.intermittent-duration")
    assert f.severity == FAIL and math.isinf(f.measured)
    f = finding(check(ds, app_for(duty(rows, wraps=False))), "pressure.intermittent-duration")
    assert f.severity == PASS and f.measured == 9.0


def test_unevenly_sampled_series():
    ds = metric_pump()
    # sample times (s) and pressure (bar); each sample holds until the next, the last for 1 s
    t = np.array([0.0, 0.5, 0.7, 3.0, 3.1, 8.0, 14.6, 15.0, 20.0])
    p = np.array([100, 100, 265, 270, 262, 270, 100, 100, 100]) * 1e5
    dt = np.append(np.diff(t), 1.0)
    n = t.size
    series = Duty(dt, p, np.full(n, 1e-5), np.full(n, 25.0), np.full(n, 323.15), np.full(n, 1e5),
                  start=t, source="series")
    f = finding(check(ds, app_for(series)), "pressure.intermittent-duration")
    # above continuous from t = 0.7 s until t = 14.6 s: one stretch of 13.9 s (hand calculation)
    assert f.measured == pytest.approx(13.9)
    assert f.severity == FAIL
    assert f.segment == "t = 0.7–14.6 s"


def test_stretches_helper_against_a_loop():
    # the vectorised runs against a plain loop over a random mask (the loop is the outside reference)
    rng = np.random.default_rng(7)
    mask = rng.random(500) > 0.6
    dur = rng.uniform(0.1, 2.0, 500)
    first, _stop, length = stretches(mask, dur, wraps=False)
    runs, cur = [], None
    for i, m in enumerate(mask):
        if m and cur is None:
            cur = [i, 0.0]
        if m:
            cur[1] += dur[i]
        if not m and cur is not None:
            runs.append(cur)
            cur = None
    if cur is not None:
        runs.append(cur)
    assert first.tolist() == [r[0] for r in runs]
    np.testing.assert_allclose(length, [r[1] for r in runs])


def test_long_series_gives_compact_findings():
    ds = metric_pump()
    n = 200_000
    i = np.arange(n)
    p = np.where((i // 1000) % 10 == 0, 270e5, 150e5)  # 20 stretches of 1000 samples
    speed = np.where(i % 50_000 == 7, 3100 / 60, 25.0)  # 4 samples above the maximum speed
    series = Duty(np.full(n, 0.01), p, np.full(n, 1e-5), speed, np.full(n, 323.15), np.full(n, 1e5),
                  source="series")
    r = check(ds, app_for(series))
    assert len(r.findings) < 30
    f = finding(r, "speed.max")
    assert (f.severity, f.count) == (FAIL, 4)
    assert f.segment == "t = 0.07–0.08 s"
    assert finding(r, "pressure.intermittent-duration").measured == pytest.approx(10.0)
    assert finding(r, "pressure.intermittent-share").measured == pytest.approx(0.1)


# --------------------------------------------------------------------------------------------------
# Flow and drive figures against hand calculations


def test_delivered_flow_hand_calculation():
    ds = metric_pump()  # 28 cm³/rev, η_v = 0.95
    r = check(ds, app_for(duty(quiet(ds, speed=1800 / 60))))
    # Q [L/min] = V [cm³/rev] · n [rpm] / 1000 · η_v = 28·1800/1000·0.95 = 47.88 L/min (DESIGN §4)
    assert r.drive.flow[0] * 60000 == pytest.approx(47.88, rel=1e-12)


def test_delivered_flow_imperial_hand_calculation():
    ds = imperial_pump()  # 1.7 in³/rev, η_v = 0.94
    r = check(ds, app_for(duty(quiet(ds, speed=Q_(1800, "1/min").to("1/s").m))))
    # Q [gpm] = V [in³/rev] · n [rpm] / 231 · η_v (231 in³ per US gallon, common practice)
    assert Q_(r.drive.flow[0], "m**3/s").to("gallon/minute").m == pytest.approx(1.7 * 1800 / 231 * 0.94,
                                                                               rel=1e-9)


def test_rms_power_hand_calculation():
    ds = metric_pump()  # 28 cm³/rev, η_v = 0.95, η_t = 0.85
    segs = [(10.0, 200.0, 1500.0), (30.0, 50.0, 1500.0), (20.0, 120.0, 1200.0)]  # s, bar, rpm
    rows = [(f"s{i}", t, p * 1e5, 1e-5, n / 60, 323.15, 1e5) for i, (t, p, n) in enumerate(segs)]
    r = check(ds, app_for(duty(rows)))
    # hand: Q [L/min] = 28·n/1000·0.95, P_in [kW] = p [bar]·Q [L/min]/600/η_t (DESIGN §4)
    powers = [p * (28 * n / 1000 * 0.95) / 600 / 0.85 for _, p, n in segs]
    t = [s[0] for s in segs]
    # RMS over the cycle, √(Σ P²·t / Σ t): the equivalent-load method for IEC 60034-1 periodic duty
    # (S6), from memory
    rms = math.sqrt(sum(pk**2 * tk for pk, tk in zip(powers, t, strict=True)) / sum(t))
    assert r.drive.rms_power / 1000 == pytest.approx(rms, rel=1e-12)
    assert r.drive.peak_power / 1000 == pytest.approx(max(powers), rel=1e-12)
    assert r.drive.mean_power / 1000 == pytest.approx(sum(pk * tk for pk, tk in zip(powers, t,
                                                                                      strict=True)) / 60)
    # heat into the oil: P_in − P_hyd = P_in·(1 − η_t)
    np.testing.assert_allclose(r.drive.power_loss, r.drive.input_power * (1 - 0.85), rtol=1e-12)
    # and the hydraulic power in hp by pint against P [hp] = p [psi]·Q [gpm]/1714 (common practice)
    p_psi = Q_(200, "bar").to("psi").m
    q_gpm = Q_(28 * 1500 / 1000 * 0.95, "L/min").to("gallon/minute").m
    assert Q_(r.drive.hydraulic_power[0], "W").to("hp").m == pytest.approx(p_psi * q_gpm / 1714, rel=2e-3)


# --------------------------------------------------------------------------------------------------
# Performance basis


def test_single_stated_efficiency_is_a_warning():
    ds = metric_pump()
    f = finding(check(ds, app_for(duty(quiet(ds)))), "performance.basis")
    assert f.severity == WARN and "extrapolated" in f.message


def test_no_efficiency_flow_is_an_upper_bound():
    ds = metric_pump(volumetric_efficiency=None, total_efficiency=None, torque_max=None)
    n = 1500 / 60
    geometric = ds.displacement * n  # Q_th = V·n, DESIGN §4
    r = check(ds, app_for(duty(quiet(ds, speed=n, flow=geometric * 0.9))))
    assert finding(r, "flow.delivered").severity == WARN  # not proven without η_v
    r = check(ds, app_for(duty(quiet(ds, speed=n, flow=geometric * (1 + EPS)))))
    assert finding(r, "flow.delivered").severity == FAIL  # more than even a leak-free pump gives
    assert math.isnan(r.drive.rms_power)


def test_table_is_used_through_the_loss_model(monkeypatch):
    # A stand-in loss model whose predictions we know (the real one is tested in its own module):
    # the checker must take η_v from it, convert ν to μ = ν·ρ and pass the extrapolated flags on.
    seen = {}

    class Model:
        method = "stand-in"

        def predict(self, speed, pressure, viscosity):
            seen["mu"] = np.asarray(viscosity)
            v = np.full(np.shape(speed), 0.9)
            torque = 28e-6 * np.asarray(pressure) / (2 * np.pi * v)  # T = V·Δp/(2π·η_hm)
            return types.SimpleNamespace(volumetric=v, hydromechanical=v, total=v * v,
                                         flow=28e-6 * np.asarray(speed) * v, torque=torque,
                                         input_power=torque * 2 * np.pi * np.asarray(speed),
                                         extrapolated=np.asarray(pressure) > 200e5)

    class Fitted:
        method = "stand-in"
        notes = ()
        predict = Model().predict

    fake = types.SimpleNamespace(fit_performance=lambda *a, **k: Fitted())
    import sheetpump.performance as performance

    monkeypatch.setattr(performance, "prediction", fake)
    table = PerformanceTable(np.array([50e5, 250e5]), np.array([6e-4, 5.8e-4]), np.array([25.0, 25.0]),
                             np.array([32e-6, 32e-6]), torque=np.array([30.0, 120.0]))
    ds = metric_pump(performance=table)
    rows = _p_rows([(10, 150e5), (5, 240e5)], ds)
    r = check(ds, app_for(duty(rows)))
    np.testing.assert_allclose(r.drive.volumetric_efficiency, 0.9)
    from sheetpump.physics.fluid import viscosity_at

    # one density for the table and the duty, so the model sees the ratio of kinematic viscosities
    mu = viscosity_at(323.15, OIL.nu1, OIL.t1, OIL.nu2, OIL.t2) * OIL.density_15
    np.testing.assert_allclose(seen["mu"], mu)
    f = finding(r, "performance.basis")
    assert f.severity == WARN and f.count == 1 and f.segments == ("s1",)


def test_efficiencies_scalar_answer():
    ds = metric_pump()
    assert performance.efficiencies(ds, 200e5, 25.0, 32e-6) == (0.95, 0.85)


# --------------------------------------------------------------------------------------------------
# Inputs, verdict


def test_bad_duty_names_the_row():
    ds = metric_pump()
    rows = quiet(ds) + quiet(ds, duration=-1.0)
    with pytest.raises(InputError) as exc:
        check(ds, app_for(duty(rows)))
    assert "Duty!A6" in str(exc.value)


def test_verdict_and_strict():
    ds = metric_pump()  # stated efficiencies only: a warning
    d = duty(quiet(ds))
    assert check(ds, app_for(d)).verdict == WARN
    assert check(ds, app_for(d), CheckSettings(strict=True)).verdict == FAIL
    r = check(ds, app_for(duty(quiet(ds, speed=ds.speed_max * 1.1))))
    assert r.verdict == FAIL
    assert r.worst_margin == pytest.approx(-0.1)


def test_standing_pump_is_not_below_minimum_speed():
    ds = metric_pump()
    rows = quiet(ds) + quiet(ds, name="stop", speed=0.0, pressure=0.0, flow=0.0)
    r = check(ds, app_for(duty(rows)))
    assert finding(r, "speed.min").severity == PASS
    assert r.drive.input_power[1] == 0.0


# --------------------------------------------------------------------------------------------------
# The cold start and the relief valve (review findings)

def test_cold_start_counts_for_the_minimum_temperature():
    # the oil at a cold start is the coldest the pump sees: -25 °C on a pump rated down to -20 °C fails
    ds = metric_pump()
    d = duty(quiet(ds))
    assert finding(check(ds, app_for(d, cold_start_temperature=273.15 - 25)), "temperature.min").severity == FAIL
    assert finding(check(ds, app_for(d, cold_start_temperature=273.15 - 15)), "temperature.min").severity == PASS


def test_cold_start_viscosity_falls_back_to_the_maximum():
    # no cold-start maximum stated: the continuous maximum is the only limit known (common practice)
    ds = metric_pump(viscosity_max_cold_start=None, viscosity_max=300e-6)
    d = duty(quiet(ds))
    # VG 46 (VI about 100) at 0 °C is about 570 mm²/s by the Walther line (ASTM D341): above 300
    f = finding(check(ds, app_for(d, cold_start_temperature=273.15)), "viscosity.cold-start")
    assert f.severity == FAIL and f.limit == 300e-6 and "no cold-start maximum stated" in f.message
    warm = finding(check(ds, app_for(d, cold_start_temperature=273.15 + 20)), "viscosity.cold-start")
    assert warm.severity == PASS  # about 140 mm²/s at 20 °C


def test_duty_above_its_own_relief_setting_is_flagged():
    ds = metric_pump()
    at = finding(check(ds, app_for(duty(quiet(ds, pressure=200e5)))), "pressure.duty-relief")
    above = finding(check(ds, app_for(duty(quiet(ds, pressure=200e5 * (1 + EPS))))), "pressure.duty-relief")
    assert at.severity == PASS and above.severity == WARN
    assert "relief valve would open" in above.message


def test_a_fit_promising_more_than_geometric_flow_is_capped_and_warned():
    # An invented table whose flow rises with pressure above V·n (η_v > 1: a bad bench reading):
    # the fit gets a negative leakage coefficient; the checker must not count on more than V·n.
    n = np.array([25.0] * 4 + [33.3] * 4)
    p = np.tile([20e5, 80e5, 150e5, 220e5], 2)
    q = 28e-6 * n * (1.0 + 0.02 * p / 220e5)
    torque = 28e-6 * p / (2 * np.pi * 0.9) + 1.0
    table = PerformanceTable(p, q, n, np.full(8, 32e-6), torque=torque)
    ds = metric_pump(performance=table)
    r = check(ds, app_for(duty(quiet(ds, pressure=180e5, speed=25.0))))
    assert np.all(r.drive.volumetric_efficiency <= 1.0)
    assert np.all(r.drive.flow <= 28e-6 * 25.0 * (1 + 1e-12))  # never more than V·n (geometric flow)
    f = finding(r, "performance.basis")
    assert f.severity == WARN and "above 1" in f.message


def test_temperature_margin_is_a_share_of_the_pump_range():
    # 50 °C on a pump rated -20…80 °C: 30 K below the top of a 100 K range = 30 % (arithmetic)
    ds = metric_pump()
    r = check(ds, app_for(duty(quiet(ds, temperature=323.15))))
    assert finding(r, "temperature.max").margin == pytest.approx(0.30, rel=1e-12)
    assert finding(r, "temperature.min").margin == pytest.approx(0.70, rel=1e-12)


# --------------------------------------------------------------------------------------------------
# Every rule, every candidate: "not checked" is a state of its own


def test_every_rule_appears_for_every_pump_even_with_blank_ratings():
    from sheetpump.checks import NOT_CHECKED, RULES

    full = metric_pump()
    blank = metric_pump(torque_max=None, inlet_pressure_min=None, inlet_pressure_max=None, temperature_min=None,
                        temperature_max=None, cleanliness=None, rotation=None)
    for ds in (full, blank):
        r = check(ds, app_for(duty(quiet(ds))))
        assert sorted(f.rule for f in r.findings) == sorted(RULES)
    r = check(blank, app_for(duty(quiet(blank))))
    nc = {f.rule: f for f in r.findings if f.severity == NOT_CHECKED}
    # (and the cold start: this application states no cold-start temperature)
    assert set(nc) == {"torque.max", "torque.relief", "inlet.min", "inlet.max", "temperature.min",
                       "temperature.max", "cleanliness", "rotation", "viscosity.cold-start", "torque.cold-start"}
    assert "states no shaft torque limit" in nc["torque.max"].message
    assert nc["torque.max"].where.field == "torque_max"  # the cell to fill
    assert nc["viscosity.cold-start"].app_where.field == "cold_start_temperature"
    assert r.counts()[NOT_CHECKED] == 10


def test_each_rule_function_gives_the_finding_of_the_rule_it_declares():
    # the registry's table comes from the rule code: each function declared with @rule(id, ...) gives a
    # finding with that id, and the check runs every declared rule once
    from sheetpump.checks import CHECK_ORDER, RULES

    r = check(metric_pump(), app_for(duty(quiet(metric_pump()))))
    assert [f.rule for f in r.findings] == [fn.rule_id for fn in CHECK_ORDER]
    assert sorted(fn.rule_id for fn in CHECK_ORDER) == sorted(RULES)


def test_a_rule_not_checked_that_matters_makes_the_verdict_at_best_warn():
    from sheetpump.comparison import compare

    # a stated breakaway torque (20 N·m): the cold start's torque rule can be judged too
    ds = metric_pump(starting_torque=20.0)
    app = app_for(duty(quiet(ds, pressure=150e5, speed=25.0)), cold_start_temperature=283.15)
    ok = check(ds, app)
    assert all(f.severity != "not checked" for f in ok.findings)
    # cleanliness and rotation not stated: shown as not checked, but they do not judge the duty
    side = metric_pump(starting_torque=20.0, cleanliness=None, rotation=None)
    assert check(side, app).verdict == ok.verdict
    # the torque limit not stated: torque matters for the duty, so at best a warning; --strict fails
    blank = metric_pump(starting_torque=20.0, torque_max=None)
    r = check(blank, app)
    assert [f.effect for f in r.findings if f.rule == "torque.max"] == [WARN]
    assert r.verdict == WARN
    assert check(blank, app, CheckSettings(strict=True)).verdict == FAIL
    # in JSON the rule's verdict is "not checked"; in JUnit a skipped case with the reason
    import json
    import xml.etree.ElementTree as ET

    from sheetpump.reports.json_report import json_report
    from sheetpump.reports.junit import junit_report
    from sheetpump.reports.text import text_report

    comp = compare([blank], app)
    doc = json.loads(json_report(comp))
    torque = next(f for f in doc["pumps"][0]["findings"] if f["rule"] == "torque.max")
    assert torque["verdict"] == "not checked" and torque["failed"] is False
    assert torque["where"]["field"] == "torque_max"
    root = ET.fromstring(junit_report([r]).split("\n", 1)[1])
    skipped = [c for c in root.iter("testcase") if c.find("skipped") is not None]
    assert {c.get("name") for c in skipped} == {"torque.max", "torque.relief"}
    assert "no shaft torque limit" in skipped[0].find("skipped").get("message")
    strict = ET.fromstring(junit_report([check(blank, app, CheckSettings(strict=True))], strict=True)
                           .split("\n", 1)[1])
    assert {c.get("name") for c in strict.iter("testcase") if c.find("failure") is not None} >= {"torque.max"}
    text = text_report(comp)
    assert "NOT CHECKED torque.max" in text and "cell to fill" in text and "2 not checked" in text


def test_torque_at_the_relief_setting_worked_case():
    # The stalled machine: 20 cm³/rev, relief 225 bar + 10 % overshoot = 247.5 bar, η_hm = η_t/η_v =
    # 0.85/0.95 = 0.8947: T = V·Δp/(2π·η_hm) = 88.1 N·m (ISO 4391 relations; common practice to check
    # the shaft at the relief setting plus overshoot) against a 70 N·m limit: fail, where the duty's
    # own torque (here at 160 bar: 20e-6·160e5/(2π·0.8947) = 56.9 N·m) passes.
    ds = metric_pump(displacement=20e-6, torque_max=70.0, volumetric_efficiency=0.95, total_efficiency=0.85)
    app = app_for(duty(quiet(ds, pressure=160e5)), relief_setting=225e5, overshoot=0.1)
    r = check(ds, app)
    eta_hm = 0.85 / 0.95
    by_hand = 20e-6 * 225e5 * 1.1 / (2 * math.pi * eta_hm)
    assert by_hand == pytest.approx(88.1, abs=0.05)
    stall = finding(r, "torque.relief")
    assert stall.severity == FAIL and stall.measured == pytest.approx(by_hand, rel=1e-12)
    assert stall.limit == 70.0 and stall.app_where.field == "relief_setting"
    assert "0.8947" in stall.message
    assert finding(r, "torque.max").severity in (PASS, WARN)
    assert finding(r, "torque.max").measured == pytest.approx(20e-6 * 160e5 / (2 * math.pi * eta_hm), rel=1e-12)


def test_relief_setting_against_the_continuous_and_intermittent_ratings():
    # a stall holds the pump at the relief setting as long as it lasts (common practice): above continuous
    # a warning, above intermittent a failure; both cells named
    ds = metric_pump()  # continuous 250 bar, intermittent 280 bar
    d = duty(quiet(ds))
    within = finding(check(ds, app_for(d, relief_setting=250e5)), "pressure.relief-stall")
    assert within.severity == PASS and within.margin == 0.0
    warn = finding(check(ds, app_for(d, relief_setting=260e5, overshoot=0.0)), "pressure.relief-stall")
    assert warn.severity == WARN and warn.where.field == "pressure_continuous"
    assert warn.app_where.field == "relief_setting"
    fail = finding(check(ds, app_for(d, relief_setting=285e5, overshoot=0.0)), "pressure.relief-stall")
    assert fail.severity == FAIL and fail.where.field == "pressure_intermittent" and fail.limit == 280e5
    # no intermittent rating: above continuous is a warning only
    none = finding(check(metric_pump(pressure_intermittent=None), app_for(d, relief_setting=285e5,
                                                                          overshoot=0.0)), "pressure.relief-stall")
    assert none.severity == WARN


def test_pressure_margin_lowers_the_high_pressure_threshold():
    # threshold 200 bar, raised minimum speed 1000 rpm; a segment at 190 bar and 800 rpm. With a 10 %
    # pressure margin the threshold is 180 bar (arithmetic), so the raised minimum applies: fail.
    ds = metric_pump()
    d = duty(quiet(ds, pressure=190e5, speed=800 / 60))
    assert finding(check(ds, app_for(d)), "speed.min-high-pressure").severity == INFO  # no segment above
    r = check(ds, app_for(d, pressure_margin=0.1))
    f = finding(r, "speed.min-high-pressure")
    assert f.severity == FAIL and "180 bar" in f.message
