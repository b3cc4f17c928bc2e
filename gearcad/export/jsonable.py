"""Values made fit for JSON: non-finite floats become null, numpy scalars plain numbers."""

from __future__ import annotations

import math
from typing import Any

__all__ = ["jsonable"]


def jsonable(value: Any) -> Any:
    """``value`` with NaN and infinities as None and numpy scalars as Python numbers, recursively."""
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dict):
        return {k: jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [jsonable(v) for v in value]
    if hasattr(value, "item") and not isinstance(value, (str, bytes)):  # numpy scalars
        return jsonable(value.item())
    return value
