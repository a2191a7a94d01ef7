"""Safety cautions attached to every output that advises on rpm, speed or acceleration."""

from __future__ import annotations

__all__ = ["CAUTIONS", "SHORT_CAUTION", "SPEEDOMETER_CAUTIONS", "SPEEDOMETER_SHORT_CAUTION"]

CAUTIONS: tuple[str, ...] = (
    "These figures are calculated from the data supplied, not measured; confirm them on "
    "the vehicle before relying on them.",
    "Never exceed the engine maker's rev limit or the rated limits of the transmission, "
    "clutch or converter, driveline, axle and tires.",
    "Tractive force beyond what the tires can grip becomes wheelspin, and hard launches "
    "and shifts load the driveline; this plan does not enforce traction or component "
    "limits.",
    "Use full-throttle acceleration and high speeds only on a closed course or sanctioned "
    "track, never on public roads, and obey local laws.",
    "Have a qualified professional review any change to gearing, engine or driveline "
    "before it is made.",
)

SHORT_CAUTION = (
    "Calculated, not measured. Respect the maker's rev limit and component ratings; "
    "traction and driveline loads are not checked. Closed course or sanctioned track "
    "only; obey local laws. Have a qualified professional review changes."
)

# a speedometer correction advises on no rpm or acceleration: only these apply to it
SPEEDOMETER_CAUTIONS: tuple[str, ...] = (
    CAUTIONS[0],
    "Check the corrected reading against a measured distance or satellite speed before "
    "relying on it; speed limits apply to the true speed.",
    CAUTIONS[-1],
)

SPEEDOMETER_SHORT_CAUTION = (
    "Calculated, not measured: confirm the corrected reading on the road before relying on "
    "it. Have a qualified professional review changes."
)
