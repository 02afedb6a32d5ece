"""Every output of every command: never over an input, never half-written, one clear line when impossible.

Table-driven over each command that writes × each of its output options × each way an output can go
wrong:

- **is an input** (for each input of the command): the same path, another spelling (``./sub/../x``),
  a hard link (same device and inode) and a symlink to it;
- **two outputs of one command are one file** (same path, other spelling, hard link, symlink);
- **cannot be written**: the output is a folder (for ``demo``, whose output is a folder: a file), its
  parent is a file, a missing folder under a file, a read-only folder (root ignores permissions: there the
  real read-only folder is skipped and the refusal simulated, see the ``read_only`` fixture).

Each refusal must be: exit code 2, exactly one line on stderr naming the option and the path, no
traceback, every input byte-for-byte unchanged (SHA-256), nothing written and no temporary ``.part``
file left behind. Then the mode of what is written (issue: outputs were ``-rw-------`` whatever the
umask): a new output gets the mode a plain ``open(..., "w")`` gives under the same umask, and replacing
an existing output keeps that file's mode.

Commands are run in-process through ``sheetpump.cli.main`` with the demo's invented inputs, as in
``tests/hostile/test_corpus.py``.
"""

from __future__ import annotations

import errno
import os
import stat
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pytest

from sheetpump import demo
from sheetpump import files as files_module
from sheetpump.cli import main
from sheetpump.files import sha256
from sheetpump.workbooks.templates import write_template


@pytest.fixture(scope="module")
def inputs(tmp_path_factory) -> dict[str, Path]:
    """The demo's application and one datasheet (its Performance sheet is also the measured table for
    ``evaluate`` and the workbook for ``recalc``), and an application whose duty is a CSV log."""
    folder = tmp_path_factory.mktemp("inputs")
    paths = demo.write_inputs(folder)
    (folder / "sub").mkdir()  # for the spelling ./sub/../x
    log = folder / "log.csv"
    # an invented press cycle as a logger would write it
    log.write_text("time [s],pressure [bar],flow [L/min]\n0,100,40\n0.5,150,38\n1.5,200,36\n1.7,120,38\n")
    app_log = write_template("application", folder / "app-log.xlsx", {**demo.MACHINE, "duty_series": ("log.csv",)})
    return {"app": paths[0], "datasheet": paths[1], "log": log, "app_log": app_log, "folder": folder,
            "series": demo.write_series(folder)[-1]}


@pytest.fixture(scope="module")
def fingerprints(inputs) -> dict[Path, str]:
    return {p: sha256(p) for p in inputs["folder"].rglob("*") if p.is_file()}


@dataclass(frozen=True)
class Output:
    """One output option of one command: how to build its command line, and which inputs it reads."""

    command: str
    option: str
    argv: Callable[[dict[str, Path], str], list[str]]
    inputs: tuple[str, ...]  # keys of the inputs fixture
    folder: bool = False  # the output is a folder (demo)

    def __str__(self) -> str:
        return f"{self.command} {self.option}"


def _check(option: str) -> Callable[[dict[str, Path], str], list[str]]:
    return lambda i, out: ["check", "--app", str(i["app"]), str(i["datasheet"]), option, out]


OUTPUTS = (
    Output("check", "--output", _check("-o"), ("app", "datasheet")),
    Output("check", "--junit", _check("--junit"), ("app", "datasheet")),
    Output("check", "--annotate", _check("--annotate"), ("app", "datasheet")),
    Output("compare", "--output", lambda i, out: ["compare", "--app", str(i["app"]), str(i["datasheet"]), "-o", out],
           ("app", "datasheet")),
    Output("evaluate", "--output", lambda i, out: ["evaluate", str(i["datasheet"]), "-o", out], ("datasheet",)),
    Output("recalc", "--output", lambda i, out: ["recalc", str(i["datasheet"]), "-o", out], ("datasheet",)),
    Output("template", "--output", lambda i, out: ["template", "datasheet", "-o", out], ()),
    *(Output("select", option, lambda i, out, o=option: ["select", "--app", str(i["app"]), str(i["series"]), o, out],
             ("app", "series")) for option in ("--output", "--junit", "--report")),
    Output("demo", "--output", lambda i, out: ["demo", "-o", out], (), folder=True),
)


