"""Benchmark: a batch on the local worker processes against a two-worker Dask LocalCluster.

Writes N variants of the demo cases (default 5,000; without their [uncertainty] tables) and runs
them with ``steamcalc.batch.batch.run_cases``: on the process pool (the baseline) and with
``scheduler=`` a LocalCluster of two worker processes, one thread each. Needs the cluster extra.

    python tests/bench/bench_cluster.py [N]
"""

import sys
import tempfile
import time
from pathlib import Path

from distributed import LocalCluster

from bench_batch import make_cases  # the script's own folder
from steamcalc.batch.batch import run_cases

if __name__ == "__main__":
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 5000
    with tempfile.TemporaryDirectory() as tmp:
        paths = make_cases(Path(tmp), count)
        start = time.perf_counter()
        pooled = run_cases(paths, out_override=Path(tmp) / "pool", progress=False)
        pool = time.perf_counter() - start
        with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
            start = time.perf_counter()
            remote = run_cases(paths, out_override=Path(tmp) / "dask", progress=False,
                               scheduler=cluster.scheduler_address)
            dask = time.perf_counter() - start
    print(f"  {str(count) + ' cases':<40} {'total s':>9} {'ms/case':>9} {'ratio':>7}")
    print(f"  {'baseline: local process pool':<40} {pool:>9.2f} {pool / count * 1e3:>9.2f} {1.0:>7.2f}")
    print(f"  {'Dask LocalCluster, 2 workers x 1 thread':<40} {dask:>9.2f} {dask / count * 1e3:>9.2f} "
          f"{dask / pool:>7.2f}")
    print(f"  records written: {sum(o.ok for o in pooled)} and {sum(o.ok for o in remote)} of {count}")
