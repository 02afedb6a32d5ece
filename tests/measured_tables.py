"""Measured tables shared by the tests of the physics of a measured table (test_measured, test_displacement,
test_wilson, test_prediction): an invented pump of Wilson's model and tables made from it.

The pump is invented: 28 cm³/rev, C_s = 1.3e-8, C_f = 0.04, C_v = 1e5, T_c = 1.0 N·m, values of the
size Merritt (Hydraulic Control Systems, 1967, ch. 5) describes for real pumps (from memory). A test
that fits a table made from it and gets it back is a self-consistency check, not an outside source.
"""

from __future__ import annotations

import numpy as np
from hypothesis import strategies as st

from sheetpump.physics.wilson import WilsonModel

TRUE = WilsonModel(28e-6, c_s=1.3e-8, c_f=0.04, c_v=1e5, t_c=1.0)  # invented pump
RPM = 1 / 60

# Hypothesis strategies of the model's coefficients and operating points.
coefficients = st.tuples(
    st.floats(1e-10, 1e-8),   # C_s: at most 95 % slip at the corner of the ranges below
    st.floats(0.0, 0.2),      # C_f
    st.floats(0.0, 3e5),      # C_v
    st.floats(0.0, 5.0),      # T_c [N·m]
    st.floats(5e-6, 100e-6),  # V [m³/rev]
)
speeds = st.floats(10.0, 60.0)         # rev/s
pressures = st.floats(1e5, 3e7)        # Pa
viscosities = st.floats(0.005, 0.2)    # Pa·s


def grid(speeds_rpm=(1000, 1500, 2000, 2500), pressures_bar=tuple(range(10, 251, 40)),
         viscosities=(0.015, 0.03, 0.06)):
    n, p, mu = np.meshgrid(np.asarray(speeds_rpm, float) * RPM, np.asarray(pressures_bar, float) * 1e5,
                           np.asarray(viscosities, float))
    return n.ravel(), p.ravel(), mu.ravel()


def noisy_table(seed=1, flow_noise=0.001, torque_noise=0.002, **kw):
    n, p, mu = grid(**kw)
    r = TRUE.predict(n, p, mu)
    rng = np.random.default_rng(seed)
    q = r.flow * (1 + flow_noise * rng.standard_normal(n.size))
    t = r.torque * (1 + torque_noise * rng.standard_normal(n.size))
    return n, p, q, t, mu


def one_curve():
    n, p, mu = grid(speeds_rpm=(1500,), viscosities=(0.03,))
    r = TRUE.predict(n, p, mu)
    return n, p, r.flow.copy(), r.torque.copy(), mu


def practical_table():
    n, p, q, t, mu = noisy_table(seed=4)
    col = np.reshape
    return (col(n * 60, (-1, 1)), col(p / 1e5, (-1, 1)), col(q * 60000, (-1, 1)), col(t, (-1, 1)),
            col(mu * 1000, (-1, 1)))
