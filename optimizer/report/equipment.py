"""The equipment list and the utilities summary of a design, for an estimate.

One row per equipment item of the design (``Designs.equipment``: the
columns, internals, pumps, blowers, drivers, exchangers a flowsheet prices),
in the order the flowsheet priced them; the rows are iterated, never named,
so an item added to a flowsheet appears here without an edit. What an item
is (its service, type, key sizes, design pressure and temperature, wall and
weight) is read from the design's figures by the kind of correlation that
prices it (``DETAILS``); an item of a kind not listed there still has every
cost column, its size basis and its correlation, and blanks where this
module knows no figure for it.

Files: ``write_table`` writes the rows as CSV, XLSX (openpyxl; every cell a
typed value, text stays text) or JSON, by the file's extension, through
``towercost.report.files.write_new``.
"""

from __future__ import annotations

import csv
import io
import math
from pathlib import Path

from towercost.design.case import supply_pressure_of
from towercost.models import costing
from towercost.models.constants import GRAVITY, STANDARD_ATMOSPHERE
from towercost.report.records import USE_UNITS, internals_name, packing_choice, to_json, used_rows

#: The columns of the equipment list, in order: key -> heading (with its unit).
COLUMNS = {
    "rank": "rank",
    "design_id": "design ID",
    "candidate": "candidate",
    "tag": "tag",
    "item": "item",
    "service": "service",
    "type": "type",
    "key_sizes": "key sizes",
    "size_basis": "cost size basis",
    "size": "cost size",
    "size_unit": "cost size unit",
    "material": "material",
    "design_pressure_kPa_gauge": "design pressure [kPa g]",
    "design_temperature_C": "design temperature [degC]",
    "wall_thickness_mm": "wall thickness [mm]",
    "weight_kg": "weight [kg]",
    "purchased_USD": "purchased cost [USD]",
    "bare_module_USD": "bare-module cost [USD]",
    "cost_basis_index": "cost basis index",
    "cost_basis": "cost basis",
    "estimate_index": "estimate index",
    "estimate_year": "estimate year",
    "correlation": "correlation",
    "range_held": "size within the correlation's range",
    "source": "source",
}

MATERIALS = {"carbon_steel": "carbon steel", "ss304": "stainless steel 304", "ss316": "stainless steel 316"}


def _service(case) -> dict[str, str]:
    """What each kind of item serves, in the case's terms."""
    solutes = ", ".join(case.solutes)
    if case.service.agent_is_liquid:
        column = f"absorber: {solutes} from the gas into the solvent"
        pump, blower = "solvent to the absorber top", "gas to treat, to the absorber bottom"
    else:
        column = f"stripper: {solutes} from the liquid into the stripping gas"
        pump, blower = "liquid to treat, to the stripper top", "stripping gas, to the stripper bottom"
    internals = f"internals of the {column.split(':')[0]}"
    return {"vessel": column, "tray": internals, "packing": internals, "packed_distributors": internals,
            "packed_supports": internals, "pump": pump, "blower": blower, "drive": "driver",
            "heat_exchanger": "heat exchange", "reboiler": "reboiler"}


def _vessel(case, d, i):
    return {"type": "vertical vessel, 2:1 ellipsoidal heads",
            "key_sizes": f"ID {d.diameter[i]:.3f} m x {d.height[i]:.2f} m tangent to tangent; shell "
                         f"{d.wall_thickness[i] * 1000:.1f} mm, heads {d.head_thickness[i] * 1000:.1f} mm",
            "design_pressure_kPa_gauge": float(d.design_pressure[i]) / 1000.0,
            "design_temperature_C": float(d.design_temperature[i]) - 273.15,
            "wall_thickness_mm": float(d.wall_thickness[i]) * 1000.0,
            "weight_kg": float(d.shell_weight[i])}


def _trays(case, d, i):
    return {"type": internals_name(case, d, i),
            "key_sizes": f"{int(d.trays[i])} trays, {d.diameter[i]:.3f} m diameter, {case.tray_spacing:.3f} m spacing",
            "weight_kg": float(d.tray_weight[i])}