# --- ways to name an existing file --------------------------------------------------------------------

def _same(path: Path, tmp: Path) -> str:
    return str(path)


def _other_spelling(path: Path, tmp: Path) -> str:
    # relative, through a folder and back: the run's working folder is the file's folder
    return os.path.join(".", "sub", "..", path.name)


def _hard_link(path: Path, tmp: Path) -> str:
    link = tmp / f"hard-{path.name}"
    os.link(path, link)
    return str(link)


def _symlink(path: Path, tmp: Path) -> str:
    link = tmp / f"sym-{path.name}"
    link.symlink_to(path)
    return str(link)


SPELLINGS = {"same path": _same, "other spelling": _other_spelling, "hard link": _hard_link,
             "symlink": _symlink}


def _leftovers(*folders: Path) -> list[Path]:
    return [p for f in folders for p in f.rglob("*") if p.name.endswith(".part")]


def _refused(capsys, argv: list[str], option: str, path: str) -> str:
    """Run ``argv``; assert the one-line refusal naming ``option`` and ``path``; return the line."""
    code = main(argv)
    out, err = capsys.readouterr()
    assert "Traceback" not in err, err
    assert code == 2, (argv, code, out, err)
    lines = err.strip().splitlines()
    assert len(lines) == 1, lines
    line = lines[0]
    assert line.startswith("sheetpump: error: "), line
    assert path in line and f"({option})" in line, line
    return line


def _unchanged(fingerprints: dict[Path, str]) -> None:
    assert {p: sha256(p) for p in fingerprints} == fingerprints


# --- an output that is an input ----------------------------------------------------------------------

INPUT_CASES = [pytest.param(o, role, spelling, id=f"{o.command}-{o.option}-{role}-{spelling}")
               for o in OUTPUTS for role in o.inputs for spelling in SPELLINGS]


@pytest.mark.parametrize(("output", "role", "spelling"), INPUT_CASES)
def test_an_output_that_is_an_input_is_refused(output, role, spelling, inputs, fingerprints, tmp_path,
                                                monkeypatch, capsys):
    monkeypatch.chdir(inputs["folder"])
    target = SPELLINGS[spelling](inputs[role], tmp_path)
    line = _refused(capsys, output.argv(inputs, target), output.option, target)
    assert "overwrite" in line and "an input" in line, line
    _unchanged(fingerprints)
    assert sha256(target) == fingerprints[inputs[role]]  # the link still shows the input's bytes
    assert _leftovers(inputs["folder"], tmp_path) == []


@pytest.mark.parametrize("spelling", SPELLINGS)
@pytest.mark.parametrize("option", ["-o", "--junit", "--annotate"])
def test_an_output_that_is_the_duty_log_is_refused(option, spelling, inputs, fingerprints, tmp_path, monkeypatch,
                                                   capsys):
    # The application's duty is read from a CSV log the application workbook names: an input too.
    monkeypatch.chdir(inputs["folder"])
    target = SPELLINGS[spelling](inputs["log"], tmp_path)
    argv = ["check", "--app", str(inputs["app_log"]), str(inputs["datasheet"]), option, target]
    long_option = {"-o": "--output"}.get(option, option)
    assert "duty log" in _refused(capsys, argv, long_option, target)
    _unchanged(fingerprints)
    assert _leftovers(inputs["folder"], tmp_path) == []


def test_compare_refuses_to_write_over_the_duty_log(inputs, fingerprints, tmp_path, capsys):
    argv = ["compare", "--app", str(inputs["app_log"]), str(inputs["datasheet"]), "-o", str(inputs["log"])]
    assert "duty log" in _refused(capsys, argv, "--output", str(inputs["log"]))
    _unchanged(fingerprints)


# --- two outputs of one command that are one file ----------------------------------------------------

PAIRS = [("-o", "--junit"), ("-o", "--annotate"), ("--junit", "--annotate")]


