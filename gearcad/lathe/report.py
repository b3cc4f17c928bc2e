"""The thread table as data: the JSON dictionary and the rows of the text, Markdown and CSV forms.

Pure: builds dictionaries and strings, prints and writes nothing.  Gear places
are named as at the machine: the stud gear, the intermediate stud's pair
(driven gear, then driver) or idler, the leadscrew gear.  Lengths in mm,
angles in degrees.
"""

from __future__ import annotations

import csv
import io
import math
from typing import Any, Sequence

from .frame import Setup
from .table import Candidate, ThreadRow, ThreadTable, error_um

__all__ = ["table_json", "row_json", "text_rows", "TEXT_HEADER", "markdown_table", "csv_table", "row_notes",
           "CAUTION", "intermediate_text", "hand_note"]

CAUTION = ("Caution: stop the spindle and isolate the lathe before changing gears; refit the guard before "
           "starting. Check the first pass against the wanted pitch before cutting a part. The fit on the frame "
           "is worked out from the machine file's figures: check it at the machine.")

TEXT_HEADER = ("Thread", "Pitch mm", "Stud", "Intermediate", "Leadscrew", "Error", "um/25mm", "Slot mm", "Angle",
               "Fits", "Alternative")


def hand_note(machine) -> str:
    """How the hand of the thread is set (every train of the table has two meshes)."""
    if machine.tumbler_reverse:
        return ("Every train turns the leadscrew the same way (two meshes): set right or left hand with the "
                "tumbler reverse.")
    return ("Every train turns the leadscrew the same way (two meshes); without a tumbler reverse the other "
            "hand needs a second idler.")


def intermediate_text(setup: Setup) -> str:
    """``40 / 20`` (driven / driver of the pair) or ``idler 45``."""
    if setup.compound:
        return f"{setup.intermediate[0]} / {setup.intermediate[1]}"
    return f"idler {setup.intermediate[0]}"


def _train(setup: Setup) -> dict[str, Any]:
    return {"stud": setup.stud, "intermediate": list(setup.intermediate), "leadscrew": setup.leadscrew,
            "kind": "compound" if setup.compound else "idler"}


def _candidate(c: Candidate) -> dict[str, Any]:
    angle = None if c.fit.angle is None else math.degrees(c.fit.angle)
    return {
        "train": _train(c.setup),
        "ratio": float(c.ratio),
        "ratio_exact": f"{c.ratio.numerator}/{c.ratio.denominator}",
        "relative_error": c.relative_error,
        "error_um_per_25mm": error_um(c.relative_error),
        "exact": c.exact,
        "fits": c.fit.fits,
        "frame": {"slot_position": c.fit.slot_position, "angle": angle, "margin": c.fit.margin,
                  "problem": c.fit.problem},
        "gears_missing": list(c.missing),
    }


def row_json(row: ThreadRow) -> dict[str, Any]:
    """One thread as JSON: the contract's keys first, then the extras."""
    best = _candidate(row.best)
    out = {"name": row.pitch.name, "pitch_mm": row.pitch.mm, "pitch_exact_mm": row.pitch.exact,
           "ratio_wanted": row.target.value, "ratio_wanted_exact": row.target.expression}
    out.update(best)
    out["within_tolerance"] = row.within_tolerance
    out["alternative"] = _candidate(row.alternative) if row.alternative else None
    out["better_ratio_not_fitting"] = _candidate(row.better_unfit) if row.better_unfit else None
    out["exact_with_missing_gear"] = _candidate(row.with_missing) if row.with_missing else None
    out["notes"] = row_notes(row)
    return out


def table_json(table: ThreadTable, not_cut: Sequence = ()) -> dict[str, Any]:
    """The whole table as JSON (``machine``, ``threads`` and extras)."""
    m = table.machine
    return {
        "machine": {
            "name": m.name, "title": m.title, "leadscrew_pitch_mm": float(m.leadscrew.coefficient),
            "leadscrew": m.leadscrew.name, "module": m.module, "diametral_pitch": m.diametral_pitch,
            "stud_to_leadscrew": m.stud_to_leadscrew, "slot": list(m.slot),
            "swing": [math.degrees(a) for a in m.swing],
            "spindle_to_stud": [list(g) for g in m.fixed_gears],
            "fixed_ratio": f"{m.fixed_ratio.numerator}/{m.fixed_ratio.denominator}",
            "tumbler_reverse": m.tumbler_reverse, "hand": hand_note(m), "shelf": m.shelf.describe(), "largest_gear": m.largest_gear,
        },
        "tolerance": table.tolerance,
        "convention": ("ratio = leadscrew turns per stud turn = stud/driven x driver/leadscrew; "
                       "pitch = ratio x leadscrew pitch x fixed ratio (stud turns per spindle turn)"),
        "threads": [row_json(r) for r in table.rows],
        "not_cut": [{"name": p.name, "pitch_mm": p.mm} for p in not_cut],
        "caution": CAUTION,
    }


