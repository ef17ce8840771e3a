"""Practice mode, domain level: a trainee's steps against an exercise's model answer, the log, the session.

The exercise is disc-burst-ar of tests/procedures/lab-closed.toml (an invented lab rig's);
its answer, tests/procedures/exercises/disc-burst-ar.toml, is a Redlich-Kwong argon rupture
(fast to solve). What is expected is joulebook's contract (README, "House procedures",
"Practice mode"; common practice, no source): a difference names the field and never the
answer's value.
"""

from __future__ import annotations

import dataclasses
import functools
import shutil
from pathlib import Path

import pytest

from balance import api
from balance.errors import InputError
from balance.kinds import KINDS
from balance.procedures import load
from balance.procedures.practice import (
    PracticeLog,
    answer_of,
    compare_step,
    solve_answer,
)
from balance.worksheet import Worksheet
from tests.helpers import SAMPLES

HERE = Path(__file__).resolve().parent / "procedures"
PROCEDURE = load(HERE / "lab-closed.toml")
EXERCISE = PROCEDURE.exercise("disc-burst-ar")
ANSWER = answer_of(EXERCISE)
STEPS = [s for s in KINDS["closed"].steps if s != "review"]

#: every value the answer's worksheet gives, as typed: no difference may say one
ANSWER_VALUES = ("300 K", "80 bar", "0.1 m3", "350 K", "2 bar", "0.3 m3", "redlich-kwong", "membrane-rupture",
                 '"Ar"')


@functools.cache
def answer_data() -> dict:
    return solve_answer(EXERCISE)


def solved(ws: Worksheet) -> dict:
    return api.entry_data(api.attempt(ws))


def changed(**sections) -> Worksheet:
    """The answer's worksheet with some sections replaced (plain data, as in to_dict)."""
    data = ANSWER.to_dict()
    for name, value in sections.items():
        if value is None:
            data.pop(name, None)
        else:
            data[name] = value
    return Worksheet.from_dict(data)


def with_initial(index: int, **values) -> Worksheet:
    initial = [dict(c) for c in ANSWER.to_dict()["initial"]]
    initial[index].update(values)
    return changed(initial=initial)


def assert_no_answer_value(verdict) -> None:
    for difference in verdict.differences:
        for value in ANSWER_VALUES:
            assert value not in difference, (value, difference)
    # and no result of the answer either, in any form it is shown in (the answer lines)
    for line in _answer_result_lines():
        number = line.split(" = ")[1].split()[0]
        assert all(number not in d for d in verdict.differences), (number, verdict.differences)


@functools.cache
def _answer_result_lines() -> tuple[str, ...]:
    return compare_step(PROCEDURE, EXERCISE, "results", ANSWER, answer_data(), answer_data()).answer


# -- the answer against itself ------------------------------------------------------------------
@pytest.mark.parametrize("step", STEPS)
def test_the_answer_itself_is_right_at_every_step(step):
    data = answer_data() if step == "results" else None
    verdict = compare_step(PROCEDURE, EXERCISE, step, ANSWER, data, answer_data())
    assert verdict.step == step
    assert verdict.right and verdict.differences == ()


def test_the_results_step_solves_the_answer_when_not_given():
    verdict = compare_step(PROCEDURE, EXERCISE, "results", ANSWER, solved(ANSWER))
    assert verdict.right
    assert "P_max = 8e+06 Pa" in verdict.answer  # chamber A, 80 bar: the answer's own lines, shown when asked


def test_a_step_the_exercise_does_not_have():
    with pytest.raises(InputError, match="the exercise has no step 'streams'"):
        compare_step(PROCEDURE, EXERCISE, "streams", ANSWER)


# -- wrong, and said without the answer ---------------------------------------------------------
def test_another_species_is_not_right():
    verdict = compare_step(PROCEDURE, EXERCISE, "fluid", changed(fluid={"species": "N2", "model": "redlich-kwong"}))
    assert not verdict.right
    assert verdict.differences == ("fluid.species: not the fluid of the exercise",)
    assert_no_answer_value(verdict)
    # the answer is there to be shown when asked, and only then
    assert 'species = "Ar"' in verdict.answer


