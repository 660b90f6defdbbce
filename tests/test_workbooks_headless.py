"""Workbooks run headless with papermill: parameters alone compute and save the record."""

import json
import shutil

import papermill

from steamcalc.records.record import load_record
from steamcalc.review.verify import verify_record


def test_letdown_workbook_with_papermill(tmp_path, demo_site_dir):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    notebook = demo_site_dir.parent / "letdown.ipynb"
    records = tmp_path / "records"
    papermill.execute_notebook(
        str(notebook), str(tmp_path / "executed.ipynb"), cwd=str(tmp_path), progress_bar=False,
        parameters={"case_file": str(site / "cases" / "LD-02.toml"), "record_folder": str(records)},
        kernel_name="python3",
    )
    record = load_record(records / "LD-02_revB.json")
    assert record["inputs"]["mass_flow"]["given"] == "2.0 t/h"
    assert verify_record(record).ok
    executed = json.loads((tmp_path / "executed.ipynb").read_text())
    printed = "".join("".join(o.get("text", "")) for c in executed["cells"] for o in c.get("outputs", []))
    assert "LD-02 rev B" in printed and "Traceback" not in printed


def test_bad_case_path_shows_a_message_not_a_traceback(tmp_path, demo_site_dir):
    notebook = demo_site_dir.parent / "letdown.ipynb"
    papermill.execute_notebook(
        str(notebook), str(tmp_path / "executed.ipynb"), cwd=str(tmp_path), progress_bar=False,
        parameters={"case_file": str(tmp_path / "missing.toml"), "record_folder": str(tmp_path)},
        kernel_name="python3",
    )
    executed = json.loads((tmp_path / "executed.ipynb").read_text())
    outputs = [o for c in executed["cells"] if c["cell_type"] == "code" for o in c.get("outputs", [])]
    # What a cell printed, and the plain text of what it displayed (the live summary shows as text headless).
    text = "".join("".join(o.get("text", "")) + "".join(o.get("data", {}).get("text/plain", "")) for o in outputs)
    assert "Input not accepted" in text and "case file not found" in text
    assert not any(o.get("output_type") == "error" for o in outputs)
    assert not list(tmp_path.glob("*.json"))
