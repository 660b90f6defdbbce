"""Work shared out over forked copies of this process: the register recomputes many records at once.

A forked worker starts as a copy of the parent, with everything the parent has imported and every state it
has evaluated, so a worker costs no start-up; nothing is pickled on the way in (the work is the parent's own
objects), only each answer on the way back. Where the platform cannot fork (Windows, macOS's default), or
inside a program with threads of its own (a Jupyter kernel), callers keep to one process: :func:`usable_workers`
says how many workers a caller may start.

Ctrl-C reaches the whole process group: workers ignore it and the parent stops them, so the user sees one
"interrupted" and no worker's traceback. SIGTERM to the parent does the same (the command line turns it into
Ctrl-C).
"""

from __future__ import annotations

import gc
import multiprocessing
import os
import signal
import threading

from ..errors import SteamcalcError

#: Below this many items a worker's fork and answer cost more than it saves (common practice: a few dozen).
SMALLEST_SHARE = 12


def usable_workers(items, limit=8):
    """How many processes may share ``items`` pieces of work: 1 unless the platform forks, this process has
    no other threads, and there is enough work for more than one."""
    if items < 2 * SMALLEST_SHARE or "fork" not in multiprocessing.get_all_start_methods():
        return 1
    if threading.active_count() > 1:   # a kernel's or a GUI's threads would be copied half-way through their work
        return 1
    try:
        cores = len(os.sched_getaffinity(0))
    except AttributeError:   # no affinity on this platform
        cores = os.cpu_count() or 1
    return max(1, min(limit, cores, items // SMALLEST_SHARE))


def _error_parts(exc):
    if isinstance(exc, SteamcalcError):
        return ("steamcalc", type(exc).__name__, exc.message,
                {k: getattr(exc, k, None) for k in ("field", "value", "limits", "fix", "source")})
    return ("other", type(exc).__name__, str(exc), {})


def _raise_from(parts):
    kind, name, message, fields = parts
    if kind == "steamcalc":
        raise SteamcalcError(message, **{k: v for k, v in fields.items() if v is not None})
    raise RuntimeError(f"{name}: {message}")


def _child(work, share, sender):
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    for name in ("SIGTERM", "SIGHUP"):
        number = getattr(signal, name, None)
        if number is not None:
            signal.signal(number, signal.SIG_DFL)
    interrupts_held(False)   # a Ctrl-C held since the fork is dropped now: this worker ignores it
    try:
        answers = [(i, work(i)) for i in share]
        sender.send(("done", answers))
    except BaseException as exc:   # sent back whole, raised in the parent by name: a worker prints nothing
        sender.send(("error", _error_parts(exc)))
    finally:
        sender.close()


def interrupts_held(held):
    """Hold Ctrl-C (SIGINT) back from this thread, or let it through again (what was held arrives then).

    The parent holds it while it forks: a worker starts with it held and lets it through only once it ignores it.
    Otherwise a Ctrl-C in the instant after a fork interrupts the new worker in Python's own start-up code,
    which prints a traceback. Where signals cannot be held (no ``pthread_sigmask``), nothing is done.
    """
    if hasattr(signal, "pthread_sigmask"):
        signal.pthread_sigmask(signal.SIG_BLOCK if held else signal.SIG_UNBLOCK, {signal.SIGINT})


def map_forked(work, count, workers):
    """``[work(0), ..., work(count - 1)]``, shared over ``workers`` processes (the parent being one of them).

    Parameters
    ----------
    work : callable
        Takes an index, returns a picklable answer; runs in the workers as in the parent.
    count : int
        How many pieces of work.
    workers : int
        Processes to use (from :func:`usable_workers`); 1 runs everything here, in order.

    Returns
    -------
    list
        The answers in index order.

    Raises
    ------
    SteamcalcError
        The first error a worker met, as it was raised there.
    """
    if workers <= 1:
        return [work(i) for i in range(count)]
    context = multiprocessing.get_context("fork")
    shares = [list(range(k, count, workers)) for k in range(workers)]
    children = []
    answers = {}
    # What exists before the fork (every module imported, every state evaluated) is set aside from the
    # garbage collector, in the parent and in each copy, for the length of the work: the collector then
    # traverses only what the work makes (a tenth of a register's time went to traversing the rest again and
    # again), and a copy's collections do not touch, and so copy, the pages it shares with the parent.
    # A program that froze objects of its own keeps them frozen: nothing more is set aside then.
    freezing = gc.get_freeze_count() == 0
    try:
        if freezing:
            gc.freeze()
        interrupts_held(True)
        try:
            for share in shares[1:]:
                receiver, sender = context.Pipe(duplex=False)
                process = context.Process(target=_child, args=(work, share, sender), daemon=True)
                process.start()
                sender.close()
                children.append((process, receiver))
        finally:
            interrupts_held(False)   # a Ctrl-C held meanwhile arrives here, in the parent
        for i in shares[0]:
            answers[i] = work(i)
        for process, receiver in children:
            try:
                kind, payload = receiver.recv()
            except EOFError:
                raise SteamcalcError("a worker of this command stopped without an answer (out of memory, or "
                                     "stopped from outside)", fix="run it again; if it recurs, free memory") from None
            if kind == "error":
                _raise_from(payload)
            answers.update(payload)
    finally:
        for process, receiver in children:
            if process.is_alive():
                process.terminate()
            process.join()
            receiver.close()
        if freezing:
            gc.unfreeze()
    return [answers[i] for i in range(count)]
