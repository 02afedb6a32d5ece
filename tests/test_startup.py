"""Start-up shortcuts change nothing but time: the cached unit registry, one command's module, one opening.

- pint's parsed definitions are kept in a per-user cache folder; a registry loaded from it must equal one
  built from pint's definitions file, unit by unit (reference: pint's own full registry, built uncached);
- an unusable cache folder means no cache, never a failure or a folder inside the package;
- the command line imports only the named command's module, but help still lists every command;
- a workbook without formulas is not opened a second time for them.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import openpyxl
import pint
import pytest

from sheetpump import units
from sheetpump.workbooks.safe import holds_formulas

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "workbooks" / "demo"


@pytest.fixture(scope="module")
def registries(tmp_path_factory):
    """(uncached, loaded from a cache written by a first build): both with sheetpump's units."""
    folder = tmp_path_factory.mktemp("pint-cache")
    units.build_registry(folder)  # writes the cache
    assert any(folder.glob("*.pickle")), "pint wrote no cache"
    return units.build_registry(None), units.build_registry(folder)


def test_cached_registry_equals_pint_full_registry(registries):
    # Reference: pint's registry built from its definitions file without a cache (pint.UnitRegistry).
    fresh, cached = registries
    # Every unit either registry knows (pint adds prefixed ones as they are met, so the two dicts may
    # differ in those) resolves to the same root in both.
    names = sorted(set(fresh._units) | set(cached._units))
    assert len(names) > 1000
    assert set(fresh._prefixes) == set(cached._prefixes)
    for name in names:
        assert _root(cached, name) == _root(fresh, name), name  # same arithmetic: the same bits


def _root(registry, name):
    """(factor, root unit) of a unit name, or the kind of error it raises (internal names like ``R_``)."""
    try:
        factor, root = registry.get_root_units(name)
    except pint.errors.PintError as exc:
        return type(exc).__name__
    return factor, str(root)


def test_every_spelling_sheetpump_reads_parses_the_same_cached(registries):
    # The trade spellings units.py reads (its docstring) and sheetpump's own units: root factor and
    # root unit identical in both registries.
    fresh, cached = registries
    spellings = ["psi", "bar", "kW", "hp", "gallon / minute", "gpm", "lpm", "liter / minute", "cm**3",
                 "inch**3 / rev", "newton * meter", "foot * force_pound", "degC", "degF", "kelvin",
                 "mm**2 / s", "cSt", "rpm", "revolution / minute", "Hz", "bara", "psig", "kPag", "MPa",
                 "mW", "MW", "second", "hour", "kg / m**3", "lb / ft**3", "percent"]
    for text in spellings:
        f_factor, f_root = fresh.get_root_units(fresh.parse_units(text))
        c_factor, c_root = cached.get_root_units(cached.parse_units(text))
        assert (c_factor, str(c_root)) == (f_factor, str(f_root)), text
    # Offset units convert alike (autoconvert_offset_to_baseunit is kept).
    assert cached.Quantity(25.0, "degC").to("kelvin").magnitude == pytest.approx(298.15, abs=1e-12)


def test_unusable_cache_folder_means_no_cache(tmp_path, monkeypatch):
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("a file where the cache folder would go")
    monkeypatch.setenv("XDG_CACHE_HOME", str(blocker))
    assert units.registry_cache_folder() is None


@pytest.mark.skipif(not hasattr(os, "getuid"), reason="POSIX permissions")
def test_cache_folder_writable_by_others_is_not_used(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    folder = units.registry_cache_folder()
    assert folder is not None and folder.is_relative_to(tmp_path)
    assert not folder.is_relative_to(Path(units.__file__).parent)
    folder.chmod(0o777)
    assert units.registry_cache_folder() is None


def test_damaged_cache_is_removed_and_registry_built(tmp_path):
    folder = tmp_path / "cache"
    units.build_registry(folder)
    for pickled in folder.glob("*.pickle"):
        pickled.write_bytes(pickled.read_bytes()[:100])  # as if a writer was killed half way
    registry = units.build_registry(folder)
    assert registry.Quantity(1.0, "psi").to("Pa").magnitude == pytest.approx(6894.757293168361, rel=1e-12)
    assert not any(folder.glob("*.pickle"))  # removed, so the next start writes a sound one


def test_module_registry_is_the_one_used(monkeypatch):
    assert isinstance(units.ureg, pint.UnitRegistry)
    assert units.to_si("3000 psi", units.PRESSURE, "pressure") == pytest.approx(20684271.87950509, rel=1e-12)


def test_command_imports_only_its_module():
    code = ("import sys; from sheetpump.cli import main; main(['rules']); "
            "print('RECALC' if 'sheetpump.recalc' in sys.modules else 'NO-RECALC')")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip().endswith("NO-RECALC")
    help_text = subprocess.run([sys.executable, "-m", "sheetpump", "--help"], capture_output=True,
                               text=True, cwd=ROOT).stdout
    for command in ("check", "compare", "recalc", "template"):
        assert command in help_text


def test_holds_formulas(tmp_path):
    assert not holds_formulas(DEMO / "baling-press.xlsx")
    book = openpyxl.Workbook()
    book.active["A1"] = 2
    book.active["B1"] = "=A1*2"
    book.save(tmp_path / "f.xlsx")
    assert holds_formulas(tmp_path / "f.xlsx")
    (tmp_path / "bad.xlsx").write_bytes(b"not a zip")
    assert holds_formulas(tmp_path / "bad.xlsx")  # unsure: the full opening decides
