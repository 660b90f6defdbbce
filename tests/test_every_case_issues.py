"""Every case a calculation accepts is issued: run writes JSON, HTML and Markdown, verify says VERIFIED,
and the workbook opens on it — over each kind's whole input space (hypothesis, fixed seed).

A few dozen examples a kind here (``STEAMCALC_EXAMPLES`` sets how many); ``tests/bench/bench_every_case.py``
runs thousands and prints the counts.
"""

import os
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings

from tests.issue_every_case import STRATEGIES, accepted, issue_and_verify, workbook_opens, write_case

EXAMPLES = int(os.environ.get("STEAMCALC_EXAMPLES", "60"))


@pytest.mark.parametrize("kind", sorted(STRATEGIES))
def test_every_accepted_case_is_issued_and_verifies(kind):
    seen = {"accepted": 0, "refused": 0}
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)

        @settings(max_examples=EXAMPLES, derandomize=True, deadline=None, database=None,
                  suppress_health_check=list(HealthCheck))
        @given(inputs_text=STRATEGIES[kind]())
        def check(inputs_text):
            seen["drawn"] = seen.get("drawn", 0) + 1   # each example its own case id, so none meets another's record
            path = write_case(folder, kind, inputs_text, seen["drawn"])
            if not accepted(path):
                seen["refused"] += 1
                return
            seen["accepted"] += 1
            problems = issue_and_verify(path, folder / "records")
            if seen["accepted"] % 5 == 1:   # a workbook is slower to build: every fifth accepted case
                problems += workbook_opens(path, folder / "records")
            assert not problems, f"{inputs_text}\n" + "\n".join(problems)

        check()
    assert seen["accepted"] >= EXAMPLES // 3, seen   # the strategy must reach mostly accepted cases
