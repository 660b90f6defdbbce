"""steamcalc: steam-system calculation records on IAPWS-IF97."""

__version__ = "0.3.3"
