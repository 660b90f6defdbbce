"""Benchmark: what a record costs beside its calculation, side by side in one run.

For each demo case (without its [uncertainty] table): the calculation, then the HTML and Markdown
rendering of its record (drawn from the record alone), the schema check as reading the file makes it, and
``verify``; each printed as a ratio to the calculation. It also counts how many times ``verify`` runs the calculation on each engine.
The design targets: HTML rendering at most 0.5x the calculation; one calculation per engine per verify.

    python tests/bench/bench_record.py [--parts]

``--parts`` then prints, per case, what the HTML page's time is made of, each as a share of the calculation: the
record's display (numbers and units written), the sketch and charts (SVG), and the template (the page around
them, with both made already). The three add up to about the whole page.
"""

import re
import shutil
import sys
import tempfile
from pathlib import Path

from timing import median_seconds

from steamcalc.calcs import get_calculation
from steamcalc.cases.site import case_inputs, case_site, load_case
from steamcalc.records.build import record_for_case
from steamcalc.records.record import IssuedRecords, load_record, write_record
from steamcalc.records.schema import validate_record
from steamcalc.render.display import display_record
from steamcalc.render.figures_svg import record_figures
from steamcalc.render.report import RENDERERS, _context, _environment, render_html, render_markdown
from steamcalc.review.verify import verify_file

DEMO = Path(__file__).resolve().parents[2] / "workbooks" / "demo_site"


def counted_calculations(calc, action):
    """How many times ``action()`` runs ``calc.calculate``."""
    real, calls = calc.calculate, []
    calc.calculate = lambda *args, **kw: calls.append(1) or real(*args, **kw)
    try:
        action()
    finally:
        calc.calculate = real
    return len(calls)


if __name__ == "__main__":
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        shutil.copy(DEMO / "site.toml", tmp / "site.toml")
        (tmp / "cases").mkdir()
        print(f"  {'case':<7} {'calc ms':>8} {'html ms':>8} {'html/calc':>9} {'md/calc':>8} {'schema/calc':>11} "
              f"{'verify/calc':>11} {'calcs in verify (iapws, fast)':>30}")
        for template in sorted((DEMO / "cases").glob("*.toml"), key=lambda p: (p.stem.startswith("SB"), p.stem)):
            text = re.sub(r"\[uncertainty\].*?(?=^\[|\Z)", "", template.read_text(), flags=re.S | re.M)
            path = tmp / "cases" / template.name
            path.write_text(text)
            case = load_case(path)
            site = case_site(case, None)
            # A site balance reads the records it links: those issued above, in this same folder.
            inputs, _ = case_inputs(case, site, read_record=IssuedRecords(tmp / "records"))
            calc = get_calculation(case.kind)
            record, _ = record_for_case(case, site, record_folder=tmp / "records")
            paths, _ = write_record(record, tmp / "records", RENDERERS)
            json_path = paths[0]
            loaded = load_record(json_path)
            calc_s = median_seconds(lambda: calc.calculate(inputs, site), repeat=9)
            html_s = median_seconds(lambda: render_html(loaded), repeat=9)
            md_s = median_seconds(lambda: render_markdown(loaded), repeat=9)
            schema_s = median_seconds(lambda: validate_record(loaded, from_text=True), repeat=9)   # as a read checks it
            verify_s = median_seconds(lambda: verify_file(json_path), repeat=5)
            counts = [counted_calculations(calc, lambda e=engine: verify_file(json_path, engine=e))
                      for engine in ("iapws", "fast")]
            print(f"  {case.id:<7} {calc_s * 1e3:>8.1f} {html_s * 1e3:>8.1f} {html_s / calc_s:>9.2f} "
                  f"{md_s / calc_s:>8.2f} {schema_s / calc_s:>11.2f} {verify_s / calc_s:>11.2f} "
                  f"{str(tuple(counts)):>30}")
            if "--parts" in sys.argv:
                shown = display_record(loaded)
                drawn = record_figures(loaded, shown)
                context = dict(_context(loaded, shown=shown), record_figures=lambda: drawn)
                page = _environment(True).get_template("record.html.j2")
                parts = {"display": median_seconds(lambda: display_record(loaded), repeat=9),
                         "sketch and charts": median_seconds(lambda: record_figures(loaded, shown), repeat=9),
                         "template": median_seconds(lambda: page.render(**context), repeat=9)}
                print("          HTML by part, of the calculation: " + ", ".join(
                    f"{name} {seconds / calc_s:.2f} ({seconds * 1e3:.2f} ms)" for name, seconds in parts.items()))
