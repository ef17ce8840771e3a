"""Sign-offs: SSHSIG signatures made and checked by OpenSSH's ssh-keygen, and the sign-off rules.

Keys are generated in each test by ``ssh-keygen -t ed25519``; signatures are
made with ``ssh-keygen -Y sign`` and checked with ``ssh-keygen -Y verify``
against an allowed-signers file (OpenSSH ssh-keygen(1)). The rules (role
order, checker not the preparer, no approval with open comments) are
joulebook's contract from the README, "The record" (common practice, no
source).
"""

from __future__ import annotations

import hashlib
import shutil
import subprocess

import pytest

from balance.errors import InputError
from balance.record import NAMESPACE, Record
from balance.record.signing import message
from tests.test_record_support import allowed_signers, keygen, new_record
from tui.cli import main

ALICE, BOB, CAROL, MALLORY = "alice@example.com", "bob@example.com", "carol@example.com", "mallory@example.com"


@pytest.fixture(scope="module")
def keys(tmp_path_factory):
    folder = tmp_path_factory.mktemp("keys")
    made = {who: keygen(folder, who.split("@")[0]) for who in (ALICE, BOB, CAROL, MALLORY)}
    made["allowed"] = allowed_signers(folder, {ALICE: made[ALICE], BOB: made[BOB], CAROL: made[CAROL]})
    return made


def reseal(data: bytes) -> bytes:
    """Recompute every 'follows' and 'sha256' line, as a forger who edited the file would."""
    lines = data.split(b"\n")
    prev = hashlib.sha256(lines[0] + b"\n").hexdigest()
    start = None
    for i, line in enumerate(lines):
        if line.startswith(b"entry "):
            start = i
        elif line.startswith(b"follows "):
            lines[i] = b"follows " + prev.encode()
            body = b"".join(ln + b"\n" for ln in lines[start:i + 1])
            prev = hashlib.sha256(body).hexdigest()
            lines[i + 1] = b"sha256  " + prev.encode()
    return b"\n".join(lines)


def test_prepared_and_checked_signatures_verify(tmp_path, keys):
    rec = new_record(tmp_path)
    p = rec.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    c = rec.sign("checked", key_path=keys[BOB], signer=BOB, author="b.checker")
    assert p.data["covers"] == rec.entries[7].hash and c.data["covers"] == p.hash
    assert p.data["namespace"] == NAMESPACE and p.data["signature"][0] == "-----BEGIN SSH SIGNATURE-----"
    assert p.data["key"].startswith("SHA256:")  # the fingerprint ssh-keygen -l prints (OpenSSH ssh-keygen(1))
    v = Record.load(rec.path).verify(keys["allowed"])
    assert v.ok and [s.status for s in v.signoffs] == ["valid", "valid"]
    assert f'Good "{NAMESPACE}" signature for {ALICE}' in v.signoffs[0].detail  # ssh-keygen -Y verify's words
    assert v.signoffs[1].covers_seq == 9 and v.later == ()
    assert "every entry is covered by the last sign-off" in v.lines()


def test_a_signature_by_the_wrong_key_fails_naming_the_entry(tmp_path, keys):
    rec = new_record(tmp_path)
    rec.sign("prepared", key_path=keys[BOB], signer=ALICE)  # Bob's key, claiming to be Alice
    v = rec.verify(keys["allowed"])
    assert not v.ok and v.broken_seq == 9
    assert "entry 9" in v.lines()[-1] and "does not verify for alice@example.com" in v.reason


def test_a_key_not_in_the_allowed_signers_fails(tmp_path, keys):
    rec = new_record(tmp_path)
    rec.sign("prepared", key_path=keys[MALLORY], signer=MALLORY)
    v = rec.verify(keys["allowed"])
    assert not v.ok and v.broken_seq == 9 and v.signoffs[0].status == "invalid"


def _forge_signoff(rec, key, signer, covers, namespace=NAMESPACE, role="prepared"):
    """A sign-off entry written directly, with a signature made outside joulebook."""
    seq = len(rec.entries) + 1
    done = subprocess.run([shutil.which("ssh-keygen"), "-q", "-Y", "sign", "-f", str(key), "-n", namespace],
                          input=message(seq, role, signer, covers), capture_output=True, check=True)
    data = {"role": role, "signer": signer, "revision": rec.revision, "covers": covers,
            "namespace": NAMESPACE, "signature": done.stdout.decode().strip().split("\n")}
    return rec._append("sign-off", lambda _: data, None)


