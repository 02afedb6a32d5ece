"""Finding LibreOffice, its Python bridge and its extension manager (``unopkg``).

Every problem is an :class:`~sheetpump.errors.InputError` with one line saying what to do, so the
command line prints it and exits with code 2.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
import uuid
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError

__all__ = ["SOFFICE_ENV", "Office", "find_office", "office_environment", "python_mismatch"]

#: Optional path of the soffice executable, when it is not on PATH (the tests use the same variable).
SOFFICE_ENV = "SHEETPUMP_SOFFICE"

_KNOWN_PLACES = (
    "/Applications/LibreOffice.app/Contents/MacOS/soffice",
    r"C:\Program Files\LibreOffice\program\soffice.exe",
)
# The Python bridge's library in LibreOffice's program folder (Linux, macOS, Windows).
_BRIDGES = ("libpyuno.so", "libpyuno.dylib", "pyuno.pyd")
_BRIDGE_PACKAGE = "python3-uno"
_TIMEOUT = 300.0


def office_environment() -> dict[str, str]:
    """The environment to start LibreOffice with: this one without an active virtual environment.

    LibreOffice's embedded Python finds its home through ``python3`` on PATH; an activated virtual
    environment's ``bin`` first on PATH makes it take that environment's (other) Python installation for
    its own, and loading Python components then fails at random (seen with LibreOffice 7.4 as
    ``std::bad_alloc`` from its Python loader). The extension finds sheetpump through the paths recorded
    at build time, so it needs nothing of the virtual environment.
    """
    env = {k: v for k, v in os.environ.items() if k not in ("VIRTUAL_ENV", "PYTHONHOME", "PYTHONPATH")}
    venvs = [sys.prefix] if sys.prefix != sys.base_prefix else []
    if os.environ.get("VIRTUAL_ENV"):
        venvs.append(os.environ["VIRTUAL_ENV"])
    bins = {os.path.normpath(os.path.join(v, b)) for v in venvs for b in ("bin", "Scripts")}
    paths = [p for p in env.get("PATH", "").split(os.pathsep) if p and os.path.normpath(p) not in bins]
    env["PATH"] = os.pathsep.join(paths)
    return env


@dataclass(frozen=True)
class Office:
    """An installed LibreOffice: its program folder, ``unopkg`` and the Python its bridge runs."""

    soffice: Path
    unopkg: Path
    #: (major, minor) of the Python LibreOffice runs extensions with, None when it cannot be told.
    python: tuple[int, int] | None

    def _run(self, command: list[str], what: str) -> subprocess.CompletedProcess[str]:
        try:
            done = subprocess.run(command, capture_output=True, text=True, timeout=_TIMEOUT,
                                  stdin=subprocess.DEVNULL, check=False, env=office_environment())
        except (OSError, subprocess.TimeoutExpired) as exc:
            raise InputError(f"LibreOffice could not {what} the extension: {exc}") from None
        if done.returncode != 0:
            lines = (done.stderr or done.stdout).strip().splitlines()
            raise InputError(f"LibreOffice could not {what} the extension: {lines[-1] if lines else 'no message'}")
        return done

    def manage(self, action: str, identifier: str, oxt: Path | None = None,
               profile: Path | None = None) -> str:
        """``list`` (the installed version, or ""), ``add`` or ``remove`` the extension for the user.

        Through ``unopkg``; as root, which ``unopkg`` refuses a user install, through the extension
        manager of a headless LibreOffice started for the purpose (:mod:`sheetpump.extension.manager`).
        """
        env = [f"-env:UserInstallation={Path(profile).resolve().as_uri()}"] if profile is not None else []
        if not (hasattr(os, "geteuid") and os.geteuid() == 0):
            args = {"list": ["list", identifier], "remove": ["remove", identifier],
                    "add": ["add", "--force", "--suppress-license", str(oxt)]}[action]
            try:
                done = self._run([str(self.unopkg), *args, *env], action)
            except InputError:
                if action == "list":  # unopkg list fails for an identifier it does not have
                    return ""
                raise
            found = re.search(r"Version:\s*(\S+)", done.stdout)
            return found.group(1) if found and action == "list" else ""
        return self._through_office(action, identifier, oxt, env)

    def _through_office(self, action: str, identifier: str, oxt: Path | None, env: list[str]) -> str:
        pipe = f"sheetpump-{uuid.uuid4().hex}"
        office = subprocess.Popen(
            [str(self.soffice), *env, "--headless", "--invisible", "--norestore", "--nolockcheck",
             "--nodefault", f"--accept=pipe,name={pipe};urp;"],
            stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
            start_new_session=True, env=office_environment())
        try:
            script = Path(__file__).with_name("manager.py")
            args = [pipe, action, identifier] + ([oxt.resolve().as_uri()] if oxt is not None else [])
            done = self._run([self.bridge_python(), str(script), *args], action)
            return done.stdout.strip()
        finally:
            office.terminate()
            try:
                office.wait(60)
            except subprocess.TimeoutExpired:
                office.kill()
                office.wait()

    def bridge_python(self) -> str:
        """The Python executable with LibreOffice's ``uno`` module: its own, else the system's."""
        program = self.soffice.parent
        for name in ("python", "python.exe", "python3"):
            if (program / name).is_file():
                return str(program / name)
        minor = f"python{self.python[0]}.{self.python[1]}" if self.python else None
        for name in (minor, "python3"):
            found = name and shutil.which(name, path="/usr/bin:/usr/local/bin:" + os.environ.get("PATH", ""))
            if found:
                return found
        raise InputError("LibreOffice's Python was not found", hint="install python3-uno")


def _soffice() -> Path:
    named = os.environ.get(SOFFICE_ENV)
    if named:
        if os.path.isfile(named) and os.access(named, os.X_OK):
            return Path(named)
        raise InputError(f"{SOFFICE_ENV}={named!r} is not an executable file",
                         hint="name LibreOffice's soffice or unset the variable")
    for name in ("soffice", "libreoffice"):
        found = shutil.which(name)
        if found:
            return Path(found)
    for place in _KNOWN_PLACES:
        if os.path.isfile(place):
            return Path(place)
    raise InputError("LibreOffice was not found (no soffice on PATH)",
                     hint="install LibreOffice, e.g. Debian: apt-get install libreoffice-calc-nogui python3-uno")


def _bridge_python(bridge: Path) -> tuple[int, int] | None:
    # The bridge library links the Python it was built for (libpython3.11.so, python311.dll, ...).
    data = bridge.read_bytes()
    # macOS bundles its own: .../LibreOfficePython.framework/Versions/3.x/... (from memory; untested here)
    found = (re.search(rb"libpython(\d)\.(\d+)", data) or re.search(rb"python(\d)(\d\d?)\.dll", data)
             or re.search(rb"LibreOfficePython\.framework/Versions/(\d)\.(\d+)", data))
    return (int(found.group(1)), int(found.group(2))) if found else None


def find_office() -> Office:
    """The installed LibreOffice with its Python bridge; raises :class:`InputError` when either is missing."""
    soffice = _soffice().resolve()  # /usr/bin/soffice is a link into the program folder
    program = soffice.parent
    unopkg = next((program / n for n in ("unopkg", "unopkg.exe", "unopkg.com") if (program / n).is_file()),
                  None)
    if unopkg is None:
        found = shutil.which("unopkg")
        if found is None:
            raise InputError(f"LibreOffice at {program} has no unopkg (its extension manager)",
                             hint="reinstall LibreOffice")
        unopkg = Path(found)
    # Linux and Windows: beside soffice; macOS: Contents/Frameworks beside Contents/MacOS (from memory)
    places = [program / n for n in _BRIDGES] + [program.parent / "Frameworks" / n for n in _BRIDGES]
    bridge = next((p for p in places if p.is_file()), None)
    if bridge is None:
        raise InputError(f"LibreOffice at {program} has no Python bridge",
                         hint=f"install it, e.g. Debian/Ubuntu: apt-get install {_BRIDGE_PACKAGE}")
    return Office(soffice, unopkg, _bridge_python(bridge))


def python_mismatch(office: Office) -> str | None:
    """Why LibreOffice's Python cannot load the sheetpump of this Python, or None when it can.

    Compiled packages (numpy) are built for one Python version: LibreOffice must run the same minor
    version as the Python sheetpump is installed in.
    """
    ours = sys.version_info[:2]
    if office.python is None or office.python == ours:
        return None
    theirs = ".".join(map(str, office.python))
    return (f"LibreOffice runs Python {theirs} but sheetpump is installed in Python {ours[0]}.{ours[1]}, "
            f"whose compiled packages (numpy) Python {theirs} cannot load; install sheetpump in a Python "
            f"{theirs} environment (e.g. python{theirs} -m venv) and run this command from there")
