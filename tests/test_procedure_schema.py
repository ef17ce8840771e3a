"""House procedures: the file reader and its validator, and `joulebook procedure list|show|check`.

The procedure file under test is tests/procedures/lab-closed.toml (an invented lab rig's
procedure, with its exercise's answer in tests/procedures/exercises/). Every broken file here
is that file with one mistake put in; the validator must name the mistake, its key and the
line it is on. The expected keys, lines and wording are joulebook's contract for its
procedure files (README, "House procedures"; common practice, no source).
"""

from __future__ import annotations

import hashlib
import shutil
from pathlib import Path

import pytest

from balance.procedures import ProcedureError, check_file, from_pin, load, parse
from balance.procedures.load import KEYS, problems
from tests.helpers import SAMPLES
from tui.cli import main

HERE = Path(__file__).resolve().parent / "procedures"
GOOD = HERE / "lab-closed.toml"
GOOD_TEXT = GOOD.read_text(encoding="utf-8")


@pytest.fixture(autouse=True)
def _no_user_config(monkeypatch, tmp_path):
    """No user config file and no firm folder but the test's own."""
    monkeypatch.setenv("JOULEBOOK_CONFIG", str(tmp_path / "no-such-config.toml"))
    monkeypatch.delenv("JOULEBOOK_PROCEDURES", raising=False)


def folder_with(folder: Path, text: str, name: str = "lab-closed.toml") -> Path:
    """A procedure folder holding ``text`` as ``name`` and the exercise answers beside it."""
    folder.mkdir(parents=True, exist_ok=True)
    if not (folder / "exercises").exists():
        shutil.copytree(HERE / "exercises", folder / "exercises")
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def line_of(text: str, needle: str, occurrence: int = 1) -> int:
    """The line (from 1) of the ``occurrence``-th line of ``text`` that holds ``needle``."""
    seen = 0
    for number, line in enumerate(text.splitlines(), start=1):
        if needle in line:
            seen += 1
            if seen == occurrence:
                return number
    raise AssertionError(f"{needle!r} (occurrence {occurrence}) is not in the text")


def edited(old: str, new: str, text: str = GOOD_TEXT) -> str:
    assert text.count(old) == 1, f"{old!r} must occur exactly once in the good file"
    return text.replace(old, new)


# -- the good file --------------------------------------------------------------------------
def test_the_good_file_reads_with_every_field_as_written():
    assert check_file(GOOD) == []
    p = load(GOOD)
    assert (p.id, p.title, p.version, p.owner, p.kinds) == ("lab-closed", "Lab rig: closed vessels", "2",
                                                            "Lab rig safety team", ("closed",))
    assert p.summary == "How the lab rig works a closed-vessel energy balance."
    assert p.defaults == {"units": "metric", "convention": "work-on-system", "atmosphere": "1.01325 bar"}
    # the file's SHA-256 is of its bytes as they are on disk (hashlib: the Python standard library)
    assert p.sha256 == hashlib.sha256(GOOD.read_bytes()).hexdigest()
    assert p.path == GOOD
    # steps: guidance and required fields
    assert set(p.steps) == {"purpose", "boundary", "terms"}
    assert p.guide("purpose").guidance == "Say what is asked, and give the job number from the rig log."
    assert p.guide("boundary").required == ("system.inside",)
    assert p.guide("states").guidance == "" and p.guide("states").required == ()
    assert p.required() == ("worksheet.job", "worksheet.basis", "system.inside", "heat.T_boundary")
    # the model rule: an alias read as the model's own name, the pressure in Pa
    (rule,) = p.model_rules
    assert rule.id == "real-gas-above-50-bar"
    assert rule.allowed == ("reference", "peng-robinson")
    assert rule.P_above == pytest.approx(50e5)  # 1 bar = 1e5 Pa (SI definition)
    assert rule.Tr_below is None and rule.severity == "stop"
    # the checks: limits in SI, as written kept for messages
    by_id = {c.id: c for c in p.checks}
    assert list(by_id) == ["design-minimum-temperature", "second-law", "closure"]
    t = by_id["design-minimum-temperature"]
    assert (t.quantity, t.compare, t.limit_text, t.severity) == ("T_min", ">=", "-29 degC", "stop")
    assert t.limit == pytest.approx(273.15 - 29)  # degC to K: +273.15 (SI definition)
    assert by_id["second-law"].limit == 0.0
    assert (by_id["closure"].limit, by_id["closure"].severity) == (1e-6, "warn")
    # sign-off: two roles, distinct, approval above 50 barg (gauge: + 1.01325 bar, the standard atmosphere)
    s = p.signoff
    assert s.roles == ("prepared", "checked") and s.distinct is True
    (e,) = s.escalations
    assert (e.role, e.quantity, e.above_text) == ("approved", "P_max", "50 barg")
    assert e.above == pytest.approx(50e5 + 101325)
    assert s.all_roles == ("prepared", "checked", "approved")
    # the exercise: its answer resolved beside the file
    (ex,) = p.exercises
    assert ex.id == "disc-burst-ar" and ex.tolerance == 0.01
    assert ex.answer == (HERE / "exercises" / "disc-burst-ar.toml").resolve()
    assert ex.hints == {"states": "Both chambers are compartments of one closed system."}
    assert p.exercise("disc-burst-ar") is ex and p.exercise("nope") is None
    assert p.rule_ids() == p.required() + ("real-gas-above-50-bar", "design-minimum-temperature", "second-law",
                                           "closure")


