"""Invented test fixtures for the spring figures (DESIGN §5a): planar routes whose
spring-load changes follow from hand statics.  Every number is invented."""

from __future__ import annotations

from designs import _fmt, _rod

ONLY_FORCES = "\n[load_cases.hand]\nspeed_kmh = 0.0\nbump_g = -1.0\nforces_N = {{ {e} = {f} }}\n"
"""A load case with the given force alone: 1 + bump_g = 0 takes every weight out."""


def hand_case(element: str, force: tuple[float, float, float]) -> str:
    return ONLY_FORCES.format(e=element, f=_fmt(force))


def overhang_text(a_mm: float, wheelbase_mm: float | None, *, sweeps: str = "") -> str:
    """Side view: an element hung by one vertical rod straight from the front upright
    above its wheel centre (route ratio 1), held fore-aft and in pitch by two level
    guides to the chassis; its centre of pressure ``a_mm`` ahead of the axle."""
    car = "" if wheelbase_mm is None else f"\n[car]\nwheelbase_mm = {wheelbase_mm!r}\n"
    body = sweeps or (
        "[sweeps.travel]\nrange_mm = [-0.001, 0.001]\nsteps = 3\n"
        "\n[sweeps.heave]\nenabled = false\n\n[sweeps.pitch]\nenabled = false\n"
    )
    return f"""\
# Invented test fixture: an element overhanging a one-axle route.
[design]
name = "overhang (test fixture)"
plane = "side"

[chassis.pickups]
guide_upper = [520.0, 210.0]
guide_lower = [520.0, 120.0]

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
hanger = [0.0, 350.0]

[elements.wing]
kind = "splitter"
mass_kg = 5.0
cg_mm = {_fmt((a_mm, 100.0))}
centre_of_pressure_mm = {_fmt((a_mm, 100.0))}

[elements.wing.pickups]
hanger = [0.0, 150.0]
guide_upper = [300.0, 210.0]
guide_lower = [300.0, 120.0]

{_rod("hanger", "front.upright.hanger", "wing.hanger")}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper")}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower")}
{body}{car}"""


def two_axle_text(wheelbase_mm: float, cp_x_mm: float, hanger_offset_mm: float = 0.0) -> str:
    """Side view: an element hung by a vertical rod from each upright (``hanger_offset_mm``
    ahead of its wheel centre), held fore-aft by one level guide; the centre of
    pressure at ``cp_x_mm``."""
    xr = -wheelbase_mm
    off = hanger_offset_mm
    return f"""\
# Invented test fixture: an element between the axles, hung from both.
[design]
name = "two axles (test fixture)"
plane = "side"

[chassis.pickups]
guide = {_fmt((xr / 2.0 + 300.0, 120.0))}

[corners.front]
wheel_centre_mm = [0.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front.pickups.upright]
hanger = {_fmt((off, 350.0))}

[corners.rear]
wheel_centre_mm = {_fmt((xr, 300.0))}
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.rear.pickups.upright]
hanger = {_fmt((xr + off, 350.0))}

[elements.tray]
kind = "undertray"
mass_kg = 5.0
cg_mm = {_fmt((cp_x_mm, 100.0))}
centre_of_pressure_mm = {_fmt((cp_x_mm, 100.0))}

[elements.tray.pickups]
front = {_fmt((off, 150.0))}
rear = {_fmt((xr + off, 150.0))}
guide = {_fmt((xr / 2.0, 120.0))}

{_rod("hanger_front", "front.upright.hanger", "tray.front")}
{_rod("hanger_rear", "rear.upright.hanger", "tray.rear")}
{_rod("guide", "chassis.guide", "tray.guide")}
[sweeps.travel]
range_mm = [-0.001, 0.001]
steps = 3

[sweeps.heave]
enabled = false

[sweeps.pitch]
enabled = false
"""


def roll_text(offset_mm: float, share: float, track_rear_mm: float) -> str:
    """Front view: an element hung by one vertical rod from the left upright above its
    wheel centre (y = 700), held sideways and in roll by two level guides; its centre
    of pressure ``offset_mm`` inboard of the hanger."""
    return f"""\
# Invented test fixture: a laterally offset load whose guides carry a roll moment.
[design]
name = "roll (test fixture)"
plane = "front"

[chassis.pickups]
guide_upper = [0.0, 260.0]
guide_lower = [0.0, 160.0]

[corners.front_left]
wheel_centre_mm = [700.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[corners.front_left.pickups.upright]
hanger = [700.0, 350.0]

[corners.front_right]
wheel_centre_mm = [-700.0, 300.0]
tyre_radius_mm = 300.0
tyre_width_mm = 240.0
suspension = "slider"

[elements.wing]
kind = "other"
mass_kg = 5.0
cg_mm = {_fmt((700.0 - offset_mm, 100.0))}
centre_of_pressure_mm = {_fmt((700.0 - offset_mm, 100.0))}

[elements.wing.pickups]
hanger = [700.0, 150.0]
guide_upper = [300.0, 260.0]
guide_lower = [300.0, 160.0]

{_rod("hanger", "front_left.upright.hanger", "wing.hanger")}
{_rod("guide_upper", "chassis.guide_upper", "wing.guide_upper")}
{_rod("guide_lower", "chassis.guide_lower", "wing.guide_lower")}
[sweeps.travel]
range_mm = [-0.001, 0.001]
steps = 3

[sweeps.heave]
enabled = false

[sweeps.roll]
enabled = false

[car]
roll_stiffness_front_share = {share!r}
track_rear_mm = {track_rear_mm!r}
"""
