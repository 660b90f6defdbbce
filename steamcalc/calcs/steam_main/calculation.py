"""Steam main, drip legs, traps and condensate return: the pipework between a header and its users.

From a header over the main's segments (:mod:`.main`), the heat the insulation lets through
(:mod:`.heat_loss`), the condensate that makes running and warming up and the drip legs and traps that
take it away (:mod:`.loads`), to the return line in which the traps' discharge flashes (:mod:`.return_line`).
"""

from __future__ import annotations

from dataclasses import dataclass

from ...errors import InputError
from ...properties.steam import REFERENCE as IF97_REFERENCE
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ...units.rows import Column
from ..base import Result, check_fields, full_record_wanted, input_field
from .economics import OPTION_COLUMNS, check_options, report_economics
from .load import load_link_value_problems, load_source
from .report import report_main
from .report_condensate import report_return, report_traps
from .supply import linked_record_problems as supply_link_problems
from .supply import supply_source
from .supply import main_stale_links as stale_links

KIND = "steam_main"
TITLE = "Steam main, drip legs, traps and condensate return"
WORKBOOK = "steam_main.ipynb"
PERCENT_VALUES = ("return_flash_fraction",)
#: Results that are pressure differences (shown "bar", never "bar(a)"); each drip trap's differential too.
PRESSURE_DIFFERENCE_RESULTS = ("main_pressure_drop", "return_friction_drop", "return_warmup_friction_drop",
                               "heater_trap_differential") + tuple(
    f"drip_{n}_trap_differential" for n in range(1, 100))
SUMMARY_RESULTS = ("main_outlet_pressure", "main_pressure_drop", "main_max_velocity", "main_size_needed",
                   "heat_loss_total", "running_load_total", "warmup_load_total", "drip_points",
                   "return_flash_fraction", "return_velocity", "return_size_needed", "annual_heat_loss_cost", "economic_thickness")

SEGMENT_COLUMNS = (
    Column("length", "length", "Length", '"75 m"', required=True),
    Column("size", "nominal_size", "Nominal size", '"DN80"', required=True),
    Column("schedule", "text", "Schedule", '"40"'),
    Column("fittings_k", "number", "Fittings K", "2.5"),
    Column("rise", "signed_length", "Rise", '"3 m"'),
)

CAUTIONS = (
    "Steam and flashing condensate cause severe burns: drip legs, trap outlets, test valves and vents must "
    "discharge to a safe place, and lines within reach stay insulated or guarded.",
    "Water hammer: a main must fall towards its drip legs, with a drip leg at every low point and riser foot; "
    "warm a cold main up slowly with its drains open, and never let condensate lie in a line that steam enters.",
    "Receivers and flash vessels are pressure vessels: their design, marking and inspection follow the local "
    "pressure-equipment code, with a relief device sized for the worst inflow.",
    "Trap capacities at a differential pressure come from the trap maker's certified data; the engineer of "
    "record confirms every selection.",
    "These results support design by a competent engineer; they do not replace the applicable codes, the "
    "equipment makers' data or a licensed engineer's approval.",
)


#: Closest drip-leg spacing accepted, m: below it the figure is a slip (mm for m), and the main would be all legs.
MIN_DRIP_SPACING = 5.0
#: Highest wind speed accepted, m/s: above a hurricane's the figure is a slip (km/h for m/s).
MAX_WIND_SPEED = 60.0


