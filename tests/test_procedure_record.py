"""A record made under a house procedure: the pin, `record verify`'s report, the sign-off rules.

The procedure is tests/procedures/lab-closed.toml (an invented lab rig's), copied into a
folder of the test's own that JOULEBOOK_PROCEDURES names. Sign-offs are unsigned (no key), as
in tests/test_record_review.py. What is expected is joulebook's contract (README, "House
procedures" and "The record"; common practice, no source).
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from balance.errors import InputError
from balance.procedures import escalated_roles, load, required_roles
from balance.record import Record
from tests.helpers import sample
from tests.test_record_support import Clock
from tui.cli import main

HERE = Path(__file__).resolve().parent / "procedures"
GOOD_TEXT = (HERE / "lab-closed.toml").read_text(encoding="utf-8")
HIGH = "n2-buffer-into-receiver.toml"  # 150 barg in V-101: above the 50 barg of the escalation
LOW = "air-test-cylinder-reversible.toml"  # 8 bar at the most: below it


@pytest.fixture
def firm(tmp_path, monkeypatch) -> Path:
    """The lab rig's procedure folder, the only one searched besides the bundled one."""
    folder = tmp_path / "firm"
    folder.mkdir()
    (folder / "lab-closed.toml").write_text(GOOD_TEXT, encoding="utf-8")
    shutil.copytree(HERE / "exercises", folder / "exercises")
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(folder))
    monkeypatch.setenv("JOULEBOOK_CONFIG", str(tmp_path / "no-such-config.toml"))
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "a.preparer")
    return folder


def variant(folder: Path, old: str, new: str, name: str = "lab-closed.toml") -> Path:
    """The lab rig's procedure with one change, written to ``folder/name``."""
    assert GOOD_TEXT.count(old) == 1
    path = folder / name
    path.write_text(GOOD_TEXT.replace(old, new), encoding="utf-8")
    return path


def record(folder: Path, procedure, sample_name: str = HIGH, name: str = "calc.jbk", **kw) -> Record:
    return Record.create(folder / name, author="a.preparer", worksheet=sample(sample_name), procedure=procedure,
                         clock=Clock(), **kw)


def house_lines(rec: Record) -> list[str]:
    return list(Record.load(rec.path).verify().house)


# -- the pin -----------------------------------------------------------------------------------
def test_the_opening_pins_the_procedure(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p)
    opening = Record.load(rec.path).entries[0]
    pin = opening.data["procedure"]
    assert (pin["id"], pin["version"], pin["title"]) == ("lab-closed", "2", "Lab rig: closed vessels")
    assert pin["sha256"] == p.sha256 and len(pin["sha256"]) == 64
    rules = pin["rules"]
    assert rules["kinds"] == ["closed"] and rules["owner"] == "Lab rig safety team"
    assert [c["id"] for c in rules["check"]] == ["design-minimum-temperature", "second-law", "closure"]
    assert rules["model_rule"][0]["allowed"] == ["reference", "pr"]
    assert rules["signoff"]["escalate"][0]["above"] == "50 barg"
    assert rules["step"]["purpose"] == {"required": ["worksheet.job", "worksheet.basis"]}
    # the procedure's roles, with the escalation's, are the record's
    assert opening.data["roles"] == ["prepared", "checked", "approved"]
    assert "practice" not in opening.data
    assert "House procedure: lab-closed version 2, Lab rig: closed vessels" in opening.text
    assert f"Procedure file SHA-256: {p.sha256}" in opening.text
    assert "PRACTICE" not in opening.text


def test_a_record_without_a_procedure_pins_none(firm, tmp_path):
    rec = Record.create(tmp_path / "plain.jbk", author="a.preparer", worksheet=sample(HIGH), clock=Clock())
    assert "procedure" not in rec.entries[0].data
    assert "House procedure" not in rec.entries[0].text
    assert Record.load(rec.path).verify().house == ()


# -- record verify -------------------------------------------------------------------------
def test_verify_says_the_current_version_and_applies_the_rules(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p)
    lines = house_lines(rec)
    assert lines[0] == f"house procedure: lab-closed version 2 (file sha256 {p.sha256})"
    assert lines[1] == f"  the current version ({firm / 'lab-closed.toml'})"
    assert lines[2] == "  rules re-applied (as pinned) to the last solve: 8 pass"
    assert "    pass      design-minimum-temperature: Below the rig's design minimum metal temperature: " \
           "T_min = 262.39 K (-10.76 °C), must be at least -29 degC" in lines
    assert any(line.startswith("    pass      real-gas-above-50-bar: ") for line in lines)
    assert any(line.startswith("    pass      worksheet.job: ") for line in lines)
    assert not any("OLDER" in line for line in lines)


