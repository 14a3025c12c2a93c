"""PNG previews of our DXF drawings, for a quick look without a CAD program.

The drawing is rendered by ezdxf's drawing add-on onto a matplotlib figure (Agg canvas,
no pyplot figure state).  The add-on draws the x-y plane, so for a 3D wireframe we
render a copy of the drawing turned by a :class:`ezdxf.math.Matrix44` view rotation:
isometric from front-left-above, a side view or a front view.  The DXF document itself
is never changed.

View frames (right, up, towards the viewer) in ISO 8855 axes (x forward, y left, z up):

* ``"top"``: (x, y, z), nose to the right;
* ``"side"``: (x, z, −y), seen from the right of the car, nose to the right;
* ``"front"``: (y, z, x), seen from ahead of the car, its left side on the right;
* ``"iso"``: seen from the direction (1, 1, 1) (front, left, above), z up.

matplotlib and ezdxf are imported inside the functions.
"""

from __future__ import annotations

import io
from typing import TYPE_CHECKING

import numpy as np

from plumbrod.design.model import Design
from plumbrod.errors import UsageError

if TYPE_CHECKING:  # pragma: no cover
    from ezdxf.document import Drawing
    from ezdxf.math import Matrix44

__all__ = ["VIEWS", "preview_png", "route_view", "view_matrix"]

VIEWS: dict[str, tuple[tuple[float, float, float], tuple[float, float, float]]] = {
    "top": ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0)),
    "side": ((1.0, 0.0, 0.0), (0.0, 0.0, 1.0)),
    "front": ((0.0, 1.0, 0.0), (0.0, 0.0, 1.0)),
    "iso": ((-1.0, 1.0, 0.0), (-1.0, -1.0, 2.0)),
}
"""Screen right and screen up of each view, in the chassis frame (not normalised)."""


def route_view(design: Design) -> str:
    """The view that shows a design best: its own plane if planar, else isometric."""
    return design.plane if design.plane in ("side", "front") else "iso"


def view_matrix(view: str) -> Matrix44:
    """The rotation taking chassis coordinates to view coordinates (right, up, towards
    the viewer) as an ezdxf Matrix44.

    ezdxf multiplies row vectors (``p' = p @ M``), so the view axes are the matrix
    columns; this is the one place that convention is handled.
    """
    from ezdxf.math import Matrix44

    if view not in VIEWS:
        raise UsageError("view", f"expected one of {', '.join(VIEWS)}, got {view!r}")
    right = np.array(VIEWS[view][0])
    up = np.array(VIEWS[view][1])
    right = right / np.linalg.norm(right)
    up = up / np.linalg.norm(up)
    toward = np.cross(right, up)
    cols = np.column_stack((right, up, toward))
    values = [float(v) for row in cols for v in (*row, 0.0)] + [0.0, 0.0, 0.0, 1.0]
    return Matrix44(values)


def preview_png(
    doc: Drawing, *, view: str = "top", dpi: int = 150, width_in: float = 12.0
) -> bytes:
    """A PNG image (bytes) of the drawing's model space on white, seen in ``view``.

    A copy of the drawing is turned into the view (the original is untouched).  Labels
    (TEXT and MTEXT in the x-y plane) move with their anchor points but keep facing the viewer,
    because the add-on does not draw text outside the x-y plane.
    """
    import ezdxf
    from ezdxf.addons.drawing import Frontend, RenderContext
    from ezdxf.addons.drawing.matplotlib import MatplotlibBackend
    from ezdxf.addons.drawing.properties import LayoutProperties
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from plumbrod.outputs.dxf_common import dxf_bytes

    matrix = view_matrix(view)
    text = dxf_bytes(doc).decode(doc.output_encoding, errors="replace")
    copy = ezdxf.read(io.StringIO(text))
    msp = copy.modelspace()
    if view != "top":
        for entity in msp:
            flat = tuple(entity.dxf.get("extrusion", (0.0, 0.0, 1.0))) == (0.0, 0.0, 1.0)
            if entity.dxftype() in ("TEXT", "MTEXT") and flat:
                # the add-on draws no text outside the x-y plane: move each label with
                # its anchor and keep it facing the viewer
                for key in ("insert", "align_point"):
                    if entity.dxf.hasattr(key):
                        entity.dxf.set(key, matrix.transform(entity.dxf.get(key)))
            else:
                entity.transform(matrix)

    fig = Figure(dpi=dpi)
    FigureCanvasAgg(fig)
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    props = LayoutProperties.from_layout(msp)
    props.set_colors("#FFFFFF")
    Frontend(RenderContext(copy), MatplotlibBackend(ax)).draw_layout(
        msp, finalize=True, layout_properties=props
    )
    x0, x1 = ax.get_xlim()
    y0, y1 = ax.get_ylim()
    aspect = (y1 - y0) / (x1 - x0) if x1 > x0 else 1.0
    fig.set_size_inches(width_in, max(2.0, min(width_in * aspect, 3.0 * width_in)))
    out = io.BytesIO()
    fig.savefig(out, format="png", dpi=dpi, facecolor="#FFFFFF")
    return out.getvalue()
