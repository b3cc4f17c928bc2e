"""``gearcad demo``: build the shipped, invented scenario into output/demo/."""

from __future__ import annotations

import argparse
from importlib import resources

from .build import add_output_options, build_and_write, solved

__all__ = ["add_parser", "run", "DEMO_FILE"]

DEMO_FILE = "moon-phase.toml"

DESCRIPTION = """\
The demo: a moon-phase indicator for a wall clock, laser-cut from 3 mm acrylic.  The
clock's hour wheel (one turn in 12 h) drives a moon disc that turns once per mean
synodic month (29.530588853 days).  gearcad solves the ratio 12/(24*29.530588853) in
three stages of 12 to 100 teeth, then builds every file into output/demo/."""


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``demo``."""
    p = subparsers.add_parser("demo", help="build the shipped demo into output/demo/", description=DESCRIPTION,
                              formatter_class=argparse.RawDescriptionHelpFormatter)
    add_output_options(p)
    p.set_defaults(out="output/demo")
    return p


def run(args: argparse.Namespace) -> int:
    """Run ``demo``."""
    from ..trains.trainfile import parse_train

    text = resources.files("gearcad").joinpath("demo", DEMO_FILE).read_text(encoding="utf-8")
    spec, extra = solved(parse_train(text, f"gearcad/demo/{DEMO_FILE}"))
    return build_and_write(spec, args, extra)
