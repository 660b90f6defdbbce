"""A state given from memory is the very state evaluated afresh; a batch stopped by Ctrl-C with a worker idle ends.

Consistency tests (no outside reference): the memory of :func:`remembering_states` changes how often a state is
evaluated, never its value, type or sign.
"""

import math

from steamcalc.properties.engines import remembering_states
from steamcalc.properties.steam import SteamState


def _exactly(state):
    """Every field of a state, spelled exactly (type, and the sign of a zero)."""
    return [(type(value).__name__, repr(value)) for value in
            (state.pressure, state.temperature, state.enthalpy, state.entropy, state.density, state.dryness,
             state.phase, state.region, state.cp, state.cv, state.speed_of_sound)]


def test_remembered_saturated_liquid_keeps_the_sign_of_its_zero_dryness():
    # -0.0 == 0.0 (same hash): without care the second state is the first one's, dryness -0.0, which a record
    # writes as -0.0 and whose digest then depends on which case a batch's worker ran first.
    with remembering_states():
        SteamState.from_p_dryness(1e5, -0.0)
        remembered = SteamState.from_p_dryness(1e5, 0.0)
    fresh = SteamState.from_p_dryness(1e5, 0.0)
    assert math.copysign(1.0, remembered.dryness) == math.copysign(1.0, fresh.dryness) == 1.0
    assert _exactly(remembered) == _exactly(fresh)


def test_remembered_fast_state_keeps_the_types_of_its_arguments():
    # The fast engine passes p and T through: 100000 and 1e5 are one key, 400 and 400.0 another.
    with remembering_states():
        SteamState.from_pT(100000, 400, engine="fast")
        remembered = SteamState.from_pT(1e5, 400.0, engine="fast")
    fresh = SteamState.from_pT(1e5, 400.0, engine="fast")
    assert _exactly(remembered) == _exactly(fresh)


def test_remembering_still_shares_a_state_given_the_same_way():
    with remembering_states(memory := {}):
        first = SteamState.from_pT(1e5, 400.0)
        again = SteamState.from_pT(1e5, 400.0)
    assert _exactly(first) == _exactly(again)
    assert sum(key[1] == "state_pT" for key in memory) == 1


_CTRL_C_WITH_ONE_WORKER_IDLE = r'''
import time, types
import steamcalc.batch.batch as batch

def case(path, site, out, force):
    if path == "slow":
        started = time.time()
        while time.time() - started < 600:   # deep in a calculation
            pass
    return path

class Bar:
    def update(self, n):
        pass

polls = []
def sleep(seconds):
    polls.append(seconds)
    time.sleep(seconds)
    if len(polls) > 40:      # about two seconds in: the quick case is done, its worker idle, the other busy
        raise KeyboardInterrupt

batch.run_one = case
batch.time = types.SimpleNamespace(sleep=sleep)
outcomes = {}
try:
    batch._run_parallel(["quick", "slow", "linking"], [[0, 1], [2]], None, None, False, 2, outcomes, Bar())
except KeyboardInterrupt:
    print("stopped", sorted(outcomes.values()))
'''


def test_ctrl_c_with_a_worker_idle_stops_the_batch():
    # A worker waiting for its next case holds the pool's queue lock; a worker killed while it waits never lets
    # it go, and the pool's own shutdown then waits for that lock for ever (Ctrl-C during a batch's second phase,
    # or at the end of its first, hung the batch). The timeout only stops a hung run; it is no timing check.
    import subprocess
    import sys

    try:
        done = subprocess.run([sys.executable, "-c", _CTRL_C_WITH_ONE_WORKER_IDLE], capture_output=True, text=True,
                              timeout=120)
    except subprocess.TimeoutExpired:
        raise AssertionError("the batch hung after Ctrl-C with one worker idle") from None
    assert "stopped ['quick']" in done.stdout, done.stdout + done.stderr


_CTRL_C_HELD_WHILE_WORKERS_START = r'''
import multiprocessing, os, signal
import steamcalc.batch.batch as batch
import steamcalc.review.forked as forked

original = forked.interrupts_held
def held(hold):
    original(hold)
    if hold:
        os.kill(os.getpid(), signal.SIGINT)   # Ctrl-C while the workers are forked: it arrives once they started

class Bar:
    def update(self, n):
        pass

def case(path, site, out, force):
    return path

forked.interrupts_held = held
batch.run_one = case
try:
    batch._run_parallel(["a", "b", "c", "d"], [[0, 1, 2, 3]], None, None, False, 2, {}, Bar())
except KeyboardInterrupt:
    print("workers left running:", len(multiprocessing.active_children()))
'''


def test_ctrl_c_held_while_the_workers_start_stops_them_before_the_batch_reports():
    # The Ctrl-C held during the fork is raised where it is let through; there the pool must already be in the
    # block that stops it, not left to the interpreter's exit (after the batch has printed what did not run).
    import subprocess
    import sys

    done = subprocess.run([sys.executable, "-c", _CTRL_C_HELD_WHILE_WORKERS_START], capture_output=True, text=True,
                          timeout=120)
    assert "workers left running: 0" in done.stdout, done.stdout + done.stderr