def test_the_sha256_follows_every_byte():
    """Another byte (a comment) is another file: the record's pin tells them apart."""
    other = GOOD_TEXT + "# one more comment\n"
    assert parse(other, path=GOOD).sha256 == hashlib.sha256(other.encode("utf-8")).hexdigest() != load(GOOD).sha256


def test_an_integer_version_reads_as_text():
    assert parse(edited('version = "2"', "version = 2"), path=GOOD).version == "2"


def test_the_keys_table_is_the_readme_layout():
    assert KEYS["check"] == ("id", "quantity", "compare", "limit", "severity", "message", "kinds")
    assert KEYS["signoff.escalate"] == ("role", "quantity", "above", "text")


# -- every kind of mistake, by key and line ------------------------------------------------------
# (name, old text, new text, the key named, words of the message, the text on the line named,
#  which occurrence of it)
MISTAKES = [
    ("unknown top-level key", "[defaults]", "[extras]\ncolour = \"red\"\n\n[defaults]", "extras",
     "is not a key of this table", "[extras]", 1),
    ("unknown key in a table", 'message = "The entropy generated must not be negative"',
     'message = "The entropy generated must not be negative"\nlimt = "0 J/K"', "check[2].limt",
     "is not a key of this table", "limt =", 1),
    ("bad id", 'id = "lab-closed"', 'id = "Lab_Closed"', "procedure.id",
     "expected lowercase letters, digits and hyphens", 'id = "Lab_Closed"', 1),
    ("unknown kind", 'kinds = ["closed"]', 'kinds = ["closed", "batch"]', "procedure.kinds",
     "'batch' is not a kind of balance", "kinds =", 1),
    ("unknown step for the kinds", "[step.boundary]", "[step.streams]", "step.streams",
     "is not a step of closed", "[step.streams]", 1),
    ("required field not requirable", 'required = ["worksheet.job", "worksheet.basis"]',
     'required = ["worksheet.job", "worksheet.colour"]', "step.purpose.required",
     "'worksheet.colour' is not a field a procedure can require", "worksheet.colour", 1),
    ("required field at the wrong step", 'required = ["system.inside"]', 'required = ["worksheet.title"]',
     "step.boundary.required", "worksheet.title is typed at the purpose step, not at boundary",
     'required = ["worksheet.title"]', 1),
    ("unknown model in allowed", 'allowed = ["reference", "pr"]', 'allowed = ["reference", "magic-eos"]',
     "model_rule[1].allowed", "'magic-eos' is not a property model", "magic-eos", 1),
    ("bad Tr_below", 'P_above = "50 bar"', 'P_above = "50 bar"\nTr_below = -0.5', "model_rule[1].Tr_below",
     "must be a reduced temperature", "Tr_below", 1),
    ("bad Tr_below (text)", 'P_above = "50 bar"', 'P_above = "50 bar"\nTr_below = "1.5"', "model_rule[1].Tr_below",
     "must be a reduced temperature", "Tr_below", 1),
    ("bad P_above unit", 'P_above = "50 bar"', 'P_above = "50 degC"', "model_rule[1].P_above", "pressure",
     "P_above", 1),
    ("unknown quantity", 'quantity = "T_min"', 'quantity = "T_lowest"', "check[1].quantity",
     "'T_lowest' is not a result quantity", "T_lowest", 1),
    ("bad compare", 'compare = "<="', 'compare = "=<"', "check[3].compare", "expected one of >=, <=, >, <",
     'compare = "=<"', 1),
    ("limit of the wrong dimension", 'limit = "-29 degC"', 'limit = "10 bar"', "check[1].limit", "temperature",
     'limit = "10 bar"', 1),
    ("limit without a unit", 'limit = "-29 degC"', "limit = -29", "check[1].limit", "with its unit",
     "limit = -29", 1),
    ("bad severity", 'severity = "warn"', 'severity = "fatal"', "check[3].severity", "expected stop or warn",
     'severity = "fatal"', 1),
    ("bad model rule severity", 'P_above = "50 bar"', 'P_above = "50 bar"\nseverity = "later"',
     "model_rule[1].severity", "expected stop or warn", 'severity = "later"', 1),
    ("missing message", 'message = "The entropy generated must not be negative"\n', "", "check[2]",
     "message is missing: it is required", "[[check]]", 2),
    ("blank message", 'message = "The entropy generated must not be negative"', 'message = "  "',
     "check[2].message", "must not be blank", 'message = "  "', 1),
    ("signoff.distinct not a bool", "distinct = true", 'distinct = "yes"', "signoff.distinct",
     "must be true or false", "distinct =", 1),
    ("duplicate roles", 'roles = ["prepared", "checked"]', 'roles = ["prepared", "checked", "prepared"]',
     "signoff.roles", "names a role twice", "roles =", 1),
    ("escalate role already in roles", 'role = "approved"', 'role = "checked"', "signoff.escalate[1].role",
     "checked is always required already", 'role = "checked"', 1),
    ("escalate with unknown quantity", 'quantity = "P_max"', 'quantity = "P_peak"', "signoff.escalate[1].quantity",
     "'P_peak' is not a result quantity", "P_peak", 1),
    ("escalate limit of the wrong dimension", 'above = "50 barg"', 'above = "50 K"', "signoff.escalate[1].above",
     "pressure", 'above = "50 K"', 1),
    ("exercise answer file missing", 'answer = "exercises/disc-burst-ar.toml"', 'answer = "exercises/nope.toml"',
     "exercise[1].answer", "no such worksheet beside the procedure", "nope.toml", 1),
    ("exercise tolerance out of range", "tolerance = 0.01", "tolerance = 0.7", "exercise[1].tolerance",
     "must be a relative tolerance above 0 and below 0.5", "tolerance = 0.7", 1),
    ("exercise tolerance zero", "tolerance = 0.01", "tolerance = 0", "exercise[1].tolerance",
     "must be a relative tolerance", "tolerance = 0", 1),
    ("exercise hint for no step", 'states = "Both chambers', 'streams = "Both chambers', "exercise[1].hints.streams",
     "is not a key of this table", "streams =", 1),
    ("bad units default", 'units = "metric"', 'units = "imperial"', "defaults.units", "expected one of si, metric, us",
     'units = "imperial"', 1),
    ("an atmosphere off the planet", 'atmosphere = "1.01325 bar"', 'atmosphere = "3 bar"', "defaults.atmosphere",
     "is not an atmosphere on this planet", 'atmosphere = "3 bar"', 1),
]