def _pump(case, d, i):
    rho = d.liquid_mass_flow[i] / d.liquid_volumetric_flow[i] if d.liquid_volumetric_flow[i] > 0 else math.nan
    discharge = supply_pressure_of(case, int(d.agent[i])) + d.pump_head[i] - STANDARD_ATMOSPHERE
    return {"type": "centrifugal pump",
            "key_sizes": f"{d.liquid_volumetric_flow[i] * 3600:.2f} m3/h, {d.pump_head[i] / (rho * GRAVITY):.1f} m "
                         f"head ({d.pump_head[i] / 1000:.1f} kPa), {d.pump_shaft_power[i] / 1000:.2f} kW shaft; "
                         f"discharge {discharge / 1000:.1f} kPa g"}


def _blower(case, d, i):
    return {"type": "centrifugal blower",
            "key_sizes": f"{d.gas_inlet_flow[i]:.3f} m3/s actual at the inlet, {d.blower_rise[i] / 1000:.2f} kPa "
                         f"rise, {d.blower_shaft_power[i] / 1000:.2f} kW shaft"}


def _packing(case, d, i):
    choice = packing_choice(case, d, i)
    return {"type": f"{choice.data['kind']}, {choice.data['material']}, {1000 * choice.data['nominal_size']:g} mm, "
                    "dumped",
            "key_sizes": f"{d.packing_volume[i]:.3f} m3: {d.packed_height[i]:.2f} m in {int(d.beds[i])} bed(s) of "
                         f"{d.bed_height[i]:.2f} m, {d.diameter[i]:.3f} m diameter",
            "weight_kg": float(d.packing_weight[i])}


def _distributors(case, d, i):
    beds = int(d.beds[i])
    return {"key_sizes": f"{d.diameter[i]:.3f} m diameter: one liquid distributor, {beds - 1} redistributor(s)"}


def _supports(case, d, i):
    return {"key_sizes": f"{d.diameter[i]:.3f} m diameter: {int(d.beds[i])} support plate(s)"}


#: Item details by the first word of the pricing correlation's name (a packed column's rows by their own).
DETAILS = {"vessel": _vessel, "tray": _trays, "pump": _pump, "blower": _blower, "packing:": _packing,
           "packed_distributors": _distributors, "packed_supports": _supports}


def _kind(correlation: str) -> str:
    """The first word of a correlation's name: "vessel", "tray", ...; a packed column's rows by their own."""
    if correlation.startswith("packing:"):
        return "packing:"
    if correlation.startswith("packed_"):
        return correlation
    return correlation.split("_")[0]


def _basis_note(correlation: str) -> str:
    row = costing.load_cost_table().get(correlation, {})
    return str(row.get("index_basis_note", ""))


def _description(spec) -> str:
    """What the pricing row says it prices: the cost table's description, or the row's own."""
    own = getattr(spec, "description", None)
    if own is not None:
        return own
    return costing.correlation(spec.correlation).description


def equipment_list(case, d, i: int = 0, design_id: str | None = None) -> list[dict]:
    """One row per equipment item of design ``i`` (see ``COLUMNS``); costs at the estimate's index [USD], to the cent."""
    from towercost.report.ids import id_of

    if design_id is None:
        design_id = id_of(case, d, i)
    eco = case.economics
    eq = d.equipment
    services = _service(case)
    rows = []
    for j in used_rows(d, i):
        spec = eq.spec_at(i, j)   # a row may switch correlation from one design to the next (fan or blower)
        kind = _kind(spec.correlation)
        row = dict.fromkeys(COLUMNS)
        row.update({
            "design_id": design_id, "candidate": case.agents[int(d.agent[i])], "tag": spec.tag, "item": spec.kind,
            "service": services.get(kind.rstrip(":"), spec.kind), "type": _description(spec) or spec.kind,
            "key_sizes": f"{spec.size_basis} {float(eq.size[i, j]):.4g} {spec.size_unit}",
            "size_basis": spec.size_basis, "size": float(eq.size[i, j]), "size_unit": spec.size_unit,
            "material": MATERIALS.get(getattr(spec, "material", "") or eq.materials[j],
                                      getattr(spec, "material", "") or eq.materials[j]),
            "purchased_USD": float(d.purchased[i, j]), "bare_module_USD": float(d.bare_module_items[i, j]),
            "cost_basis_index": float(eq.basis[j]), "cost_basis": _basis_note(spec.correlation),
            "estimate_index": float(eco.index_to), "estimate_year": eco.index_year,
            "correlation": spec.correlation, "range_held": bool(eq.in_range[i, j]), "source": spec.source,
        })
        if kind in DETAILS:
            row.update(DETAILS[kind](case, d, i))
        rows.append({k: _tidy(k, v) for k, v in row.items()})
    return rows


