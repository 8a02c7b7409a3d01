"""bandcast from Python: photoelectron spectra predicted from first principles.

Each function takes a structure file (XYZ, MOL or SD; ``"file.sdf#2"`` for record 2) and
keyword options named like the command line's (``basis=``, ``method=``, ``element=``,
``photon=`` …, with ``-`` written ``_``), runs the same code as ``bandcast COMMAND … --json``
and returns the same dictionary. Spectrum curves come back as NumPy arrays.

Errors raise :class:`InputError` (bad input: the command's exit code 2) or
:class:`ComputationError` (the computation failed: exit code 1), with the command's message.

Predictions guide a measurement; they do not replace it.
"""

from __future__ import annotations

import json
import os
from typing import Any, Iterable

import numpy as np

from . import _native

InputError = _native.InputError
ComputationError = _native.ComputationError

__all__ = ["scf", "ionize", "core", "spectrum", "assign", "InputError", "ComputationError"]


def _option(name: str, value: Any) -> list[str]:
    flag = "--" + name.replace("_", "-")
    if value is None or value is False:
        return []
    if value is True:
        return [flag]
    if isinstance(value, (list, tuple)):
        if name in ("window",) and len(value) == 2:
            return [flag, f"{value[0]}:{value[1]}"]
        return [flag, ",".join(str(v) for v in value)]
    return [flag, str(value)]


def _argv(command: str, files: Iterable[str], options: dict[str, Any]) -> list[str]:
    argv = [command, *[os.fspath(f) for f in files]]
    for name, value in options.items():
        if name == "json":
            raise InputError("json= is implied: the result is always the JSON dictionary")
        argv += _option(name, value)
    return argv + ["--json"]


def _run(command: str, files: Iterable[str], options: dict[str, Any]) -> dict:
    text = _native.run(_argv(command, files, options))
    return json.loads(text)


def _arrays(result: dict) -> dict:
    """Curves as NumPy arrays: every list of numbers under a key named `curve` (or inside it)."""
    def convert(v: Any) -> Any:
        if isinstance(v, dict):
            return {k: convert(x) for k, x in v.items()}
        if isinstance(v, list) and v and all(isinstance(x, (int, float)) for x in v):
            return np.asarray(v, dtype=float)
        if isinstance(v, list) and v and all(isinstance(x, list) and x and all(isinstance(y, (int, float)) for y in x) for x in v):
            return np.asarray(v, dtype=float)
        return v
    for key in ("curve", "measured", "aligned", "trace"):
        if key in result:
            result[key] = convert(result[key])
    return result


def scf(structure: str, **options: Any) -> dict:
    """Hartree–Fock ground state, as `bandcast scf STRUCTURE --json`."""
    return _run("scf", [structure], options)


def ionize(structure: str, **options: Any) -> dict:
    """Valence ionization energies (labelled bands), as `bandcast ionize STRUCTURE --json`."""
    return _run("ionize", [structure], options)


def core(structure: str, **options: Any) -> dict:
    """Core-level binding energies and shifts, as `bandcast core STRUCTURE --json`."""
    return _run("core", [structure], options)


def spectrum(structures: str | Iterable[str], **options: Any) -> dict:
    """A broadened spectrum, as `bandcast spectrum FILE[:WEIGHT]… --json`; `curve` as arrays.

    `structures` is one file or a list (a mixture; ``"file.xyz:0.2"`` weights a component).
    """
    files = [structures] if isinstance(structures, (str, os.PathLike)) else list(structures)
    return _arrays(_run("spectrum", files, options))


def assign(structure: str, **options: Any) -> dict:
    """Match a measured trace (``measured="trace.csv"``), as `bandcast assign … --json`."""
    return _arrays(_run("assign", [structure], options))
