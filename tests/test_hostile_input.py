"""Hostile and malformed input is refused cleanly: a SteamcalcError naming the field, never a crash.

A fuzz test feeds random TOML values of every type to every case, input and site key; the
named payloads of a fault and bad-input campaign (unit arithmetic, devices, infinite numbers,
gauge atmospheres, injection strings) are each checked against every output they could reach.
"""

import datetime
import json
import math
import os
import re
import shutil
import tomllib
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from steamcalc.batch.batch import write_index
from steamcalc.calcs import get_calculation
from steamcalc.calcs.base import input_fields
from steamcalc.cli import main
from steamcalc.errors import SteamcalcError
from steamcalc.records.record import load_record, record_text
from steamcalc.render.report import render_html, render_markdown
from steamcalc.records.build import record_for_case
from steamcalc.cases.site import CASE_KEYS, SITE_KEYS, case_site, load_case, load_site

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
CASE_OF_KIND = {"letdown": "LD-01.toml", "flash": "FL-01.toml", "exchanger": "HX-01.toml"}


# -- a small TOML writer (the standard library reads TOML but does not write it) -------------------
def toml_value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return toml_string(value)
    if isinstance(value, (datetime.datetime, datetime.date, datetime.time)):
        return value.isoformat()
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{" + ", ".join(f"{toml_string(k)} = {toml_value(v)}" for k, v in value.items()) + "}"
    raise TypeError(value)


def toml_string(text):
    """A TOML basic string: backslash, quote and control characters escaped, the rest as it is."""
    escaped = "".join(f"\\u{ord(c):04x}" if ord(c) < 0x20 or ord(c) == 0x7f else c
                      for c in text.replace("\\", "\\\\").replace('"', '\\"'))
    return f'"{escaped}"'


def toml_text(data):
    lines, tables = [], []
    for key, value in data.items():
        (tables if isinstance(value, dict) else lines).append((key, value))
    out = [f"{toml_string(k)} = {toml_value(v)}" for k, v in lines]
    for name, table in tables:
        out += _table_lines(name, table)
    return "\n".join(out) + "\n"


def _table_lines(name, table):
    plain = [(k, v) for k, v in table.items() if not (isinstance(v, dict) and k in _SUBTABLES)]
    subs = [(k, v) for k, v in table.items() if isinstance(v, dict) and k in _SUBTABLES]
    out = [f"[{name}]"] + [f"{toml_string(k)} = {toml_value(v)}" for k, v in plain]
    for key, value in subs:
        out += _table_lines(f"{name}.{key}", value)
    return out


_SUBTABLES = {"desuperheater", "valve", "lines", "relief", "vessel"}


def test_toml_writer_round_trips():
    data = {"case": {"id": "X", "n": 1.5, "when": datetime.date(2020, 1, 2)},
            "inputs": {"a": ["1 K", {"b": float("inf")}], "desuperheater": {"c": "x\u001b\n"}}}
    assert tomllib.loads(toml_text(data))["inputs"]["desuperheater"]["c"] == "x\u001b\n"


# -- the fuzz test ---------------------------------------------------------------------------------------
UNITS = ["bar(a)", "bar(g)", "barg", "psig", "kPa(a)", "bar", "degC", "°C", "degF", "K", "delta_degC", "t/h", "kg/s",
         "kg/h", "lb/h", "m", "mm", "m^2", "kW/(m^2 K)", "m^2 K/kW", "kJ/(kg K)", "m^3/h", "h", "EUR/MWh", "kg/MWh",
         "kg/kWh", "", "%", "t/h*9**9**9", "m**99", "furlong", "(g)"]
numbers = st.one_of(st.integers(-10**6, 10**6), st.floats(allow_nan=True, allow_infinity=True),
                    st.sampled_from([0, 1, -1, 1e-300, 1e300, 1e400, 0.5, 100]))
quantity_text = st.builds(lambda n, u: f"{n} {u}".strip(), numbers, st.sampled_from(UNITS))
scalars = st.one_of(
    st.text(max_size=20), st.integers(-10**20, 10**20), st.floats(allow_nan=True, allow_infinity=True),
    st.booleans(), st.datetimes(), st.dates(), st.times(), quantity_text, quantity_text,
    st.sampled_from(["header:LP", "header:HP", "header:NOPE", "header:", "water", "counterflow", "1-2", "DN80"]))
toml_values = st.recursive(
    scalars, lambda children: st.lists(children, max_size=3) |
    st.dictionaries(st.from_regex(r"[a-z_]{1,8}", fullmatch=True), children, max_size=3), max_leaves=6)