#: Significant digits kept of a figure in the list: every file format then holds the very same number.
DIGITS = 12


def _tidy(key: str, value):
    """Costs to the cent, other figures to ``DIGITS`` significant digits (spreadsheets keep 15 or 16)."""
    if isinstance(value, bool) or not isinstance(value, float) or not math.isfinite(value):
        return value
    if key.endswith("_USD"):
        return round(value, 2)
    return float(f"{value:.{DIGITS}g}")


def ranked_rows(result) -> list[dict]:
    """The equipment rows of every ranked design of an optimize result, each led by the design's rank."""
    rows = []
    for i in range(len(result.designs)):
        rows += [{"rank": i + 1, **row} for row in equipment_list(result.case, result.designs, i)]
    return rows


def utilities(d, i: int = 0) -> list[dict]:
    """The utilities summary of design ``i``: each consumption at its rate in schedule units and its yearly cost."""
    out = []
    for j, spec in enumerate(d.uses.specs):
        unit, factor = USE_UNITS.get(spec.rate_unit, (spec.rate_unit, 1.0))
        out.append({"use": spec.label, "rate": float(d.uses.rate[i, j]) * factor, "unit": unit,
                    "cost_USD_per_yr": (-1.0 if spec.credit else 1.0) * float(d.use_cost[i, j])})
    return out


# --------------------------------------------------------------------------- files

FORMATS = (".csv", ".xlsx", ".json")


#: Leading characters that make a spreadsheet read a text cell as a formula.
FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def csv_cell(value):
    r"""A value as a CSV cell: None empty; text a spreadsheet would take for a formula gets a leading apostrophe.

    >>> csv_cell('=HYPERLINK("x")'), csv_cell(2.5), csv_cell(None)
    ('\'=HYPERLINK("x")', 2.5, '')
    """
    if value is None:
        return ""
    if isinstance(value, str) and value.startswith(FORMULA_START):
        return "'" + value
    return value


def csv_text(rows: list[dict]) -> str:
    """Rows of equal keys as CSV text: a header line, then one line per row (see ``csv_cell``)."""
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(rows[0]), lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: csv_cell(v) for k, v in row.items()})
    return buffer.getvalue()


def _xlsx_bytes(rows: list[dict], sheet: str) -> bytes:
    """The rows as a workbook: one header row, then typed cells; text cells are stored as text, never formulas."""
    from openpyxl import Workbook
    from openpyxl.cell.cell import TYPE_STRING

    book = Workbook()
    ws = book.active
    ws.title = sheet[:31]
    keys = list(rows[0])
    ws.append([COLUMNS.get(k, k) for k in keys])
    for r, row in enumerate(rows, start=2):
        for c, key in enumerate(keys, start=1):
            value = row[key]
            cell = ws.cell(row=r, column=c)
            if isinstance(value, str):
                cell.value = value
                cell.data_type = TYPE_STRING        # "=..." stays the text it is
            else:
                cell.value = value
    ws.freeze_panes = "A2"
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()


def table_content(path: Path, rows: list[dict], sheet: str = "equipment") -> str | bytes:
    """The file content for ``path`` by its extension: CSV text, XLSX bytes or JSON text."""
    suffix = Path(path).suffix.lower()
    if not rows:
        raise ValueError("no rows to write")
    if suffix == ".csv":
        return csv_text(rows)
    if suffix == ".xlsx":
        return _xlsx_bytes(rows, sheet)
    if suffix == ".json":
        return to_json({"rows": rows}) + "\n"
    raise ValueError(f"{path}: the equipment list is written as .csv, .xlsx or .json, by the file's extension")


def write_table(path: Path, rows: list[dict], *, force: bool = False, sheet: str = "equipment") -> Path:
    """Write the rows to ``path`` (CSV, XLSX or JSON by extension), whole or not at all."""
    from towercost.report.files import write_new

    return write_new(Path(path), table_content(path, rows, sheet), force=force)