@pytest.mark.parametrize("name, old, new, key, words, needle, occurrence", MISTAKES, ids=[m[0] for m in MISTAKES])
def test_each_mistake_is_named_by_its_key_and_line(tmp_path, name, old, new, key, words, needle, occurrence):
    text = edited(old, new)
    found = check_file(folder_with(tmp_path, text))
    assert len(found) == 1, [str(p) for p in found]  # the one mistake put in, and nothing else
    (p,) = found
    assert p.key == key
    assert words in p.message
    assert p.line == line_of(text, needle, occurrence)
    assert str(p) == f"line {p.line}: {key}: {p.message}"
    with pytest.raises(ProcedureError) as caught:
        parse(text, "lab-closed.toml", path=tmp_path / "lab-closed.toml")
    assert [str(q) for q in caught.value.problems] == [str(p)]


@pytest.mark.parametrize("key", ["id", "title", "version", "owner", "kinds"])
def test_a_missing_required_key_is_named_at_its_table(tmp_path, key):
    lines = GOOD_TEXT.splitlines(keepends=True)
    head = line_of(GOOD_TEXT, "[procedure]")
    mine = next(i for i, line in enumerate(lines) if i >= head and line.startswith(f"{key} ="))
    text = "".join(lines[:mine] + lines[mine + 1:])
    found = check_file(folder_with(tmp_path, text))
    assert (found[0].line, found[0].key) == (head, "procedure"), [str(p) for p in found]
    assert found[0].message == f"{key} is missing: it is required"
    if key != "kinds":  # without kinds no step is a step of them: the steps are named too
        assert len(found) == 1, [str(p) for p in found]