def input_keys(kind):
    return [(f.metadata["section"], f.name) for f in input_fields(get_calculation(kind).Inputs)]


def _case_data(kind):
    return tomllib.loads((DEMO / "cases" / CASE_OF_KIND[kind]).read_text(encoding="utf-8"))


def _site_data():
    return tomllib.loads((DEMO / "site.toml").read_text(encoding="utf-8"))


def _issue(folder, case_data, site_data):
    """Write the files, then read, compute and render them as `steamcalc run` does (without writing)."""
    case_data["case"]["site"] = "site.toml"
    (folder / "site.toml").write_text(toml_text(site_data), encoding="utf-8")
    (folder / "case.toml").write_text(toml_text(case_data), encoding="utf-8")
    case = load_case(folder / "case.toml")
    record, _ = record_for_case(case, case_site(case), with_uncertainty=False)
    record_text(record)
    render_html(record)
    render_markdown(record)


def _assert_clean(exc, key):
    """A refusal must be a SteamcalcError naming the field (the key itself, or the input it is
    weighed against, such as an outlet pressure against its inlet)."""
    text = str(exc)
    assert exc.field or key in text, text
    assert "internal error" not in text.lower()


def _outcome(folder, case_data, site_data, key, value):
    try:
        _issue(folder, case_data, site_data)
    except SteamcalcError as exc:
        _assert_clean(exc, key)
        if isinstance(value, (dict, datetime.date, datetime.time)):  # a wrong type: must name exactly this key
            assert key in str(exc), str(exc)


FUZZ = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                                        HealthCheck.too_slow])


@pytest.mark.parametrize("kind", sorted(CASE_OF_KIND))
@FUZZ
@given(data=st.data())
def test_random_values_for_every_input_key(kind, data, tmp_path):
    section, key = data.draw(st.sampled_from(input_keys(kind)), label="key")
    value = data.draw(toml_values, label="value")
    case = _case_data(kind)
    table = case["inputs"].setdefault(section, {}) if section else case["inputs"]
    table[key] = value
    _outcome(tmp_path, case, _site_data(), key, value)


def test_zero_steam_dryness_is_refused_by_the_exchanger(tmp_path):
    case = _case_data("exchanger")
    case["inputs"]["steam_dryness"] = 0.0
    _outcome(tmp_path, case, _site_data(), "steam_dryness", 0.0)


def test_tiny_xt_is_refused_by_the_valve_sizing(tmp_path):
    case = _case_data("letdown")
    case["inputs"].setdefault("valve", {})["xt"] = 1e-300
    _outcome(tmp_path, case, _site_data(), "xt", 1e-300)


@pytest.mark.parametrize("fl", [1e-320, 1e-200, 0.01])
def test_tiny_spray_valve_fl_is_refused_by_its_field(fl, tmp_path):
    # 1e-320 squared underflows to zero: the choked differential was 0 and the sizing divided by it
    case = _case_data("letdown")
    case["inputs"]["desuperheater"]["spray_valve_fl"] = fl
    with pytest.raises(SteamcalcError) as info:
        _issue(tmp_path, case, _site_data())
    assert "spray_valve_fl" in str(info.value) and info.value.fix


@pytest.mark.parametrize("section, key", [("valve", "fd"), ("relief", "kd"), ("relief", "kc"),
                                          ("turbine", "isentropic_efficiency")])
@pytest.mark.parametrize("value", [1e-320, 1e-5])
def test_tiny_coefficients_and_efficiencies_are_refused_by_their_field(section, key, value, tmp_path):
    # valve.fd = 1e-320 was an internal ZeroDivisionError; relief.kd = 1e-320 an internal "not finite"
    case = _case_data("letdown")
    case["inputs"].setdefault(section, {})[key] = value
    with pytest.raises(SteamcalcError) as info:
        _issue(tmp_path, case, _site_data())
    assert f"{section}.{key}" in str(info.value) and info.value.fix and "below 0.01" in str(info.value)


@FUZZ
@given(key=st.sampled_from(list(SITE_KEYS) + ["headers.LP", "headers.MP", "headers"]), value=toml_values,
       kind=st.sampled_from(sorted(CASE_OF_KIND)))
