import pytest


@pytest.fixture
def demo_site_dir():
    from pathlib import Path
    return Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"


@pytest.fixture(autouse=True)
def register_memory_of_its_own(tmp_path_factory, monkeypatch):
    """Each test gets an empty register memory (steamcalc.review.memory), never the user's: a record a test verified
    before must not be taken as verified by a test that changes the calculation under it."""
    monkeypatch.setenv("STEAMCALC_CACHE", str(tmp_path_factory.mktemp("steamcalc-cache")))


@pytest.fixture(scope="session")
def demo_linked_records(tmp_path_factory):
    """The record the demo main SM-01 links (HX-01 revision B, its steam flow), issued once into a folder of its
    own: give it as ``record_folder`` (or copy it beside ``--out``) to compute SM-01 where the demo site's records
    folder has not been issued."""
    from pathlib import Path

    from steamcalc.cli import main

    folder = tmp_path_factory.mktemp("demo_linked_records")
    case = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site" / "cases" / "HX-01.toml"
    assert main(["run", str(case), "--out", str(folder), "--quiet"]) in (0, 1)
    return folder