def test_no_procedure_table_at_all(tmp_path):
    text = edited("[procedure]\n", "")
    found = check_file(folder_with(tmp_path, text))
    assert any("has no [procedure] table" in p.message for p in found), [str(p) for p in found]
    # its keys now stand at the top level: each is named as no key of a procedure file
    assert any(p.key == "id" and "is not a key of this table" in p.message and p.line == line_of(text, 'id = "lab')
               for p in found)


def test_a_toml_syntax_error_is_named_by_its_line(tmp_path):
    text = edited('owner = "Lab rig safety team"', "owner = Lab rig safety team")
    (p,) = check_file(folder_with(tmp_path, text))
    assert p.key == "" and p.message.startswith("is not valid TOML")
    assert p.line == line_of(text, "owner = Lab rig")


def test_a_quantity_of_another_kind_is_named(tmp_path):
    """t_end is a transient's quantity: no check on it in a closed-only procedure."""
    text = edited('quantity = "T_min"', 'quantity = "t_end"')
    found = check_file(folder_with(tmp_path, text))
    mine = [p for p in found if p.key == "check[1].quantity"]
    assert len(mine) == 1, [str(p) for p in found]
    assert mine[0].message == "t_end is a result of transient balances, not of closed"
    assert mine[0].line == line_of(text, 'quantity = "t_end"')
    # the check's kinds narrow it: a closed-only check of a transient quantity is named too
    both = edited('kinds = ["closed"]', 'kinds = ["closed", "transient"]', text)
    found = check_file(folder_with(tmp_path / "both", both))
    assert not [p for p in found if p.key == "check[1].quantity"]  # a transient's quantity: allowed now
    narrowed = edited('quantity = "t_end"', 'quantity = "t_end"\nkinds = ["closed"]', both)
    found = check_file(folder_with(tmp_path / "narrowed", narrowed))
    assert [p.key for p in found if "t_end is a result of transient" in p.message] == ["check[1].quantity"]


def test_a_check_kind_outside_the_procedure_is_named(tmp_path):
    text = edited('message = "The energy balance must close"',
                  'message = "The energy balance must close"\nkinds = ["steady-flow"]')
    found = check_file(folder_with(tmp_path, text))
    assert [(p.key, p.line) for p in found if "is not one of this procedure's kinds" in p.message] == [
        ("check[3].kinds", line_of(text, 'kinds = ["steady-flow"]'))], [str(p) for p in found]


def test_an_exercise_answer_of_another_kind_is_named(tmp_path):
    folder = tmp_path / "firm"
    text = edited('answer = "exercises/disc-burst-ar.toml"', 'answer = "exercises/letdown.toml"')
    path = folder_with(folder, text)
    shutil.copy(SAMPLES / "gas-letdown-preheated.toml", folder / "exercises" / "letdown.toml")
    (p,) = check_file(path)
    assert p.key == "exercise[1].answer" and p.line == line_of(text, "letdown.toml")
    assert p.message == "the answer worksheet letdown.toml is a steady-flow balance; this procedure is for closed"


def test_an_exercise_answer_that_is_no_worksheet_is_named(tmp_path):
    folder = tmp_path / "firm"
    path = folder_with(folder, GOOD_TEXT)
    (folder / "exercises" / "disc-burst-ar.toml").write_text("[fluid\nspecies = 'Ar'\n", encoding="utf-8")
    (p,) = check_file(path)
    assert p.key == "exercise[1].answer" and "is not a worksheet" in p.message