@pytest.mark.parametrize("spelling", SPELLINGS)
@pytest.mark.parametrize(("first", "second"), PAIRS)
def test_two_outputs_that_are_one_file_are_refused(first, second, spelling, inputs, fingerprints, tmp_path,
                                                   monkeypatch, capsys):
    earlier = tmp_path / "earlier-output"
    earlier.write_text("an earlier output\n")  # hard links and symlinks need a file to point at
    monkeypatch.chdir(tmp_path)
    (tmp_path / "sub").mkdir()
    other = SPELLINGS[spelling](earlier, tmp_path / "sub")
    argv = ["check", "--app", str(inputs["app"]), str(inputs["datasheet"]), first, str(earlier), second, other]
    # --annotate is checked first, then --junit, then -o: the later of the two is named
    order = ["--annotate", "--junit", "-o"]
    named, path = (second, other) if order.index(second) > order.index(first) else (first, str(earlier))
    line = _refused(capsys, argv, {"-o": "--output"}.get(named, named), path)
    assert "same file" in line, line
    assert earlier.read_text() == "an earlier output\n"
    _unchanged(fingerprints)
    assert _leftovers(tmp_path) == []


def test_an_annotated_copy_of_several_datasheets_clashing_with_the_report_is_refused(inputs, tmp_path, capsys):
    # With several datasheets, --annotate OUT.xlsx writes OUT-<datasheet>.xlsx: that may be the -o file.
    second = tmp_path / "second.xlsx"
    second.write_bytes(inputs["datasheet"].read_bytes())
    clash = tmp_path / f"marked-{inputs['datasheet'].stem}.xlsx"
    argv = ["check", "--app", str(inputs["app"]), str(inputs["datasheet"]), str(second),
            "--annotate", str(tmp_path / "marked.xlsx"), "-o", str(clash)]
    assert "same file" in _refused(capsys, argv, "--output", str(clash))
    assert not clash.exists() and _leftovers(tmp_path) == []


# --- outputs that cannot be written ------------------------------------------------------------------

def _a_folder(tmp: Path, output: Output) -> str:
    if output.folder:  # the demo's output is a folder: the wrong kind is a file
        (tmp / "a-file").write_text("not a folder\n")
        return str(tmp / "a-file")
    (tmp / "a-folder").mkdir()
    return str(tmp / "a-folder")


def _parent_is_a_file(tmp: Path, output: Output) -> str:
    (tmp / "notes.txt").write_text("a file, not a folder\n")
    return str(tmp / "notes.txt" / "out.xlsx")


def _missing_folder_under_a_file(tmp: Path, output: Output) -> str:
    (tmp / "notes.txt").write_text("a file, not a folder\n")
    return str(tmp / "notes.txt" / "results" / "out.xlsx")


UNWRITABLE = {"is a folder (demo: a file)": _a_folder, "parent is a file": _parent_is_a_file,
              "missing folder under a file": _missing_folder_under_a_file}


def _snapshot(folder: Path) -> dict[str, str]:
    return {str(p.relative_to(folder)): sha256(p) if p.is_file() else "folder" for p in folder.rglob("*")}


@pytest.mark.parametrize("kind", UNWRITABLE)
@pytest.mark.parametrize("output", OUTPUTS, ids=str)
def test_an_output_that_cannot_be_written_is_refused(output, kind, inputs, fingerprints, tmp_path, capsys):
    target = UNWRITABLE[kind](tmp_path, output)
    before = _snapshot(tmp_path)
    _refused(capsys, output.argv(inputs, target), output.option, target)
    assert _snapshot(tmp_path) == before  # nothing written, no temporary file, no folder made
    _unchanged(fingerprints)


@pytest.fixture(params=["chmod 555", "os.access denies"])
def read_only(request, tmp_path, monkeypatch):
    """A folder without write permission: really (mode 0555, restored afterwards so that pytest can clean
    up), or as sheetpump is told by ``os.access``, which also works for root."""
    folder = tmp_path / "read-only"
    folder.mkdir()
    if request.param == "os.access denies":
        real_access = os.access
        monkeypatch.setattr(files_module.os, "access",
                            lambda p, mode, **kw: False if Path(p) == folder else real_access(p, mode, **kw))
        yield folder
        return
    folder.chmod(0o555)
    if os.access(folder, os.W_OK):
        folder.chmod(0o755)
        # root (or CAP_DAC_OVERRIDE) writes into a 0555 folder anyway, so there is no read-only folder to
        # test with here; the "os.access denies" case and test_a_write_the_system_refuses_... simulate the
        # refusal for root, and the parent-is-a-file cases above cover a real impossible write.
        pytest.skip("running as root: permissions are not enforced, a 0555 folder is writable")
    yield folder
    folder.chmod(0o755)


