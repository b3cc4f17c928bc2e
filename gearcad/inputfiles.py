"""Reading the user's text files (train files, profiles) with every size bounded.

Input, not computation: like :func:`gearcad.trains.trainfile.read_train` and the
profile loader, this module reads files and nothing else.  A file is refused
with one line naming it and the limit when it is larger than the limit, is not
text (NUL or other control bytes), or is not UTF-8 (a UTF-16 file, say, as some
editors save); a UTF-8 byte-order mark is accepted and dropped.  TOML nested
deeper than Python's parser can follow is refused the same way.
"""

from __future__ import annotations

import os
import tomllib
from pathlib import Path
from typing import Any, Callable

from .errors import GearcadError

__all__ = ["MAX_INPUT_BYTES", "MAX_NESTING", "MAX_NAME_LENGTH", "read_text_file", "decode_text", "parse_toml",
           "nesting_depth", "plain_file_name"]

#: Largest train or profile file read, bytes.  A train file of 32 stages with
#: comments is under 8 kB; 64 kB leaves room for long notes.
MAX_INPUT_BYTES = 64 * 1024
#: Deepest nesting of tables and arrays in a train or profile file; the deepest
#: gearcad reads is 4 (stage list, stage, gear, hub).
MAX_NESTING = 8

_BOMS = {b"\xff\xfe\x00\x00": "UTF-32", b"\x00\x00\xfe\xff": "UTF-32", b"\xff\xfe": "UTF-16", b"\xfe\xff": "UTF-16"}
_ALLOWED_CONTROLS = {9, 10, 13}  # tab, line feed, carriage return


def read_text_file(path: str | os.PathLike[str], what: str, error: Callable[[str], GearcadError],
                   limit: int = MAX_INPUT_BYTES) -> str:
    """The text of a small UTF-8 file, or ``error(message)`` raised with one line naming the fault.

    Parameters
    ----------
    path : str or os.PathLike
        The file.
    what : str
        What it is, for messages (``"train file"``).
    error : callable
        Builds the exception to raise from a message (``InputError``, ``ProfileError``).
    limit : int
        Largest size accepted, bytes.

    Returns
    -------
    str
        The file's text without a byte-order mark.
    """
    path = Path(path)
    shown = f"{what} {str(path)!r}"
    try:
        if path.is_dir():
            raise error(f"{shown} is a folder, not a file")
        with open(path, "rb") as handle:
            data = handle.read(limit + 1)
    except FileNotFoundError:
        raise error(f"{shown} does not exist") from None
    except OSError as exc:
        raise error(f"{shown} cannot be read: {exc.strerror or exc}") from None
    if len(data) > limit:
        raise error(f"{shown} is larger than the {limit // 1024} kB allowed for a {what}")
    return decode_text(data, shown, error)


def decode_text(data: bytes, shown: str, error: Callable[[str], GearcadError]) -> str:
    """``data`` as UTF-8 text (a leading byte-order mark dropped), refusing binary content and other encodings."""
    for bom, name in _BOMS.items():
        if data.startswith(bom):
            raise error(f"{shown} is {name} text; save it as UTF-8")
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    bad = next((b for b in data if b < 32 and b not in _ALLOWED_CONTROLS or b == 127), None)
    if bad is not None:
        raise error(f"{shown} is not a text file (it holds the control byte 0x{bad:02x}); a TOML text file is expected")
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise error(f"{shown} is not UTF-8 text (byte 0x{data[exc.start]:02x} at offset {exc.start}); "
                    "save it as UTF-8") from None


def nesting_depth(value: Any) -> int:
    """Depth of nested tables and arrays in parsed TOML (a scalar: 0), iteratively."""
    deepest, stack = 0, [(value, 0)]
    while stack:
        item, depth = stack.pop()
        if isinstance(item, dict):
            children = item.values()
        elif isinstance(item, list):
            children = item
        else:
            deepest = max(deepest, depth)
            continue
        deepest = max(deepest, depth + 1)
        stack.extend((child, depth + 1) for child in children)
    return deepest


def parse_toml(text: str, shown: str, error: Callable[[str], GearcadError]) -> dict[str, Any]:
    """Parse TOML, refusing syntax errors and nesting deeper than :data:`MAX_NESTING` with one line."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise error(f"{shown}: TOML syntax error: {exc}") from None
    except RecursionError:
        raise error(f"{shown}: tables or arrays nested deeper than {MAX_NESTING} levels") from None
    if nesting_depth(data) > MAX_NESTING:
        raise error(f"{shown}: tables or arrays nested deeper than {MAX_NESTING} levels")
    return data


#: Longest name that becomes a file or folder name (characters).
MAX_NAME_LENGTH = 64
_RESERVED_NAMES = {"con", "prn", "aux", "nul", *(f"com{i}" for i in range(1, 10)), *(f"lpt{i}" for i in range(1, 10))}
_NOT_IN_NAMES = '/\\:*?"<>|'


def plain_file_name(name: object, what: str) -> str:
    """``name`` when every common file system takes it as a file name, else :class:`InputError` naming the rule.

    Allowed: 1 to :data:`MAX_NAME_LENGTH` printable characters, none of ``/ \\ : * ? " < > |``,
    not starting with a dot, not ending with a dot or a space, not a name Windows reserves
    (``CON``, ``NUL``, ``COM1`` ...).
    """
    from .errors import InputError

    rule = (f"a plain file name: 1 to {MAX_NAME_LENGTH} printable characters without / \\ : * ? \" < > |, "
            "not starting with a dot nor ending with a dot or space")
    if not isinstance(name, str) or not name:
        raise InputError(f"{what} must be {rule}, got {name!r}")
    shown = repr(name if len(name) <= 80 else name[:77] + "...")
    if len(name) > MAX_NAME_LENGTH:
        raise InputError(f"{what} must be {rule}; got {len(name)} characters: {shown}")
    if any(c in _NOT_IN_NAMES for c in name) or not name.isprintable() or name.startswith(".") \
            or name.endswith((".", " ")):
        raise InputError(f"{what} must be {rule}, got {shown}")
    if name.split(".")[0].lower() in _RESERVED_NAMES:
        raise InputError(f"{what} {shown} is a device name on Windows; choose another")
    return name