@dataclass(frozen=True)
class Inputs:
    """Inputs of a steam main and its condensate return; values in SI (Pa absolute, K, kg/s, m, s)."""

    supply_pressure: float = input_field(
        "pressure", "Supply pressure", "Pressure of the header feeding the main; leave it out when a let-down record "
        "feeds it ([inputs.supply_link]).",
        example="header:MP", required=True)
    steam_flow: float = input_field(
        "mass_flow", "Steam flow", "Steam the main carries to its users; leave it out when a heater record gives "
        "it ([inputs.load_link]).", example="750 kg/h", required=True, positive=True)
    supply_temperature: float | None = input_field(
        "temperature", "Supply temperature", "Leave empty for saturated steam; give it (or supply_superheat) when "
        "superheated.",
        example="185 °C")
    supply_superheat: float | None = input_field(
        "temperature_difference", "Supply superheat", "Superheat of the supply steam above saturation at the supply "
        "pressure (a header fed by a let-down without desuperheating carries some); or give supply_temperature.",
        example="38 K")
    supply_link_record_id: str | None = input_field(
        "text", "Supply let-down record", "An issued let-down record whose outlet (after its desuperheater) feeds "
        "the main instead of a header: its outlet pressure and temperature become the supply.", example="LD-01",
        section="supply_link", key="record")
    supply_link_revision: str | None = input_field(
        "text", "Supply record's revision", "Revision of the linked let-down record.", example="B",
        section="supply_link", key="revision")
    supply_link_folder: str | None = input_field(
        "text", "Supply record's folder", "Folder of the linked record, relative to the case file; the site's "
        "records folder when not given.", example="../records", section="supply_link", key="folder")
    supply_link_kind: str | None = input_field(
        "text", "Supply record's kind", "Filled in from the linked record when the main runs (give it only to pin "
        "it).", example="letdown", section="supply_link", key="kind")
    supply_link_content_digest: str | None = input_field(
        "text", "Supply record's content digest", "Filled in from the linked record when the main runs (give it "
        "only to pin the record you checked).", example="sha256:...", section="supply_link", key="content_digest")
    load_link_record_id: str | None = input_field(
        "text", "Heater record", "An issued steam-heater record whose steam flow at design duty is the main's steam "
        "flow, instead of a figure copied from it.", example="HX-01", section="load_link", key="record")
    load_link_revision: str | None = input_field(
        "text", "Heater record's revision", "Revision of the linked heater record.", example="B",
        section="load_link", key="revision")
    load_link_folder: str | None = input_field(
        "text", "Heater record's folder", "Folder of the linked heater record, relative to the case file; the site's "
        "records folder when not given.", example="../records", section="load_link", key="folder")
    load_link_kind: str | None = input_field(
        "text", "Heater record's kind", "Filled in from the linked record when the main runs (give it only to pin "
        "it).", example="exchanger", section="load_link", key="kind")
    load_link_content_digest: str | None = input_field(
        "text", "Heater record's content digest", "Filled in from the linked record when the main runs (give it "
        "only to pin the record you checked).", example="sha256:...", section="load_link", key="content_digest")
    load_link_condensate: str | None = input_field(
        "text", "Heater record's condensate", "Filled in when the main runs: the heater record's result taken as the "
        "heater's condensate into the return line, when the return line gives the heater's trap but not its flow.",
        example="the heater record's condensate flow at design duty", section="load_link", key="condensate")
    segments: tuple | None = input_field(
        "rows", "Segments", "The main's straight runs in order from the header: length, size, schedule, fittings K "
        "and rise (a fall below zero).", example='[{length = "75 m", size = "DN80"}]', required=True,
        columns=SEGMENT_COLUMNS)
    velocity_limit: float = input_field(
        "velocity", "Velocity limit", "Highest steam velocity in the main; 25 m/s when not given (common practice "
        "for saturated steam).", example="25 m/s", default=25.0, positive=True)
    drip_spacing: float = input_field(
        "length", "Drip leg spacing", "Largest run between drip legs on a level or falling main; 50 m when not "
        "given (common practice: 30 to 50 m).", example="50 m", default=50.0, positive=True)
    ambient_temperature: float = input_field(
        "temperature", "Ambient temperature", "Air around the main; the start of a warm-up.", example="10 °C",
        default=293.15)
    wind_speed: float = input_field(
        "velocity", "Wind speed", "Air speed across the main; 0 for still air indoors.", example="3 m/s", default=0.0)
    warmup_time: float = input_field(
        "time", "Warm-up time", "Time to bring the main from cold to steam temperature.", example="20 min",
        default=1200.0, positive=True)
    trap_safety_factor: float = input_field(
        "number", "Trap safety factor", "Trap capacity over the load it must pass: 2 when not given (common "
        "practice for drips, on the warm-up load).", example="2", default=2.0)
    insulation_thickness: float = input_field(
        "length", "Insulation thickness", "Thickness of the insulation; 0 for a bare main.", example="50 mm",
        section="insulation", key="thickness", required=True)
    conductivity_50: float = input_field(
        "thermal_conductivity", "Conductivity at 50 °C mean", "The maker's figure at 50 °C mean temperature.",
        example="0.040 W/(m·K)", section="insulation", key="conductivity_50", default=0.040, positive=True)
    conductivity_150: float = input_field(
        "thermal_conductivity", "Conductivity at 150 °C mean", "The maker's figure at 150 °C mean temperature.",
        example="0.055 W/(m·K)", section="insulation", key="conductivity_150", default=0.055, positive=True)
    jacket_emissivity: float = input_field(
        "fraction", "Jacket emissivity", "Of the cladding: about 0.1 for aluminium, 0.9 for painted or plastic "
        "(common practice).", example="0.1", section="insulation", key="emissivity", default=0.1, positive=True)
    insulation_options: tuple | None = input_field(
        "rows", "Insulation options", "Candidate thicknesses for the economic thickness, thinnest first: one "
        "[[inputs.insulation.options]] table each, with thickness (0 for bare) and cost, the installed cost per "
        "metre of pipe as a plain number in the site fuel price's currency.",
        example='[{thickness = "40 mm", cost = 30.0}, {thickness = "50 mm", cost = 34.0}]', section="insulation",
        key="options", columns=OPTION_COLUMNS)
    evaluation_years: float | None = input_field(
        "number", "Evaluation period, years", "Years over which the installed cost is recovered (with the options).",
        example="10", section="insulation", key="evaluation_years")
    discount_rate: float | None = input_field(
        "fraction", "Discount rate", "Yearly rate of return on capital, a fraction: 0.08 for 8 % (with the options).",
        example="0.08", section="insulation", key="discount_rate")
    receiver_pressure: float | None = input_field(
        "pressure", "Receiver pressure", "Pressure of the receiver or flash vessel the return line ends in.",
        example="header:LP", section="return_line", key="receiver_pressure")
    return_size: str | None = input_field(
        "nominal_size", "Return line size", "Nominal size of the return line.", example="DN50",
        section="return_line", key="size")
    return_schedule: str = input_field(
        "text", "Return line schedule", "ASME B36.10M schedule; 80 when not given (common practice for condensate).",
        example="80", section="return_line", key="schedule", default="80")
    return_length: float | None = input_field(
        "length", "Return line length", "Length of the return line to the receiver, fittings included.",
        example="160 m", section="return_line", key="length", positive=True)
    lift: float = input_field(
        "length", "Lift", "Height the return line rises after the traps; 0 when it falls all the way.",
        example="4 m", section="return_line", key="lift", default=0.0)
    return_drop_limit: float = input_field(
        "pressure_difference", "Return line drop limit", "Largest friction drop allowed in the return line.",
        example="0.3 bar", section="return_line", key="drop_limit", default=0.3e5, positive=True)
    heater_condensate_flow: float | None = input_field(
        "mass_flow", "Heater condensate", "Condensate of the heater the main feeds, into the same return line; "
        "left empty with a heater record linked, that record's condensate flow at design duty is taken.",
        example="750 kg/h", section="return_line", key="heater_condensate_flow", positive=True)
    heater_trap_pressure: float | None = input_field(
        "pressure", "Heater trap inlet pressure", "Pressure in the heater's steam space at the trap, at the "
        "lowest load the return must work at.", example="4 bar(g)", section="return_line", key="heater_trap_pressure")

    def __post_init__(self):
        check_fields(self)
        if self.supply_superheat is not None:
            if self.supply_temperature is not None:
                raise InputError("the supply state is given twice, as supply_temperature and as supply_superheat",
                                 field="supply_superheat", value=f"{self.supply_superheat:g} K",
                                 fix="keep one: supply_temperature or supply_superheat (kelvin above saturation at "
                                     "the supply pressure)")
            if not self.supply_superheat > 0.0:
                raise InputError("a supply superheat must be above 0 K", field="supply_superheat",
                                 value=f"{self.supply_superheat:g} K", fix="leave it out for dry saturated steam")
        if self.wind_speed < 0.0:
            raise InputError("a wind speed cannot be below zero", field="wind_speed", value=f"{self.wind_speed:g} m/s",
                             fix='give the air speed across the main, "0 m/s" for still air indoors')
        if self.wind_speed > MAX_WIND_SPEED:
            raise InputError(f"is above any design wind for a pipe rack ({MAX_WIND_SPEED:g} m/s)", field="wind_speed",
                             value=f"{self.wind_speed:g} m/s", limits=(0, MAX_WIND_SPEED, "m/s"),
                             fix="give the wind speed in m/s (a km/h figure is 3.6 times too large)")
        if self.drip_spacing < MIN_DRIP_SPACING:
            raise InputError(f"drip legs closer than {MIN_DRIP_SPACING:g} m apart are not a design",
                             field="drip_spacing", value=f"{self.drip_spacing:g} m",
                             fix="give the spacing in metres, 30 to 50 m on level runs (common practice)")
        for i, segment in enumerate(self.main_segments):
            if abs(segment.rise) > segment.length:
                raise InputError(f"segment {i + 1} rises or falls {abs(segment.rise):g} m over its {segment.length:g} m "
                                 "length: a run cannot climb more than its own length", field=f"segments[{i}].rise",
                                 value=f"{segment.rise:g} m", fix="give the height gained from the segment's start to "
                                 "its end (a fall below zero), no more than its length")
        if self.insulation_thickness < 0.0:
            raise InputError("insulation cannot be thinner than zero", field="insulation.thickness",
                             value=f"{self.insulation_thickness * 1000:g} mm",
                             fix="give the thickness of the insulation, or 0 for a bare main")
        if self.insulation_thickness > 0.5:
            raise InputError("is thicker than any pipe insulation (500 mm)", field="insulation.thickness",
                             value=f"{self.insulation_thickness * 1000:g} mm", limits=(0, 500, "mm"))
        if self.lift < 0.0:
            raise InputError("a lift is a height the line rises; a falling line has lift 0", field="return_line.lift",
                             value=f"{self.lift:g} m", fix="give lift = \"0 m\" for a line falling to the receiver")
        if self.lift > 0.0 and self.receiver_pressure is None:
            raise InputError("a lift without a back pressure: the lift only means something against the receiver's "
                             "pressure", field="return_line.lift", value=f"{self.lift:g} m",
                             fix="give receiver_pressure in [inputs.return_line] (e.g. \"header:LP\"), or remove the lift")
        if self.receiver_pressure is not None and (self.return_size is None or self.return_length is None):
            missing = "size" if self.return_size is None else "length"
            raise InputError(f"a return line needs its {missing}", field=f"return_line.{missing}",
                             fix='e.g. size = "DN50", length = "160 m"')
        if (self.heater_condensate_flow is None) != (self.heater_trap_pressure is None):
            raise InputError("give the heater's condensate flow and its trap inlet pressure together",
                             field="return_line.heater_trap_pressure" if self.heater_trap_pressure is None
                             else "return_line.heater_condensate_flow",
                             fix="give both, or neither when no heater drains into the return")
        if not 1.0 <= self.trap_safety_factor <= 10.0:
            raise InputError("a trap safety factor lies from 1 to 10", field="trap_safety_factor",
                             value=self.trap_safety_factor, limits=(1, 10, ""))
        if self.conductivity_150 < self.conductivity_50 * 0.5:
            raise InputError("the conductivity at 150 °C is less than half that at 50 °C: no insulation behaves so",
                             field="insulation.conductivity_150", fix="check the maker's figures and their units")
        check_options(self.insulation_options, self.discount_rate, self.evaluation_years)
        if self.supply_pressure <= 0.0:
            raise InputError("must be above zero", field="supply_pressure")

    @classmethod
    def linked_values(cls, values, given, site, case_path=None, read_record=None):
        """The supply from a linked let-down record (:func:`.supply.linked_supply`) and the steam flow from a linked
        heater record (:func:`.load.linked_load`), when the case names them."""
        from .load import linked_load
        from .supply import linked_supply
        return linked_load(*linked_supply(values, given, case_path, read_record), case_path, read_record)

    @property
    def main_segments(self):
        from .main import Segment
        return tuple(Segment.from_row(row) for row in self.segments)


