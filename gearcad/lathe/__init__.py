"""Lathe change gears: thread pitches, machine files, swing-frame fit and thread tables.

Stage: a consumer of the ratio solver (``gearcad.ratio``) that turns a list of
threads into trains of change gears placed on a lathe's swing frame.  Pure
computation but for :func:`load_machine` (input); the sheet's files are written
by :mod:`gearcad.export.threadsheet`.  Names are loaded on first use (PEP 562).
"""

from __future__ import annotations

import importlib
from typing import Any

_HOMES = {
    "Pitch": "threads", "Series": "threads", "SERIES": "threads", "parse_pitch": "threads",
    "parse_threads": "threads",
    "Machine": "machine", "load_machine": "machine", "parse_machine": "machine", "machine_names": "machine",
    "Frame": "frame", "Setup": "frame", "FrameFit": "frame", "place": "frame",
    "Candidate": "table", "ThreadRow": "table", "ThreadTable": "table", "thread_table": "table",
    "can_cut": "table", "arrangements": "table",
    "table_json": "report", "markdown_table": "report", "csv_table": "report",
    "sheet_pages": "sheet",
    "missing_gears": "missing", "missing_gear_spec": "missing",
}

__all__ = sorted(_HOMES)


def __getattr__(name: str) -> Any:
    if name not in _HOMES:
        raise AttributeError(f"module 'gearcad.lathe' has no attribute {name!r}")
    value = getattr(importlib.import_module(f".{_HOMES[name]}", __name__), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(__all__))
