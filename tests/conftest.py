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
