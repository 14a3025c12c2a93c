"""JSON text that never holds NaN or Infinity (they are not JSON, and not a figure).

:func:`dumps_finite` is ``json.dumps(..., allow_nan=False)``; when a figure is not
finite it raises :class:`~plumbrod.errors.FigureError` naming where in the document it
sits, so a command prints one line and exits 2 instead of writing an invalid file.
"""

from __future__ import annotations

import json
import math
from typing import Any

from plumbrod.errors import FigureError

__all__ = ["dumps_finite", "first_non_finite"]


def first_non_finite(doc: Any, path: str = "") -> tuple[str, float] | None:
    """The key path (``a.b[3].c``) and value of the first NaN or infinity in ``doc``."""
    if isinstance(doc, float):
        return None if math.isfinite(doc) else (path or "(top)", doc)
    if isinstance(doc, dict):
        for key, value in doc.items():
            found = first_non_finite(value, f"{path}.{key}" if path else str(key))
            if found:
                return found
    elif isinstance(doc, (list, tuple)):
        for i, value in enumerate(doc):
            found = first_non_finite(value, f"{path}[{i}]")
            if found:
                return found
    return None


def dumps_finite(doc: Any, *, source: str = "", **kwargs: Any) -> str:
    """``json.dumps(doc, allow_nan=False, **kwargs)``; FigureError on NaN or infinity.

    ``source`` (the design file) goes into the message.
    """
    try:
        return json.dumps(doc, allow_nan=False, **kwargs)
    except ValueError:
        found = first_non_finite(doc)
        if found is None:
            raise
        raise FigureError(source, found[0], found[1]) from None
