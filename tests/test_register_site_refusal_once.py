"""the register reads each site file once (``_site_records``) and keeps a refusal to raise it
again for the next record. Raising the same exception object again adds each raise's frames to its traceback,
so every record's frame (its record, its row) stays alive for the rest of the register while a site file does
not read: a 300-record register over an unreadable site.toml peaked at 218 MB against 137 MB with a readable
one (e47a188: 190 MB either way), growing with the register.
"""

import gc
import weakref

from steamcalc.errors import SteamcalcError
from steamcalc.review.register import _site_records


class _RecordInMemory:
    """Stands for what a register row's frame holds (the record read, its row)."""


def _row_that_reads_the_site(site_record, path):
    record = _RecordInMemory()
    try:
        site_record(path)
    except SteamcalcError:
        pass
    return weakref.ref(record)


def test_a_cached_site_refusal_keeps_no_row_alive(tmp_path):
    site = tmp_path / "site.toml"
    site.write_text('[site]\nname = "Broken"\nelevation = "180 parsec"\n', encoding="utf-8")
    site_record = _site_records()
    first = _row_that_reads_the_site(site_record, site)
    later = [_row_that_reads_the_site(site_record, site) for _ in range(5)]
    gc.collect()
    assert [ref() for ref in [first] + later] == [None] * 6


def test_the_refusal_is_still_given_each_time(tmp_path):
    site = tmp_path / "site.toml"
    site.write_text('[site]\nname = "Broken"\nelevation = "180 parsec"\n', encoding="utf-8")
    site_record = _site_records()
    messages = []
    for _ in range(3):
        try:
            site_record(site)
        except SteamcalcError as exc:
            messages.append(exc.message)
    assert len(messages) == 3 and len(set(messages)) == 1
