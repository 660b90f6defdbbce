"""Batches on a Dask cluster (the optional ``cluster`` extra): the same records, failures and exit
codes as the local worker processes. Skipped where the Dask ``distributed`` package is absent."""

import json
import shutil

import pytest

from steamcalc.cli import main

distributed = pytest.importorskip("distributed")


@pytest.fixture(scope="module")
def scheduler():
    # Two workers of one thread each, in this process: a threaded worker is where an engine
    # choice could leak between tasks (it is context-local, so it must not).
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=False, dashboard_address=None) as cluster:
        yield cluster.scheduler_address


def _content_digests(folder):
    return {p.name: json.loads(p.read_text())["content_digest"] for p in sorted(folder.glob("*.json"))}


def test_cluster_run_gives_the_records_of_the_process_pool(tmp_path, demo_site_dir, scheduler, capsys):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    (site / "cases" / "BAD.toml").write_text('[case]\nkind = "letdown"\nid = "BAD"\n')
    local, remote = tmp_path / "local", tmp_path / "remote"
    local_code = main(["run", str(site / "cases"), "--out", str(local), "--quiet"])
    local_out = capsys.readouterr()
    remote_code = main(["run", str(site / "cases"), "--out", str(remote), "--quiet", "--scheduler", scheduler])
    remote_out = capsys.readouterr()
    assert remote_code == local_code == 2  # the bad case is reported the same way, the others still run
    assert _content_digests(remote) == _content_digests(local) and len(_content_digests(local)) == len(list(demo_site_dir.glob("cases/*.toml")))
    assert remote_out.err.replace(str(remote), "OUT") == local_out.err.replace(str(local), "OUT")
    assert (remote / "index.html").exists() and (remote / "index.csv").read_text() != ""
    assert main(["verify", str(remote), "--engine", "fast", "--scheduler", scheduler]) == 0
    assert capsys.readouterr().out.count("verdict: VERIFIED") == len(list(demo_site_dir.glob("cases/*.toml")))


def test_unreachable_scheduler_is_a_clear_usage_error(tmp_path, demo_site_dir, capsys):
    code = main(["run", str(demo_site_dir / "cases" / "LD-02.toml"), "--out", str(tmp_path),
                 "--scheduler", "tcp://127.0.0.1:9"])
    assert code == 2
    err = capsys.readouterr().err
    assert "--scheduler" in err and "tcp://127.0.0.1:9" in err and "Traceback" not in err
