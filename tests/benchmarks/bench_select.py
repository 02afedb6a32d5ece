"""``select`` of 50 series × 10 sizes on a 1,000-segment duty, against checking the 500 datasheets one by one.

Inputs are invented and built in code (reading workbooks is left out of both sides): the demo's baling
press with its seven segments repeated to 1,000; 50 series of 10 sizes each (10 to 55 cm³/rev) in two
frames; half the series give a performance table per frame (the frame's other sizes take it scaled by
displacement), half single stated efficiencies.

* ours: :func:`sheetpump.selection.select` — every size checked, the motor sized and the energy priced
  for every size, the proposal and its reasons;
* reference: ``check(datasheet, application)`` for each of the same 500 datasheets, one after another in
  one process (each size's scaled table fitted by the checker itself).

Target: ratio ≤ 1.0 (the selection does more per size, and must still not cost more).

    python -m tests.benchmarks.run select
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

from sheetpump.checks import check
from sheetpump.datasheet import Datasheet, PerformanceTable
from sheetpump.duty import Application, Duty, Oil
from sheetpump.physics.wilson import WilsonModel
from sheetpump.selection import SizeSeries, select

from .common import compare, row

SERIES, SIZES, SEGMENTS = 50, 10, 1000


def application() -> Application:
    from sheetpump import demo

    d = np.array([[r[1], r[2], r[3], r[5]] for r in demo.DUTY], float)
    idx = np.arange(SEGMENTS) % len(d)
    duty = Duty(duration=d[idx, 0], pressure=d[idx, 1] * 1e5, flow=d[idx, 2] / 60000,
                speed=np.full(SEGMENTS, 1470 / 60), temperature=d[idx, 3] + 273.15,
                inlet_pressure=np.full(SEGMENTS, 0.92e5), names=tuple(f"segment {i + 1}" for i in range(SEGMENTS)))
    return Application("invented press", duty, Oil(46e-6, 313.15, 6.8e-6, 373.15), relief_setting=250e5,
                       flow_margin=0.05, cycles_per_hour=0.5, energy_price=0.22)


def _table(v: float, k: int) -> PerformanceTable:
    model = WilsonModel(v, c_s=(1.0 + 0.02 * k) * 1e-8, c_f=0.045, c_v=9.0e4, t_c=0.9)
    p, n, nu = (a.ravel() for a in np.meshgrid([10e5, 50e5, 100e5, 150e5, 200e5, 250e5], [1000 / 60, 1500 / 60,
                                                2000 / 60], [20e-6, 46e-6], indexing="ij"))
    pred = model.predict(n, p, nu * 870.0)
    return PerformanceTable(p, np.asarray(pred.flow), n, nu, input_power=np.asarray(pred.input_power))


def series_list() -> list[SizeSeries]:
    out = []
    for k in range(SERIES):
        volumes = np.linspace(10e-6, 55e-6, SIZES) * (1 + 0.002 * k)
        sizes, scaled = [], {}
        with_tables = k % 2 == 0
        refs = {0: 3, 1: 7}  # the frame's size with a table
        for i, v in enumerate(volumes):
            frame = 0 if i < SIZES // 2 else 1
            base = Datasheet(f"Invented {k}", f"S{k}-{i}", float(v), 500 / 60, 3000 / 60, 250e5, 290e5,
                             pressure_intermittent=275e5, intermittent_max_duration=15.0, intermittent_max_share=0.2,
                             viscosity_min=10e-6, viscosity_max=300e-6, temperature_min=253.15,
                             temperature_max=353.15, inlet_pressure_min=0.8e5, price=300.0 + 10 * i)
            if with_tables:
                ref = refs[frame]
                t = _table(float(volumes[ref]), k)
                ratio = float(v / volumes[ref])
                table = dataclasses.replace(t, flow=t.flow * ratio, input_power=t.input_power * ratio)
                base = dataclasses.replace(base, performance=table)
                if i != ref:
                    scaled[base.model] = (f"S{k}-{ref}", ratio)
            else:
                base = dataclasses.replace(base, volumetric_efficiency=0.92, total_efficiency=0.82)
            sizes.append(base)
        out.append(SizeSeries(f"Invented {k}", tuple(sizes), scaled=scaled))
    return out


def run(repeat: int = 3) -> list[dict[str, Any]]:
    app = application()
    series = series_list()
    sheets = [ds for s in series for ds in s.sizes]
    ours, ref = compare(lambda: select(series, app), lambda: [check(ds, app) for ds in sheets], repeat=repeat)
    return [row(f"select: {SERIES} series x {SIZES} sizes, {SEGMENTS}-segment duty (in memory)", ours, ref,
                f"check of the {len(sheets)} datasheets one by one", at_most=1.0)]


if __name__ == "__main__":
    for r in run():
        print(r)
