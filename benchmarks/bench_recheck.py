"""Re-checking an archive of records: serial, a pool of 2 processes, a Dask cluster of 2 workers.

Makes N records once in a temporary folder (default 1,000: copies of records
of three closed samples on cubic models, which replay in milliseconds), then
re-checks them all (``balance.record.recheck.recheck_all``: verify and replay
each) three ways, and prints each way's records per second and its ratio to
serial:

- serial, in this process (warmed by one record first);
- ``jobs=2``: a process pool, its two processes spawned in the timed run, as
  ``joulebook record recheck --jobs 2`` does at every run;
- a Dask ``LocalCluster`` of 2 worker processes (1 thread each), started and
  warmed before the timed run, as a firm's cluster is already running; the
  timed run connects a client, checks the workers' joulebook and maps the work.

Every way must give the same rows (checked). With fewer than 2 CPUs the
ratios say nothing. Not a test: machines here are shared and noisy.

    python benchmarks/bench_recheck.py [N]    (default 1000 records)
"""

from __future__ import annotations

import os
import shutil
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

SAMPLES = ("n2-buffer-into-receiver.toml", "methane-piston-isothermal.toml", "argon-membrane-rupture.toml")


def make_archive(folder: Path, n: int) -> list[str]:
    """N records in folder (ten to a sub-folder), copies of one record of each sample."""
    from balance import api
    from balance.record import Record

    made = []
    for name in SAMPLES:
        ws = api.read((ROOT / "samples" / name).read_text(encoding="utf-8"))
        made.append(Record.create(folder / f"{Path(name).stem}.source", author="b.bench", worksheet=ws).path)
    for i in range(n):
        sub = folder / f"{i // 10:04d}"
        sub.mkdir(exist_ok=True)
        shutil.copyfile(made[i % len(made)], sub / f"calc-{i:05d}.jbk")
    from balance.record.recheck import find_records

    return find_records([str(folder)])


def timed(run) -> tuple[float, list]:
    t0 = time.perf_counter()
    rows = run()
    return time.perf_counter() - t0, rows


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    from balance.record.recheck import recheck_all, recheck_one

    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        paths = make_archive(Path(tmp), n)
        print(f"{len(paths)} records of {', '.join(SAMPLES)} made in {time.perf_counter() - t0:.1f} s; "
              f"{os.cpu_count()} CPUs")
        recheck_one(paths[0])  # warm: imports, the unit registry, the models' caches

        serial_s, serial = timed(lambda: recheck_all(paths))
        outcomes = sorted({r.outcome for r in serial})
        print(f"serial                       {len(paths) / serial_s:8.0f} records/s  ({serial_s:6.2f} s)  "
              f"ratio 1.00   outcomes: {', '.join(outcomes)}")

        pool_s, pool = timed(lambda: recheck_all(paths, jobs=2))
        if pool != serial:
            raise SystemExit("the process pool's rows differ from serial")
        print(f"process pool, 2 workers      {len(paths) / pool_s:8.0f} records/s  ({pool_s:6.2f} s)  "
              f"ratio {serial_s / pool_s:4.2f}   (spawning the 2 processes included)")

        try:
            from dask.distributed import Client, LocalCluster
        except ImportError:
            print("Dask LocalCluster: not measured (pip install 'joulebook[cluster]')")
            return
        with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
            with Client(cluster.scheduler_address) as client:  # warm each worker, as a running cluster is
                client.run(recheck_one, paths[0])
            dask_s, rows = timed(lambda: recheck_all(paths, scheduler=cluster.scheduler_address))
        if rows != serial:
            raise SystemExit("the Dask cluster's rows differ from serial")
        print(f"Dask LocalCluster, 2 workers {len(paths) / dask_s:8.0f} records/s  ({dask_s:6.2f} s)  "
              f"ratio {serial_s / dask_s:4.2f}   (a warm cluster; connecting the client included)")


if __name__ == "__main__":  # the pool's processes are spawned: they import this file without running it
    main()
