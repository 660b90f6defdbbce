"""A batch stopped by SIGTERM or SIGHUP ends as Ctrl-C does (issue 22, item 16).

A service manager's SIGTERM or a closed terminal's SIGHUP leaves the index of what finished, the list of cases
not run and exit 130, with no worker tracebacks.
"""

import signal
import subprocess
import sys
import time

import pytest

from tests.bench.bench_batch import make_cases


@pytest.mark.skipif(not hasattr(signal, "SIGHUP"), reason="POSIX signals")
@pytest.mark.parametrize("stop", [signal.SIGTERM, signal.SIGHUP])
def test_a_stop_signal_ends_a_batch_as_ctrl_c_does(tmp_path, stop):
    make_cases(tmp_path, count=120)
    out = tmp_path / "records"
    process = subprocess.Popen([sys.executable, "-m", "steamcalc", "run", str(tmp_path / "cases"), "--out", str(out),
                                "--quiet"], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    # Wait for the first record rather than for a time: the signal must find the batch running.
    deadline = time.monotonic() + 300
    while not any(out.glob("*_rev*.json")) and process.poll() is None and time.monotonic() < deadline:
        time.sleep(0.05)
    process.send_signal(stop)
    stdout, stderr = process.communicate(timeout=300)
    if process.returncode == 0:
        pytest.skip("the batch finished before the signal arrived")
    assert process.returncode == 130, stderr
    assert "Traceback" not in stderr and "Traceback" not in stdout
    assert "did not run" in stderr and "not run:" in stderr
    assert (out / "index.html").exists() and (out / "index.csv").exists()
    # What finished is whole: every JSON has its reports.
    for record in out.glob("*_rev*.json"):
        assert record.with_suffix(".html").exists() and record.with_suffix(".md").exists(), record.name
