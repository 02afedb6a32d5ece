"""Cell functions against the same formula written by hand.

``SP_INPUT_POWER(pressure, flow, total_eff, [unit])`` computes P_in = Δp·Q/η_t; by hand, in the default
units (bar, L/min, kW), that is ``p * q / (600 * eta)`` (DESIGN §4: P[kW] = Δp[bar]·Q[L/min]/600).

Arrays (1,000,000 values per argument):

* numbers: numpy arrays in the default units, through the function a Python user calls,
  ``sheetpump.cells.SP_INPUT_POWER(p, q, eta)`` (numpy arrays in, a numpy array out: convert, validate,
  compute, convert the result). The 2-D list a spreadsheet range gets (``tolist()`` of a million floats,
  for nested-list arguments) is the spreadsheet's transfer cost, not the formula's; it is timed
  separately and given in the row's note.
* with units: each argument a pint Quantity array of the one registry, ``ureg.Quantity(values, "psi")``
  (the values of a range plus one unit string per argument), efficiency a plain array, result in hp,
  through the same cell function. The reference is the formula by hand with the conversion factors
  written in: raw numpy.

Scalars: one call of the cell function ``sheetpump.cells.SP_INPUT_POWER`` (what the spreadsheet calls),
timed as :mod:`timeit` times a statement, against the bare float expression timed the same way; with unit
strings (``"3000 psi"``, ``"10 gpm"``) also against pint parsing every string anew per call
(``ureg.Quantity("3000 psi")``) and converting the result with pint.
"""

from __future__ import annotations

import timeit
from typing import Any

import numpy as np

from sheetpump import cells
from sheetpump.catalogue import CATALOGUE
from sheetpump.units import ureg

from .common import compare, median_time, row

N = 1_000_000
_PSI = 6894.757293168361  # Pa per psi (NIST SP 811)
_GPM = 3.785411784e-3 / 60.0  # m^3/s per US gallon per minute (NIST SP 811)
_HP = 745.6998715822702  # W per mechanical horsepower (NIST SP 811)


def _arrays() -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(1)
    p = rng.uniform(10.0, 300.0, N)  # bar (or psi, with units)
    q = rng.uniform(5.0, 120.0, N)  # L/min (or gpm)
    eta = rng.uniform(0.6, 0.95, N)
    return p, q, eta


def _timeit(ours: str, reference: str, namespace: dict[str, Any], number: int = 20_000,
            repeat: int = 15) -> tuple[float, float]:
    """Median time per execution of two statements, as :mod:`timeit` times them, in alternation."""
    timers = [timeit.Timer(ours, globals=namespace), timeit.Timer(reference, globals=namespace)]
    for t in timers:
        t.timeit(max(number // 10, 1))  # warm-up
    samples: list[list[float]] = [[], []]
    for _ in range(repeat):
        for t, s in zip(timers, samples, strict=True):
            s.append(t.timeit(number) / number)
    return float(np.median(samples[0])), float(np.median(samples[1]))


def run() -> list[dict[str, Any]]:
    calc = CATALOGUE["SP_INPUT_POWER"]
    rows = []
    p, q, eta = _arrays()

    # -- arrays of numbers ------------------------------------------------------------------------
    f = cells.SP_INPUT_POWER
    ours, ref = compare(lambda: f(p, q, eta), lambda: p * q / (600.0 * eta), repeat=15)
    got = f(p, q, eta)
    assert type(got) is np.ndarray and got.shape == p.shape
    np.testing.assert_allclose(got, p * q / (600.0 * eta), rtol=1e-12)
    small = slice(0, 100_000)
    as_list = median_time(lambda: calc.cell(p[small].reshape(1, -1).tolist(), q[small], eta[small]),
                          repeat=5) * 10
    rows.append(row("cells.SP_INPUT_POWER, 1e6-value numpy arrays", ours, ref, "raw numpy", at_most=1.5,
                    note=f"numpy array out; a spreadsheet range (nested lists in, 2-D list out) takes "
                         f"{as_list * 1e3:.0f} ms (timed on 1e5 values, scaled)"))

    # -- arrays with units ------------------------------------------------------------------------
    pq, qq = ureg.Quantity(p, "psi"), ureg.Quantity(q, "gpm")
    ours, ref = compare(lambda: f(pq, qq, eta, "hp"), lambda: (p * _PSI) * (q * _GPM) / eta / _HP,
                        repeat=15)
    np.testing.assert_allclose(f(pq, qq, eta, "hp"), (p * _PSI) * (q * _GPM) / eta / _HP, rtol=1e-9)
    rows.append(row("cells.SP_INPUT_POWER, 1e6-value arrays in psi, gpm -> hp", ours, ref, "raw numpy",
                    at_most=1.5,
                    note="each argument a pint Quantity array (values + one unit); reference: the same "
                         "conversion factors written into the numpy expression"))

    # -- scalars ----------------------------------------------------------------------------------
    ns = {"f": cells.SP_INPUT_POWER, "p": 210.0, "q": 39.5, "eta": 0.85, "ps": "3000 psi", "qs": "10 gpm",
          "ureg": ureg}
    assert abs(cells.SP_INPUT_POWER(210.0, 39.5, 0.85) / (210.0 * 39.5 / (600.0 * 0.85)) - 1) < 1e-12
    ours, ref = _timeit("f(p, q, eta)", "p * q / (600.0 * eta)", ns)
    rows.append(row("SP_INPUT_POWER scalar call, numbers", ours, ref, "bare float expression", at_most=40))

    ours, ref = _timeit("f(ps, qs, eta, 'hp')", "p * q / (600.0 * eta)", ns)
    rows.append(row("SP_INPUT_POWER scalar call, '3000 psi', '10 gpm' -> hp", ours, ref,
                    "bare float expression", at_most=60))
    pint_stmt = "(ureg.Quantity(ps) * ureg.Quantity(qs) / eta).to('hp').magnitude"
    assert abs(eval(pint_stmt, ns) - cells.SP_INPUT_POWER("3000 psi", "10 gpm", 0.85, "hp")) < 1e-9
    ours, ref = _timeit("f(ps, qs, eta, 'hp')", pint_stmt, ns, number=300, repeat=9)
    rows.append(row("the same scalar call vs pint parsing per call", ours, ref,
                    "ureg.Quantity(text) per call", at_least_faster=50))
    return rows
