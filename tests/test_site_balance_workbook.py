"""The site-balance workbook run headless with papermill: parameters alone compute, draw and save the record."""

import json
import shutil

import papermill

from steamcalc.cli import main
from steamcalc.records.record import load_record
from steamcalc.review.verify import verify_record


def _outputs(path):
    executed = json.loads(path.read_text())
    outputs = [o for c in executed["cells"] if c["cell_type"] == "code" for o in c.get("outputs", [])]
    text = "".join("".join(o.get("text", "")) + "".join(o.get("data", {}).get("text/plain", "")) for o in outputs)
    return outputs, text


def test_site_balance_workbook_with_papermill(tmp_path, demo_site_dir):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    for name in ("LD-01", "LD-02", "FL-01", "HX-01"):   # the records the balance links, issued first
        assert main(["run", str(site / "cases" / f"{name}.toml"), "--quiet"]) in (0, 1)
    records = tmp_path / "records"
    papermill.execute_notebook(
        str(demo_site_dir.parent / "site_balance.ipynb"), str(tmp_path / "executed.ipynb"), cwd=str(tmp_path),
        progress_bar=False, kernel_name="python3",
        parameters={"case_file": str(site / "cases" / "SB-01.toml"), "record_folder": str(records)})
    record = load_record(records / "SB-01_revA.json")
    assert verify_record(record).ok
    outputs, text = _outputs(tmp_path / "executed.ipynb")
    assert "SB-01 rev A: WARN" in text and "saved: record SB-01 rev A" in text
    assert not any(o.get("output_type") == "error" for o in outputs)
    # Plotly's Sankey diagrams, one per load case, drawn from the record's figure data.
    assert sum("application/vnd.plotly.v1+json" in o.get("data", {}) for o in outputs) == 2


def test_links_not_yet_issued_are_issued_from_their_case_files_first(tmp_path, demo_site_dir):
    # A fresh checkout has no records: the workbook issues what the balance links, as `run` on the site would.
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    papermill.execute_notebook(
        str(demo_site_dir.parent / "site_balance.ipynb"), str(tmp_path / "executed.ipynb"), cwd=str(tmp_path),
        progress_bar=False, kernel_name="python3",
        parameters={"case_file": str(site / "cases" / "SB-01.toml"), "record_folder": str(tmp_path / "records")})
    outputs, text = _outputs(tmp_path / "executed.ipynb")
    assert "LD-01 rev B issued from LD-01.toml (it was not in records/)" in text and "SB-01 rev A: WARN" in text
    assert not any(o.get("output_type") == "error" for o in outputs)
    assert sorted(p.name for p in (site / "records").glob("*.json")) == \
        ["FL-01_revB.json", "HX-01_revB.json", "LD-01_revB.json", "LD-02_revB.json"]


def test_a_balance_whose_links_are_not_issued_shows_a_message_not_a_traceback(tmp_path, demo_site_dir):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    (site / "cases" / "LD-02.toml").unlink()   # nothing here issues the linked LD-02: refused by name
    papermill.execute_notebook(
        str(demo_site_dir.parent / "site_balance.ipynb"), str(tmp_path / "executed.ipynb"), cwd=str(tmp_path),
        progress_bar=False, kernel_name="python3",
        parameters={"case_file": str(site / "cases" / "SB-01.toml"), "record_folder": str(tmp_path / "records")})
    outputs, text = _outputs(tmp_path / "executed.ipynb")
    assert "not run:" in text and "letdown[0].record" in text and "issue it first" in text
    assert not any(o.get("output_type") == "error" for o in outputs)
    assert not (tmp_path / "records").exists()
