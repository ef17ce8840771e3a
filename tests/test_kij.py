"""Binary interaction parameters kij: the bundled file, its loader, a worksheet's own values
and `joulebook species --kij`.

The outside source is ChemSep's Peng-Robinson set (pr.ipd) as the ``thermo`` package
distributes it: thermo 0.6.1's ``IPDB``, table "ChemSep PR".  Tests that read it skip when
thermo is not installed.
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest

from balance.errors import InputError
from balance.interaction import GIVEN, MISSING, KijSet, bundled_pairs, kij_set, read_kij
from tests.helpers import ROOT
from tui import cli

DATA_FILE = Path(__file__).resolve().parents[1] / "balance" / "data" / "kij.toml"
DATA = tomllib.loads(DATA_FILE.read_text(encoding="utf-8"))
SPECIES = tomllib.loads((DATA_FILE.parent / "species.toml").read_text(encoding="utf-8"))
PR = DATA["peng-robinson"]["kij"]

# Pinned by balance/data/build_kij.py's output (thermo 0.6.1, chemicals 1.5.2, species.toml of 54
# species); after a deliberate rebuild, update them from the printed values of a failing run.
N_PAIRS = 132
SUM_KIJ = 2.8474  # sum of every kij, rounded to 1e-6

#: The natural-gas components and what the source holds for them.
GAS = ("CH4", "C2H6", "C3H8", "nC4H10", "iC4H10", "nC5H12", "N2", "CO2", "H2S", "H2O")
#: Gas pairs absent from ChemSep's pr.ipd (source: thermo 0.6.1 IPDB.has_ip_specific('ChemSep PR', ...)
#: is False for each; test_the_gas_pairs_missing_are_missing_in_the_source checks it).
GAS_MISSING = {("CH4", "H2S"), ("CH4", "H2O"), ("C2H6", "H2O"), ("C3H8", "H2O"), ("nC4H10", "H2S"),
               ("nC4H10", "H2O"), ("iC4H10", "nC5H12"), ("iC4H10", "H2O"), ("nC5H12", "H2O"), ("N2", "H2O")}


def _ipdb():
    pytest.importorskip("thermo")
    from thermo.interaction_parameters import IPDB

    return IPDB


def _cas(sid: str) -> str:
    return SPECIES[sid]["cas"]


# --- the data file ------------------------------------------------------------------

def test_the_file_holds_the_pinned_pairs_and_sum():
    assert len(PR) == N_PAIRS
    assert round(math.fsum(e["kij"] for e in PR.values()), 6) == pytest.approx(SUM_KIJ, abs=1e-9)


def test_each_pair_is_two_known_species_once_in_file_order_with_a_page():
    order = list(SPECIES)
    seen = set()
    for key, entry in PR.items():
        i, j = key.split(" ")
        assert i in SPECIES and j in SPECIES and order.index(i) < order.index(j), key
        assert frozenset((i, j)) not in seen, key
        seen.add(frozenset((i, j)))
        assert -1.0 < entry["kij"] < 1.0 and entry["page"].startswith("p"), key


def test_the_header_names_source_versions_and_the_models_that_read_it():
    head = DATA_FILE.read_text(encoding="utf-8").split("\n[", 1)[0]
    for words in ("pr.ipd", "thermo 0.6.1", "chemicals 1.5.2", "soave-redlich-kwong", "common practice, no source",
                  "van-der-waals, redlich-kwong", "kij = 0", "[fluid.kij]", "Layout"):
        assert words in head, words
    assert DATA["peng-robinson"]["source"] == "ChemSep pr.ipd via thermo 0.6.1"


# --- against the outside source -----------------------------------------------------

def test_every_bundled_value_is_thermos_chemsep_pr_value():
    # source: ChemSep PR (pr.ipd) via thermo 0.6.1, IPDB table "ChemSep PR"
    IPDB = _ipdb()
    for key, entry in PR.items():
        cas = [_cas(s) for s in key.split(" ")]
        assert IPDB.has_ip_specific("ChemSep PR", cas, "kij"), key  # in the data, not defaulted to 0
        assert entry["kij"] == IPDB.get_ip_specific("ChemSep PR", cas, "kij"), (
            f"{key}: thermo's value differs; rebuild with balance/data/build_kij.py if the source changed")


def test_no_pair_the_source_holds_is_left_out():
    # source: ChemSep PR via thermo 0.6.1 (every pair of bundled species it has)
    IPDB = _ipdb()
    ids = list(SPECIES)
    held = {frozenset((a, b)) for n, a in enumerate(ids) for b in ids[n + 1:]
            if IPDB.has_ip_specific("ChemSep PR", [_cas(a), _cas(b)], "kij")}
    assert held == {frozenset(k.split(" ")) for k in PR}


def test_two_values_named_by_the_source():
    # source: thermo 0.6.1's own example in IPDB.get_ip_specific's docstring: nitrogen-ethane 0.0533
    assert PR["N2 C2H6"] == {"kij": 0.0533, "page": "p302"}
    # source: ChemSep pr.ipd line "Methane/Carbon Dioxide T=199.82-271.48K p399", .978e-1
    assert PR["CO2 CH4"] == {"kij": 0.0978, "page": "p399"}
    # source: ChemSep pr.ipd "Propane/n-Octane p683" is 0.: a source's own 0 is a pair in the data
    assert PR["C3H8 nC8H18"]["kij"] == 0.0


def test_the_gas_pairs_missing_are_missing_in_the_source():
    # source: ChemSep PR via thermo 0.6.1
    IPDB = _ipdb()
    for i, j in GAS_MISSING:
        assert not IPDB.has_ip_specific("ChemSep PR", [_cas(i), _cas(j)], "kij"), (i, j)


def test_the_generator_reproduces_the_file():
    pytest.importorskip("thermo")
    import chemicals
    import thermo

    if (thermo.__version__, chemicals.__version__) != ("0.6.1", "1.5.2"):
        pytest.skip("the generator runs with thermo 0.6.1 and chemicals 1.5.2 only")
    from balance.data import build_kij

    assert build_kij.main(["--check"]) == 0


# --- the loader -----------------------------------------------------------------------

def test_kij_set_reads_the_bundled_values_into_a_symmetric_matrix():
    ks = kij_set(GAS, "peng-robinson")
    n = len(GAS)
    assert ks.ids == GAS and ks.model == "peng-robinson"
    assert all(ks.matrix[a][a] == 0.0 for a in range(n))
    assert all(ks.matrix[a][b] == ks.matrix[b][a] for a in range(n) for b in range(n))
    assert [(i, j) for i, j, _, _ in ks.used] == [(GAS[a], GAS[b]) for a in range(n) for b in range(a + 1, n)]
    # source: ChemSep pr.ipd via thermo 0.6.1, p399 (methane-carbon dioxide)
    assert ks.matrix[GAS.index("CH4")][GAS.index("CO2")] == 0.0978
    assert ("CH4", "CO2", 0.0978, "ChemSep pr.ipd via thermo 0.6.1, p399") in ks.used
    assert "CH4-CO2  kij = 0.0978  (ChemSep pr.ipd via thermo 0.6.1, p399)" in ks.lines()
    assert len(ks.lines()) == n * (n - 1) // 2


def test_missing_pairs_are_0_and_named_by_the_warning():
    ks = kij_set(GAS, "peng-robinson")
    assert set(ks.missing()) == GAS_MISSING
    for i, j in GAS_MISSING:
        assert ks.matrix[GAS.index(i)][GAS.index(j)] == 0.0
        assert (i, j, 0.0, MISSING) in ks.used
        assert f"{i}-{j}" in ks.warning()
    assert "kij = 0 is assumed" in ks.warning() and "[fluid.kij]" in ks.warning()
    assert ks.warning().count(".") == 2  # one sentence: the full stop, and the one of [fluid.kij]
    assert "CH4-H2S  kij = 0  (not in the data: 0 assumed)" in ks.lines()


def test_a_mixture_the_data_covers_has_no_warning():
    ks = kij_set(("CH4", "C2H6", "C3H8", "nC4H10", "N2", "CO2"), "peng-robinson")  # hpp-natural-gas
    assert ks.missing() == () and ks.warning() is None


def test_srk_reads_the_peng_robinson_values_and_says_so():
    # common practice, no source: PR kij used for SRK when no SRK set is at hand
    pr, srk = kij_set(GAS, "peng-robinson"), kij_set(GAS, "soave-redlich-kwong")
    assert srk.matrix == pr.matrix and srk.missing() == pr.missing()
    sources = {source for _, _, _, source in srk.used if source != MISSING}
    assert sources and all("peng-robinson value" in s for s in sources)
    assert "which soave-redlich-kwong reads" in srk.warning()
    assert [p[:3] for p in bundled_pairs("soave-redlich-kwong")] == [p[:3] for p in bundled_pairs("peng-robinson")]


@pytest.mark.parametrize("model", ["van-der-waals", "redlich-kwong"])
def test_vdw_and_rk_have_no_bundled_kij(model):
    ks = kij_set(("CH4", "CO2", "N2"), model)
    assert ks.matrix == ((0.0,) * 3,) * 3
    assert ks.missing() == (("CH4", "CO2"), ("CH4", "N2"), ("CO2", "N2"))
    assert f"{model} has no bundled binary interaction parameters" in ks.warning()
    assert bundled_pairs(model) == ()


def test_given_values_win_over_the_bundled_ones():
    given = read_kij({"carbon dioxide-methane": 0.12, "CH4-H2S": "0.08"}, ("CH4", "CO2", "H2S"))
    assert given == {("CH4", "CO2"): 0.12, ("CH4", "H2S"): 0.08}
    ks = kij_set(("CH4", "CO2", "H2S"), "peng-robinson", given)
    assert ks.used[0] == ("CH4", "CO2", 0.12, GIVEN) and ks.matrix[1][0] == 0.12
    assert ks.used[1] == ("CH4", "H2S", 0.08, GIVEN)
    assert ks.missing() == () and ks.warning() is None
    # either order of a given pair
    assert kij_set(("CH4", "CO2"), "peng-robinson", {("CO2", "CH4"): -0.01}).matrix[0][1] == -0.01


def test_kij_set_refuses_a_model_without_mixing_rule_kij():
    with pytest.raises(InputError) as err:
        kij_set(("CH4", "CO2"), "ideal-gas")
    assert err.value.field == "fluid.model" and "cubic" in err.value.message


def test_read_kij_accepts_names_with_dashes_and_returns_pairs_in_mixture_order():
    ids = ("nC4H10", "CO2", "R134a")
    got = read_kij({"carbon dioxide-n-butane": 0.13, "1,1,1,2-tetrafluoroethane-n-butane": "−0.02"}, ids)
    assert list(got) == [("nC4H10", "CO2"), ("nC4H10", "R134a")]
    assert got[("nC4H10", "R134a")] == -0.02


COMPONENTS = ("CH4", "CO2", "N2")


@pytest.mark.parametrize("table, key, words", [
    ({"CH4-unobtainium": 0.1}, "CH4-unobtainium", "unknown species 'unobtainium'"),
    ({"CH4-H2O": 0.1}, "CH4-H2O", "H2O is not a component of this mixture; its components are CH4, CO2, N2"),
    ({"CH4-methane": 0.1}, "CH4-methane", "pairs CH4 with itself"),
    ({"CH4-CO2": 0.1, "CO2-CH4": 0.1}, "CO2-CH4", "gives the pair CH4-CO2 a second time"),
    ({"CH4-CO2": 0.1, "methane-co2": 0.1}, "methane-co2", "a second time (first as 'CH4-CO2')"),
    ({"CH4 CO2": 0.1}, "CH4 CO2", 'joined by "-"'),
    ({"CH4-CO2": "abc"}, "CH4-CO2", "must be a number between -1 and 1"),
    ({"CH4-CO2": "0,1"}, "CH4-CO2", "a decimal point"),
    ({"CH4-CO2": True}, "CH4-CO2", "must be a number"),
    ({"CH4-CO2": [0.1]}, "CH4-CO2", "must be a number"),
    ({"CH4-CO2": 1.0}, "CH4-CO2", "between -1 and 1 (exclusive)"),
    ({"CH4-CO2": -1}, "CH4-CO2", "between -1 and 1 (exclusive)"),
    ({"CH4-CO2": "nan"}, "CH4-CO2", "between -1 and 1 (exclusive)"),
    ({"x-y-z": 0.1}, "x-y-z", "names no two known species"),
])
def test_read_kij_names_the_field_of_each_bad_entry(table, key, words):
    with pytest.raises(InputError) as err:
        read_kij(table, COMPONENTS)
    assert err.value.field == f"fluid.kij.{key}"
    assert words in err.value.message, err.value.message


def test_read_kij_refuses_a_table_that_is_not_one():
    with pytest.raises(InputError) as err:
        read_kij([("CH4-CO2", 0.1)], COMPONENTS)
    assert err.value.field == "fluid.kij" and "table of pairs" in err.value.message


def test_the_kij_set_is_frozen():
    ks = kij_set(COMPONENTS, "peng-robinson")
    assert isinstance(ks, KijSet)
    with pytest.raises(AttributeError):
        ks.model = "van-der-waals"


def test_the_loader_imports_neither_thermo_nor_numpy():
    code = ("import sys, json, balance.interaction, balance.data.build_kij; "
            "print(json.dumps([m for m in ('thermo', 'numpy', 'rich', 'textual') if m in sys.modules]))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert json.loads(out.stdout) == []


# --- the command line -------------------------------------------------------------------

def test_species_kij_lists_every_bundled_pair(capsys):
    assert cli.main(["species", "--kij"]) == 0
    out = capsys.readouterr().out
    assert "CO2-CH4" in out and "0.0978" in out and "p399" in out
    assert f"{N_PAIRS} pairs" in out


def test_species_kij_of_a_bundled_composition_as_json(capsys):
    assert cli.main(["species", "--kij", "hpp-natural-gas", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["model"] == "peng-robinson"
    assert data["components"] == ["CH4", "C2H6", "C3H8", "nC4H10", "N2", "CO2"]
    assert len(data["pairs"]) == 15 and data["missing"] == [] and data["warning"] is None
    # source: ChemSep pr.ipd via thermo 0.6.1, p399
    assert {"i": "CH4", "j": "CO2", "kij": 0.0978, "source": "ChemSep pr.ipd via thermo 0.6.1, p399"} in data["pairs"]
    assert data["matrix"][0][5] == data["matrix"][5][0] == 0.0978


def test_species_kij_names_the_missing_pairs(capsys):
    assert cli.main(["species", "--kij", "methane", "H2S", "CO2", "--model", "srk", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["model"] == "soave-redlich-kwong" and data["missing"] == [["CH4", "H2S"]]
    assert "CH4-H2S" in data["warning"]
    assert cli.main(["species", "--kij", "CH4", "H2S"]) == 0
    out = capsys.readouterr().out
    assert "not in the data: 0 assumed" in out and "kij = 0 is assumed for CH4-H2S" in out


@pytest.mark.parametrize("argv, field", [
    (["species", "--kij", "CH4", "unobtainium"], "NAME: unknown species 'unobtainium'"),
    (["species", "--kij", "CH4"], "NAME: --kij needs two species or more"),
    (["species", "--kij", "CH4", "CO2", "--model", "ideal-gas"], "--model: binary interaction parameters"),
    (["species", "--kij", "--model", "nonsense"], "--model: unknown model"),
    (["species", "CH4", "CO2"], "NAME: give one species"),
])
def test_species_kij_bad_input_is_a_message_naming_the_field(capsys, argv, field):
    assert cli.main(argv) == cli.EXIT_INPUT
    err = capsys.readouterr().err
    assert field in err and "Traceback" not in err
