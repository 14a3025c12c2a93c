"""The cautions plumbrod shows with every report and in ``--help`` (DESIGN §7)."""

__all__ = ["CAUTION"]

CAUTION = (
    "Caution: the analysis is idealised (pin-jointed rods, rigid rockers unless a "
    "stiffness is given, quasi-static loads, no fatigue). It does not replace a "
    "qualified engineer's sign-off, physical proof-load tests of the parts, or the "
    "technical regulations of your series; many series ban aero devices that move with "
    "the suspension."
)
