"""The flash workbook's table: the cascade (or single flash) stage by stage, from the result."""

from __future__ import annotations


def flash_stage_rows(inputs, result):
    """The cascade (or single flash) as rows for a table: one dict per stage."""
    stages = inputs.stage_pressures
    if len(stages) == 1:
        return [{"stage": 1, "pressure, bar(a)": stages[0] / 1e5,
                 "flash fraction, %": result.value("flash_fraction") * 100,
                 "flash steam, kg/h": result.value("flash_steam_flow"),
                 "residual condensate, kg/h": result.value("residual_condensate_flow")}]
    return [{"stage": i, "pressure, bar(a)": result.value(f"stage_{i}_pressure"),
             "flash fraction, %": result.value(f"stage_{i}_flash_fraction") * 100,
             "flash steam, kg/h": result.value(f"stage_{i}_flash_steam_flow"),
             "residual condensate, kg/h": result.value(f"stage_{i}_residual_condensate_flow")}
            for i in range(1, len(stages) + 1)]
