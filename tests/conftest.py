"""Settings shared by the test suite: hypothesis profiles.

* ``ci`` (the default): derandomised, so every run of the suite — on any machine, in CI — tries the
  same examples and is green or red for a reason, never by chance; no example database (nothing read
  from or written to ``.hypothesis/``); no deadline, since a shared 2-core machine makes any time limit
  a coin toss.
* ``campaign``: random and long (20,000 examples per test unless ``SHEETPUMP_FUZZ_EXAMPLES`` says
  otherwise), with the local example database so a failure replays. Run it with
  ``SHEETPUMP_FUZZ_PROFILE=campaign python -m pytest tests/test_fuzz_cells.py`` (DEVELOPERS.md); every
  failure it finds is fixed and kept as an ``@example`` regression.
"""

from __future__ import annotations

import os

from hypothesis import settings

settings.register_profile("ci", derandomize=True, database=None, deadline=None, print_blob=True)
settings.register_profile("campaign", derandomize=False, max_examples=20_000, deadline=None, print_blob=True)
settings.load_profile(os.environ.get("SHEETPUMP_FUZZ_PROFILE", "ci"))
