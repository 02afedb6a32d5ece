"""Pure physics: SI numbers or numpy arrays in, SI numbers out. No units, files or spreadsheets.

The modules, each one topic: :mod:`~.validate` (the argument validators), :mod:`~.pump` (flow, power,
torque, efficiencies), :mod:`~.fluid` (viscosity and density of the oil), :mod:`~.drive` (duty-cycle
power and the electric motor), :mod:`~.start` (starting an induction motor), :mod:`~.suction` (the
suction line), and for a measured performance table :mod:`~.table` (its columns and levels),
:mod:`~.measured` (per-point evaluation), :mod:`~.displacement` (derived displacement, the ISO 8426
idea), :mod:`~.wilson` (Wilson's loss model and its fit) and :mod:`~.prediction` (the model of a
table and the ``SP_PREDICT_*`` formulas). Their public functions are re-exported here.
"""

from .displacement import *  # noqa: F403
from .drive import *  # noqa: F403
from .fluid import *  # noqa: F403
from .measured import *  # noqa: F403
from .prediction import *  # noqa: F403
from .pump import *  # noqa: F403
from .start import *  # noqa: F403
from .suction import *  # noqa: F403
from .table import *  # noqa: F403
from .validate import *  # noqa: F403
from .wilson import *  # noqa: F403
