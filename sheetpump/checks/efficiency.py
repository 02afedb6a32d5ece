"""What the pump's efficiencies rest on: a performance table (measured or extrapolated) or single values.

The torque and the delivered flow of every other rule come from these efficiencies
(:func:`sheetpump.performance.estimate`), so a reviewer sees here how far to trust them.
"""

from __future__ import annotations

import numpy as np

from .context import Context
from .findings import INFO, WARN, Finding
from .registry import rule

__all__ = ["basis"]


@rule("performance.basis", "what the efficiencies rest on")
def basis(ctx: Context) -> Finding:
    ds, est = ctx.ds, ctx.estimate
    notes = "; ".join(est.notes)
    if est.basis == "table":
        n_extra = int(np.count_nonzero(est.extrapolated))
        share = float(np.sum(ctx.duty.duration, where=est.extrapolated) / ctx.cycle) if ctx.cycle else 0.0
        where = ds.performance.where if ds.performance is not None else ds.where("performance")
        if n_extra:
            return Finding(rule="performance.basis", severity=WARN, message=f"{notes}; {n_extra} segment(s) "
                           "outside the table's range (extrapolated)", count=n_extra, share=share,
                           segments=ctx.listed(est.extrapolated), where=where)
        return Finding(rule="performance.basis", severity=INFO, message=notes, where=where)
    field_name = "volumetric_efficiency" if ds.volumetric_efficiency is not None else "total_efficiency"
    return Finding(rule="performance.basis", severity=WARN, message=notes, segment="all segments",
                   where=ds.where(field_name))