def test_verify_says_an_older_version_after_the_file_is_edited(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p)
    # the lab rig tightens its design minimum temperature and bumps the version
    newer = variant(firm, 'limit = "-29 degC"', 'limit = "0 degC"')
    newer.write_text(newer.read_text(encoding="utf-8").replace('version = "2"', 'version = "3"'), encoding="utf-8")
    current = load(newer)
    lines = house_lines(rec)
    assert lines[1] == (f"  an OLDER version: the folders now have version 3 (sha256 {current.sha256}) "
                        f"at {newer}")
    # the pinned rules still pass ...
    pinned = lines.index("  rules re-applied (as pinned) to the last solve: 8 pass")
    now = next(i for i, line in enumerate(lines) if line.startswith("  rules of the current version 3: "))
    assert pinned < now
    assert any(line.startswith("    pass      design-minimum-temperature: ") for line in lines[pinned:now])
    # ... and the current version's, applied too, stop
    assert lines[now] == "  rules of the current version 3: 7 pass, 1 stop"
    assert any(line.startswith("    STOP      design-minimum-temperature: ") and "must be at least 0 degC" in line
               for line in lines[now:])


def test_verify_without_the_procedure_in_the_folders(firm, tmp_path, monkeypatch):
    rec = record(tmp_path, load(firm / "lab-closed.toml"))
    empty = tmp_path / "empty"
    empty.mkdir()
    monkeypatch.setenv("JOULEBOOK_PROCEDURES", str(empty))
    lines = house_lines(rec)
    assert lines[1] == "  not in the procedure folders here: its rules are applied as the record pinned them"
    assert lines[2] == "  rules re-applied (as pinned) to the last solve: 8 pass"
    assert ("  approved is required, NOT signed yet: Above 50 barg the rig lead approves. (P_max = 151 bar(a), "
            "above 50 barg)") in lines
    assert "  not yet signed as prepared, checked" in lines


def test_record_verify_on_the_command_line(firm, tmp_path, capsys):
    rec = record(tmp_path, load(firm / "lab-closed.toml"))
    assert main(["record", "verify", str(rec.path)]) == 0
    out = capsys.readouterr().out.splitlines()
    assert "house procedure: lab-closed version 2 (file sha256 " + load(firm / "lab-closed.toml").sha256 + ")" in out
    assert f"  the current version ({firm / 'lab-closed.toml'})" in out
    assert any(line.startswith("    pass      second-law: ") for line in out)
    assert out[-1] == "verdict: intact"


# -- which roles sign --------------------------------------------------------------------------
def test_an_escalation_above_its_pressure_adds_a_role(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p, HIGH)
    data = rec.entries[-1].data  # the solve entry's
    assert required_roles(p, data) == ("prepared", "checked", "approved")
    (role, why) = escalated_roles(p, data)[0]
    assert role == "approved" and why == "Above 50 barg the rig lead approves. (P_max = 151 bar(a), above 50 barg)"
    assert f"  approved is required, NOT signed yet: {why}" in house_lines(rec)


def test_below_the_escalation_two_roles_sign(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p, LOW)
    data = rec.entries[-1].data
    assert required_roles(p, data) == ("prepared", "checked")
    assert escalated_roles(p, data) == []
    lines = house_lines(rec)
    assert not any("is required" in line for line in lines)
    # the model rule does not apply at 8 bar; the rest pass
    assert lines[2] == "  rules re-applied (as pinned) to the last solve: 7 pass, 1 n/a"
    assert any(line.startswith("    n/a       real-gas-above-50-bar: ") for line in lines)
    assert required_roles(p, None) == ("prepared", "checked")  # not solved: no escalation known


# -- the sign-off rules -----------------------------------------------------------------------
def test_distinct_signers_refuse_one_person_in_two_roles(firm, tmp_path):
    rec = record(tmp_path, load(firm / "lab-closed.toml"))
    rec.sign("prepared", unsigned=True, signer="alice")
    rec.sign("checked", unsigned=True, signer="bob")
    with pytest.raises(InputError, match="procedure lab-closed wants every role signed by a different person: "
                                         r"Bob signed this revision as checked \(entry 10\)"):
        rec.sign("approved", unsigned=True, signer="Bob")
    with pytest.raises(InputError, match="alice signed this revision as prepared"):
        rec.sign("approved", unsigned=True, signer="alice")  # the record's own rule covers only the checker
    rec.sign("approved", unsigned=True, signer="carol")
    assert [s.signer for s in Record.load(rec.path).verify().signoffs] == ["alice", "bob", "carol"]
    lines = house_lines(Record.load(rec.path))
    assert any(line.startswith("  approved is required, signed (entry 11): ") for line in lines)
    assert not any(line.startswith("  not yet signed as") for line in lines)


