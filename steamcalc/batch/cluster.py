"""Batches on a Dask distributed cluster: ``steamcalc run DIR --scheduler ADDRESS`` and
``steamcalc verify DIR --scheduler ADDRESS``.

An optional extra (``pip install ".[cluster]"``). Each case (or record) is one task; the task is
the same function the local path runs (:func:`steamcalc.batch.batch.run_one`,
:func:`steamcalc.review.verify.verify_file`), so results, failures, the index and exit codes are the same whichever
runs them. The workers must see the same folders as the command (a shared file system) and
have steamcalc installed at the same version. Tasks in a threaded Dask worker keep their own
IF97 engine choice (it is context-local), so a Monte Carlo in one thread never switches the
engine of a record computed in another.
"""

from __future__ import annotations

from ..errors import SteamcalcError

#: How long to wait for a scheduler to answer, s.
CONNECT_TIMEOUT = 10


def connect(address):
    """A Dask client on the scheduler at ``address`` (e.g. ``tcp://10.0.0.5:8786``), or a clear error."""
    try:
        from distributed import Client
    except ImportError:
        raise SteamcalcError("running on a cluster needs the Dask 'distributed' package, which is not installed",
                             field="--scheduler", value=address,
                             fix='pip install "steamcalc[cluster]" (or leave out --scheduler to use local '
                                 'worker processes)') from None
    try:
        return Client(address, timeout=CONNECT_TIMEOUT)
    except (OSError, TimeoutError, ValueError) as exc:
        raise SteamcalcError(f"no Dask scheduler answered at {address!r} within {CONNECT_TIMEOUT} s ({exc})",
                             field="--scheduler", value=address,
                             fix="check the address (tcp://HOST:PORT) and that the scheduler is running") from None


def _gather(client, futures, total, progress):
    """Results in the order submitted, with a progress bar as tasks finish."""
    from distributed import as_completed

    from .tasks import progress_bar

    bar = progress_bar(total, progress)
    try:
        for _ in as_completed(futures):
            bar.update(1)
    finally:
        bar.close()
    return [future.result() for future in futures]


def run_cases_on_cluster(paths, site_override, out_override, address, progress=True):
    """Run case files as tasks on a Dask cluster; outcomes in the order given."""
    from .tasks import link_phases, run_one

    outcomes = {}
    with connect(address) as client:
        # Cases that link issued records run after the records they link (as on the local path).
        for phase in link_phases(paths):
            futures = client.map(run_one, [str(paths[n]) for n in phase], site_override=site_override,
                                 out_override=out_override, pure=False)
            outcomes.update(zip(phase, _gather(client, futures, len(phase), progress)))
    return [outcomes[n] for n in range(len(paths))]


def verify_on_cluster(paths, engine, address, progress=True):
    """Verify record files as tasks on a Dask cluster; results of
    :func:`steamcalc.review.verify.verify_file`, in order."""
    from ..review.verify import verify_file

    with connect(address) as client:
        futures = client.map(verify_file, [str(p) for p in paths], engine=engine, pure=False)
        return _gather(client, futures, len(paths), progress)


__all__ = ["connect", "run_cases_on_cluster", "verify_on_cluster"]