def test_duplicate_rule_ids_are_named_at_the_second_rule(tmp_path):
    text = edited('id = "closure"', 'id = "second-law"')
    found = check_file(folder_with(tmp_path, text))
    assert [p.message for p in found] == [
        "two rules have the id 'second-law' (check[2] and check[3]); a deviation names one rule by its id"]
    assert (found[0].key, found[0].line) == ("check[3].id", line_of(text, 'id = "second-law"', 2))


def test_duplicate_rule_ids_are_refused(tmp_path):
    """A rule id is one rule's: two checks, or a check and a model rule, may not share one."""
    text = edited('id = "closure"', 'id = "second-law"')
    found = check_file(folder_with(tmp_path, text))
    assert len(found) == 1 and "two rules have the id 'second-law'" in found[0].message
    # a check may not take a model rule's id either: a deviation would name both
    text = edited('id = "closure"', 'id = "real-gas-above-50-bar"')
    found = check_file(folder_with(tmp_path / "model", text))
    assert [p.message for p in found] == [
        "two rules have the id 'real-gas-above-50-bar' (model_rule[1] and check[3]); a deviation names one rule by its "
        "id"]
    # nor a required field's name (which is no id a check may have in any case)
    text = edited('id = "closure"', 'id = "worksheet.job"')
    messages = [p.message for p in problems(text, source_dir=HERE)]
    assert ("two rules have the id 'worksheet.job' (step.purpose.required and check[3]); a deviation names one rule "
            "by its id") in messages
    assert any(m.startswith("expected lowercase letters, digits and hyphens") for m in messages)


def test_many_mistakes_are_all_named_in_line_order(tmp_path):
    text = edited('limit = "-29 degC"', "limit = -29")
    text = edited('compare = "<="', 'compare = "=<"', text)
    text = edited('distinct = true', 'distinct = 1', text)
    found = check_file(folder_with(tmp_path, text))
    assert [p.key for p in found] == ["check[1].limit", "check[3].compare", "signoff.distinct"]
    assert [p.line for p in found] == sorted(p.line for p in found)
    with pytest.raises(ProcedureError, match=r"\(and 2 more: `joulebook procedure check` lists them\)"):
        parse(text, path=tmp_path / "lab-closed.toml")


# -- the pin -------------------------------------------------------------------------------------
def test_from_pin_gives_the_same_rules():
    p = load(GOOD)
    back = from_pin(p.pin())
    assert (back.id, back.version, back.title, back.sha256, back.owner, back.kinds) == (
        p.id, p.version, p.title, p.sha256, p.owner, p.kinds)
    assert back.checks == p.checks
    assert back.model_rules == p.model_rules
    assert back.signoff == p.signoff
    assert back.required() == p.required()
    assert back.rule_ids() == p.rule_ids()
    assert back.exercises == () and back.guide("boundary").guidance == ""  # no guidance, no exercises


def test_from_pin_refuses_rules_that_do_not_read():
    pin = load(GOOD).pin()
    pin["rules"] = {**pin["rules"], "check": [{**pin["rules"]["check"][0], "compare": "=="}]}
    with pytest.raises(ProcedureError, match="compare"):
        from_pin(pin)


# -- the command line ------------------------------------------------------------------------
def test_procedure_check_names_each_mistake_file_line_key(tmp_path, capsys):
    text = edited('limit = "-29 degC"', 'limit = "10 bar"')
    text = edited('severity = "warn"', 'severity = "fatal"', text)
    path = folder_with(tmp_path, text)
    assert main(["procedure", "check", str(path)]) == 2
    err = capsys.readouterr().err.splitlines()
    limit_line, severity_line = line_of(text, 'limit = "10 bar"'), line_of(text, 'severity = "fatal"')
    assert err[0].startswith(f"{path}:{limit_line}: check[1].limit: ")
    assert err[1].startswith(f"{path}:{severity_line}: check[3].severity: expected stop or warn")
    assert err[2] == f"joulebook: {path}: 2 mistakes"
    assert len(err) == 3


def test_procedure_check_passes_a_good_file(tmp_path, capsys):
    path = folder_with(tmp_path, GOOD_TEXT)
    assert main(["procedure", "check", str(path)]) == 0
    out = capsys.readouterr()
    assert out.err == ""
    assert out.out.startswith(f"{path}: procedure lab-closed version 2 reads: 3 steps with guidance, "
                              "4 required fields, 1 model rules, 3 checks, 1 exercises; sha256 ")
    assert hashlib.sha256(path.read_bytes()).hexdigest() in out.out


