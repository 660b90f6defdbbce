"""The record's JSON Schema: every record of today and of release 0.2 follows it, and a record
edited out of it is refused by load_record naming the file and the field."""

import json
import shutil
from pathlib import Path

import pytest
from jsonschema import Draft7Validator

from steamcalc.calcs.base import SERIES_DASHES, SERIES_ROLES, SERIES_STYLES, STATUSES
from steamcalc.cli import main
from steamcalc.errors import RecordError
from steamcalc.records.record import READABLE_SCHEMAS, SCHEMA, load_record
from steamcalc.records.schema import FIX, FIX_BUILT, record_schema, validate_record

DEMO_SITE = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_2"
DEMO_CASES = ("LD-01", "LD-02", "FL-01", "FL-02", "HX-01")


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """The demo site's records, issued once for the module: case id -> path of its JSON."""
    folder = tmp_path_factory.mktemp("schema") / "demo_site"
    shutil.copytree(DEMO_SITE, folder, ignore=shutil.ignore_patterns("records"))
    out = folder / "records"
    # 0 for pass and warn, 1 for a failing check; 2 (bad input) would mean no record.
    assert main(["run", str(folder / "cases"), "--out", str(out), "--quiet"]) in (0, 1)
    return {case: out / f"{case}_revB.json" for case in DEMO_CASES}


def _edited(source, tmp_path, edit):
    """A copy of a record file with ``edit(record)`` applied (the digests are left as they were)."""
    record = json.loads(source.read_text(encoding="utf-8"))
    edit(record)
    path = tmp_path / source.name
    path.write_text(json.dumps(record, indent=2), encoding="utf-8")
    return path


def test_the_schema_file_is_a_valid_draft_7_schema():
    schema = record_schema()
    Draft7Validator.check_schema(schema)   # the meta-schema of draft 7, which the validator compiles
    assert schema["$id"] == "https://steamcalc.invalid/record.schema.json"
    assert schema["title"] and schema["description"]


def test_the_schema_accepts_exactly_the_readable_schemas():
    assert record_schema()["properties"]["schema"]["enum"] == list(READABLE_SCHEMAS)


def test_the_schema_knows_the_same_statuses_styles_roles_and_dashes_as_the_code():
    definitions = record_schema()["definitions"]
    assert definitions["status"]["enum"] == list(STATUSES)
    series = definitions["series"]["properties"]
    assert series["style"]["enum"] == list(SERIES_STYLES)
    assert series["role"]["enum"] == list(SERIES_ROLES)
    assert series["dash"]["enum"] == list(SERIES_DASHES)


def test_every_demo_record_of_today_follows_the_schema(issued):
    for case, path in issued.items():
        record = load_record(path)        # validates against the schema
        validate_record(record, source=path)
        assert record["schema"] == SCHEMA and isinstance(record["figures"], list), case
    assert "uncertainty" in load_record(issued["LD-01"])


@pytest.mark.parametrize("name", ["LD-02_revA.json", "FL-01_revA.json"])
def test_a_schema_1_record_of_release_0_2_is_still_read(name):
    record = load_record(ARCHIVE / name)
    assert record["schema"] == "steamcalc.record/1" and "figures" not in record


def _first_series(record):
    return next((f, s) for f, figure in enumerate(record["figures"])
                for s, series in enumerate(figure.get("series", ())) if len(series["x"]) > 1)


def _text_in_series_x(record):
    f, s = _first_series(record)
    record["figures"][f]["series"][s]["x"][1] = "twelve"
    return f"figures.{f}.series.{s}.x.1"


def _check_status_ok(record):
    record["checks"][2]["status"] = "ok"
    return "checks.2.status"


def _figures_removed(record):
    del record["figures"]
    return "figures"


def _input_without_unit(record):
    name = next(iter(record["inputs"]))
    del record["inputs"][name]["unit"]
    return f"inputs.{name}.unit"


@pytest.mark.parametrize("edit", [_text_in_series_x, _check_status_ok, _figures_removed, _input_without_unit],
                         ids=["text in a series' x", "check status ok", "no figures in a /2 record",
                              "input without unit"])
def test_a_record_edited_out_of_the_schema_is_refused_naming_file_and_field(issued, tmp_path, edit):
    fields = []
    path = _edited(issued["LD-01"], tmp_path, lambda record: fields.append(edit(record)))
    with pytest.raises(RecordError) as caught:
        load_record(path)
    text = str(caught.value)
    assert str(path) in text and f"field '{fields[0]}'" in text, text
    assert caught.value.field == fields[0] and f"Fix: {FIX}" in text


def test_the_command_line_refuses_such_a_record_without_a_traceback(issued, tmp_path, capsys):
    path = _edited(issued["LD-02"], tmp_path, _check_status_ok)
    capsys.readouterr()
    assert main(["verify", str(path)]) == 2
    err = capsys.readouterr().err
    assert str(path) in err and "checks.2.status" in err and "'ok'" in err, err
    assert "Traceback" not in err and "internal error" not in err


def test_an_offending_value_is_shown_shortened(issued, tmp_path):
    path = _edited(issued["FL-01"], tmp_path, lambda record: record.update(title=list(range(5000))))
    with pytest.raises(RecordError, match="field 'title'") as caught:
        load_record(path)
    assert len(str(caught.value)) < 400


def test_a_record_being_built_that_breaks_the_schema_is_called_a_fault_of_steamcalc(issued):
    record = load_record(issued["FL-01"])
    record["checks"][0]["status"] = "ok"
    with pytest.raises(RecordError) as caught:
        validate_record(record)
    assert caught.value.fix == FIX_BUILT and caught.value.source is None


def test_a_record_being_built_may_hold_tuples_where_its_file_holds_lists(issued):
    record = load_record(issued["HX-01"])
    record["assumptions"] = tuple(record["assumptions"])
    for figure in record["figures"]:
        for series in figure.get("series", ()):
            series["x"], series["y"] = tuple(series["x"]), tuple(series["y"])
    validate_record(record)


@pytest.mark.parametrize("edit, field", [
    (lambda r: r["figures"][1]["axes"]["y"].update(range=[5.0, 5.0]), "figures.1.axes.y.range"),
    (lambda r: r["figures"][1]["series"][0]["y"].pop(), "figures.1.series.0.y"),
    (lambda r: r["figures"][1]["series"][0].update(axis="y2") or r["figures"][1]["axes"].pop("y2", None),
     "figures.1.series.0.axis"),
    (lambda r: r["figures"][1]["series"][0]["y"].__setitem__(0, 1.7e308), "figures.1.series.0.y"),
    (lambda r: r["figures"].append(dict(r["figures"][0])), "figures.3.name"),
    (lambda r: r["figures"][0]["axes"]["x"].update(unit="__import__('os')"), "figures.0.axes.x.unit"),
], ids=["empty range", "y shorter than x", "axis absent", "beyond a double's drawing", "name twice", "unit as code"])
def test_figure_data_the_views_cannot_draw_is_refused_by_field(issued, tmp_path, edit, field):
    # What the schema cannot say: lengths, the axes a series names, ranges, sizes, names given twice.
    path = _edited(issued["LD-01"], tmp_path, edit)
    with pytest.raises(RecordError) as info:
        load_record(path)
    assert info.value.field == field and str(path) in str(info.value)
