"""Every single-byte change of a signed record is detected.

A signed record of a sample (prepared and checked, with keys made here by
OpenSSH's ssh-keygen) is changed one byte at a time: each byte flipped (one
bit), each byte duplicated (an insertion) and each byte deleted, at every
position. Each changed file must fail verification (a line named as
malformed, a torn tail, a broken chain or a failed signature). A second,
bigger record gets a large random sample of random changes. The expectation
is joulebook's contract (README, "The record"; common practice, no source).
"""

from __future__ import annotations

import multiprocessing
import random

import pytest

from balance.errors import InputError
from balance.record import Record, inspect
from tests.test_record_support import allowed_signers, keygen, new_record

ALICE, BOB = "alice@example.com", "bob@example.com"


@pytest.fixture(scope="module")
def signed(tmp_path_factory):
    folder = tmp_path_factory.mktemp("tamper")
    keys = {ALICE: keygen(folder, "alice"), BOB: keygen(folder, "bob")}
    allowed = allowed_signers(folder, keys)
    rec = new_record(folder, "air-test-cylinder-reversible.toml")
    c = rec.comment(5, "Is 1.2 g the trapped mass at bottom dead centre?", author=BOB)
    rec.resolve(c.seq, "Yes: swept plus clearance volume at suction conditions.")
    rec.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    rec.sign("checked", key_path=keys[BOB], signer=BOB)
    big = new_record(folder, "n2-buffer-into-receiver.toml", name="big.record")
    big.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    initial = big.worksheet().to_dict()["initial"]
    initial[0]["T"] = "35 degC"
    big.append_step("initial", initial)
    big.append_solve()
    big.sign("prepared", key_path=keys[ALICE], signer=ALICE)
    big.sign("checked", key_path=keys[BOB], signer=BOB)
    return rec.path.read_bytes(), big.path.read_bytes(), str(allowed), folder


def _changes(data: bytes, p: int):
    """The single-byte changes at position p: a bit flipped, the byte deleted, the byte doubled.

    Deleting or doubling a byte equal to the one before it gives the same
    file as at p - 1, so it is not tried twice.
    """
    if p < len(data):
        yield "flip", data[:p] + bytes([data[p] ^ (1 << (p % 8))]) + data[p + 1:]
        if p == 0 or data[p] != data[p - 1]:
            yield "delete", data[:p] + data[p + 1:]
            yield "insert", data[:p] + data[p:p + 1] + data[p:]
    else:
        yield "insert", data + b"\n"


_WORK: tuple = ()


def _undetected(positions) -> list[tuple[str, int]]:
    data, allowed = _WORK
    missed = []
    for p in positions:
        for op, changed in _changes(data, p):
            if inspect(changed, "r.record", allowed).ok:
                missed.append((op, p))
    return missed


def test_the_unchanged_records_verify(signed):
    small, big, allowed, _ = signed
    assert inspect(small, "r.record", allowed).ok
    assert inspect(big, "r.record", allowed).ok


def test_every_single_byte_change_of_a_signed_record_is_detected(signed):
    global _WORK
    small, _, allowed, _ = signed
    _WORK = (small, allowed)
    positions = list(range(len(small) + 1))
    chunks = [positions[i::8] for i in range(8)]
    with multiprocessing.get_context("fork").Pool(2) as pool:  # the CI machine has two cores
        missed = [m for part in pool.map(_undetected, chunks) for m in part]
    assert missed == []
    assert len(small) > 13_000  # every kind of line: opening, steps, solve, comment, resolution, sign-offs


def test_a_random_sample_of_changes_to_a_bigger_record_is_detected(signed):
    _, big, allowed, _ = signed
    rng = random.Random(20250106)
    missed = []
    for _ in range(1500):
        p = rng.randrange(len(big))
        op = rng.choice(["flip", "delete", "insert", "replace"])
        if op == "flip":
            changed = big[:p] + bytes([big[p] ^ rng.randrange(1, 256)]) + big[p + 1:]
        elif op == "delete":
            changed = big[:p] + big[p + 1:]
        elif op == "insert":
            changed = big[:p] + bytes([rng.randrange(256)]) + big[p:]
        else:
            changed = big[:p] + bytes([rng.choice(b"0123456789abcdef \n|:")]) + big[p + 1:]
        if changed != big and inspect(changed, "r.record", allowed).ok:
            missed.append((op, p))
    assert missed == []


def test_loading_a_changed_file_refuses_recovers_or_fails_verification(signed, tmp_path):
    small, _, allowed, _ = signed
    rng = random.Random(7)
    outcomes = {"refused": 0, "recovered": 0, "failed": 0}
    for k in range(120):
        p = rng.randrange(len(small) + 1)
        op, changed = rng.choice(list(_changes(small, p)))
        path = tmp_path / f"m{k}.record"
        path.write_bytes(changed)
        try:
            rec = Record.load(path)
        except InputError as exc:
            assert "line " in str(exc)
            outcomes["refused"] += 1
            continue
        if rec.recovered:
            outcomes["recovered"] += 1
            continue
        assert not rec.verify(allowed).ok, (op, p)
        outcomes["failed"] += 1
    assert sum(outcomes.values()) == 120 and outcomes["failed"] > 0 and outcomes["refused"] > 0
