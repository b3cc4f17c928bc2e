"""``gearcad profiles``: list the tooth systems (and other profiles) with their key figures."""

from __future__ import annotations

import argparse
import math

from ._format import print_json, table

__all__ = ["add_parser", "run"]


def add_parser(subparsers: argparse._SubParsersAction) -> argparse.ArgumentParser:
    """Register ``profiles``."""
    p = subparsers.add_parser("profiles", help="list tooth systems and other profiles",
                              description="List the shipped profiles with their key figures and sources.")
    p.add_argument("--json", action="store_true", help="print JSON instead of the table")
    p.add_argument("--sources", action="store_true", help="also print the source of every value")
    return p


def run(args: argparse.Namespace) -> int:
    """Run ``profiles``."""
    from ..profiles import load_tooth_system, tooth_system_names

    systems = [load_tooth_system(n) for n in tooth_system_names()]
    if args.json:
        print_json({"tooth": [{
            "name": s.name, "title": s.title, "standard": s.standard,
            "pressure_angle": math.degrees(s.pressure_angle), "addendum": s.addendum, "dedendum": s.dedendum,
            "fillet_radius": s.fillet_radius, "clearance": s.clearance, "sources": dict(s.sources)} for s in systems]})
        return 0
    rows = [(s.name, f"{math.degrees(s.pressure_angle):g}", f"{s.addendum:.3f}", f"{s.dedendum:.3f}",
             f"{s.fillet_radius:.3f}", f"{s.clearance:.3f}", s.title) for s in systems]
    print("Tooth systems (basic rack; lengths in modules)")
    print(table(rows, header=("name", "angle deg", "addendum", "dedendum", "root fillet", "clearance", "title"), left=(0, 6)))
    if args.sources:
        for s in systems:
            print(f"\n{s.name}: {s.standard}")
            for key, src in s.sources.items():
                print(f"  {key}: {src}")
    return 0
