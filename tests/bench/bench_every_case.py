"""Benchmark: every accepted case is issued, over many drawn cases (the property test, at scale).

Draws cases over each kind's whole input space (``tests/issue_every_case.py``), and for every case the
calculation accepts, runs it as a user does and verifies it. Prints, per kind, how many cases were drawn,
accepted, issued and verified, and the failures (none expected).

    python tests/bench/bench_every_case.py [CASES_PER_KIND]     # 10000 by default
"""

import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))   # the repository, for tests.issue_every_case

from hypothesis import HealthCheck, given, settings  # noqa: E402

from tests.issue_every_case import STRATEGIES, accepted, issue_and_verify, write_case  # noqa: E402

if __name__ == "__main__":
    count = int(sys.argv[1]) if len(sys.argv) > 1 else 10000
    print(f"  {'kind':<10} {'drawn':>7} {'accepted':>9} {'issued and verified':>20} {'s/case':>7}")
    for kind, strategy in sorted(STRATEGIES.items()):
        tally = {"drawn": 0, "accepted": 0, "ok": 0}
        failures = []
        start = time.perf_counter()
        with tempfile.TemporaryDirectory() as folder:

            @settings(max_examples=count, derandomize=True, deadline=None, database=None,
                      suppress_health_check=list(HealthCheck))
            @given(inputs_text=strategy())
            def draw(inputs_text):
                tally["drawn"] += 1
                path = write_case(folder, kind, inputs_text, tally["drawn"])
                if not accepted(path):
                    path.unlink()
                    return
                tally["accepted"] += 1
                problems = issue_and_verify(path, Path(folder) / "records")
                if problems:
                    failures.append((inputs_text, problems))
                else:
                    tally["ok"] += 1
                for stale in Path(folder, "records").glob(f"P-{tally['drawn']}_revA.*"):
                    stale.unlink()   # keep the folder small over thousands of cases

            draw()
        seconds = (time.perf_counter() - start) / max(tally["drawn"], 1)
        print(f"  {kind:<10} {tally['drawn']:>7} {tally['accepted']:>9} {tally['ok']:>20} {seconds:>7.2f}")
        for inputs_text, problems in failures[:5]:
            print("    FAILED:", inputs_text.replace("\n", "; "), "->", "; ".join(problems)[:300])
