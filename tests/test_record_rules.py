"""The record's own rules, as the app asks them: is a solve due, is the calculation signed
off as it stands, which role signs next. Expectations: the sign-off rules of
balance.record.review (README, "The record"); common practice, no source.
"""

from __future__ import annotations

from balance.record import ROLES
from tests.test_record_support import new_record


def test_a_solve_is_due_after_a_step_until_it_is_solved(tmp_path):
    rec = new_record(tmp_path)  # a sample: its steps, then its solve
    assert not rec.needs_solve()
    rec.append_step("worksheet", {"title": "buffer, second look"})
    assert rec.needs_solve()
    rec.comment(2, "check the title")  # a comment changes no input
    assert rec.needs_solve()
    rec.append_solve()
    assert not rec.needs_solve()


def test_sign_offs_follow_the_roles_until_the_calculation_changes(tmp_path):
    rec = new_record(tmp_path)
    assert rec.roles == tuple(ROLES) == ("prepared", "checked", "approved")
    assert not rec.signed() and rec.next_role() == "prepared"
    rec.sign("prepared", unsigned=True, author="a.preparer")
    assert rec.signed() and rec.next_role() == "checked"
    rec.comment(3, "see the fluid")  # comments and resolutions leave the sign-off standing
    assert rec.signed() and rec.next_role() == "checked"
    rec.sign("checked", unsigned=True, author="b.checker")
    rec.resolve(len(rec.entries) - 1, "checked against the data sheet")
    rec.sign("approved", unsigned=True, author="c.approver")
    assert rec.next_role() == "approved"  # every role signed: the last one is shown
    rec.append_step("worksheet", {"title": "revision 2"})
    assert not rec.signed() and rec.next_role() == "prepared"


def test_a_record_made_with_other_roles_signs_in_those(tmp_path):
    from balance.record import Record

    rec = Record.create(tmp_path / "r.jbk", author="a.preparer", roles=("prepared", "witnessed"))
    assert rec.roles == ("prepared", "witnessed") and rec.next_role() == "prepared"
