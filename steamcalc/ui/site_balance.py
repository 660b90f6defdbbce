"""The site-balance workbook: its tables, Sankey and header diagrams, drawn from the balance's record.

A balance is lists of items rather than one box per input, so its workbook reads the case file (edited in
any text editor, beside the workbook) instead of a form: :class:`BalanceBook` issues the record from it,
and every view here only draws what the record holds (results, checks, the steam-flow figure data). A case
that cannot run is shown as its error, by file and field, never a traceback.
"""

from __future__ import annotations

import html
from pathlib import Path

from ..calcs.site_balance.comparison import comparison_rows
from ..calcs.site_balance.figures import sankey_links
from ..cases.site import case_site, load_case
from ..errors import InputError, RecordConflictError, SteamcalcError
from ..records.build import record_for_case
from ..records.record import write_record
from ..render.display import convert, record_system, shown_check
from ..render.header_svg import header_svg
from ..render.report import RENDERERS, format_unit
from .charts import shown_rows
from .linked_cases import MAX_ISSUED, issue_missing_link


class BalanceBook:
    """A balance case, its record and the views of it.

    Parameters
    ----------
    case_file : str or Path
        The balance's case file (``kind = "balance"``).
    record_folder : str or Path
        Where :meth:`save` writes the record; linked records are read from the case's links folder.
    """

    def __init__(self, case_file, record_folder):
        self.case_file = Path(case_file)
        self.record_folder = Path(record_folder)
        self.record, self.error, self.issued = None, None, []
        try:
            self.case = load_case(self.case_file)
            if self.case.kind != "balance":
                raise SteamcalcError(f"this workbook runs site balances; {self.case_file.name} is a {self.case.kind} "
                                     "case", source=self.case_file, fix="open it in its own kind's workbook")
            self._compute()
        except SteamcalcError as exc:
            self.error = str(exc)

    def _compute(self):
        """The balance's record; a linked record not issued yet is issued first from its case file beside the
        balance's (as ``steamcalc run`` on the site folder would), and said so in :attr:`issued`."""
        site = case_site(self.case)
        for _ in range(MAX_ISSUED):
            try:
                self.record, _ = record_for_case(self.case, site, record_folder=self.record_folder)
                return
            except InputError as exc:
                issued = issue_missing_link(exc, self.case_file.parent)
                if issued is None:
                    raise
                self.issued.append(issued)

    def _rows(self, keys):
        results = self.record["results"]
        return [{"load case": case, **{label: results[f"{case}.{key}"]["value"] for key, label in keys
                                       if f"{case}.{key}" in results}} for case in self.load_cases()]

    @property
    def system(self):
        """The display system of the site (``"SI"`` or ``"US"``): every view below is drawn in it, by pint."""
        return record_system(self.record)

    def _table(self, rows, index):
        import pandas as pd

        return pd.DataFrame(shown_rows(rows, self.system)).set_index(index)

    def load_cases(self):
        """The load cases' names, in the record's order."""
        return [key[len("load_case."):-len(".name")] for key in self.record["inputs"]
                if key.startswith("load_case.") and key.endswith(".name")]

    def message(self):
        """What stops the balance, or its status and where it stands (and any linked record issued for it)."""
        first = "".join(f"{line}\n" for line in self.issued)
        if self.error:
            return f"{first}not run: {self.error}"
        return (f"{first}{self.record['id']} rev {self.record['revision']}: {self.record['status'].upper()} - "
                f"{len(self.load_cases())} load cases, {len(self.record['checks'])} checks")

    def summary(self):
        """Per load case: boiler, fuel, deaerator, make-up (a pandas table)."""
        import pandas as pd

        if self.error:
            return pd.DataFrame({"not run": [self.error]})
        keys = (("boiler_steam_flow", "boiler steam, kg/h"), ("blowdown_flow", "blowdown, kg/h"),
                ("fuel_power", "fuel input, kW"), ("deaerator_steam_flow", "deaerator steam, kg/h"),
                ("makeup_water_flow", "make-up water, kg/h"), ("vent_heat_loss", "vent heat lost, kW"))
        return self._table(self._rows(keys), "load case")

    def headers(self):
        """Per load case and header: what closes it, its let-down or vent flow, its temperature."""
        import pandas as pd

        if self.error:
            return pd.DataFrame({"not run": [self.error]})
        results, rows = self.record["results"], []
        headers = list(self.record["site"]["headers"])
        for case in self.load_cases():
            for header in headers:
                rows.append({"load case": case, "header": header,
                             "closed by": results[f"{case}.{header}.closed_by"]["value"],
                             "vent, kg/h": results[f"{case}.{header}.vent_flow"]["value"],
                             "temperature, °C": results[f"{case}.{header}.temperature"]["value"]})
        return self._table(rows, ["load case", "header"])

    def checks(self):
        """The record's checks, status first."""
        import pandas as pd

        if self.error:
            return pd.DataFrame({"not run": [self.error]})
        return pd.DataFrame([{"status": c["status"], **dict(zip(("check", "detail"), shown_check(c, self.system)))}
                             for c in self.record["checks"] if c.get("kind") != "notice"])

    def comparison(self):
        """The what-if against the balance: fuel, water, CO₂ and money a year."""
        import pandas as pd

        if self.error:
            return pd.DataFrame({"not run": [self.error]})
        rows = []
        for row in comparison_rows(self.record):
            unit = row["unit"]
            zero, shown_unit = convert(0.0, unit, self.system)
            scale = convert(1.0, unit, self.system)[0] - zero   # a difference scales without the offset
            rows.append(dict(row, unit=format_unit(shown_unit), balance=convert(row["balance"], unit, self.system)[0],
                             **{"what-if": convert(row["what-if"], unit, self.system)[0],
                                "difference": row["difference"] * scale}))
        return pd.DataFrame(rows)

    def sankey(self, case):
        """Plotly's Sankey diagram of a load case's steam flows, from the record's figure data."""
        import plotly.graph_objects as go

        if self.error:
            return go.Figure(layout={"title": f"not run: {self.error}"})
        figure = next(f for f in self.record["figures"] if f["name"] == f"steam_flows_{case}")
        if figure.get("missing"):
            return go.Figure(layout={"title": f"{figure['title']}: {figure['missing']}"})
        nodes, sources, targets, values = sankey_links(figure)
        record_unit = figure["axes"]["y"]["unit"]
        values = [convert(value, record_unit, self.system)[0] for value in values]
        unit = format_unit(convert(1.0, record_unit, self.system)[1])
        return go.Figure(go.Sankey(node={"label": nodes, "pad": 18},
                                   link={"source": sources, "target": targets, "value": values,
                                         "hovertemplate": "%{source.label} → %{target.label}: %{value:,.0f} " + unit}),
                         layout={"title": figure["title"] + f" ({unit})"})

    def header_diagram(self, case):
        """The header diagram of a load case with its flows (SVG, in the site's units), from the record's figure data."""
        from IPython.display import HTML, SVG

        if self.error:
            return HTML(f"<p>not run: {html.escape(self.error)}</p>")
        figure = next(f for f in self.record["figures"] if f["name"] == f"header_diagram_{case}")
        if figure.get("missing"):
            return HTML(f"<p>{html.escape(figure['title'])}: {html.escape(figure['missing'])}</p>")
        return SVG(header_svg(figure, self.system, f"header-diagram-{case}"))

    def save(self):
        """Write the record to the record folder; one line saying what was done. Run All in a notebook someone
        has open never saves by itself (as the other workbooks)."""
        from .workbook import interactive_session

        if self.error:
            return f"not saved: {self.error}"
        if interactive_session():
            return (f"not saved by Run All: call save() in a cell of its own to issue {self.record['id']} rev "
                    f"{self.record['revision']} once you have checked the balance")
        name = f"record {self.record['id']} rev {self.record['revision']}"
        try:
            paths, status = write_record(self.record, self.record_folder, RENDERERS)
        except RecordConflictError as exc:
            return (f"not saved: {name} already exists with different content ({exc.source}); raise the revision "
                    "in the case file to issue the changed balance")
        except SteamcalcError as exc:
            return f"not saved: {exc}"
        return f"saved: {name}, {paths[0]}" if status == "written" else f"unchanged, kept: {name}, {paths[0]}"
