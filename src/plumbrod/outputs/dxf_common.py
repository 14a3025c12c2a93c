"""Shared DXF plumbing for every drawing: versions, layers, a millimetre document with
only the linetypes its layers use, text, extents, fixed metadata and the bytes.

ezdxf is imported inside the functions (it takes about half a second to import).
"""

from __future__ import annotations

import io
import math
import re
from collections.abc import Iterable
from contextlib import contextmanager
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from plumbrod.errors import PlumbrodError, UsageError
from plumbrod.outputs.plate_profile import PlateProfile

if TYPE_CHECKING:  # pragma: no cover
    from collections.abc import Iterator

    from ezdxf.document import Drawing
    from ezdxf.layouts import Modelspace

__all__ = [
    "DXF_VERSIONS",
    "TEXT_COLOUR",
    "LayerSpec",
    "check_version",
    "dxf_bytes",
    "finish",
    "frozen_metadata",
    "line",
    "new_document",
    "profile_vertices",
    "text",
]

DXF_VERSIONS: tuple[str, ...] = ("R2010", "R2000")
"""DXF versions we write: R2010 by default, R2000 for older cutting software."""

MIN_EZDXF = (1, 4, 2)
"""Older ezdxf releases wrote files some CAD programs refuse (see DXF notes)."""


@dataclass(frozen=True)
class LayerSpec:
    """A layer: ``name``, ACI ``colour``, ``linetype`` and whether it is cut."""

    name: str
    colour: int
    linetype: str = "Continuous"
    cut: bool = False


TEXT_COLOUR = 7
"""ACI 7: drawn black on a light background and white on a dark one (every CAD program
inverts it), so text stays readable whatever background the CAD user picked."""

_ARC_MIN_RAD = 1e-9


# -- document set-up --------------------------------------------------------------------
def _ezdxf() -> Any:
    import ezdxf

    found = tuple(int(p) for p in re.findall(r"\d+", ezdxf.__version__)[:3])
    if found < MIN_EZDXF:
        raise PlumbrodError(
            f"ezdxf: expected version >= {'.'.join(map(str, MIN_EZDXF))}, "
            f"got {ezdxf.__version__}; upgrade it (pip install -U ezdxf)"
        )
    return ezdxf


def check_version(dxf_version: str) -> str:
    if dxf_version not in DXF_VERSIONS:
        raise UsageError(
            "dxf_version",
            f"expected one of {', '.join(DXF_VERSIONS)}, got {dxf_version!r}",
            "R2010 suits current CAD, R2000 older cutting software",
        )
    return dxf_version


def new_document(dxf_version: str, layers: Iterable[LayerSpec]) -> Drawing:
    """A new mm document with our layers and only the linetypes they use (the
    "Standard" text style is always there)."""
    from ezdxf.tools.standards import linetypes

    ezdxf = _ezdxf()
    layers = tuple(layers)
    with frozen_metadata():  # ezdxf stamps its creation marker here
        doc = ezdxf.new(check_version(dxf_version), setup=False, units=ezdxf.units.MM)
    wanted = {spec.linetype.upper() for spec in layers} - {"CONTINUOUS"}
    for name, description, pattern in linetypes():
        if name.upper() in wanted and name not in doc.linetypes:
            doc.linetypes.add(name, pattern=pattern, description=description)
    doc.header["$INSUNITS"] = ezdxf.units.MM
    doc.header["$MEASUREMENT"] = 1
    doc.header["$LUNITS"] = 2
    doc.header["$AUNITS"] = 0
    doc.header["$TEXTSTYLE"] = "Standard"
    for spec in layers:
        doc.layers.add(spec.name, color=spec.colour, linetype=spec.linetype)
    return doc


def text(
    msp: Modelspace,
    content: str,
    insert: Iterable[float],
    height: float,
    layer: str,
    *,
    align: str = "LEFT",
) -> None:
    """A TEXT in the standard style, placed by ``align`` at ``insert`` (mm)."""
    from ezdxf.enums import TextEntityAlignment

    entity = msp.add_text(content, height=height, dxfattribs={"layer": layer, "style": "Standard"})
    entity.set_placement(tuple(float(c) for c in insert), align=TextEntityAlignment[align])


def finish(doc: Drawing) -> Drawing:
    """Zoom the active viewport to the drawing and write ``$EXTMIN``/``$EXTMAX``."""
    import ezdxf.zoom
    from ezdxf import bbox

    msp = doc.modelspace()
    extents = bbox.extents(msp)
    if extents.has_data:
        # ezdxf copies the layout's extents and limits into the header when it writes
        low = tuple(float(c) for c in extents.extmin)
        high = tuple(float(c) for c in extents.extmax)
        msp.dxf.extmin, msp.dxf.extmax = low, high
        msp.dxf.limmin, msp.dxf.limmax = low[:2], high[:2]
        doc.header["$EXTMIN"], doc.header["$EXTMAX"] = low, high
    ezdxf.zoom.extents(msp)
    return doc


@contextmanager
def frozen_metadata() -> Iterator[None]:
    """Let ezdxf write fixed dates and GUIDs (restores the option afterwards)."""
    import ezdxf

    before = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    try:
        yield
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = before


def dxf_bytes(doc: Drawing, *, fixed_metadata: bool = True) -> bytes:
    """The document as ASCII DXF bytes in its own encoding (UTF-8 for R2010, cp1252 for
    R2000), "\\n" line ends.  ``fixed_metadata`` writes fixed dates (2000-01-01) and GUIDs
    instead of the time of writing, so the same drawing gives the same bytes."""
    stream = io.StringIO()
    if fixed_metadata:
        with frozen_metadata():
            doc.write(stream)
    else:
        doc.write(stream)
    return doc.encode(stream.getvalue())


def line(msp: Modelspace, a: Iterable[float], b: Iterable[float], layer: str) -> None:
    """A LINE from ``a`` to ``b`` (mm) on ``layer``."""
    msp.add_line(
        tuple(float(c) for c in a), tuple(float(c) for c in b), dxfattribs={"layer": layer}
    )


def profile_vertices(profile: PlateProfile) -> list[tuple[float, float, float]]:
    """(u, v, bulge) vertices of the closed profile: each arc's start point carries the
    arc's bulge, each arc's end point starts the tangent line (bulge 0).  Zero-length
    lines and zero-sweep arcs are dropped, and the first vertex is not repeated."""
    from ezdxf.math import arc_to_bulge

    raw: list[tuple[float, float, float]] = []
    for arc in profile.arcs:
        if arc.sweep_rad <= _ARC_MIN_RAD:
            raw.append((*arc.start_uv, 0.0))
            continue
        start, end, bulge = arc_to_bulge(arc.centre_uv, arc.start_rad, arc.end_rad, arc.radius_mm)
        raw.append((start.x, start.y, bulge))
        raw.append((end.x, end.y, 0.0))
    out: list[tuple[float, float, float]] = []
    for vertex in raw:
        # a zero-length line: the next arc starts where the last one ended
        if out and math.dist(out[-1][:2], vertex[:2]) <= 1e-9:
            out[-1] = (out[-1][0], out[-1][1], vertex[2] or out[-1][2])
            continue
        out.append(vertex)
    if len(out) > 1 and math.dist(out[-1][:2], out[0][:2]) <= 1e-9:
        last = out.pop()
        out[0] = (out[0][0], out[0][1], out[0][2] or last[2])
    return out
