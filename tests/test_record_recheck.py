"""Re-checking an archive: every record under a folder verified and replayed, one row each.

The archive is made here from the repository's samples (scenarios of our own
invention): a record signed with keys made by OpenSSH's ``ssh-keygen -t
ed25519`` and checked by ``ssh-keygen -Y verify`` against an allowed-signers
file (OpenSSH ssh-keygen(1), "ALLOWED SIGNERS"); one signed by a key the file
does not hold; one not signed; one with a byte of an entry's text changed; one
whose recorded number was changed and resealed by a forger; one filed as an
earlier release would have filed it (another settled temperature, written
through the record's own writer, so it verifies); one that solved when
recorded and fails now. The outcomes, their order of precedence and the exit
codes are joulebook's contract (README, "Re-checking an archive"; common
practice, no source). The CSV is read back with Python's csv module (RFC 4180
quoting). The same rows must come from this process, a process pool and a
Dask cluster (Dask's LocalCluster, worker processes of its own).
"""

from __future__ import annotations

import copy
import csv
import os
import shutil
import socket
from pathlib import Path

import pytest

from balance import api
from balance.record import Record
from balance.record.recheck import (CHAIN_BROKEN, CHANGED, COLUMNS, FAILS_VERIFICATION, NOT_SIGNED, OUTCOMES,
                                    REPRODUCED, RESOLVE_FAILED, SIGNATURE_INVALID, UNREADABLE, find_records,
                                    recheck_all, recheck_one)
from balance.record.replay import solve_data
from tests.helpers import SAMPLES
from tests.test_record_signing import reseal
from tests.test_record_support import allowed_signers, keygen
from tui.cli import main

ALICE, BOB, MALLORY = "alice@example.com", "bob@example.com", "mallory@example.com"
N2 = "n2-buffer-into-receiver.toml"  # Peng-Robinson, closed: replays in milliseconds
AIR = "air-test-cylinder-reversible.toml"
#: the earlier release of the "changed" record put the settled temperature this much higher
EARLIER = 1.002
HAS_SSH = shutil.which("ssh-keygen") is not None


def _create(path: Path, sample: str, **kw) -> Record:
    return Record.create(path, author="a.preparer", worksheet=api.read((SAMPLES / sample).read_text("utf-8")), **kw)


def _earlier_release(sections: dict) -> dict:
    """A solve as an earlier joulebook would have filed it: the settled temperature EARLIER times higher."""
    data = copy.deepcopy(solve_data(sections))
    data["states"]["settled"]["T"]["value"] *= EARLIER
    return data


@pytest.fixture(scope="module")
def archive(tmp_path_factory):
    """An archive of records, one of each outcome, in folders and sub-folders; the files by name."""
    root = tmp_path_factory.mktemp("archive")
    keys = root / "keys"
    (root / "2024" / "q4").mkdir(parents=True)
    (root / "2025").mkdir()
    keys.mkdir()
    made: dict[str, Path] = {}

    made["unsigned"] = _create(root / "2025" / "unsigned.jbk", AIR).path
    good = _create(root / "2025" / "tampered.jbk", N2)
    data = good.path.read_bytes()
    at = data.index(b"\n| ") + 3  # the first byte of the first line of text, in entry 1
    good.path.write_bytes(data[:at] + data[at:at + 1].swapcase() + data[at + 1:])
    made["tampered"] = good.path

    forged = root / "2024" / "forged.jbk"  # a recorded number changed, the chain sealed again
    recorded_T = repr(good.entries[-1].data["states"]["settled"]["T"]["value"]).encode()
    forged.write_bytes(reseal(data.replace(b"T = { value = " + recorded_T, b"T = { value = 250.0")))
    made["forged"] = forged

    made["changed"] = _create(root / "2024" / "q4" / "changed.jbk", N2, solver=_earlier_release).path

    failing = _create(root / "2024" / "q4" / "now-fails.jbk", N2)
    solved = failing.entries[-1].data
    failing.append_step("process", {})  # under-specified now: this joulebook refuses to solve it
    failing.append_solve(data=solved)  # an earlier release filed a result for it
    made["now fails"] = failing.path

    dangling = root / "2025" / "moved-away.jbk"
    dangling.symlink_to(root / "nowhere.jbk")
    made["dangling"] = dangling

    allowed = None
    if HAS_SSH:
        who = {name: keygen(keys, name.split("@")[0]) for name in (ALICE, BOB, MALLORY)}
        allowed = allowed_signers(keys, {ALICE: who[ALICE], BOB: who[BOB]})
        signed = _create(root / "2024" / "signed.jbk", N2)
        signed.sign("prepared", key_path=who[ALICE], signer=ALICE)
        signed.sign("checked", key_path=who[BOB], signer=BOB, author="b.checker")
        made["signed"] = signed.path
        stranger = _create(root / "2024" / "stranger.jbk", AIR)
        stranger.sign("prepared", key_path=who[MALLORY], signer=MALLORY)  # not in the allowed-signers file
        made["stranger"] = stranger.path
    return root, made, allowed