@pytest.mark.parametrize("output", OUTPUTS, ids=str)
def test_an_output_in_a_read_only_folder_is_refused(output, read_only, inputs, fingerprints, capsys):
    target = str(read_only / ("results" if output.folder else "out.xlsx"))
    line = _refused(capsys, output.argv(inputs, target), output.option, target)
    assert "permission" in line, line
    assert list(read_only.iterdir()) == []
    _unchanged(fingerprints)


@pytest.mark.parametrize("output", OUTPUTS, ids=str)
def test_a_write_the_system_refuses_is_one_line_and_leaves_nothing(output, tmp_path, inputs, fingerprints,
                                                                  monkeypatch, capsys):
    # Works for root too: the system refuses to create the temporary file (as a read-only file system or a
    # folder without permission does), although the checks before writing passed.
    real_open = os.open

    def refusing_open(path, flags, *args, **kwargs):
        if str(path).endswith(".part"):
            raise PermissionError(errno.EACCES, "Permission denied", str(path))
        return real_open(path, flags, *args, **kwargs)

    monkeypatch.setattr(files_module.os, "open", refusing_open)
    target = tmp_path / ("results" if output.folder else "out.xlsx")
    code = main(output.argv(inputs, str(target)))
    _, err = capsys.readouterr()
    assert code == 2 and "Traceback" not in err, err
    assert len(err.strip().splitlines()) == 1 and "cannot be written" in err, err
    assert str(tmp_path) in err, err  # names the file it could not write (for demo: one inside its folder)
    assert _leftovers(tmp_path) == [] and not (target.is_file())
    _unchanged(fingerprints)


# --- the mode of what is written ----------------------------------------------------------------------

def _plain_write_mode(folder: Path) -> int:
    """The mode ``open(..., "w")`` gives a new file under the current umask: the reference."""
    probe = folder / "probe.txt"
    with open(probe, "w") as handle:
        handle.write("x")
    mode = stat.S_IMODE(probe.stat().st_mode)
    probe.unlink()
    return mode


def _written(output: Output, target: Path) -> list[Path]:
    return sorted(p for p in target.rglob("*") if p.is_file()) if output.folder else [target]


@pytest.fixture(params=[0o022, 0o027, 0o002], ids=lambda u: f"umask-{u:03o}")
def umask(request):
    old = os.umask(request.param)
    yield request.param
    os.umask(old)


@pytest.mark.parametrize("output", OUTPUTS, ids=str)
def test_a_new_output_gets_the_mode_a_plain_write_gives(output, umask, inputs, tmp_path, capsys):
    target = tmp_path / ("results" if output.folder else "out.xlsx")
    assert main(output.argv(inputs, str(target))) in (0, 1)
    capsys.readouterr()
    expected = _plain_write_mode(tmp_path)
    # POSIX open(2): a new file's mode is the requested 0666 less the umask (0644 under umask 022)
    assert expected == 0o666 & ~umask
    written = _written(output, target)
    assert written
    for path in written:
        assert oct(stat.S_IMODE(path.stat().st_mode)) == oct(expected), path


@pytest.mark.parametrize("mode", [0o664, 0o600, 0o640])
@pytest.mark.parametrize("output", [o for o in OUTPUTS if not o.folder and o.command != "template"], ids=str)
def test_replacing_an_output_keeps_its_mode(output, mode, inputs, tmp_path, capsys):
    target = tmp_path / "out.xlsx"
    target.write_text("an earlier output\n")
    target.chmod(mode)
    assert main(output.argv(inputs, str(target))) in (0, 1)
    capsys.readouterr()
    assert target.read_text(errors="replace") != "an earlier output\n"  # it was replaced
    assert oct(stat.S_IMODE(target.stat().st_mode)) == oct(mode)


def test_template_force_keeps_the_mode(inputs, tmp_path, capsys):
    target = tmp_path / "pump.xlsx"
    target.write_text("an earlier file\n")
    target.chmod(0o664)
    assert main(["template", "datasheet", "-o", str(target), "--force"]) == 0
    capsys.readouterr()
    assert target.read_bytes()[:2] == b"PK" and stat.S_IMODE(target.stat().st_mode) == 0o664
