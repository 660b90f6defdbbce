"""The Markdown record's cell filters skip the translation for text that holds nothing to translate: the texts they
give are the very texts the full translation gives, for every character up to U+2FFF and for random mixtures."""

import random
import re

import pytest

from steamcalc.render.report import _CODE_TABLE, _MD_TABLE, _code, _md, _one_line

CHARACTERS = [chr(i) for i in range(0x3000)]


def _md_translated(text):
    return _one_line(str(text)).translate(_MD_TABLE)


def _code_translated(text):
    text = _one_line(str(text)).translate(_CODE_TABLE)
    if "`" not in text:
        return f"`{text}`"
    fence = "`" * (max(len(run) for run in re.findall(r"`+", text)) + 1)
    pad = " " if text.startswith("`") or text.endswith("`") else ""
    return f"{fence}{pad}{text}{pad}{fence}"


@pytest.mark.parametrize("cell, translated", [(_md, _md_translated), (_code, _code_translated)])
def test_every_character_alone_and_between_letters(cell, translated):
    for c in CHARACTERS:
        for text in (c, f"a{c}b", f"{c}{c}", f"`{c}"):
            assert cell(text) == translated(text), repr(text)


@pytest.mark.parametrize("cell, translated", [(_md, _md_translated), (_code, _code_translated)])
def test_random_mixtures(cell, translated):
    pick = random.Random(20261203)
    alphabet = CHARACTERS[:256] + ["\u202e", "\u2066", "°", "³", "·", "→"] + list("abc 1.,-`") * 20
    for _ in range(20000):
        text = "".join(pick.choice(alphabet) for _ in range(pick.randint(0, 14)))
        assert cell(text) == translated(text), repr(text)


def test_numbers_and_labels_are_given_back_unchanged():
    for text in ("196.2", "4,500", "bar(a)", "m³/h", "Throttled steam temperature", "1.3 × 10⁻¹⁵"):
        assert _md(text) == text
    assert _md(12.5) == "12.5" and _code(3) == "`3`"
