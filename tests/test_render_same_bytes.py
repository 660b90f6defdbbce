"""Drawing a record's reports faster changes none of their bytes.

``tests/test_render_same_bytes.json`` holds the SHA-256 of every report the code drew before the drawing was
made faster: for each archived record (every folder of ``tests/archive``), in its own display
units and with its site's ``display_units`` set to ``"US"``, the HTML and Markdown record (drawn one by one and
both at once, as ``verify`` and ``register`` draw them) and the layout releases 0.2 and 0.3 drew them in
(``render_earlier``). Each must be drawn to the very same bytes (source: the reports as drawn by the code of
commit 5a598a4, before the change).

The fixture is written by this file's own script, run on the code the reference is to be drawn by::

    PYTHONPATH=. python tests/test_render_same_bytes.py --write
"""

import hashlib
import json
import sys
from pathlib import Path

import pytest

from steamcalc.records.record import load_record
from steamcalc.render.report import RENDERERS, render_earlier, render_html, render_markdown

ARCHIVE = Path(__file__).resolve().parent / "archive"
FIXTURE = Path(__file__).with_suffix(".json")
RECORDS = sorted(ARCHIVE.glob("v*/*_rev*.json"))
SYSTEMS = ("own", "US")


def _record(path, system):
    record = load_record(path)
    if system == "US":
        record = dict(record, site=dict(record.get("site") or {}, display_units="US"))
    return record


def _digest(text):
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def drawn(path, system):
    """Name -> SHA-256 of every report of one archived record in one display system."""
    record = _record(path, system)
    both = RENDERERS.draw(record)
    return {"html": _digest(render_html(record)), "md": _digest(render_markdown(record)),
            "draw.html": _digest(both[".html"]), "draw.md": _digest(both[".md"]),
            "earlier.html": _digest(render_earlier(record, ".html")),
            "earlier.md": _digest(render_earlier(record, ".md"))}


def _key(path, system):
    return f"{path.parent.name}/{path.stem}/{system}"


CASES = [(path, system) for path in RECORDS for system in SYSTEMS]


def test_the_reference_covers_every_archived_record():
    reference = json.loads(FIXTURE.read_text(encoding="utf-8"))
    assert sorted(reference) == sorted(_key(path, system) for path, system in CASES)
    assert {path.parent.name for path in RECORDS} >= {"v0_3", "v0_3_schema2"}


@pytest.mark.parametrize("path, system", CASES, ids=[_key(p, s) for p, s in CASES])
def test_a_record_is_drawn_to_the_same_bytes(path, system):
    reference = json.loads(FIXTURE.read_text(encoding="utf-8"))[_key(path, system)]
    assert drawn(path, system) == reference


if __name__ == "__main__":
    if sys.argv[1:] != ["--write"]:
        sys.exit("usage: python tests/test_render_same_bytes.py --write   (draws the reference with this code)")
    table = {_key(path, system): drawn(path, system) for path, system in CASES}
    FIXTURE.write_text(json.dumps(table, indent=1, sort_keys=True) + "\n", encoding="utf-8")
    print(f"wrote {len(table)} records' digests to {FIXTURE}")
