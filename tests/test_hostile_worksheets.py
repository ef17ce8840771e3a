"""Hostile worksheets through `joulebook check` and `joulebook solve --json` (in-process, through
the command line's entry point) and the façade: never a traceback, never a hang, exit 0, 1 or 2
with a message; `check` is ready only for what `solve` accepts, and `api.problems` is empty
exactly when `check` gets to counting.

The bundled samples and worksheets of the cases the audit found are mutated as it did: bytes
flipped, text cut off, lines doubled (duplicate keys), values nested thousands of levels deep,
10 MB strings, values replaced by wrong types, huge, NaN, infinite, negative and zero numbers,
absurd units and unicode, overrides at the edge of a double, sections of the wrong type,
unknown species and models. The work is bounded by the inputs' limits, not timed: a run takes
seconds. Expectations: joulebook's contract (README, "Exit codes"; common practice, no source).
"""

from __future__ import annotations

import contextlib
import io
import re
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from balance import api
from balance.errors import BalanceError
from tests.helpers import SAMPLES
from tui.cli import main

#: The samples on models that need no CoolProp (its import alone takes seconds), and the audit's cases.
BASES = [p.read_text(encoding="utf-8") for p in sorted(SAMPLES.glob("*.toml"))
         if 'model = "reference"' not in p.read_text(encoding="utf-8")] + [
    # a polytropic n of 1000 (divided by zero in solve)
    '[fluid]\nspecies = "N2"\nmodel = "peng-robinson"\n[[initial]]\nT = "300 K"\nP = "1 bar"\nn = "1 mol"\n'
    '[final]\nP = "3 bar"\nT = "?"\n[[heat]]\nQ = "?"\n[process]\nconstraints = ["polytropic"]\nn = "1000"\n',
    # the liquid-full rigid vessel, P given
    '[fluid]\nspecies = "H2O"\nmodel = "incompressible"\n[[initial]]\nT = "20 degC"\nP = "1 bar"\nm = "10 kg"\n'
    '[final]\nT = "?"\nP = "1 bar"\n[[heat]]\nQ = "418 kJ"\n[process]\nconstraints = ["rigid"]\n',
    # an atmosphere below vacuum under a gauge reading
    '[worksheet]\natmosphere = "-149 bar"\n[fluid]\nspecies = "N2"\nmodel = "ideal-gas"\n[[initial]]\nT = "300 K"\n'
    'P = "150 barg"\nn = "1 mol"\n[final]\nT = "?"\n[[heat]]\nQ = "1 kJ"\n[process]\nconstraints = ["rigid"]\n',
    # a kinetic energy beyond a double, and a species name 40 000 characters long (the fuzzy match hung)
    '[fluid]\nspecies = "N2"\nmodel = "peng-robinson"\n[[initial]]\nT = "300 K"\nP = "1 bar"\nn = "1 mol"\n'
    '[final]\nT = "?"\n[[heat]]\nQ = "1 kJ"\n[process]\nconstraints = ["rigid"]\ndKE = "1e308 kJ"\n',
    '[fluid]\nspecies = "' + "Nitrogen" * 5000 + '"\nmodel = "ideal-gas"\n',
]

VALUES = ["nan", "inf", "-inf", "1e308", "-1e308", "0", "-0.0", "99999999999999999999999", "true", "[]", "{}",
          '"?"', '""', '"-5 K"', '"0 K"', '"-300 degC"', '"0 bar"', '"-1 bar"', '"-2 barg"', '"1e308 kJ"',
          '"1e308 K"', '"1e308 bar"', '"1e-308 bar"', '"1e308 mol"', '"1e-308 mol"', '"1e308 m3"', '"1e-308 m3"',
          '"1 10**10**10*bar"', '"25 C"', '"1,5 bar"', '"☃ K"', '"1 furlong/fortnight"', '"1e308"', '"1e-320"',
          '"unobtainium"', '"nan K"', '"inf bar"', '"0.5 m3/kg"', '"1e-308 m3/kg"', '"-1e308 kJ/kg"', '"1e6"',
          '"-1"', '"1.0000000001"', '"' + "x" * 300 + '"', '"1 ' + "m*" * 90 + 'm"', '"\\u0000 K"', '"𝟙 bar"']
OVERRIDES = ["M", "Tc", "Pc", "omega", "cp", "cv", "rho", "a", "b"]
EXTREME = ['"1e308 K"', '"1e-300 K"', '"1e308 Pa"', '"1e-300 Pa"', '"1e308 kg/mol"', '"1e-300 kg/mol"',
           '"1e300 J/(mol K)"', '"1e-300 J/(mol K)"', '"1e300 kg/m3"', '"1e-300 kg/m3"', '"1e300 Pa m6/mol2"',
           '"1e-300 Pa m6/mol2"', '"1e300 m3/mol"', '"1e-300 m3/mol"', '"4.9"', '"-0.99"', '"1e308"']
MODELS = ["ideal-gas", "van-der-waals", "redlich-kwong", "soave-redlich-kwong", "peng-robinson", "incompressible", "nope"]
SPECIES = ["N2", "H2O", "CO2", "CH4", "Ar", "He", "H2", "unobtainium", "n2", "7727-37-9", "x" * 5000]


