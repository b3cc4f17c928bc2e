"""The command line: parses, calls the public API, prints.  The only code that prints.

Each command lives in its own module of this package with two functions,
``add_parser(subparsers)`` and ``run(args) -> int``; :data:`COMMANDS` maps the
command name to that module, which is imported only when its command runs
(or for ``--help``), so ``gearcad --help`` loads neither cadquery nor OCP.

Exit codes: 0 all well, 1 a check failed or nothing met the tolerance,
2 bad input (one line on stderr, no traceback), 130 interrupted.
"""

from __future__ import annotations

import argparse
import importlib
import signal
import sys
from typing import NoReturn, Sequence

from ..errors import GearcadError

__all__ = ["main", "COMMANDS"]

COMMANDS: dict[str, str] = {
    "pair": "gearcad.cli.pair",
    "profiles": "gearcad.cli.profiles",
    "ratio": "gearcad.cli.ratio",
    "build": "gearcad.cli.build",
    "design": "gearcad.cli.design",
    "demo": "gearcad.cli.demo",
    "lathe": "gearcad.cli.lathe",
    "worm": "gearcad.cli.worm",
}


class OneLineParser(argparse.ArgumentParser):
    """An argparse parser whose errors are one line: ``gearcad CMD: error: ...``."""

    def _get_formatter(self) -> argparse.HelpFormatter:  # the width given: argparse would import shutil for it
        from ._format import help_width

        return self.formatter_class(prog=self.prog, width=help_width())

    def error(self, message: str) -> NoReturn:
        self.exit(2, f"{self.prog}: error: {message} (see {self.prog} --help)\n")


def build_parser(only: str | None = None) -> argparse.ArgumentParser:
    """The top-level parser with every available command (or, with ``only``, that one: a faster start)."""
    parser = OneLineParser(prog="gearcad", description="From a gear ratio to meshing involute gears and files a machine accepts.")
    from .. import __version__

    parser.add_argument("--version", action="version", version=f"gearcad {__version__}")
    subparsers = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=OneLineParser)
    for name, module_name in COMMANDS.items():
        if only is not None and name != only:
            continue
        try:
            module = importlib.import_module(module_name)
        except ModuleNotFoundError as exc:  # a command still being built
            if exc.name != module_name:
                raise
            continue
        sub = module.add_parser(subparsers)
        sub.set_defaults(_run=module.run)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``gearcad`` command; returns the exit code."""
    argv = list(sys.argv[1:] if argv is None else argv)
    parser = build_parser(argv[0] if argv and argv[0] in COMMANDS else None)  # one command: import only its module
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help (0) or a usage error (2, already printed as one line)
        return int(exc.code or 0)
    if not getattr(args, "_run", None):
        parser.print_help()
        return 2
    interrupted = []

    def on_interrupt(signum, frame):  # remember it: a library may turn the KeyboardInterrupt into another error
        interrupted.append(signum)
        raise KeyboardInterrupt

    previous = signal.signal(signal.SIGINT, on_interrupt)
    try:
        return int(args._run(args))
    except GearcadError as exc:
        if interrupted:
            return _interrupted(args.command)
        print(f"gearcad {args.command}: error: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        return _interrupted(args.command)
    except BrokenPipeError:
        return 0
    except Exception:
        if interrupted:  # e.g. the CAD kernel's import, cut short, reports an ImportError
            return _interrupted(args.command)
        raise
    finally:
        signal.signal(signal.SIGINT, previous)


def _interrupted(command: str) -> int:
    print(f"gearcad {command}: interrupted; nothing was put in place (output folders and files are replaced "
          "only when complete)", file=sys.stderr)
    return 130