def test_random_values_for_every_site_key(key, value, kind, tmp_path):
    site = _site_data()
    if key.startswith("headers"):
        if key == "headers":
            site["headers"] = value
        else:
            site["headers"][key.split(".")[1]] = value
    else:
        if key in ("elevation", "atmospheric_pressure"):
            site["site"].pop("elevation", None)
        site["site"][key] = value
    _outcome(tmp_path, _case_data(kind), site, key.split(".")[-1], value)


@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(key=st.sampled_from([k for k in CASE_KEYS if k != "site"] + ["notes"]), value=toml_values)
def test_random_values_for_every_case_key(key, value, tmp_path):
    case = _case_data("flash")
    if key == "notes":
        case["assumptions"] = {"notes": value}
    else:
        case["case"][key] = value
    _outcome(tmp_path, case, _site_data(), key, value)


# -- files that are not case files ------------------------------------------------------------------------
def _run(*args):
    return main([str(a) for a in args])


@pytest.fixture
def site_dir(tmp_path):
    shutil.copytree(DEMO, tmp_path / "site", ignore=shutil.ignore_patterns("records"))
    return tmp_path / "site"


@pytest.mark.parametrize("what", ["device", "fifo", "folder", "symlink loop", "too big", "binary"])
def test_files_that_are_not_small_text_files_are_refused_by_name(what, site_dir, tmp_path, capsys):
    case = site_dir / "cases" / "LD-02.toml"
    target = tmp_path / "bad.toml"
    if what == "device":
        target = Path("/dev/zero")
    elif what == "fifo":
        os.mkfifo(target)
    elif what == "folder":
        target.mkdir()
    elif what == "symlink loop":
        target.symlink_to(target)
    elif what == "too big":
        target.write_text("# padding\n" * 120_000)
    elif what == "binary":
        target.write_bytes(b"\xff\xfe\x00junk")
    assert _run("run", case, "--site", target, "--out", tmp_path / "out") == 2
    err = capsys.readouterr().err
    assert str(target) in err and "internal error" not in err
    assert _run("run", target, "--out", tmp_path / "out") == 2
    err = capsys.readouterr().err
    assert str(target) in err and "internal error" not in err and "Traceback" not in err


def test_a_byte_order_mark_is_accepted(site_dir, tmp_path):
    case = site_dir / "cases" / "LD-02.toml"
    case.write_bytes(b"\xef\xbb\xbf" + case.read_bytes())
    assert _run("run", case, "--out", tmp_path / "out") == 0


def test_unreadable_file_is_named(site_dir, tmp_path, capsys, monkeypatch):
    # Simulated (the tests may run as root, who can read anything).
    import builtins
    real_open = builtins.open
    case = site_dir / "cases" / "LD-02.toml"

    def refusing_open(path, *args, **kwargs):
        if str(path) == str(case):
            raise PermissionError(13, "Permission denied", str(path))
        return real_open(path, *args, **kwargs)

    monkeypatch.setattr(builtins, "open", refusing_open)
    assert _run("run", case, "--out", tmp_path / "out") == 2
    err = capsys.readouterr().err
    assert "may not read" in err and str(case) in err


SITE_PAYLOADS = {
    "gauge atmosphere": ('atmospheric_pressure = "1 bar(g)"', "atmospheric_pressure"),
    "atmosphere of 50 bar(a)": ('atmospheric_pressure = "50 bar(a)"', "atmospheric_pressure"),
    "make-up water at 15 K": ('makeup_water_temperature = "15 K"', "makeup_water_temperature"),
    "ambient 5000 degC": ('ambient_temperature = "5000 degC"', "ambient_temperature"),
    "negative emission factor": ('fuel_emission_factor = "-0.2 kg/kWh"', "fuel_emission_factor"),
    "hours as arithmetic": ('operating_hours = "6000 h*9**9**9"', "operating_hours"),
    "efficiency infinite": ("boiler_efficiency = inf", "boiler_efficiency"),
    "price negative": ('fuel_price = "-40 EUR/MWh"', "fuel_price"),
    "site as a number": (None, "site"),
}


@pytest.mark.parametrize("name", list(SITE_PAYLOADS))
def test_site_sanity(name, site_dir, tmp_path):
    line, field = SITE_PAYLOADS[name]
    text = (site_dir / "site.toml").read_text()
    if line is None:
        text = "site = 123\n"
    else:
        key = line.split(" = ")[0]
        text = re.sub(rf"(?m)^{key} = .*$", "", text)
        if key == "atmospheric_pressure":
            text = re.sub(r"(?m)^elevation = .*$", "", text)
        text = text.replace("[site]\n", f"[site]\n{line}\n", 1)
    (site_dir / "site.toml").write_text(text)
    with pytest.raises(SteamcalcError) as caught:
        load_site(site_dir / "site.toml")
    assert caught.value.field == field, str(caught.value)


