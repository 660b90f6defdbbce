"""Quantities at the edge: parsing unit strings (pint), pressure bases, the site atmosphere, record units."""