def test_another_model_is_not_right():
    verdict = compare_step(PROCEDURE, EXERCISE, "fluid", changed(fluid={"species": "Ar", "model": "peng-robinson"}))
    assert verdict.differences == ("fluid.model: not the model the firm's answer uses",)
    assert_no_answer_value(verdict)


def test_the_same_fluid_by_other_names_is_right():
    verdict = compare_step(PROCEDURE, EXERCISE, "fluid", changed(fluid={"species": "argon", "model": "RK"}))
    assert verdict.right, verdict.differences


def test_a_pressure_five_percent_off_is_not_right():
    verdict = compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, P="84 bar"))
    assert not verdict.right
    assert verdict.differences == ("initial[1].P: differs from the answer",)
    assert_no_answer_value(verdict)
    assert verdict.hint == "Both chambers are compartments of one closed system."  # the exercise's hint


def test_within_the_tolerance_is_right():
    """0.5 % off with the exercise's 1 % tolerance; and the same pressure in another unit."""
    assert EXERCISE.tolerance == 0.01
    assert compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, P="80.4 bar")).right
    assert compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, P="79.6 bar")).right
    assert compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, P="8 MPa")).right
    # 80 bar absolute is 78.98675 barg (the standard atmosphere, 1.01325 bar)
    assert compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, P="78.98675 barg")).right
    assert compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, T="26.85 degC")).right  # 300 K
    # just outside it is not
    assert not compare_step(PROCEDURE, EXERCISE, "states", with_initial(0, P="81.2 bar")).right


def test_a_missing_compartment_is_not_right():
    verdict = compare_step(PROCEDURE, EXERCISE, "states", changed(initial=[ANSWER.to_dict()["initial"][0]]))
    assert not verdict.right
    assert verdict.differences == ("[[initial]]: you have 1, the answer has 2",)
    assert_no_answer_value(verdict)


def test_a_value_given_where_the_answer_solves_for_it():
    final = {**ANSWER.to_dict()["final"], "T": "280 K"}
    verdict = compare_step(PROCEDURE, EXERCISE, "states", changed(final=final))
    assert verdict.differences == ("final.T: the answer solves for it",)
    blank = {k: v for k, v in ANSWER.to_dict()["final"].items() if k != "T"}
    verdict = compare_step(PROCEDURE, EXERCISE, "states", changed(final=blank))
    assert verdict.differences == ("final.T: the answer solves for it ('?'); you left it blank",)
    verdict = compare_step(PROCEDURE, EXERCISE, "states", with_initial(1, V="?"))
    assert verdict.differences == ("initial[2].V: the answer gives it; you solve for it",)
    assert_no_answer_value(verdict)


def test_wrong_constraints_are_not_right():
    verdict = compare_step(PROCEDURE, EXERCISE, "constraints", changed(process={"constraints": ["rigid", "adiabatic"]}))
    assert verdict.differences == ("process.constraints: not what the answer has",)
    assert_no_answer_value(verdict)
    # the same constraints in another order are right
    swapped = changed(process={"constraints": ["adiabatic", "membrane-rupture"]})
    assert compare_step(PROCEDURE, EXERCISE, "constraints", swapped).right


def test_the_wrong_kind_is_not_right():
    ws = Worksheet.from_dict({**ANSWER.to_dict(), "system": {"kind": "steady-flow", "inside": "the argon"}})
    verdict = compare_step(PROCEDURE, EXERCISE, "boundary", ws)
    assert verdict.differences == ("system.kind: not the kind of balance of the answer",)
    assert verdict.hint == "Draw the boundary round the gas, not the steel."  # the procedure's guidance


def test_an_added_heat_term_is_not_right():
    heat = [{"name": "from the room", "Q": "?", "T_boundary": "20 degC"}]
    verdict = compare_step(PROCEDURE, EXERCISE, "terms", changed(heat=heat))
    assert verdict.differences == ("[[heat]]: you have 1, the answer has 0",)