def _supply_state(inputs):
    if inputs.supply_superheat is not None:
        saturated = SteamState.from_p_dryness(inputs.supply_pressure, 1.0)
        return SteamState.from_pT(inputs.supply_pressure, saturated.temperature + inputs.supply_superheat)
    if inputs.supply_temperature is None:
        return SteamState.from_p_dryness(inputs.supply_pressure, 1.0)
    state = SteamState.from_pT(inputs.supply_pressure, inputs.supply_temperature)
    if state.phase not in ("superheated vapour", "vapour", "supercritical") and (state.superheat or 0) <= 0:
        raise InputError("the supply temperature is at or below saturation: that is not dry steam",
                         field="supply_temperature", fix="leave it empty for saturated steam")
    return state


def calculate(inputs, site):
    """The main's states, drop, heat loss and condensate loads, the traps, and the return line.

    Parameters
    ----------
    inputs : Inputs
    site : steamcalc.cases.site.Site
        The atmosphere; operating hours, boiler efficiency and fuel price for the yearly loss.

    Returns
    -------
    Result

    Notes
    -----
    Each segment: :math:`\\Delta p = (f L/D + \\sum K) \\rho v^2/2 + \\rho g \\Delta z` (isothermal
    compressible flow where the friction drop exceeds 10 % of the inlet pressure); :math:`h_{out} = h_{in} -
    q' L/\\dot m`. See the modules of this package for heat loss, loads and the return line.

    References
    ----------
    IAPWS R7-97(2012), IAPWS-IF97; Colebrook (1939); Churchill and Chu (1975); Churchill and Bernstein (1977);
    Müller-Steinhagen and Heck (1986); ASME B36.10M.

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> r = calculate(Inputs(supply_pressure=9e5, steam_flow=0.2, segments=((100.0, "DN80", None, None, None),),
    ...                      insulation_thickness=0.05), Site())
    >>> round(r.value("main_outlet_pressure"), 3), r.value("drip_points")
    (8.954, 2)
    """
    from .heat_loss import REFERENCES as HEAT_REFERENCES

    result = Result()
    result.references.extend([IF97_REFERENCE, *HEAT_REFERENCES,
                              "Colebrook, C. F. (1939), Turbulent flow in pipes, J. Inst. Civil Eng. 11, 133-156 "
                              "(through fluids.friction.Colebrook); Darcy-Weisbach equation",
                              "Isothermal compressible flow in a pipe (through fluids.compressible.isothermal_gas)",
                              "ASME B36.10M pipe dimensions (through fluids.piping.nearest_pipe)"])
    result.assumptions.extend([
        "Steady flow; the pipe wall at the steam temperature (steam-side film and steel wall resistances neglected)",
        "Heat lost by each segment taken at its inlet steam temperature; the main is horizontal in air, "
        "surroundings at the air temperature",
        f"Gauge pressures converted with the site atmosphere of {site.atmospheric_pressure / 1e5:.5g} bar(a)",
        "Insulation conductivity straight through the maker's figures at 50 °C and 150 °C mean temperature",
    ])
    for source in (supply_source(inputs), load_source(inputs)):
        if source is not None:
            result.assumptions.append(source)
    result.cautions.extend(CAUTIONS)
    supply = _supply_state(inputs)
    if inputs.ambient_temperature >= supply.temperature - 1.0:
        raise InputError(f"the air at {inputs.ambient_temperature - 273.15:.1f} °C is not below the supply steam's "
                         f"{supply.temperature - 273.15:.1f} °C: the main cannot lose heat to it",
                         field="ambient_temperature", value=f"{inputs.ambient_temperature - 273.15:g} °C",
                         fix="give the air temperature around the main in °C (e.g. \"15 degC\"), and check the "
                             "supply pressure's basis (bar(g) or bar(a))")
    flows, drips = report_main(inputs, site, supply, result)
    options = report_economics(inputs, site, flows, result)
    report_traps(inputs, flows, drips, result)
    if inputs.receiver_pressure is not None:
        report_return(inputs, drips, result)
    if full_record_wanted():
        from .figures import figures
        result.figures.extend(figures(inputs, site, flows, drips, result, options))
    return result


def linked_record_problems(record, record_path, read_record):
    """What no longer holds of a main's links, for ``verify``: ``(problems, notes)``; the flows it took from its
    heater record against that record too (:func:`.load.load_link_value_problems`)."""
    problems, notes = supply_link_problems(record, record_path, read_record)
    return problems + load_link_value_problems(record, record_path, read_record), notes


__all__ = ["KIND", "TITLE", "WORKBOOK", "Inputs", "calculate", "linked_record_problems", "stale_links", "Phrase"]
