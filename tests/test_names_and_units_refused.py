"""Names and units that would mislead are refused by their field (issue 22, item 18).

``ton/h`` (a US short ton to pint, 9.3 % below the tonne a steam engineer means) is refused with ``t/h`` offered; a
blank preparer and an id or revision too long for a file name are refused by their field, not by a lock file.
"""

import pytest

from steamcalc.cases.site import MAX_ID, load_case
from steamcalc.errors import SteamcalcError, UnitError
from steamcalc.units.quantities import parse_quantity

@pytest.mark.parametrize("text", ["4.5 ton/h", "2 tons/h", "1 ton/s"])
def test_ton_is_refused_and_the_tonne_offered(text):
    with pytest.raises(UnitError) as caught:
        parse_quantity(text, "valve.max_flow", "mass_flow")
    message = str(caught.value)
    assert "valve.max_flow" in message and "short ton" in message and "t/" in message


@pytest.mark.parametrize("text,kg_per_s,source", [
    ("3.6 t/h", 1.0, "1 t = 1000 kg (SI Brochure, table 8)"),
    ("1 short_ton/h", 907.18474 / 3600, "1 short ton = 907.18474 kg (NIST SP 811, B.8)"),
])
def test_tonnes_and_a_named_short_ton_still_read(text, kg_per_s, source):
    assert parse_quantity(text, "valve.max_flow", "mass_flow") == pytest.approx(kg_per_s, rel=1e-12), source


def _case(tmp_path, **meta):
    lines = ["[case]", 'kind = "flash"'] + [f"{k} = {v!r}".replace("'", '"') for k, v in meta.items()]
    path = tmp_path / "case.toml"
    path.write_text("\n".join(lines) + "\n[inputs]\ncondensate_flow = \"1 t/h\"\n")
    return path


@pytest.mark.parametrize("meta,field", [
    (dict(id="FL-9", prepared_by="   "), "prepared_by"),
    (dict(id="F" * (MAX_ID + 1), prepared_by="A. Engineer"), "id"),
    (dict(id="FL-9", revision="R" * 21, prepared_by="A. Engineer"), "revision"),
])
def test_blank_preparer_and_long_names_refused_by_field(tmp_path, meta, field):
    with pytest.raises(SteamcalcError) as caught:
        load_case(_case(tmp_path, **meta))
    assert caught.value.field == field
