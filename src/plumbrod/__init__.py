"""plumbrod: route aero loads to the wheel uprights through rods and rockers.

Reads a design of hardpoints, solves the 3D linkage through the suspension travel and
body motion, and checks route ratio, line of action, forces, buckling, clearance.

The Python API (stable; everything else may move between versions)::

    import plumbrod
    design = plumbrod.load_design("my_car.toml")   # a path, a Path, or TOML text
    findings = plumbrod.analyse(design)            # what every report is built from
    findings.verdict, [c.id for c in findings.checks]

Importing the package is light: numpy and the solvers load on the first ``analyse``.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any

from plumbrod.errors import AssemblyError, DesignFileError, LocationError, PlumbrodError

if TYPE_CHECKING:
    from plumbrod.design.model import Design
    from plumbrod.verdict.findings import Findings

__all__ = [
    "AssemblyError",
    "Design",
    "DesignFileError",
    "Findings",
    "LocationError",
    "PlumbrodError",
    "__version__",
    "analyse",
    "load_design",
]
__version__ = "0.1.0"


def load_design(path_or_text: str | Path, *, source: str | None = None) -> Design:
    """The validated design of a file (a ``str`` path or a :class:`~pathlib.Path`) or of
    TOML text (a ``str`` holding a newline).  ``source`` names text in messages and
    reports (default ``"<text>"``).  Raises :class:`DesignFileError` (one line: file,
    key path, what is wrong, how to fix it) on any problem."""
    from plumbrod.design.loading import load_design as load_file
    from plumbrod.design.loading import parse_design

    if isinstance(path_or_text, str) and "\n" in path_or_text:
        return parse_design(path_or_text, source or "<text>")
    if not isinstance(path_or_text, str | Path):
        raise TypeError(f"load_design takes a path or TOML text, not {type(path_or_text).__name__}")
    return load_file(path_or_text)


def analyse(design: Design | str | Path) -> Findings:
    """Solve every sweep and run every check of ``design`` (a :class:`Design`, or what
    :func:`load_design` takes).  Returns the :class:`Findings`: ``checks``,
    ``verdict``, ``analysis.sweeps`` (solved poses as numpy arrays, pose batch first),
    ``analysis.figures`` (route ratio, line of action, ... per sweep), member
    ``reserves``, ``mass``, ``compliance``, ``clearance``, ``plausibility``.  Raises
    :class:`LocationError` when a body is not located, :class:`AssemblyError` when the
    linkage does not assemble at a pose."""
    from plumbrod.design.model import Design as DesignType
    from plumbrod.verdict.findings import review

    if not isinstance(design, DesignType):
        design = load_design(design)
    return review(design)


def __getattr__(name: str) -> Any:
    """``plumbrod.Design`` and ``plumbrod.Findings`` load their modules when first used."""
    if name == "Design":
        from plumbrod.design.model import Design

        return Design
    if name == "Findings":
        from plumbrod.verdict.findings import Findings

        return Findings
    raise AttributeError(f"module 'plumbrod' has no attribute {name!r}")
