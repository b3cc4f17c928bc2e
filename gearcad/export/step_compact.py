"""Share repeated geometry in a STEP file's text: one entity where the kernel wrote several equal ones.

The kernel's STEP writer gives every use of a point, direction, placement or
curve its own entity: a B-spline flank is written once for its bottom edge and
again as the profile of its side face, with its own copy of every control
point; the direction (0, 0, 1) appears thousands of times.  ISO 10303-21 lets
any number of entities refer to one instance, so :func:`share_geometry` keeps
the first of each set of textually equal *geometric* entities (the kinds in
:data:`SHAREABLE`, which carry no identity of their own) and points every
reference at it, repeating until nothing more merges (points first, then the
curves made of them).  Topology (vertices, edges, faces) and product data are
never merged.

The text is also written tightly: no blanks outside quoted strings, one entity
a line, and every real written with more than :data:`DECIMALS` decimals (the
kernel writes twelve) rounded to that many.  In mm that moves a point by at
most 5e-10 mm, 200 times less than the kernel's own confusion distance (1e-7 mm,
the uncertainty the file declares), so the file describes the same shapes.

Pure text processing, no kernel: it runs on the file the kernel wrote.
"""

from __future__ import annotations

import re

__all__ = ["SHAREABLE", "DECIMALS", "share_geometry"]

#: Geometric entity kinds that may be shared (AP214 geometry without identity).
SHAREABLE = frozenset({
    "CARTESIAN_POINT", "DIRECTION", "VECTOR", "AXIS2_PLACEMENT_3D", "AXIS1_PLACEMENT", "LINE", "CIRCLE",
    "B_SPLINE_CURVE_WITH_KNOTS", "PLANE", "CYLINDRICAL_SURFACE", "SURFACE_OF_LINEAR_EXTRUSION",
})

#: Decimals kept in a real written without an exponent (1e-9: mm for lengths, parameter units for knots).
DECIMALS = 9

_ENTITY = re.compile(r"#(\d+)\s*=\s*((?:'(?:[^']|'')*'|[^';])*);")
_TOKEN = re.compile(r"'(?:[^']|'')*'|#\d+")
_SPACE = re.compile(r"\s+")
_PIECE = re.compile(r"'(?:[^']|'')*'|[^']+")
_LONG_REAL = re.compile(r"(?<![\w.#])(-?\d+)\.(\d{%d})(\d+)(?![\dE.])" % DECIMALS)


def _round(match: re.Match[str]) -> str:
    """A real with more than DECIMALS decimals, rounded to DECIMALS and without trailing zeros."""
    whole, kept, rest = match.groups()
    value = round(float(f"{whole}.{kept}{rest}"), DECIMALS)
    text = f"{value:.{DECIMALS}f}".rstrip("0")
    return "0." if text in ("-0.", "0.") else text


def _tight(body: str) -> str:
    """``body`` without blanks and with long reals rounded, quoted strings untouched."""
    return "".join(piece if piece[0] == "'" else _LONG_REAL.sub(_round, _SPACE.sub("", piece))
                   for piece in _PIECE.findall(body))


def _kind(body: str) -> str:
    return body.split("(", 1)[0].strip()


def share_geometry(text: str) -> str:
    """The STEP file ``text`` with equal geometric entities merged (see the module docstring).

    Parameters
    ----------
    text : str
        A complete ISO 10303-21 file (one DATA section), as the kernel writes it.

    Returns
    -------
    str
        The same file with fewer entities; the header and the entity numbers
        kept (numbers of merged entities simply no longer occur).
    """
    head, found, rest = text.partition("\nDATA;")
    data, found_end, tail = rest.partition("\nENDSEC;")
    if not found or not found_end:
        return text
    bodies = {int(m.group(1)): _tight(m.group(2)) for m in _ENTITY.finditer(data)}
    canon: dict[int, int] = {}

    def resolve(match: re.Match[str]) -> str:
        token = match.group(0)
        if token[0] == "'":
            return token
        number = int(token[1:])
        return f"#{canon.get(number, number)}"

    shareable = [n for n, body in bodies.items() if _kind(body) in SHAREABLE]
    while True:
        first: dict[str, int] = {}
        merged = False
        for number in shareable:
            if number in canon:
                continue
            key = _TOKEN.sub(resolve, bodies[number])
            if key in first:
                canon[number] = first[key]
                merged = True
            else:
                first[key] = number
        if not merged:
            break
    lines = [f"#{n}={_TOKEN.sub(resolve, body)};" for n, body in bodies.items() if n not in canon]
    return head + "\nDATA;\n" + "\n".join(lines) + "\nENDSEC;" + tail
