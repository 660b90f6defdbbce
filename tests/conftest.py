import pytest


@pytest.fixture
def demo_site_dir():
    from pathlib import Path
    return Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