@pytest.fixture(autouse=True)
def _no_default_signers(tmp_path, monkeypatch):
    monkeypatch.delenv("JOULEBOOK_ALLOWED_SIGNERS", raising=False)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "config"))


def _rows(archive, **kw):
    root, made, allowed = archive
    return {Path(r.path): r for r in recheck_all(find_records([str(root)]), allowed_signers=allowed, **kw)}


def test_every_record_under_the_folders_is_found_once_and_sorted(archive):
    root, made, _ = archive
    found = find_records([str(root), str(made["changed"]), str(root / "2024")])
    assert found == sorted(found) and len(found) == len(set(found))
    assert {Path(p) for p in found} == set(made.values())  # sub-folders too; the keys and the CSV are not records


def test_each_outcome_is_named_with_what_was_found(archive):
    _, made, allowed = archive
    rows = _rows(archive)
    assert rows[made["unsigned"]].outcome == NOT_SIGNED
    assert rows[made["unsigned"]].detail == "1 solve reproduced; no sign-off"
    assert rows[made["unsigned"]].revision == 1 and rows[made["unsigned"]].roles == ()

    tampered = rows[made["tampered"]]
    assert tampered.outcome == CHAIN_BROKEN and tampered.revision is None
    assert tampered.detail.startswith("entry 1 (line 3) does not match its sha256 seal")

    forged = rows[made["forged"]]  # its text still says the old number: verify's rule, then the replay
    assert forged.outcome == FAILS_VERIFICATION
    assert "its text is not the rendering of its data" in forged.detail and "also results changed" in forged.detail
    assert forged.quantity == "states.settled.T"

    changed = rows[made["changed"]]
    assert changed.outcome == CHANGED and changed.entry == 8 and changed.quantity == "states.settled.T"
    # judged against the largest recorded temperature of the result: V-101 at 20 degC (the sample)
    recorded = Record.load(made["changed"]).entries[-1].data["states"]["settled"]["T"]["value"]
    assert changed.change == pytest.approx((recorded / EARLIER - recorded) / 293.15, rel=1e-6)
    assert changed.detail.startswith("entry 8: 1 value beyond 1e-09; largest states.settled.T: recorded ")
    assert changed.largest_change == f"states.settled.T {changed.change:+.3g}"

    now_fails = rows[made["now fails"]]
    assert now_fails.outcome == RESOLVE_FAILED and now_fails.detail.startswith("entry 10: solved when recorded, now fails")
    assert now_fails.quantity == "" and now_fails.change is None

    assert rows[made["dangling"]].outcome == UNREADABLE and rows[made["dangling"]].detail == "does not exist"
    if allowed is None:
        pytest.skip("ssh-keygen is not installed: the signed records are not made")
    signed = rows[made["signed"]]
    assert signed.outcome == REPRODUCED and signed.roles == ("prepared", "checked") and signed.signatures == "valid"
    assert signed.detail == "1 solve reproduced"
    stranger = rows[made["stranger"]]
    assert stranger.outcome == SIGNATURE_INVALID and "does not verify for mallory@example.com" in stranger.detail


def test_a_broken_chain_wins_over_everything(tmp_path):
    rec = _create(tmp_path / "changed.jbk", N2, solver=_earlier_release)  # results changed, not signed ...
    data = rec.path.read_bytes()
    rec.path.write_bytes(data.replace(b"V-101", b"V-110", 1))  # ... and now a broken chain
    row = recheck_one(str(rec.path))
    assert row.outcome == CHAIN_BROKEN and row.quantity == "" and row.detail.startswith("entry 2 ")
    assert OUTCOMES[0] == CHAIN_BROKEN and OUTCOMES[-1] == REPRODUCED


