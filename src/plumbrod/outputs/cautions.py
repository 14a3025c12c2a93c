"""The cautions plumbrod shows with every report and in ``--help`` (DESIGN §7)."""

__all__ = ["CAUTION", "RIDE_CAUTION"]

CAUTION = (
    "Caution: the analysis is idealised (pin-jointed rods, rigid rockers unless a "
    "stiffness is given, quasi-static loads, no fatigue). It does not replace a "
    "qualified engineer's sign-off, physical proof-load tests of the parts, or the "
    "technical regulations of your series; many series ban aero devices that move with "
    "the suspension."
)

RIDE_CAUTION = (
    "Ride study: an idealised linear quarter car per axle (linear spring, damper and "
    "tyre; the tyre never leaves the road; no bump stop, no friction), driven in a "
    "straight line (no roll; the axles are not coupled in pitch: each takes its steady "
    "share of the downforce), on one ISO 8608 road class at a time with the left and "
    "right tracks uncorrelated; the probabilities "
    "assume Gaussian responses. Use it to compare bolted with routed, not as a lap-time "
    "or durability prediction; many series ban aero devices mounted to move with the "
    "suspension."
)