def test_a_signature_in_another_namespace_fails(tmp_path, keys):
    rec = new_record(tmp_path)
    _forge_signoff(rec, keys[ALICE], ALICE, rec.head, namespace="file")
    v = rec.verify(keys["allowed"])
    assert not v.ok and v.broken_seq == 9 and "does not verify" in v.reason
    control = new_record(tmp_path, name="control.record")  # the same forgery with our namespace passes
    _forge_signoff(control, keys[ALICE], ALICE, control.head)
    assert control.verify(keys["allowed"]).ok


def test_a_signature_over_another_hash_fails(tmp_path, keys):
    rec = new_record(tmp_path)
    _forge_signoff(rec, keys[ALICE], ALICE, rec.entries[3].hash)  # a valid signature, but of an older head
    v = rec.verify(keys["allowed"])
    assert not v.ok and v.broken_seq == 9 and "not the chain head before it" in v.reason


def test_an_edit_after_signing_fails_even_when_the_chain_is_resealed(tmp_path, keys):
    rec = new_record(tmp_path)
    rec.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    data = rec.path.read_bytes()
    edited = data.replace(b'P = "150 barg"', b'P = "100 barg"').replace(b"    P  150 barg", b"    P  100 barg")
    assert edited != data
    # kept as it was: the sign-off no longer covers the chain head before it
    (tmp_path / "a.record").write_bytes(reseal(edited))
    v = Record.load(tmp_path / "a.record").verify(keys["allowed"])
    assert not v.ok and v.broken_seq == 9 and "not the chain head" in v.reason
    assert [seq for seq, _ in v.problems] == [9]  # the forged text matches its data: only the signature tells
    report = Record.load(tmp_path / "a.record").replay()
    assert not report.ok and report.solves[0].status == "differs"  # the recorded results are not of these inputs
    # the forger also changes what the sign-off says it covers: the signature no longer matches
    forged = Record.load(tmp_path / "a.record")
    old_head = rec.entries[7].hash.encode()
    again = reseal(reseal(edited).replace(b'covers = "' + old_head, b'covers = "' + forged.entries[7].hash.encode()))
    (tmp_path / "b.record").write_bytes(again)
    v = Record.load(tmp_path / "b.record").verify(keys["allowed"])
    assert not v.ok and v.broken_seq == 9 and "does not verify" in v.reason
    # and without resealing, the chain itself breaks at the edited entry
    (tmp_path / "c.record").write_bytes(edited)
    v = Record.load(tmp_path / "c.record").verify(keys["allowed"])
    assert not v.chain_ok and v.broken_seq == 5


def test_changes_after_a_signoff_are_a_new_revision_signed_again(tmp_path, keys):
    rec = new_record(tmp_path)
    rec.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    rec.note("V-101 is re-rated: 140 barg")
    initial = rec.worksheet().to_dict()["initial"]
    initial[0]["P"] = "140 barg"
    rec.append_step("initial", initial)
    rec.append_solve()
    v = rec.verify(keys["allowed"])
    assert v.ok and v.revision == 2 and v.signoffs[0].revision == 1 and v.later == (10, 11, 12)
    assert v.later_unsigned == 3 and v.signoffs[0].covers_seq == 8
    assert any("revision 2 is unsigned" in line for line in v.lines())
    with pytest.raises(InputError, match="revision 2 has no prepared sign-off"):
        rec.sign("checked", key_path=keys[BOB], signer=BOB)
    rec.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    rec.sign("checked", key_path=keys[BOB], signer=BOB)
    rec.sign("approved", key_path=keys[CAROL], signer=CAROL)
    v = Record.load(rec.path).verify(keys["allowed"])
    assert v.ok and [(s.role, s.revision, s.status) for s in v.signoffs] == [
        ("prepared", 1, "valid"), ("prepared", 2, "valid"), ("checked", 2, "valid"), ("approved", 2, "valid")]
    assert v.signoffs[-1].covers_seq == 14 and v.later == ()


def test_unsigned_signoffs_are_reported_as_unsigned(tmp_path):
    rec = new_record(tmp_path)
    rec.sign("prepared", unsigned=True)
    rec.sign("checked", unsigned=True, signer="b.checker")
    v = rec.verify()
    assert v.ok and [s.status for s in v.signoffs] == ["unsigned", "unsigned"]
    assert "Not signed cryptographically: marked unsigned." in rec.entries[-1].text


def test_signatures_not_checked_are_not_a_pass(tmp_path, keys):
    rec = new_record(tmp_path)
    rec.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    v = rec.verify()
    assert v.chain_ok and not v.ok and v.signoffs[0].status == "not checked"
    assert "not checked" in v.lines()[-1]


