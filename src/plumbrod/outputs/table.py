"""One row per solved pose: positions, ratios, angles and forces, for CSV and JSON.

Column names are ``<item>/<quantity>_<unit>`` (load-case columns start with the case:
``<case>/<item>/<quantity>_<unit>``), so every column says its unit.  Spring columns
(DESIGN §5a; names kept stable for other programs): ``<case>/front_axle/spring_delta_N``
and ``rear_axle`` (every element together, + = more compressed), the same with
``_bolted_N`` and ``_floor_N``, per corner ``<case>/<corner>/spring_delta_N`` (corners
the design does not hold are ``front_left``, ``front_right``, ``rear_left``,
``rear_right``) and ``tyre_load_gain_N``, and per element ``<case>/<element>/spring_share``
and ``spring_share_floor`` (largest |axle change| / the element's vertical load).
Empty where a figure needs ``[car] wheelbase_mm``.
"""

from __future__ import annotations

import csv
import io
import json

import numpy as np
from numpy.typing import NDArray

from plumbrod.mechanics.analysis import Analysis

__all__ = ["pose_table", "table_csv", "table_json"]

Array = NDArray[np.float64]
DRIVER_COLUMNS = ("travel_mm", "heave_mm", "roll_deg", "pitch_deg")


def _columns_of_sweep(analysis: Analysis, name: str) -> dict[str, Array]:
    link = analysis.link
    res = analysis.sweeps[name]
    fig = analysis.figures[name]
    kin = res.solved.kin
    n = res.spec.size
    cols: dict[str, Array] = {}
    for key in DRIVER_COLUMNS:
        cols[key] = res.spec.values.get(key, np.full(n, np.nan if key == "travel_mm" else 0.0))
    if not res.spec.is_travel:
        cols["travel_mm"] = np.full(n, np.nan)
    for c, corner in enumerate(link.corner_names):
        i = link.wheel_centre[c]
        cols[f"{corner}/wheel_travel_mm"] = kin.points[:, i, 2] - link.points[0, i, 2]
    for route in analysis.routes.routes:
        i = link.point(route.pickup)
        for axis, label in enumerate("xyz"):
            cols[f"{route.name}/{label}_mm"] = kin.points[:, i, axis]
        if route.name in fig.route_ratio:
            cols[f"{route.name}/route_ratio"] = fig.route_ratio[route.name]
    for element, rh in fig.ride_height.items():
        cols[f"{element}/ride_height_mm"] = rh.height_mm
        cols[f"{element}/ride_height_bolted_mm"] = rh.bolted_height_mm
    kinds = {e.name: e.kind for e in analysis.design.elements}
    for element, att in fig.attitude.items():
        cols[f"{element}/pitch_deg"] = att.pitch_deg
        cols[f"{element}/roll_deg"] = att.roll_deg
        cols[f"{element}/pitch_bolted_deg"] = att.bolted_pitch_deg
        cols[f"{element}/roll_bolted_deg"] = att.bolted_roll_deg
        if kinds.get(element) == "wing":
            cols[f"{element}/angle_of_attack_change_deg"] = att.pitch_deg
    for rod, angle in fig.line_of_action_deg.items():
        cols[f"{rod}/line_of_action_deg"] = angle
    for j, (rod, body) in enumerate(fig.transmission_labels):
        cols[f"{rod}@{body}/transmission_deg"] = fig.transmission_deg[:, j]
    if res.elastic is not None:  # redundant location: what the motion alone does
        for j, r in enumerate(res.elastic.setup.rods):
            cols[f"fight/{link.rod_names[r]}/force_N"] = res.elastic.force_N[:, j]
    st = analysis.statics.get(name)
    if st is not None:
        design_rods = [r.name for r in analysis.design.rods]
        total = analysis.rod_force_N(name)  # fight forces included
        for k, case in enumerate(st.cases):
            for rod in design_rods:
                cols[f"{case}/{rod}/force_N"] = total[:, k, link.rod_names.index(rod)]
            for route_name, force in st.upright_force_N.items():
                f = force[:, k]
                for axis, label in enumerate("xyz"):
                    cols[f"{case}/{route_name}/upright_F{label}_N"] = f[:, axis]
                size = np.linalg.norm(f, axis=-1)
                cols[f"{case}/{route_name}/upright_angle_deg"] = np.degrees(
                    np.arccos(np.clip(np.abs(f[:, 2]) / np.where(size > 0, size, 1.0), 0.0, 1.0))
                )
                moment = st.upright_moment_Nm[route_name][:, k]
                cols[f"{case}/{route_name}/upright_Mx_Nm"] = moment[:, 0]
                cols[f"{case}/{route_name}/upright_My_Nm"] = moment[:, 1]
            for e, element in enumerate(st.elements):
                leak = st.leakage[:, k, e]
                cols[f"{case}/{element}/leak_heave_N"] = leak[:, 0]
                cols[f"{case}/{element}/leak_roll_Nm"] = leak[:, 1]
                cols[f"{case}/{element}/leak_pitch_Nm"] = leak[:, 2]
                cols[f"{case}/{element}/leak_heave_virtual_work_N"] = st.leakage_virtual_work[
                    :, k, e, 0
                ]
                load = st.vertical_load_N[:, k, e]
                cols[f"{case}/{element}/leak_fraction"] = np.divide(
                    leak[:, 0], load, out=np.zeros(n), where=np.abs(load) > 1e-9
                )
    if analysis.springs is not None and name in analysis.springs.sweeps:
        cols.update(_spring_columns(analysis, name))
    return cols