def test_procedure_check_of_a_file_that_is_not_there(tmp_path, capsys):
    assert main(["procedure", "check", str(tmp_path / "none.toml")]) == 2
    assert "cannot be read" in capsys.readouterr().err


def test_procedure_list_shows_the_folder_and_a_broken_file(tmp_path, monkeypatch, capsys):
    folder = tmp_path / "firm"
    good = folder_with(folder, GOOD_TEXT)
    folder_with(folder, edited('compare = "<="', 'compare = "=<"'), name="broken.toml")
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(folder))
    assert main(["procedure", "list"]) == 0
    out = capsys.readouterr().out
    assert f"  {folder}  [JOULEBOOK_PROCEDURES]" in out
    assert "  lab-closed  version 2  [closed, 1 exercise]  Lab rig: closed vessels" in out
    assert f"      {good}" in out
    broken = next(line for line in out.splitlines() if line.startswith("  broken.toml: NOT READ: "))
    compare_line = line_of(GOOD_TEXT, 'compare = "<="')
    assert "check[3].compare" in broken and f"line {compare_line}" in broken
    # the firm's folder is searched before the bundled one
    lines = out.splitlines()
    assert lines.index(f"  {folder}  [JOULEBOOK_PROCEDURES]") < next(i for i, l in enumerate(lines) if "[bundled]" in l)


def test_procedure_list_says_a_later_copy_is_hidden(tmp_path, monkeypatch, capsys):
    first, second = tmp_path / "a", tmp_path / "b"
    folder_with(first, GOOD_TEXT)
    folder_with(second, edited('version = "2"', 'version = "1"'))
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", f"{first}:{second}")
    assert main(["procedure", "list"]) == 0
    out = capsys.readouterr().out
    assert "  lab-closed  version 2  [closed, 1 exercise]  Lab rig: closed vessels\n" in out
    assert "  lab-closed  version 1  [closed, 1 exercise]  Lab rig: closed vessels  (hidden by an earlier " \
           "folder's procedure of this id)" in out


def test_procedure_folders_from_the_config_file(tmp_path, monkeypatch, capsys):
    folder = tmp_path / "firm"
    folder_with(folder, GOOD_TEXT)
    config = tmp_path / "config.toml"
    config.write_text(f'procedures = ["{folder}"]\n', encoding="utf-8")
    monkeypatch.setenv("JOULEBOOK_CONFIG", str(config))
    assert main(["procedure", "list"]) == 0
    out = capsys.readouterr().out
    assert f"  {folder}  [{config}]" in out and "  lab-closed  version 2" in out


def test_procedure_show_prints_the_guidance_and_checks(tmp_path, monkeypatch, capsys):
    folder = tmp_path / "firm"
    folder_with(folder, GOOD_TEXT)
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(folder))
    assert main(["procedure", "show", "lab-closed"]) == 0
    out = capsys.readouterr().out
    lines = out.splitlines()
    assert lines[0] == "Lab rig: closed vessels"
    assert "  id lab-closed, version 2, owner Lab rig safety team" in lines
    assert "Step purpose:" in lines and "    Say what is asked, and give the job number from the rig log." in lines
    assert "    Draw the boundary round the gas, not the steel." in lines
    assert "    required: worksheet.job (a job or calculation number)" in lines
    assert "  real-gas-above-50-bar (stop): reference, peng-robinson when the pressure above 50 bar" in lines
    assert "  design-minimum-temperature (stop): T_min at least -29 degC" in lines
    assert "  second-law (stop): S_gen at least 0 J/K" in lines
    assert "  closure (warn): residual at most 1e-06" in lines
    assert "Sign-off: prepared, checked, each by a different person" in lines
    assert "  and approved when P_max is above 50 barg: Above 50 barg the rig lead approves." in lines
    assert "  disc-burst-ar: Bursting disc between two argon chambers" in lines


def test_procedure_show_of_an_unknown_id(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(tmp_path))
    assert main(["procedure", "show", "no-such-procedure"]) == 2
    assert "no procedure 'no-such-procedure' in the procedure folders" in capsys.readouterr().err