def _error_text(c: Candidate) -> str:
    return "exact" if c.exact else f"{c.relative_error:+.2e}"


def _frame_cells(c: Candidate) -> tuple[str, str]:
    angle = "-" if c.fit.angle is None else f"{math.degrees(c.fit.angle):.1f}"
    return f"{c.fit.slot_position:.1f}", angle


def text_rows(table: ThreadTable) -> list[tuple[str, ...]]:
    """One row of cells per thread, in the order of :data:`TEXT_HEADER`."""
    rows = []
    for r in table.rows:
        b = r.best
        slot, angle = _frame_cells(b)
        um = "0" if b.exact else f"{error_um(b.relative_error):+.1f}"
        rows.append((r.pitch.name, f"{r.pitch.mm:.4f}", str(b.setup.stud), intermediate_text(b.setup),
                     str(b.setup.leadscrew), _error_text(b), um, slot, angle, "yes" if b.fit.fits else "NO",
                     _alternative_cell(r)))
    return rows


def _alternative_cell(row: ThreadRow) -> str:
    alt = row.alternative
    if alt is None:
        return "-"
    return alt.setup.describe().replace(" ", "") + ("" if alt.exact else f" ({alt.relative_error:+.1e})")


def _short(c: Candidate) -> str:
    s = c.setup
    return f"stud {s.stud}, {intermediate_text(s)}, leadscrew {s.leadscrew} ({_error_text(c)})"


def row_notes(row: ThreadRow, verbose: bool = True) -> list[str]:
    """What a machinist should know about one row beyond its cells (``verbose``: the alternative too)."""
    notes = []
    if not row.best.fit.fits:
        notes.append(f"no train of the shelf fits the frame; the nearest: {row.best.fit.problem}")
    elif abs(row.best.relative_error) > row.tolerance:
        notes.append(f"outside the tolerance of {row.tolerance:g}")
    if row.better_unfit:
        notes.append(f"a better ratio needs {_short(row.better_unfit)}, which does not fit: "
                     f"{row.better_unfit.fit.problem}")
    if row.alternative and verbose:
        label = "exact alternative" if row.alternative.exact and row.best.exact else "next best"
        notes.append(f"{label}: {_short(row.alternative)}")
    if row.with_missing:
        gears = ", ".join(str(z) for z in row.with_missing.missing)
        notes.append(f"exact with a gear of {gears} teeth, not on the shelf: {_short(row.with_missing)}")
    if row.pitch.pi_power:
        notes.append("a worm pitch contains pi: no gear train is exact")
    return notes


def markdown_table(table: ThreadTable) -> str:
    """The table in Markdown, with an alternatives-and-notes column."""
    m = table.machine
    lines = [f"## Thread table: {m.title}", "",
             f"Leadscrew {m.leadscrew.name}; change gears module {m.module:g} mm; tolerance {table.tolerance:g}. "
             "Intermediate: driven / driver of the pair on the intermediate stud, or the idler. "
             "Slot: intermediate stud from the leadscrew, mm; angle of the frame from the line leadscrew-to-stud. "
             + hand_note(m), "",
             "| " + " | ".join(TEXT_HEADER) + " | Notes |",
             "|" + "|".join("---" if i in (0, 3, 10) else "---:" for i in range(len(TEXT_HEADER))) + "|---|"]
    for cells, row in zip(text_rows(table), table.rows):
        lines.append("| " + " | ".join(cells) + " | " + "; ".join(row_notes(row, False)).replace("|", "/") + " |")
    lines += ["", CAUTION, ""]
    return "\n".join(lines)


def csv_table(table: ThreadTable) -> str:
    """The table as CSV: one line per thread, with the alternative and the missing gear."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(["thread", "pitch_mm", "stud", "intermediate_driven_or_idler", "intermediate_driver",
                     "leadscrew", "ratio", "relative_error", "error_um_per_25mm", "fits", "slot_position_mm",
                     "angle_deg", "within_tolerance", "alternative", "gears_missing", "notes"])
    for r in table.rows:
        b, s = r.best, r.best.setup
        writer.writerow([
            r.pitch.name, f"{r.pitch.mm:.6f}", s.stud, s.intermediate[0],
            s.intermediate[1] if s.compound else "", s.leadscrew, f"{b.ratio.numerator}/{b.ratio.denominator}",
            f"{b.relative_error:.6e}", f"{error_um(b.relative_error):.3f}", b.fit.fits,
            f"{b.fit.slot_position:.2f}", "" if b.fit.angle is None else f"{math.degrees(b.fit.angle):.2f}",
            r.within_tolerance, r.alternative.setup.describe() if r.alternative else "",
            " ".join(str(z) for z in r.with_missing.missing) if r.with_missing else "", "; ".join(row_notes(r))])
    return buffer.getvalue()
