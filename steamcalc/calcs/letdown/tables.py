"""The let-down workbook's tables: flow cases, lines, relief device and the two-stage proposal, from the result."""

from __future__ import annotations

from .equipment import flow_cases


def valve_case_rows(inputs, result):
    """The let-down's flow cases as table rows."""
    rows = []
    for name, flow in flow_cases(inputs):
        row = {"flow case": name, "flow, kg/h": flow * 3600,
               "valve inlet, bar(a)": result.value(f"valve_inlet_pressure_{name}"),
               "required Kv, m³/h": result.value(f"valve_kv_{name}"),
               "choked": "yes" if result.value(f"choked_{name}") else "no"}
        if f"valve_travel_{name}" in result.values:
            row["travel, %"] = result.value(f"valve_travel_{name}")
        if f"valve_noise_{name}" in result.values:
            row["noise at 1 m, dB(A)"] = result.value(f"valve_noise_{name}")
        if f"valve_outlet_mach_{name}" in result.values:
            row["outlet Mach"] = result.value(f"valve_outlet_mach_{name}")
        for key, heading in (("spray_water_flow", "spray water, kg/h"), ("spray_valve_kv", "spray valve Kv, m³/h"),
                             ("spray_valve_travel", "spray valve travel, %")):
            if f"{key}_{name}" in result.values:
                row[heading] = result.value(f"{key}_{name}")
        rows.append(row)
    return rows


def letdown_sections(inputs, result):
    """The let-down workbook's tables by heading: flow cases with noise, lines, relief device,
    and the two-stage proposal when made."""
    sections = {"Flow cases": valve_case_rows(inputs, result)}
    lines = []
    for key, label, size in (("inlet", "inlet line", inputs.inlet_size), ("outlet", "outlet line", inputs.outlet_size)):
        if size is None:
            continue
        row = {"line": label, "size": size}
        for name, heading, unit in (("velocity", "velocity", "m/s"), ("line_pressure_drop", "pressure drop", "bar difference"),
                                    ("line_pressure_drop_per_100m", "pressure gradient", "bar difference per 100 m")):
            if f"{key}_{name}" in result.values:
                row[f"{heading}, {unit}"] = result.value(f"{key}_{name}")
        lines.append(row)
    if lines:
        sections["Lines"] = lines
    relief = [(k, result.values[k]) for k in (
        "relief_design_flow", "relief_relieving_pressure", "relief_relieving_temperature",
        "relief_required_area_direct_integration", "relief_required_area_steam_equation", "relief_required_area",
        "relief_orifice", "relief_orifice_area", "relief_capacity_margin", "relief_inlet_loss_fraction",
        "relief_reaction_force") if k in result.values]
    if any(k == "relief_orifice" for k, _ in relief):
        sections["Relief device (preliminary; the engineer of record and the maker's certified capacity govern)"] = [
            {"quantity": v.label, "value": v.value, "unit": v.unit.replace("**2", "²")} for _, v in relief]
    if "two_stage_split_pressure" in result.values:
        sections["Noise: two-stage let-down proposal"] = two_stage_rows(result)
    return sections


def two_stage_rows(result):
    """The two-stage proposal as table rows: each stage on its valve, both together, and the split at equal
    pressure ratios for comparison."""
    def value(key):
        return result.value(key) if key in result.values else ""

    rows = [{"stage": f"{word} stage", "valve": value(f"two_stage_valve_{word}"),
             "rated Kv, m³/h": value(f"two_stage_rated_kv_{word}"),
             "required Kv, m³/h": value(f"two_stage_kv_{word}"), "outlet Mach": value(f"two_stage_outlet_mach_{word}"),
             "noise at 1 m, dB(A)": value(f"two_stage_noise_{word}"),
             "intermediate, bar(a)": value("two_stage_split_pressure")} for word in ("first", "second")]
    rows.append({**{k: "" for k in rows[0]}, "stage": "both (energy sum)",
                 "noise at 1 m, dB(A)": value("two_stage_noise_combined"),
                 "intermediate, bar(a)": value("two_stage_split_pressure")})
    if "two_stage_noise_combined_equal_ratios" in result.values:
        rows.append({**{k: "" for k in rows[0]}, "stage": "both, at equal pressure ratios (comparison)",
                     "noise at 1 m, dB(A)": value("two_stage_noise_combined_equal_ratios"),
                     "intermediate, bar(a)": value("two_stage_intermediate_pressure")})
    return rows