def test_every_outcome_has_its_exit_code():
    from tui.record_cli import RECHECK_EXIT

    assert tuple(RECHECK_EXIT) == OUTCOMES  # the same words, in the order of precedence
    assert [RECHECK_EXIT[o] for o in OUTCOMES] == [1, 2, 1, 1, 5, 4, 0, 0]


def test_a_replay_that_raises_is_its_own_row(tmp_path, monkeypatch):
    rec = _create(tmp_path / "calc.jbk", N2)

    def boom(self, tolerance):
        raise RuntimeError("a defect")

    monkeypatch.setattr(Record, "replay", boom)
    row = recheck_one(str(rec.path))
    assert row.outcome == RESOLVE_FAILED and row.detail.startswith("the replay raised RuntimeError: a defect")


def test_signatures_not_checked_are_said_not_passed_over(archive):
    _, made, allowed = archive
    if allowed is None:
        pytest.skip("ssh-keygen is not installed")
    row = recheck_one(str(made["signed"]))  # no allowed-signers file
    assert row.outcome == REPRODUCED and row.signatures == "not checked"
    assert "signatures not checked (no allowed-signers file)" in row.detail


def test_a_recheck_only_reads(tmp_path):
    rec = _create(tmp_path / "torn.jbk", N2)
    data = rec.path.read_bytes()[:-40]  # the last entry cut off, as by an interrupted copy
    rec.path.write_bytes(data)
    before = {p.name: (p.read_bytes(), p.stat().st_mtime_ns) for p in tmp_path.iterdir()}
    row = recheck_one(str(rec.path))
    assert row.outcome == CHAIN_BROKEN and row.detail.startswith("entry 8 is cut off at the end")
    # Record.load would set the torn entry aside and rewrite the record; a re-check must not
    assert {p.name: (p.read_bytes(), p.stat().st_mtime_ns) for p in tmp_path.iterdir()} == before


def test_serial_process_pool_and_dask_give_the_same_rows(archive):
    root, _, allowed = archive
    paths = find_records([str(root)])
    serial = recheck_all(paths, allowed_signers=allowed)
    assert [r.path for r in serial] == paths
    assert recheck_all(list(reversed(paths)), jobs=2, allowed_signers=allowed) == serial
    pytest.importorskip("distributed")
    from dask.distributed import LocalCluster

    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        seen = []
        rows = recheck_all(paths, scheduler=cluster.scheduler_address, allowed_signers=allowed,
                           progress=lambda done, total: seen.append((done, total)))
        assert rows == serial
        assert seen[-1] == (len(paths), len(paths))
        assert main(["record", "recheck", str(root / "2025"), "--scheduler", cluster.scheduler_address]) == 1


def test_the_command_line_prints_the_table_and_writes_its_csv(archive, tmp_path, capsys):
    root, made, allowed = archive
    out_csv = tmp_path / "recheck.csv"
    args = ["record", "recheck", str(root), "--csv", str(out_csv)] + (["--allowed-signers", str(allowed)] if allowed else [])
    assert main(args) == 1  # a broken chain wins
    out, err = capsys.readouterr()
    assert "chain broken" in out and str(made["tampered"]) in out
    n = len(made)
    counts = "1 chain broken, 1 unreadable" + (", 1 signature invalid" if allowed else "")
    assert f"{n} records: {counts}, 1 fails verification, 1 re-solve failed, 1 results changed, 1 not signed" in out
    assert "exit 1: chain broken" in err
    with open(out_csv, newline="", encoding="utf-8") as fh:
        table = list(csv.reader(fh))
    assert tuple(table[0]) == COLUMNS == ("path", "outcome", "largest change", "revision", "signed roles", "detail")
    by_path = {Path(r[0]): r for r in table[1:]}
    assert set(by_path) == set(made.values())
    assert by_path[made["changed"]][1:4] == ["results changed", _rows(archive)[made["changed"]].largest_change, "1"]
    assert by_path[made["unsigned"]][1:] == ["not signed", "", "1", "", "1 solve reproduced; no sign-off"]
    if allowed:
        assert by_path[made["signed"]][4] == "prepared, checked"


@pytest.mark.parametrize("which, code", [("unsigned", 0), ("changed", 4), ("now fails", 5), ("tampered", 1),
                                         ("forged", 1), ("stranger", 1), ("signed", 0)])
