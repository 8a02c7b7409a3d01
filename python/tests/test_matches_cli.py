"""The Python functions give the same result as the command line's --json, to the last digit
(same code path, same options), and raise the command's errors as exceptions."""

import json
import os
import pathlib
import subprocess

import numpy as np
import pytest

import bandcast

ROOT = pathlib.Path(__file__).resolve().parents[2]
GW = ROOT / "tests" / "data" / "gw100"


def cli(*args):
    exe = os.environ.get("BANDCAST_BIN", str(ROOT / "target" / "release" / "bandcast"))
    out = subprocess.run([exe, *args, "--json"], capture_output=True, text=True, check=True)
    return json.loads(out.stdout)


def test_water_ionize_equals_cli():
    py = bandcast.ionize(str(GW / "water.xyz"), basis="cc-pVDZ", method="ep2")
    assert py == cli("ionize", str(GW / "water.xyz"), "--basis", "cc-pVDZ", "--method", "ep2")
    assert py["bands"][0]["label"] == "1b1"


def test_nitrogen_default_method_equals_cli():
    py = bandcast.ionize(str(GW / "nitrogen.xyz"), basis="cc-pVDZ", count=3)
    assert py == cli("ionize", str(GW / "nitrogen.xyz"), "--basis", "cc-pVDZ", "--count", "3")


def test_core_level_equals_cli():
    # STO-3G: the default core method is ΔCCSD(T) for a molecule this small
    py = bandcast.core(str(GW / "water.xyz"), basis="sto-3g", quick=True)
    assert py == cli("core", str(GW / "water.xyz"), "--basis", "sto-3g", "--quick")


def test_spectrum_curve_is_numpy():
    py = bandcast.spectrum(str(GW / "water.xyz"), basis="sto-3g", method="koopmans", photon="he2")
    ref = cli("spectrum", str(GW / "water.xyz"), "--basis", "sto-3g", "--method", "koopmans", "--photon", "he2")
    assert py["bands"] == ref["bands"]
    curve = py["curve"]
    assert any(isinstance(v, np.ndarray) for v in (curve.values() if isinstance(curve, dict) else [curve]))


def test_bad_input_raises_input_error_with_the_message():
    with pytest.raises(bandcast.InputError, match="basis"):
        bandcast.scf(str(GW / "water.xyz"), basis="no-such-set")
    with pytest.raises(bandcast.InputError):
        bandcast.scf(str(ROOT / "no" / "such.xyz"), basis="sto-3g")
