r"""A measured performance table's columns and levels, and the least-squares fit of its columns.

What :mod:`~sheetpump.physics.measured`, :mod:`~sheetpump.physics.displacement`,
:mod:`~sheetpump.physics.wilson` and :mod:`~sheetpump.physics.prediction` share about a table of
measured points: its columns flattened to one length (:func:`table_columns`), its complete points
(:func:`complete_points`), the levels of speed and viscosity it was measured at (:func:`levels`,
:func:`count_levels`) and the points of each level (:func:`group_points`, the one grouping every
module uses), and linear least squares with the covariance of the coefficients (:func:`least_squares`).

Pure functions of SI numbers or numpy arrays: speed n [rev/s], pressure rise Δp [Pa], flow Q [m³/s],
torque T [N·m], dynamic viscosity μ [Pa·s].

References
----------
.. [1] ISO 4409, Hydraulic fluid power -- Positive-displacement pumps, motors and integral
   transmissions -- Methods of testing and presenting basic steady-state performance.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike

from ..errors import ModelError, PhysicsError
from .validate import non_negative, positive

__all__ = ["LEVEL_TOLERANCE", "complete_points", "count_levels", "group_points", "least_squares", "levels",
           "table_columns"]

#: Speeds (and viscosities) that agree within this relative tolerance count as one level [-]. A bench
#: motor's speed droops a little with load, and oil temperature wanders a degree or so.
LEVEL_TOLERANCE = 0.03


def _column(x: ArrayLike, name: str) -> np.ndarray:
    try:
        return np.asarray(x, dtype=float).ravel()
    except (TypeError, ValueError):
        raise PhysicsError(name, "must be numbers") from None


def table_columns(**columns: ArrayLike | None) -> dict[str, np.ndarray]:
    """Flatten the table's columns and check that they have one length (a scalar is repeated)."""
    out = {k: _column(v, k) for k, v in columns.items() if v is not None}
    length = max(a.size for a in out.values())
    for name, a in out.items():
        if a.size == 1 and length > 1:
            out[name] = np.full(length, a[0])
        elif a.size != length:
            raise PhysicsError(name, f"has {a.size} values where the table has {length} points")
    return out


def levels(x: np.ndarray, rel: float = LEVEL_TOLERANCE) -> tuple[np.ndarray, int]:
    """Label values that agree within a relative tolerance as one level; return labels and count."""
    if x.size == 0:
        return np.zeros(0, dtype=int), 0
    order = np.argsort(x, kind="stable")
    xs = x[order]
    new = np.r_[True, np.diff(xs) > rel * np.maximum(np.abs(xs[1:]), 1e-300)]
    labels = np.empty(x.size, dtype=int)
    labels[order] = np.cumsum(new) - 1
    return labels, int(new.sum())


def count_levels(x: np.ndarray) -> int:
    """How many levels ``x`` takes (:func:`levels`), at least 2 where its values spread wider than the
    level tolerance: a continuous sweep or a densely logged table chains into one level, yet varies."""
    _, count = levels(x)
    if count == 1 and float(x.max() - x.min()) > LEVEL_TOLERANCE * float(np.abs(x).max()):
        return 2
    return count


def least_squares(columns: list[np.ndarray], y: np.ndarray, what: str) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Linear least squares with column scaling; returns coefficients, their covariance, residuals.

    The covariance is s²·(AᵀA)⁻¹ with s² = RSS/(N − p); it is NaN when no point is redundant.
    """
    a = np.column_stack(columns)
    # LAPACK given a NaN or an infinity prints its own complaint on standard output (it once made
    # --format json invalid): such a table is refused here, before LAPACK sees it.
    if not (np.isfinite(a).all() and np.isfinite(y).all()):
        raise ModelError(what, "cannot be fitted: a term of the model is too large or too small to compute")
    # Columns differ by many orders of magnitude (rev/s against Pa); scale them for a sound rank.
    scale = np.abs(a).max(axis=0)
    scale[scale == 0] = 1.0
    a_s = a / scale
    coef, _, rank, _ = np.linalg.lstsq(a_s, y, rcond=None)
    if rank < a.shape[1]:
        raise ModelError(what, "cannot be fitted: its terms cannot be separated in this table (singular)")
    resid = y - a_s @ coef
    dof = y.size - a.shape[1]
    s2 = float(resid @ resid) / dof if dof > 0 else math.nan
    cov = s2 * np.linalg.inv(a_s.T @ a_s)
    return coef / scale, cov / np.outer(scale, scale), resid


def _groups(n: np.ndarray, mu: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """One label per (speed level, viscosity level) among the masked points; -1 elsewhere.

    Labels rise with the speed level, then the viscosity level.
    """
    labels = np.full(n.size, -1, dtype=np.int64)
    if mask.any():
        ln, _ = levels(n[mask])
        lm, count = levels(mu[mask])
        labels[mask] = ln.astype(np.int64) * max(count, 1) + lm
    return labels


def group_points(speed: ArrayLike, pressure: ArrayLike, viscosity: ArrayLike,
                 mask: ArrayLike | None = None) -> list[np.ndarray]:
    """Indices of the points measured at one speed and one viscosity, each group by rising pressure.

    Speeds (and viscosities) that agree within :data:`LEVEL_TOLERANCE` (relative, between neighbours
    in sorted order) count as one level. Groups come by rising speed level, then viscosity level;
    points outside ``mask`` belong to none. One sort of the whole table: O(N log N) in time, O(N) in
    memory, however many groups there are.

    Parameters
    ----------
    speed, pressure, viscosity : array
        Shaft speed [rev/s], pressure rise [Pa] and dynamic viscosity [Pa·s] of each point.
    mask : array of bool, optional
        The points to group (default all).

    Examples
    --------
    >>> [g.tolist() for g in group_points([25.0, 25.1, 40.0, 25.0], [2e7, 1e7, 1e7, 5e6], 0.03)]
    [[3, 1, 0], [2]]
    """
    t = table_columns(speed=speed, pressure=pressure, viscosity=viscosity)
    n, p, mu = t["speed"], t["pressure"], t["viscosity"]
    keep = np.ones(n.size, dtype=bool) if mask is None else np.broadcast_to(np.asarray(mask, dtype=bool), n.shape)
    labels = _groups(n, mu, keep)
    idx = np.flatnonzero(labels >= 0)
    if idx.size == 0:
        return []
    idx = idx[np.lexsort((p[idx], labels[idx]))]
    cuts = np.flatnonzero(np.diff(labels[idx])) + 1
    return np.split(idx, cuts)


def complete_points(speed: ArrayLike, pressure: ArrayLike, flow: ArrayLike, torque: ArrayLike, viscosity: ArrayLike
                    ) -> tuple[dict[str, np.ndarray], list[str]]:
    """The table's complete points as columns (those with a missing value left out, said in the notes),
    checked: speed [rev/s] and torque [N·m] and viscosity [Pa·s] > 0, pressure [Pa] and flow [m³/s] >= 0."""
    t = table_columns(speed=speed, pressure=pressure, flow=flow, torque=torque, viscosity=viscosity)
    finite = np.logical_and.reduce([np.isfinite(a) for a in t.values()])
    notes = []
    if not finite.all():
        notes.append(f"{int((~finite).sum())} point(s) with a missing value left out")
    t = {k: a[finite] for k, a in t.items()}
    if t["speed"].size == 0:
        raise ModelError("flow", "has no complete point")
    positive(t["speed"], "speed")
    non_negative(t["pressure"], "pressure")
    non_negative(t["flow"], "flow")
    positive(t["torque"], "torque")
    positive(t["viscosity"], "viscosity")
    return t, notes
