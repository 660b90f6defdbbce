"""Sources a checker can look up: no issued demo record says "from memory".

A basis either cites the clause, table or text that states it, or is a trade fact marked
"common practice", or, where no text was found to confirm it, says "not confirmed against the
... text" - and then only among the record's assumptions, never in a result's label, a check's
phrase, a warning or a worked step. The citations the demo records carry are pinned below, each
beside the public text it was confirmed against.
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
CASES = ("LD-01", "LD-02", "FL-01", "FL-02", "HX-01", "SB-01", "SM-01")


@pytest.fixture(scope="module")
def records(tmp_path_factory):
    """The demo site's records, issued afresh: {case id: record}."""
    site = tmp_path_factory.mktemp("sources") / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
    out = site / "issued"
    assert main(["run", str(site / "cases"), "--out", str(out), "--quiet"]) in (0, 1)
    found = {path.stem.split("_rev")[0]: json.loads(path.read_text(encoding="utf-8"))
             for path in out.glob("*_rev*.json")}
    assert set(found) == set(CASES)
    return found


def _texts(node, path=()):
    """(path, text) of every string in a record."""
    if isinstance(node, dict):
        for key, value in node.items():
            yield from _texts(value, path + (str(key),))
    elif isinstance(node, list):
        for i, value in enumerate(node):
            yield from _texts(value, path + (str(i),))
    elif isinstance(node, str):
        yield path, node


@pytest.mark.parametrize("case", CASES)
def test_no_result_label_or_check_phrase_says_from_memory(records, case):
    record = records[case]
    labels = [entry.get("label", "") for entry in record["results"].values()]
    checks = [text for _, text in _texts(record["checks"])]
    assert not [t for t in labels + checks if "from memory" in t]


@pytest.mark.parametrize("case", CASES)
def test_no_statement_of_a_demo_record_says_from_memory(records, case):
    assert not [(path, text) for path, text in _texts(records[case]) if "from memory" in text]


@pytest.mark.parametrize("case", CASES)
def test_every_unconfirmed_statement_is_an_assumption(records, case):
    unconfirmed = [path for path, text in _texts(records[case]) if "not confirmed" in text]
    assert all(path[0] == "assumptions" for path in unconfirmed), unconfirmed


def test_the_unconfirmed_vessel_clearances_are_stated_as_such(records):
    for case in ("FL-01", "FL-02"):
        stated = [a for a in records[case]["assumptions"] if a.startswith("Vessel height stacks")]
        assert len(stated) == 1 and "not confirmed against the paper's text" in stated[0]


#: The citations the demo records carry, each with the public text that confirms it.
CITED = [
    ("LD-01", "the single-jeopardy basis of API Std 521, 6th ed., 4.2.3",
     "icarus-orm-academy.com, 'What is Double Jeopardy?': API 521 6th edition section 4.2.3"),
    ("LD-02", "the single-jeopardy basis of API Std 521, 6th ed., 4.2.3",
     "icarus-orm-academy.com, 'What is Double Jeopardy?': API 521 6th edition section 4.2.3"),
    ("LD-01", "API RP 520 Part I, 7th ed., 3.5.2 and Table 2: 110 % of the MAWP",
     "API RP 520 Part I 7th ed. (2000) 3.5, Tables 2 and 3, as reproduced on scribd.com (Relieving-Valve-2)"),
    ("LD-01", "ASME Section I, PG-67, allow 6 %",
     "state boiler rules restating ASME Section I (e.g. 15 Miss. Code R. 10-76-3.1.6): 6 % above the set pressure"),
    ("LD-01", "the smallest outlet API 526 pairs with the Q orifice",
     "Valve Selection Handbook, Table 5-1 (API Std. 526 inlet, outlet and orifice): 6Q8"),
    ("LD-02", "the smallest outlet API 526 pairs with the L orifice",
     "Valve Selection Handbook, Table 5-1 (API Std. 526 inlet, outlet and orifice): 3L4, 4L6"),
    ("FL-01", "ASME VIII-1 UG-36(b)(1): its rules cover an opening of up to one half of the inside diameter",
     "eng-tips.com thread 298894, quoting UG-36(b)(1): one-half the diameter up to 60 in, one-third above"),
    ("FL-01", "the ratio of the UK government's greenhouse-gas conversion factors for natural gas",
     "UK GHG conversion factors 2023, natural gas: 0.20226 (net CV) / 0.18256 (gross CV) kg CO2/kWh = 1.108"),
]


@pytest.mark.parametrize("case, citation, source", CITED, ids=[f"{c}: {t[:40]}" for c, t, _ in CITED])
def test_a_confirmed_basis_cites_its_clause(records, case, citation, source):
    assert any(citation in text for text in records[case]["assumptions"]), (citation, source)


def test_the_branches_the_demo_does_not_reach_cite_too():
    # Wet inlet steam (Zeuner's exponent) and a relief set below 15 psig (the scope of ASME VIII-1):
    # sources "A Text-Book of Mechanical Engineering" (archive.org), appendix note to p. 608, and
    # eng-tips.com thread 20227, quoting U-1(c)(2)(h).
    from steamcalc.calcs.letdown.calculation import Inputs, calculate
    from steamcalc.cases.site import Site

    r = calculate(Inputs(inlet_pressure=6e5, outlet_pressure=1.5e5, mass_flow=0.5, inlet_dryness=0.97,
                         rated_kv=20.0, set_pressure=1.9e5), Site())
    texts = [str(c.detail) for c in r.checks] + list(r.assumptions) + list(r.warnings) + [s.equation for s in r.steps]
    assert not [t for t in texts if "from memory" in t]
    assert any("Zeuner's empirical exponent of the wet-steam adiabatic" in a for a in r.assumptions)
    scope = next(c for c in r.checks if c.name == "Relief set pressure within the usual pressure-vessel scope")
    assert "U-1(c)(2)(h): vessels of 15 psi or less are outside its scope" in str(scope.detail)