@st.composite
def mutated(draw) -> str:
    text = draw(st.sampled_from(BASES))
    for _ in range(draw(st.integers(1, 3))):
        lines = text.split("\n")
        kind = draw(st.sampled_from(["flip", "cut", "twice", "deep", "huge", "value", "override", "section",
                                     "model", "species"]))
        at = draw(st.integers(0, max(len(text) - 1, 0)))
        line = draw(st.integers(0, len(lines) - 1))
        if kind == "flip" and text:
            text = text[:at] + draw(st.characters(codec="utf-8")) + text[at + 1:]
        elif kind == "cut":
            text = text[:at]
        elif kind == "twice":
            text = "\n".join(lines[:line] + [lines[line]] + lines[line:])
        elif kind == "deep":
            depth = draw(st.sampled_from([10, 40, 5000]))
            text = "\n".join(lines[:line] + ["deep = " + "[" * depth + "]" * depth] + lines[line:])
        elif kind == "huge":
            text = "\n".join(lines[:line] + [f'title = "{"y" * draw(st.sampled_from([10 ** 5, 10 ** 7]))}"'] + lines[line:])
        elif kind == "value":
            keyed = [i for i, ln in enumerate(lines) if "=" in ln and not ln.lstrip().startswith("#")]
            if keyed:
                i = draw(st.sampled_from(keyed))
                lines[i] = lines[i].split("=")[0] + "= " + draw(st.sampled_from(VALUES))
                text = "\n".join(lines)
        elif kind == "override" and "[fluid]" in text:
            entry = f"{draw(st.sampled_from(OVERRIDES))} = {draw(st.sampled_from(EXTREME + VALUES))}"
            text = text.replace("[fluid]", f"[fluid.overrides]\n{entry}\n[fluid]", 1) \
                if "[fluid.overrides]" not in text else text.replace("[fluid.overrides]", f"[fluid.overrides]\n{entry}", 1)
        elif kind == "section":
            section = draw(st.sampled_from(["initial", "final", "heat", "work", "process", "fluid", "worksheet"]))
            text = f"{section} = {draw(st.sampled_from(VALUES))}\n" + text
        elif kind == "model":
            text = re.sub(r'model = "[^"]*"', f'model = "{draw(st.sampled_from(MODELS))}"', text)
        elif kind == "species":
            text = re.sub(r'species = "[^"]*"', f'species = "{draw(st.sampled_from(SPECIES))}"', text)
    return text


def command(argv: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


def assert_handled(text: str, folder: Path) -> None:
    path = folder / "hostile.toml"
    path.write_text(text, encoding="utf-8", errors="surrogatepass")
    for argv in (["check", str(path)], ["solve", "--json", str(path)]):
        code, out, err = command(argv)  # an exception escaping here is the traceback a user would see
        assert code in (0, 1, 2), (argv, code)
        assert "Traceback" not in err
        if code:  # a message: on stderr, or the degrees-of-freedom count that `check` prints
            assert err.startswith("joulebook: ") or (argv[0] == "check" and out.strip()), (argv, err, out)
    try:
        ws = api.read(text)
    except BalanceError:
        return
    check, found = api.check(ws), api.problems(ws)
    assert (not found) == (not check.error), (check.message, found)
    if check.error:
        assert check.error_field in {p.field for p in found}
    if check.ready:
        attempt = api.attempt(ws)
        assert attempt.error_kind != "InputError" and not attempt.error_kind.startswith("numerical"), attempt.message


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(text=mutated())
def test_hostile_worksheets_get_a_message_never_a_traceback(text):
    with tempfile.TemporaryDirectory() as folder:
        assert_handled(text, Path(folder))


def test_the_audits_cases_are_handled(tmp_path):
    for text in BASES:
        assert_handled(text, tmp_path)


def test_what_the_audit_broke_is_named_in_words(tmp_path):
    cases = {
        "deep": ('[fluid]\nspecies = "N2"\n[[initial]]\nT = ' + "[" * 5000 + "]" * 5000 + "\n",
                 "nests arrays and tables more than 32 levels deep (line 4)"),  # a RecursionError
        "tower": ('[fluid]\nspecies = "N2"\nmodel = "ideal-gas"\n[[initial]]\nT = "300 K"\nP = "1 10**10**10*bar"\n'
                  'n = "1 mol"\n', "has a power of a power in its unit"),  # evaluated by pint, it hung
        "name": (BASES[-1], "is 40000 characters long; a species is named by"),  # the fuzzy match hung
        "dKE": (BASES[-2], "process.dKE: is too large to compute with; got '1e308 kJ'"),
        "atmosphere": (BASES[-3], "worksheet.atmosphere: must be an absolute pressure above zero"),
        "huge": ('[worksheet]\ntitle = "' + "y" * 10_000_000 + '"\n', "is 10000023 characters long; a worksheet is at most 1000000"),
        "digits": ("[worksheet]\ntitle = 1" + "0" * 5000 + "\n", "holds a number too long to read"),
    }
    for name, (text, words) in cases.items():
        path = tmp_path / f"{name}.toml"
        path.write_text(text, encoding="utf-8")
        code, _, err = command(["check", str(path)])
        assert code == 2 and words in err, (name, err[:300])
