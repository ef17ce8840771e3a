"""The command line: `state`, `species`, `check` and `solve --json` contracts."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from tests.helpers import ROOT, SAMPLES

KEYS = ("T", "P", "v", "u", "h", "s", "cv", "cp", "Z")


def cli(*args):
    return subprocess.run([sys.executable, "-m", "tui.cli", *args], capture_output=True, text=True, cwd=ROOT,
                          timeout=300)


def test_state_json_encodes_every_quantity_with_a_unit():
    out = cli("state", "N2", "--model", "peng-robinson", "--given", "T=500 K", "--given", "v=1 L/mol", "--json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    for key in KEYS:
        assert set(data[key]) == {"value", "unit"}
    # above Tc (126.2 K) and, at about 42 bar, above Pc (34 bar): supercritical
    # (the phase rule: common practice, no source)
    assert data["P"]["value"] > 33.958e5  # Pc of N2, CoolProp 8.0
    assert data["phase"] == "supercritical"
    assert data["T"] == {"value": 500.0, "unit": "K"}
    assert data["v"]["value"] == pytest.approx(1e-3)
    # every unit is one pint reads (the contract of the JSON form)
    from balance.units import Q_

    for key in KEYS:
        Q_(data[key]["value"], data[key]["unit"])


def test_state_ideal_gas_matches_gas_law():
    # P v = R T (the ideal-gas law; R = 8.314462618 J/(mol K), CODATA 2018)
    out = cli("state", "nitrogen", "--model", "ig", "--given", "T=300 K", "--given", "P=1 bar", "--json")
    data = json.loads(out.stdout)
    assert data["v"]["value"] == pytest.approx(8.314462618 * 300 / 1e5, rel=1e-12)
    assert data["Z"]["value"] == 1.0


def test_species_list_and_detail_show_sources():
    out = cli("species", "--json")
    entries = json.loads(out.stdout)
    assert len(entries) >= 40
    assert all(e["sources"] for e in entries)
    out = cli("species", "co2")
    assert out.returncode == 0 and "Sources" in out.stdout and "carbon dioxide" in out.stdout
    out = cli("species", "unobtainium")
    assert out.returncode == 2 and "unknown species" in out.stderr


def test_check_reports_degrees_of_freedom():
    out = cli("check", str(SAMPLES / "n2-buffer-into-receiver.toml"))
    assert out.returncode == 0, out.stderr
    assert "ready to solve" in out.stdout


def test_solve_json_has_the_whole_result():
    out = cli("solve", str(SAMPLES / "argon-membrane-rupture.toml"), "--json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    for key in ("states", "terms", "dU", "dU_ideal_gas", "dU_departure", "S_gen", "residual", "warnings",
                "cautions", "equations", "convention"):
        assert key in data
    assert data["residual"] < 1e-9
    # the ideal-gas and departure parts add up to ΔU (definition of the split)
    assert data["dU_ideal_gas"]["value"] + data["dU_departure"]["value"] == pytest.approx(data["dU"]["value"], abs=1e-6)
