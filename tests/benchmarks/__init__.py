"""Speed benchmarks of sheetpump against plain references (not tests: ``python -m tests.benchmarks.run``)."""
