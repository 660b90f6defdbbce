"""A record names the steamcalc release whose code computed it, not the installed package's metadata.

Found by an independent checker: records issued by release 0.3.1's code, run from a checkout on the path beside an
installed 0.3.2, said "0.3.2", so a genuine record of 0.3.1 would get none of the allowances of the releases after it
(and a record of one release could claim another's). Expected: the provenance's steamcalc version is the code's
``steamcalc.__version__``.
"""

from importlib import metadata

import steamcalc
from steamcalc.records import record as record_module


def test_the_provenance_names_the_running_codes_release(monkeypatch):
    real = metadata.version
    monkeypatch.setattr(metadata, "version", lambda name: "9.9.9" if name == "steamcalc" else real(name))
    record_module._versions.cache_clear()
    try:
        versions = record_module.provenance()
        assert versions["steamcalc"] == steamcalc.__version__ != "9.9.9"
        assert versions["iapws"] == real("iapws") and list(versions)[0] == "steamcalc"
    finally:
        record_module._versions.cache_clear()
