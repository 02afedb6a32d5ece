"""Reports: the checker's and the selection's answers as text, JSON, JUnit XML and an annotated copy.

* :mod:`.text` — the readable report of a comparison (``sheetpump check``, the demo's ``report.txt``);
* :mod:`.json_report` — the same answer, machine-readable;
* :mod:`.junit` — JUnit XML, one test case per rule, and the caution every suite carries;
* :mod:`.annotate` — a copy of a datasheet with the offending cells filled and a findings sheet;
* :mod:`.selection_report` — the selection (``sheetpump select``) as text, JSON and JUnit XML;
* :mod:`.formatting` — what they share: severity order, display units, a finding's value in its unit.

They only format: numbers come from :mod:`sheetpump.comparison` and :mod:`sheetpump.selection`, shown in
the display units of the check's settings. Files are written atomically (:mod:`sheetpump.files`).
Each module is imported where it is used, so ``import sheetpump.reports`` costs nothing.
"""