def test_the_purpose_step_asks_for_the_house_fields():
    heading = {k: v for k, v in ANSWER.to_dict()["worksheet"].items() if k not in ("job", "basis")}
    verdict = compare_step(PROCEDURE, EXERCISE, "purpose", changed(worksheet=heading))
    assert verdict.differences == ("worksheet.job: the house requires it", "worksheet.basis: the house requires it")
    # the words are the trainee's own: another title is no difference
    other = {**ANSWER.to_dict()["worksheet"], "title": "Disc bursts", "purpose": "what happens"}
    assert compare_step(PROCEDURE, EXERCISE, "purpose", changed(worksheet=other)).right


def test_the_results_step_compares_the_quantities_within_the_tolerance():
    off = with_initial(0, P="84 bar")
    verdict = compare_step(PROCEDURE, EXERCISE, "results", off, solved(off), answer_data())
    assert not verdict.right
    assert "P_max: differs from the answer by more than 1%" in verdict.differences
    assert all(d.split(":")[0] in ("P_max", "S_gen", "T_min", "T_max", "P_min", "Q_total", "W_total")
               for d in verdict.differences), verdict.differences
    assert_no_answer_value(verdict)
    near = with_initial(0, P="80.4 bar")  # 0.5 % off: the results within 1 % too
    assert compare_step(PROCEDURE, EXERCISE, "results", near, solved(near), answer_data()).right
    unsolved = compare_step(PROCEDURE, EXERCISE, "results", ANSWER, None, answer_data())
    assert unsolved.differences == ("results: not solved yet",)
    failed = compare_step(PROCEDURE, EXERCISE, "results", ANSWER, {"error": "no root"}, answer_data())
    assert failed.differences == ("results: the solve failed",)


def test_a_result_of_another_kind_has_none_of_the_answers_quantities():
    ws = api.read(SAMPLES / "gas-letdown-preheated.toml")
    verdict = compare_step(PROCEDURE, EXERCISE, "results", ANSWER, solved(ws), answer_data())
    assert "S_gen: your result has none" in verdict.differences


# -- the log --------------------------------------------------------------------------------
def _verdict(step: str, right: bool):
    ws = ANSWER if right else changed(fluid={"species": "N2", "model": "peng-robinson"},
                                      initial=[ANSWER.to_dict()["initial"][0]],
                                      process={"constraints": ["rigid"]},
                                      system={"kind": "closed", "inside": "x"})
    if step == "boundary" and not right:
        ws = Worksheet.from_dict({**ANSWER.to_dict(), "system": {"kind": "transient"}})
    verdict = compare_step(PROCEDURE, EXERCISE, step, ws)
    assert verdict.right is right
    return verdict


def test_the_log_says_how_each_step_went():
    log = PracticeLog.of(None)
    log.record(_verdict("boundary", True))
    log.record(_verdict("fluid", False))
    log.record(_verdict("fluid", True))
    log.record(_verdict("states", False))
    log.revealed("states")
    log.record(_verdict("constraints", False))
    log.revealed("constraints")
    log.record(_verdict("constraints", True))
    lines = log.summary(STEPS)
    assert lines == [
        "purpose: not checked",
        "boundary: right first time",
        "fluid: right after 2 tries",
        "states: not right yet (1 try); the answer was shown",
        "terms: not checked",
        "constraints: right after 2 tries; the answer was shown",
        "results: not checked",
        "1 of 7 steps right first time",
    ]
    # the log is plain data: it reads back the same
    assert PracticeLog.of(dict(log.steps)).summary(STEPS) == lines


def test_right_first_time_stays_so_after_a_later_wrong_try():
    log = PracticeLog.of({})
    log.record(_verdict("fluid", True))
    log.record(_verdict("fluid", False))
    assert log.summary(["fluid"]) == ["fluid: right first time", "1 of 1 steps right first time"]
    assert log.steps["fluid"] == {"tries": 2, "first": True, "revealed": False, "right": False}


def test_an_answer_shown_before_any_try_is_said():
    log = PracticeLog.of({})
    log.revealed("states")
    assert log.summary(["states"])[0] == "states: the answer was shown"