CASE_PAYLOADS = {
    "unit arithmetic": ('mass_flow = "2.0 t/h"', 'mass_flow = "4.5 t/h*9**9**9"', "mass_flow"),
    "number beyond a double": ('mass_flow = "2.0 t/h"', 'mass_flow = "1e400 t/h"', "mass_flow"),
    "infinite dryness": ('inlet_temperature = "230 degC"', "inlet_dryness = inf", "inlet_dryness"),
    "table for a string": ('mass_flow = "2.0 t/h"', "mass_flow = {value = 2}", "mass_flow"),
    "revision true": ('revision = "B"', "revision = true", "revision"),
    "site a number": ('site = "../site.toml"', "site = 123", "site"),
    "title a table": ('title = "HP to MP let-down, no desuperheating"', "title = {a = 1}", "title"),
    # a trailing newline passed the file-name pattern ('$' matches before it): files named 'LD-02\n_revB.json'
    "id with a trailing newline": ('id = "LD-02"', 'id = "LD-02\\n"', "id"),
    "revision with a trailing newline": ('revision = "B"', 'revision = "B\\n"', "revision"),
}


@pytest.mark.parametrize("name", list(CASE_PAYLOADS))
def test_case_payloads_refused_by_field(name, site_dir, tmp_path, capsys):
    old, new, field = CASE_PAYLOADS[name]
    case = site_dir / "cases" / "LD-02.toml"
    text = case.read_text()
    assert old in text
    case.write_text(text.replace(old, new, 1))
    assert _run("run", case, "--out", tmp_path / "out") == 2
    err = capsys.readouterr().err
    assert f"'{field}'" in err and "internal error" not in err, err
    assert not list((tmp_path / "out").glob("*.json")) if (tmp_path / "out").exists() else True


def test_verify_refuses_an_oversized_sample_count_at_once(site_dir, tmp_path, capsys):
    out = tmp_path / "out"
    assert _run("run", site_dir / "cases" / "LD-01.toml", "--out", out) == 0
    path = out / "LD-01_revB.json"
    record = json.loads(path.read_text())
    assert "uncertainty" in record
    record["uncertainty"]["samples"] = 10_000_000
    path.write_text(json.dumps(record))
    assert _run("verify", path) == 2
    assert "uncertainty.samples" in capsys.readouterr().err


# -- injection payloads against every output ---------------------------------------------------------
PAYLOADS = ['=HYPERLINK("http://example.invalid","x")', "+cmd|' /C calc'!A0", "-2+3", "@SUM(A1)",
            "\tTAB", "<script>alert(1)</script>", "[click](javascript:alert(1))", "![img](http://example.invalid/p.png)",
            "\u001b[32mVERIFIED\u001b[0m", "| fake | row |", "line\n# heading", "`code` *bold* _it_"]


def _payload_case(site_dir, revision, title, prepared_by):
    source = (site_dir / "cases" / "LD-02.toml").read_text()
    text = source.replace('id = "LD-02"', 'id = "INJ"').replace('revision = "B"', f'revision = "{revision}"')
    text = re.sub(r"(?m)^title = .*$", lambda _: f"title = {toml_string(title)}", text)
    text = re.sub(r"(?m)^prepared_by = .*$", lambda _: f"prepared_by = {toml_string(prepared_by)}", text)
    notes = PAYLOADS if revision == "B" else [f"{p} (rev C)" for p in PAYLOADS]
    text += "\n[assumptions]\nnotes = [" + ", ".join(toml_string(n) for n in notes) + "]\n"
    path = site_dir / "cases" / f"INJ-{revision}.toml"
    path.write_text(text)
    return path


