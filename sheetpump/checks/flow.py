"""Flow: the flow the pump delivers after its volumetric losses against the flow the machine needs.

The flow margin m raises a required flow Q to Q·(1 + m). Without a volumetric efficiency the delivered
flow is the geometric flow V·n, an upper bound: a pass is then not proven.
"""

from __future__ import annotations

import dataclasses

from ..units import FLOW
from .context import Context
from .findings import PASS, WARN, Finding
from .limits import bound
from .registry import rule

__all__ = ["delivered"]


@rule("flow.delivered", "delivered flow after volumetric losses at least the required flow")
def delivered(ctx: Context) -> Finding:
    app, est = ctx.app, ctx.estimate
    need = ctx.duty.flow * (1 + app.flow_margin)
    note = f" (required flow plus a {app.flow_margin:.0%} margin)" if app.flow_margin else ""
    f = bound(ctx, "flow.delivered", est.flow, need, False, FLOW, ctx.ds.where("displacement"),
              active=need > 0, what="no flow required", rating_note=note, check_nan=True)
    if est.volumetric_known or f.severity != PASS:
        return f
    # No η_v: the geometric flow is an upper bound, so a pass is not proven.
    return dataclasses.replace(f, severity=WARN, message=f.message + "; not proven: the datasheet states no "
                               "volumetric efficiency, so the flow is the geometric flow V·n (an upper bound)",
                               where=ctx.ds.where("volumetric_efficiency"))