def test_an_answer_shown_before_the_first_try_is_not_right_first_time():
    log = PracticeLog.of({})
    log.revealed("fluid")
    log.record(_verdict("fluid", True))
    assert log.summary(["fluid"])[-1] == "0 of 1 steps right first time"


# -- the session ----------------------------------------------------------------------------
@pytest.fixture
def firm(tmp_path, monkeypatch) -> Path:
    folder = tmp_path / "firm"
    folder.mkdir()
    shutil.copy(HERE / "lab-closed.toml", folder / "lab-closed.toml")
    shutil.copytree(HERE / "exercises", folder / "exercises")
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(folder))
    monkeypatch.setenv("JOULEBOOK_CONFIG", str(tmp_path / "no-such-config.toml"))
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "t.trainee")
    return folder


def _session(folder: Path, path: Path, **kw):
    from tui.session import Session

    return Session.new(path, procedure=load(folder / "lab-closed.toml"), **kw)


def test_a_practice_session_starts_from_the_house_defaults(firm, tmp_path):
    s = _session(firm, tmp_path / "p.jbk", exercise="disc-burst-ar")
    head = s.worksheet.heading
    assert (head.procedure, head.convention, head.atmosphere) == ("lab-closed", "work-on-system", "1.01325 bar")
    assert s.worksheet.system.kind == "closed"
    assert s.units == "metric"
    assert s.procedure is not None and s.procedure.id == "lab-closed"
    assert s.extras["practice"]["exercise"] == "disc-burst-ar"
    assert s.exercise() == s.procedure.exercise("disc-burst-ar")
    assert s.guidance("boundary") == "Draw the boundary round the gas, not the steel."
    assert s.record is None  # made at the first commit


def test_an_unknown_exercise_is_refused(firm, tmp_path):
    with pytest.raises(InputError, match="procedure lab-closed has no exercise 'nope'; it has disc-burst-ar"):
        _session(firm, tmp_path / "p.jbk", exercise="nope")


def test_practise_logs_each_try_in_the_extras(firm, tmp_path):
    s = _session(firm, tmp_path / "p.jbk", exercise="disc-burst-ar")
    verdict = s.practise("boundary")
    assert verdict.right  # a closed balance, as the answer
    log = s.extras["practice"]["log"]
    assert log["boundary"]["tries"] == 1 and log["boundary"]["first"] is True
    wrong = s.practise("fluid")  # nothing chosen yet
    assert not wrong.right and "fluid.species: not the fluid of the exercise" in wrong.differences
    last = s.extras["practice"]["last"]["fluid"]
    assert last["right"] is False and last["differences"] == list(wrong.differences)
    s.edit(dataclasses.replace(s.worksheet, fluid=dataclasses.replace(s.worksheet.fluid, species="Ar", model="RK")))
    assert s.practise("fluid").right
    s.reveal("states")
    assert s.practise("review") is None  # the review is not compared
    assert s.practice_summary() == [
        "purpose: not checked", "boundary: right first time", "fluid: right after 2 tries",
        "states: the answer was shown", "terms: not checked",
        "constraints: not checked", "results: not checked", "1 of 7 steps right first time"]
    assert s.extras["practice"]["log"]["states"]["revealed"] is True


def test_after_a_commit_the_record_is_a_practice_record(firm, tmp_path):
    s = _session(firm, tmp_path / "p.jbk", exercise="disc-burst-ar")
    s.edit(dataclasses.replace(s.worksheet, fluid=dataclasses.replace(s.worksheet.fluid, species="Ar", model="RK")))
    s.commit()
    opening = s.record.entries[0]
    assert opening.data["practice"] == {"exercise": "disc-burst-ar"}
    assert opening.data["procedure"]["id"] == "lab-closed"
    assert opening.data["procedure"]["sha256"] == load(firm / "lab-closed.toml").sha256
    assert "PRACTICE record for exercise disc-burst-ar" in opening.text
    # reopened, it is a practice session again
    from tui.session import Session

    again = Session.open(s.path)
    assert again.extras["practice"]["exercise"] == "disc-burst-ar"
    assert again.procedure is not None and again.procedure.id == "lab-closed"


