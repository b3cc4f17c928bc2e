"""Names of a package that load on first use (PEP 562), so importing one light module does not load the rest."""

from __future__ import annotations

import importlib
import sys
from typing import Any, Callable, Iterable, Mapping

__all__ = ["lazy_names"]


def lazy_names(package: str, homes: Mapping[str, str], exported: Iterable[str]) -> tuple[Callable[[str], Any],
                                                                                       Callable[[], list[str]]]:
    """The ``__getattr__`` and ``__dir__`` of ``package``: each name in ``homes`` is read from its module
    (``homes[name]``, relative to the package) the first time it is asked for, then kept in the package."""
    exported = tuple(exported)

    def __getattr__(name: str) -> Any:
        if name not in homes:
            raise AttributeError(f"module {package!r} has no attribute {name!r}")
        value = getattr(importlib.import_module(f".{homes[name]}", package), name)
        setattr(sys.modules[package], name, value)
        return value

    def __dir__() -> list[str]:
        return sorted(set(vars(sys.modules[package])) | set(exported))

    return __getattr__, __dir__
