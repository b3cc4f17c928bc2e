"""Lathe change gears: thread pitches, machine files, swing-frame fit and thread tables.

Stage: a consumer of the ratio solver (``gearcad.ratio``) that turns a list of
threads into trains of change gears placed on a lathe's swing frame.  Pure
computation but for :func:`load_machine` (input); the sheet's files are written
by :mod:`gearcad.export.threadsheet`.  Names are loaded on first use (PEP 562).
"""

from __future__ import annotations

from ..lazy import lazy_names

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

__getattr__, __dir__ = lazy_names(__name__, _HOMES, __all__)