def test_a_session_under_a_procedure_is_not_practice(firm, tmp_path):
    s = _session(firm, tmp_path / "w.jbk")
    assert "practice" not in s.extras and s.exercise() is None and s.practise("boundary") is None
    assert s.practice_summary() == []
    s.edit(dataclasses.replace(s.worksheet, fluid=dataclasses.replace(s.worksheet.fluid, species="Ar", model="RK")))
    s.commit()
    assert "practice" not in s.record.entries[0].data and s.record.entries[0].data["procedure"]["id"] == "lab-closed"


def test_the_house_heading_reaches_the_record(firm, tmp_path):
    text = (HERE / "lab-closed.toml").read_text(encoding="utf-8")
    text = text.replace('convention = "work-on-system"', 'convention = "work-by-system"')
    text = text.replace('atmosphere = "1.01325 bar"', 'atmosphere = "0.95 bar"')
    (firm / "lab-closed.toml").write_text(text, encoding="utf-8")
    s = _session(firm, tmp_path / "w.jbk")
    assert (s.worksheet.heading.convention, s.worksheet.heading.atmosphere) == ("work-by-system", "0.95 bar")
    s.edit(dataclasses.replace(s.worksheet, fluid=dataclasses.replace(s.worksheet.fluid, species="Ar", model="RK")))
    s.commit()
    assert s.dirty() == ()  # the session says everything is committed ...
    head = s.record.worksheet().heading  # ... so the record should hold what the session shows
    assert (head.procedure, head.convention, head.atmosphere) == ("lab-closed", "work-by-system", "0.95 bar")


def test_a_practice_session_keeps_the_procedure_it_was_given(firm, tmp_path, monkeypatch):
    p = load(firm / "lab-closed.toml")
    empty = tmp_path / "empty"
    empty.mkdir()
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(empty))
    from tui.session import Session

    s = Session.new(tmp_path / "p.jbk", procedure=p, exercise="disc-burst-ar")
    assert s.extras["practice"]["exercise"] == "disc-burst-ar"  # holds today
    s.edit(dataclasses.replace(s.worksheet, fluid=dataclasses.replace(s.worksheet.fluid, species="Ar", model="RK")))
    s.commit()
    assert s.record.entries[0].data.get("practice") == {"exercise": "disc-burst-ar"}


# -- the command line that starts them -----------------------------------------------------------
def test_joulebook_practice_starts_a_practice_session(firm, tmp_path, monkeypatch, capsys):
    from tui.cli import main

    monkeypatch.chdir(tmp_path)  # the new worksheet's draft is written here
    started = []
    assert main(["practice", "lab-closed"], run_app=lambda s: started.append(s) or 0) == 0
    (s,) = started
    assert s.extras["practice"]["exercise"] == "disc-burst-ar"  # the first exercise by default
    assert s.path.parent == tmp_path and s.path.name.startswith("practice-disc-burst-ar")
    assert "practice, lab-closed exercise disc-burst-ar: Bursting disc between two argon chambers" in \
        capsys.readouterr().err


def test_joulebook_practice_of_an_unknown_exercise_or_procedure(firm, tmp_path, monkeypatch, capsys):
    from tui.cli import main

    monkeypatch.chdir(tmp_path)
    never = lambda s: pytest.fail("the app must not start")
    assert main(["practice", "lab-closed", "--exercise", "nope"], run_app=never) == 2
    assert "procedure lab-closed has no exercise 'nope'; it has disc-burst-ar" in capsys.readouterr().err
    assert main(["practice", "no-such-procedure"], run_app=never) == 2
    assert "no procedure 'no-such-procedure' in the procedure folders" in capsys.readouterr().err


def test_joulebook_new_under_a_procedure(firm, tmp_path, monkeypatch):
    from tui.cli import main

    monkeypatch.chdir(tmp_path)
    started = []
    assert main(["new", str(tmp_path / "calc.jbk"), "--procedure", "lab-closed"],
                run_app=lambda s: started.append(s) or 0) == 0
    (s,) = started
    assert s.worksheet.heading.procedure == "lab-closed" and s.procedure.id == "lab-closed"
    assert "practice" not in s.extras