def test_the_rules_are_enforced_when_signing(tmp_path, keys):
    rec = new_record(tmp_path)
    with pytest.raises(InputError, match="has no prepared sign-off"):
        rec.sign("checked", unsigned=True)
    with pytest.raises(InputError, match="unknown role"):
        rec.sign("reviewed", unsigned=True)
    with pytest.raises(InputError, match="--key"):
        rec.sign("prepared")
    rec.sign("prepared", unsigned=True, signer=ALICE)
    with pytest.raises(InputError, match="already signed as prepared"):
        rec.sign("prepared", unsigned=True, signer=ALICE)
    with pytest.raises(InputError, match="the checker may not be the preparer"):
        rec.sign("checked", key_path=keys[ALICE], signer="Alice@Example.com")
    rec.sign("checked", unsigned=True, signer=BOB)
    c = rec.comment(5, "Is V-102 really evacuated?", author=BOB)
    with pytest.raises(InputError, match=r"1 comment is still open \(entry 11\)"):
        rec.sign("approved", unsigned=True, signer=CAROL)
    rec.resolve(c.seq, "Yes: vacuum test record VT-7.")
    rec.sign("approved", unsigned=True, signer=CAROL)
    assert rec.verify().ok and len(rec.entries) == 13


def test_signing_needs_a_successful_solve_of_the_current_inputs(tmp_path):
    rec = new_record(tmp_path, None)
    with pytest.raises(InputError, match="nothing has been solved"):
        rec.sign("prepared", unsigned=True)
    rec = new_record(tmp_path, name="b.record")
    rec.append_step("system", {"kind": "closed", "inside": "both vessels"})
    with pytest.raises(InputError, match="after the last solve"):
        rec.sign("prepared", unsigned=True)
    rec.append_step("process", {})
    rec.append_solve()
    with pytest.raises(InputError, match="failed"):
        rec.sign("prepared", unsigned=True)


@pytest.mark.parametrize("role, signer, problem", [
    ("approved", CAROL, "has no prepared sign-off"),
    ("checked", ALICE, "has no prepared sign-off"),
])
def test_broken_rules_in_a_written_record_fail_verification(tmp_path, role, signer, problem):
    rec = new_record(tmp_path)
    data = {"role": role, "signer": signer, "revision": 1, "covers": rec.head, "unsigned": True}
    rec._append("sign-off", lambda _: data, None)
    v = rec.verify()
    assert not v.ok and v.broken_seq == 9 and problem in v.reason


def test_a_checker_who_prepared_fails_verification(tmp_path):
    rec = new_record(tmp_path)
    rec.sign("prepared", unsigned=True, signer=ALICE)
    data = {"role": "checked", "signer": ALICE, "revision": 1, "covers": rec.head, "unsigned": True}
    rec._append("sign-off", lambda _: data, None)
    v = rec.verify()
    assert not v.ok and v.broken_seq == 10 and "may not be the preparer" in v.reason


# -- the command line ------------------------------------------------------------------------
def test_sign_and_verify_on_the_command_line(tmp_path, keys, capsys, monkeypatch):
    monkeypatch.setenv("JOULEBOOK_AUTHOR", "a.preparer")
    path = str(tmp_path / "calc.jbk")
    new_record(tmp_path)
    assert main(["record", "sign", path, "--role", "prepared", "--key", str(keys[ALICE]), "--signer", ALICE]) == 0
    assert main(["record", "verify", path, "--allowed-signers", str(keys["allowed"])]) == 0
    out = capsys.readouterr().out
    assert "VALID" in out and "verdict: intact, all signatures valid" in out
    assert main(["record", "verify", path]) == 1  # signatures not checked
    assert main(["record", "sign", path, "--role", "checked", "--key", str(keys[ALICE]), "--signer", ALICE]) == 2
    assert "may not be the preparer" in capsys.readouterr().err
    data = (tmp_path / "calc.jbk").read_bytes()
    (tmp_path / "calc.jbk").write_bytes(data.replace(b"V-101", b"V-110", 1))
    assert main(["record", "verify", path, "--allowed-signers", str(keys["allowed"])]) == 1
    assert "broken at entry 2" in capsys.readouterr().err
    assert main(["record", "verify", path, "--allowed-signers", str(tmp_path / "nowhere")]) == 2
    assert main(["record", "verify", str(keys["allowed"])]) == 2  # not a record: unreadable
    assert "line 1" in capsys.readouterr().err