def test_exit_codes(archive, capsys, which, code):
    _, made, allowed = archive
    if which not in made:
        pytest.skip("ssh-keygen is not installed")
    args = ["record", "recheck", str(made[which])] + (["--allowed-signers", str(allowed)] if allowed else [])
    assert main(args) == code
    assert ("failed the re-check" in capsys.readouterr().err) == (code != 0)


def test_an_unreadable_record_exits_2_as_bad_input(tmp_path, capsys):
    (tmp_path / "moved-away.jbk").symlink_to(tmp_path / "nowhere.jbk")  # listed in the folder, not there
    _create(tmp_path / "calc.jbk", AIR)
    assert main(["record", "recheck", str(tmp_path)]) == 2
    out, err = capsys.readouterr()
    assert "unreadable" in out and "exit 2: unreadable" in err


def test_bad_input_names_itself_with_exit_code_2(tmp_path, capsys):
    assert main(["record", "recheck", str(tmp_path / "no-such-folder")]) == 2
    assert f"{tmp_path / 'no-such-folder'}: does not exist" in capsys.readouterr().err
    assert main(["record", "recheck", str(tmp_path)]) == 2  # an empty folder: nothing was checked
    assert "holds no records (*.jbk)" in capsys.readouterr().err
    _create(tmp_path / "calc.jbk", AIR)
    assert main(["record", "recheck", str(tmp_path), "--allowed-signers", str(tmp_path / "nowhere")]) == 2
    assert "--allowed-signers" in capsys.readouterr().err
    assert main(["record", "recheck", str(tmp_path), "--csv", str(tmp_path / "no" / "t.csv")]) == 2
    assert "--csv" in capsys.readouterr().err
    for bad in (["--jobs", "0"], ["--tolerance", "-1"]):
        with pytest.raises(SystemExit) as stop:  # argparse refuses it, naming the option
            main(["record", "recheck", str(tmp_path), *bad])
        assert stop.value.code == 2 and bad[0] in capsys.readouterr().err


def test_the_scheduler_is_named_when_dask_is_missing_or_unreachable(tmp_path, capsys, monkeypatch):
    _create(tmp_path / "calc.jbk", AIR)
    with monkeypatch.context() as m:
        m.setitem(os.sys.modules, "dask.distributed", None)  # as if Dask were not installed
        assert main(["record", "recheck", str(tmp_path), "--scheduler", "tcp://127.0.0.1:8786"]) == 2
        err = capsys.readouterr().err
        assert "--scheduler" in err and "joulebook[cluster]" in err
    pytest.importorskip("distributed")
    import dask

    with socket.socket() as s:  # a port no scheduler listens on
        s.bind(("127.0.0.1", 0))
        port = s.getsockname()[1]
    with dask.config.set({"distributed.comm.timeouts.connect": "1s"}):
        assert main(["record", "recheck", str(tmp_path), "--scheduler", f"tcp://127.0.0.1:{port}"]) == 2
    assert f"--scheduler: cannot reach a Dask scheduler at 'tcp://127.0.0.1:{port}'" in capsys.readouterr().err
    assert main(["record", "recheck", str(tmp_path), "--scheduler", "tcp://x", "--jobs", "2"]) == 2
    assert "--jobs" in capsys.readouterr().err


def test_a_worker_with_another_joulebook_is_named_and_refused():
    from balance.errors import InputError
    from balance.record import recheck

    class Cluster:  # what recheck asks of a dask.distributed Client, answered as by an outdated worker
        def __init__(self, theirs):
            self.theirs = theirs

        def scheduler_info(self):
            return {"workers": dict.fromkeys(self.theirs)}

        def run(self, func):
            return self.theirs

    ours = api.pins()
    recheck._same_joulebook(Cluster({"tcp://10.0.0.7:40001": ours}), "tcp://host:8786")  # the same: accepted
    older = {**ours, "joulebook": "0.0.9"}
    with pytest.raises(InputError, match=r"--scheduler: worker tcp://10.0.0.8:40002 runs joulebook 0.0.9"):
        recheck._same_joulebook(Cluster({"tcp://10.0.0.7:40001": ours, "tcp://10.0.0.8:40002": older}), "tcp://host:8786")
    other_data = {**ours, "species_data_sha256": "0" * 64}
    with pytest.raises(InputError, match="runs other species data"):
        recheck._same_joulebook(Cluster({"tcp://10.0.0.7:40001": other_data}), "tcp://host:8786")