def test_without_distinct_one_person_may_check_and_approve(firm, tmp_path):
    p = load(variant(firm, "distinct = true", "distinct = false"))
    rec = record(tmp_path, p)
    rec.sign("prepared", unsigned=True, signer="alice")
    rec.sign("checked", unsigned=True, signer="bob")
    rec.sign("approved", unsigned=True, signer="bob")
    other = record(tmp_path, p, name="other.jbk")
    other.sign("prepared", unsigned=True, signer="alice")
    with pytest.raises(InputError, match="the checker may not be the preparer"):  # the record's own rule stands
        other.sign("checked", unsigned=True, signer="alice")


def test_a_stop_refuses_the_sign_off_until_justified(firm, tmp_path):
    p = load(variant(firm, 'limit = "-29 degC"', 'limit = "0 degC"'))
    rec = record(tmp_path, p)
    with pytest.raises(InputError) as refused:
        rec.sign("prepared", unsigned=True, signer="alice")
    message = str(refused.value)
    assert "procedure lab-closed version 2 stops at rule 'design-minimum-temperature'" in message
    assert "must be at least 0 degC" in message
    assert "[worksheet.deviations] (design-minimum-temperature = \"why\")" in message
    # the deviation, written in the worksheet and solved again: the sign-off is allowed
    heading = rec.worksheet().to_dict()["worksheet"]
    why = "V-102 is rated to -40 degC (lab rig vessel file); the frost is on the outside only."
    rec.append_step("worksheet", {**heading, "deviations": {"design-minimum-temperature": why}})
    with pytest.raises(InputError, match="solve before signing"):
        rec.sign("prepared", unsigned=True, signer="alice")
    rec.append_solve()
    rec.sign("prepared", unsigned=True, signer="alice")
    rec.sign("checked", unsigned=True, signer="bob")
    lines = house_lines(rec)
    assert any(line.startswith("    deviation design-minimum-temperature: ") and line.endswith(f"— justified: {why}")
               for line in lines)


def test_a_blank_justification_does_not_open_the_sign_off(firm, tmp_path):
    p = load(variant(firm, 'limit = "-29 degC"', 'limit = "0 degC"'))
    rec = record(tmp_path, p)
    heading = rec.worksheet().to_dict()["worksheet"]
    rec.append_step("worksheet", {**heading, "deviations": {"design-minimum-temperature": " "}})
    rec.append_solve()
    with pytest.raises(InputError, match="stops at rule 'design-minimum-temperature'"):
        rec.sign("prepared", unsigned=True, signer="alice")


def test_a_blank_required_field_refuses_the_sign_off(firm, tmp_path):
    rec = record(tmp_path, load(firm / "lab-closed.toml"))
    heading = rec.worksheet().to_dict()["worksheet"]
    rec.append_step("worksheet", {k: v for k, v in heading.items() if k != "job"})
    rec.append_solve()
    with pytest.raises(InputError, match="stops at rule 'worksheet.job'"):
        rec.sign("prepared", unsigned=True, signer="alice")


def test_a_model_outside_the_allowed_ones_refuses_the_sign_off(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p, "argon-membrane-rupture.toml")  # Redlich-Kwong at 80 bar
    with pytest.raises(InputError, match="stops at rule 'real-gas-above-50-bar'.*fluid.model is redlich-kwong"):
        rec.sign("prepared", unsigned=True, signer="alice")


def test_the_sign_off_follows_the_pinned_rules_not_the_folders(firm, tmp_path):
    """A record made under version 2 is signed by version 2's rules, though the folder now holds
    a stricter version 3 (verify shows both)."""
    rec = record(tmp_path, load(firm / "lab-closed.toml"))
    variant(firm, 'limit = "-29 degC"', 'limit = "0 degC"')
    rec.sign("prepared", unsigned=True, signer="alice")


# -- practice records --------------------------------------------------------------------------
def test_a_practice_record_is_never_signed(firm, tmp_path):
    p = load(firm / "lab-closed.toml")
    rec = record(tmp_path, p, LOW, practice="disc-burst-ar")
    opening = rec.entries[0]
    assert opening.data["practice"] == {"exercise": "disc-burst-ar"}
    assert "PRACTICE record for exercise disc-burst-ar: it can never be signed" in opening.text
    with pytest.raises(InputError, match=r"this is a practice record \(exercise disc-burst-ar\): a practice record "
                                         "can never be signed"):
        rec.sign("prepared", unsigned=True, signer="alice")
    for role in ("checked", "approved"):
        with pytest.raises(InputError):
            rec.sign(role, unsigned=True, signer="bob")
    assert Record.load(rec.path).verify().signoffs == ()
    assert house_lines(rec)[0] == "PRACTICE record (exercise disc-burst-ar): never signed"


def test_a_practice_record_needs_its_procedure(firm, tmp_path):
    with pytest.raises(InputError, match="a practice record follows a procedure"):
        Record.create(tmp_path / "p.jbk", author="a.preparer", worksheet=sample(LOW), practice="disc-burst-ar")