def test_injection_payloads_against_every_output(site_dir, tmp_path, capsys):
    out = tmp_path / "out"
    cases = [_payload_case(site_dir, "B", PAYLOADS[5], PAYLOADS[8]), _payload_case(site_dir, "C", PAYLOADS[6], PAYLOADS[0])]
    assert _run("run", *cases, "--out", out, "--quiet") == 0
    run_output = capsys.readouterr()
    for stem in (out / "INJ_revB", out / "INJ_revC"):
        page = stem.with_suffix(".html").read_text()
        assert "<script>" not in page and "href='javascript" not in page and 'href="javascript' not in page
        md = stem.with_suffix(".md").read_text()
        # Markdown characters of user text come escaped: no raw HTML, link or image survives.
        assert not re.search(r"(?<!\\)<script", md) and not re.search(r"(?<!\\)\]\(javascript:", md)
        assert "![img](" not in md and "\u001b" not in md and "\n# heading" not in md and "| fake | row |" not in md
    # Terminal output of run, verify and diff: no control characters from user text.
    assert _run("verify", out / "INJ_revB.json", out / "INJ_revC.json") == 0
    assert _run("diff", out / "INJ_revB.json", out / "INJ_revC.json") == 0
    terminal = capsys.readouterr()
    assert "\u001b[32m" in "".join(PAYLOADS) and "[32mVERIFIED" in terminal.out  # the payload reached it, cleaned
    for text in (run_output.out, run_output.err, terminal.out, terminal.err):
        assert "\u001b" not in text
    # The indexes, with every payload as a title and a checker's name.
    record = load_record(out / "INJ_revB.json")
    for n, payload in enumerate(PAYLOADS):
        copy = dict(record, id=f"INJ-{n:02d}", title=payload, checked_by=payload)
        (out / f"INJ-{n:02d}_revB.json").write_text(json.dumps(copy))
    html_index, csv_index = write_index(out)
    import csv
    rows = list(csv.reader(csv_index.read_text().splitlines()[1:]))
    assert len(rows) == len(PAYLOADS) + 2
    for row in rows:
        for cell in row:
            assert cell[:1] not in ("=", "+", "-", "@", "\t", "\r"), cell
    index = html_index.read_text()
    assert all(href.startswith("./") for href in re.findall(r"href='([^']*)'", index))
    assert "<script>" not in index


@pytest.mark.parametrize("edit", ["Infinity", "-Infinity", "NaN", "1e999", "1" + "0" * 400])
@pytest.mark.parametrize("command", ["verify", "register", "diff"])
def test_a_record_edited_to_a_non_finite_or_oversized_number_is_refused_by_name(site_dir, tmp_path, capsys,
                                                                                 edit, command):
    # verify and register crashed (OverflowError in the recomputation, ValueError in the digest):
    # steamcalc never writes such a number, so the record is refused when read
    out = tmp_path / "out"
    assert _run("run", site_dir / "cases" / "LD-02.toml", "--out", out) == 0
    issued = out / "LD-02_revB.json"
    text = issued.read_text()
    value = re.search(r'"outlet_temperature": \{\s*"value": ([-0-9.e+]+)', text)
    crafted = out / "LD-02_revC.json"
    crafted.write_text(text[:value.start(1)] + edit + text[value.end(1):])
    capsys.readouterr()
    args = {"verify": [crafted], "register": [out], "diff": [issued, crafted]}[command]
    code = _run(command, *args)
    captured = capsys.readouterr()
    err = captured.err if command != "register" else captured.out + captured.err   # the register lists it
    assert "internal error" not in err and "Traceback" not in err, err
    assert code in (1, 2) and crafted.name in err and "finite" in err, err


def test_a_crafted_record_gives_no_script_link_in_the_index(site_dir, tmp_path):
    out = tmp_path / "out"
    assert _run("run", site_dir / "cases" / "LD-02.toml", "--out", out) == 0
    record = load_record(out / "LD-02_revB.json")
    crafted = dict(record, id="javascript:alert(1)//")
    (out / "crafted.json").write_text(json.dumps(crafted))
    (out / "javascript:alert(1).json").write_text(json.dumps(record))
    html_index, _ = write_index(out)
    hrefs = re.findall(r"href='([^']*)'", html_index.read_text())
    assert hrefs and all(h.startswith("./") and ":" not in h for h in hrefs), hrefs
    with pytest.raises(SteamcalcError, match="plain name"):
        load_record(out / "crafted.json")


@pytest.mark.parametrize("section,key,text", [
    ("vessel", "residence_time", "1e300 min"),       # a time had no bounds: a 4e96 m vessel was issued
    ("", "condensate_pressure", "1e300 bar(g)"),     # absolute pressures are bounded too
])
def test_absurd_times_and_pressures_are_refused(tmp_path, section, key, text):
    case = _case_data("flash")
    (case["inputs"].setdefault(section, {}) if section else case["inputs"])[key] = text
    with pytest.raises(SteamcalcError) as info:
        _issue(tmp_path, case, _site_data())
    assert key in str(info.value) and not re.search(r"\bbar\b(?!\()", str(info.value))
