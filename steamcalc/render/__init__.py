"""Views of a record: HTML, Markdown, SVG figures and sketch, display units (SI or US)."""