def _spring_columns(analysis: Analysis, name: str) -> dict[str, Array]:
    springs = analysis.springs
    assert springs is not None
    sp = springs.sweeps[name]
    cols: dict[str, Array] = {}
    for k, case in enumerate(springs.cases):
        for a, axle in enumerate(("front_axle", "rear_axle")):
            cols[f"{case}/{axle}/spring_delta_N"] = sp.axle_N[:, k, :, a].sum(axis=1)
            cols[f"{case}/{axle}/spring_delta_bolted_N"] = sp.axle_bolted_N[:, k, :, a].sum(axis=1)
            cols[f"{case}/{axle}/spring_delta_floor_N"] = sp.axle_floor_N[:, k, :, a].sum(axis=1)
        for s, spring in enumerate(springs.spring_names):
            cols[f"{case}/{spring}/spring_delta_N"] = sp.spring_N[:, k, :, s].sum(axis=1)
            cols[f"{case}/{spring}/spring_delta_bolted_N"] = sp.spring_bolted_N[:, k, :, s].sum(
                axis=1
            )
            cols[f"{case}/{spring}/tyre_load_gain_N"] = sp.tyre_gain_N[:, k, s]
        for e, element in enumerate(springs.elements):
            load = np.abs(sp.vertical_load_N[:, k, e])
            safe = np.where(load > 1e-9, load, np.nan)
            for key, arr in (
                ("spring_share", sp.axle_N),
                ("spring_share_floor", sp.axle_floor_N),
                ("spring_share_bolted", sp.axle_bolted_N),
            ):
                cols[f"{case}/{element}/{key}"] = np.abs(arr[:, k, e]).max(axis=-1) / safe
    return cols


def pose_table(
    analysis: Analysis, sweeps: list[str] | None = None
) -> tuple[list[str], list[list[object]]]:
    """Columns and rows for the chosen sweeps (all by default), one row per pose."""
    names = sweeps or list(analysis.sweeps)
    per_sweep = {name: _columns_of_sweep(analysis, name) for name in names}
    columns: list[str] = ["sweep", "pose"]
    for cols in per_sweep.values():
        for key in cols:
            if key not in columns:
                columns.append(key)
    rows: list[list[object]] = []
    for name, cols in per_sweep.items():
        n = analysis.sweeps[name].spec.size
        for i in range(n):
            row: list[object] = [name, i]
            for key in columns[2:]:
                value = cols.get(key)
                row.append(
                    None if value is None or np.isnan(value[i]) else round(float(value[i]), 6)
                )
            rows.append(row)
    return columns, rows


def table_csv(columns: list[str], rows: list[list[object]]) -> str:
    """The table as CSV text (empty cells where a column does not apply)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(columns)
    for row in rows:
        writer.writerow(["" if v is None else v for v in row])
    return out.getvalue()


def table_json(analysis: Analysis, columns: list[str], rows: list[list[object]]) -> str:
    """The table as JSON: design name and file, columns, rows (null where n/a)."""
    doc = {
        "design": {"name": analysis.design.name, "file": analysis.design.source},
        "load_cases": list(analysis.loads.cases) if analysis.loads else [],
        "columns": columns,
        "rows": rows,
    }
    return json.dumps(doc, ensure_ascii=False) + "\n"
