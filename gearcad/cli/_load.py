"""Load options shared by ``pair``, ``build``, ``design``: torque or power, and speed."""

from __future__ import annotations

import argparse

__all__ = ["add_load_options", "load_from_args"]


def add_load_options(parser: argparse.ArgumentParser) -> None:
    """``--torque NM`` or ``--power W``, with ``--speed RPM`` (of the input, or gear 1)."""
    group = parser.add_mutually_exclusive_group()
    group.add_argument("--torque", type=float, metavar="NM", help="steady torque on the input (gear 1), N·m: rate the teeth")
    group.add_argument("--power", type=float, metavar="W", help="power through the train, W (needs --speed): rate the teeth")
    parser.add_argument("--speed", type=float, metavar="RPM", help="speed of the input (gear 1), rpm")


def load_from_args(args: argparse.Namespace):
    """An :class:`gearcad.trains.plan.InputLoad`, or None when no load was asked for."""
    from ..errors import InputError
    from ..trains.plan import InputLoad
    from ..meshes.strength import torque_from_power
    from ..validate import positive

    if args.torque is None and args.power is None:
        if args.speed is not None:
            raise InputError("--speed needs --torque or --power")
        return None
    if args.speed is None:
        raise InputError("a load rating needs --speed RPM (the velocity factor depends on the pitch-line speed)")
    speed = positive(args.speed, "speed", "rpm")
    torque = positive(args.torque, "torque", "N·m") if args.torque is not None else torque_from_power(
        positive(args.power, "power", "W"), speed)
    return InputLoad(torque, speed)
