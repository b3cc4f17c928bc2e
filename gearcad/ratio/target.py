"""Targets: a ratio given as a decimal, a fraction or a math expression, kept exact and bounded.

A plain decimal or fraction (``29.530588853``, ``127/20``, ``1.5e-3``) is read
with Python's :mod:`fractions` alone (no sympy: a fast start).  Anything else
is read by a small recursive-descent parser of our own that builds a sympy
expression node by node; no Python ``eval`` is ever run (sympy's own
``sympify``/``parse_expr`` do call ``eval``, so they are not used).

Grammar (``^`` and ``**`` are both powers, right-associative)::

    expr   := term (("+" | "-") term)*
    term   := unary (("*" | "/") unary)*
    unary  := ("+" | "-") unary | power
    power  := atom (("^" | "**") unary)?
    atom   := NUMBER | CONSTANT | FUNCTION "(" expr ("," expr)* ")" | "(" expr ")"

Every input is bounded before work is done on it: the text has at most
``MAX_TEXT`` characters and ``MAX_DEPTH`` levels of nesting, a number's
decimal exponent is at most ``MAX_EXPONENT_DIGITS``-ish in size, every
intermediate value is evaluated alongside in mpmath at a fixed precision and
refused once its magnitude leaves ``10^+-MAX_MAGNITUDE`` (so no power tower
is ever built exactly), and the final value must lie within ``TARGET_RANGE``
(what gear trains express: four stages of 1:10 each way give 1e-4 to 1e4;
1e-9 to 1e9 leaves room for any summing or planetary train).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Any, Callable

from ..errors import InputError

__all__ = ["Target", "parse_target", "ALLOWED_NAMES", "TARGET_RANGE", "MAX_TEXT"]

#: Significant digits of the rational stand-in used for irrational targets.
APPROX_DIGITS = 80
#: Least and greatest target accepted (output turns per input turn).
TARGET_RANGE = (Fraction(1, 10 ** 9), Fraction(10 ** 9))
#: Most characters of a target's text.
MAX_TEXT = 500
#: Most levels of parentheses and nested calls.
MAX_DEPTH = 40
#: Largest |log10| of any intermediate value of an expression.
MAX_MAGNITUDE = 300
#: Largest |decimal exponent| written in a number (``1e400`` is refused before it is built).
MAX_LITERAL_EXPONENT = 330
#: Binary precision of the guarding evaluation (about 120 decimal digits).
_GUARD_BITS = 400

_FUNCTION_NAMES = ("abs", "acos", "asin", "atan", "cbrt", "cos", "cosh", "exp", "ln", "log", "log10", "log2",
                   "root", "sin", "sinh", "sqrt", "tan", "tanh")
#: Names the parser accepts, for error messages and ``--help``.
ALLOWED_NAMES = "numbers, + - * / ^ ( ), constants pi e tau, functions " + " ".join(_FUNCTION_NAMES)

_NUMBER = r"(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
#: Tokens of an expression (compiled by ``re`` on first use: a plain number never needs it).
_TOKEN = r"\s*(?:(" + _NUMBER + r")|(\*\*|[-+*/^(),])|([A-Za-zπ_][A-Za-z0-9_]*))"
_PLAIN = re.compile(r"\s*\+?\s*(" + _NUMBER + r")\s*(?:/\s*(" + _NUMBER + r")\s*)?")
_MAX_EXPONENT = 1000


@dataclass(frozen=True)
class Target:
    """A target ratio (output turns per input turn).

    Attributes
    ----------
    expression : str
        The text as given.
    exact : Fraction or sympy.Expr
        The exact value: a Fraction for a rational target read without sympy,
        else a sympy expression.
    value : float
        The value rounded to a float.
    rational : Fraction or None
        The exact value when it is rational, else None.
    approx : Fraction
        ``rational``, or an ``APPROX_DIGITS``-digit rational stand-in for an
        irrational target; every ranking compares against it exactly.
    """

    expression: str
    exact: Any = field(compare=False)
    value: float
    rational: Fraction | None
    approx: Fraction

    def digits(self, count: int = 17) -> str:
        """The value with ``count`` significant digits."""
        if self.rational is not None:
            return significant(self.rational, count)
        import sympy

        return str(sympy.N(self.exact, count))


def significant(value: Fraction, count: int) -> str:
    """A positive rational written with ``count`` significant digits (half to even), no exponent."""
    exponent = math.floor(math.log10(value.numerator) - math.log10(value.denominator))
    for e in (exponent - 1, exponent, exponent + 1):  # settle the float estimate exactly
        if Fraction(10) ** e <= value < Fraction(10) ** (e + 1):
            exponent = e
            break
    scaled = round(value * Fraction(10) ** (count - 1 - exponent))
    if scaled >= 10 ** count:  # rounding carried into a new digit
        exponent += 1
        scaled = round(value * Fraction(10) ** (count - 1 - exponent))
    digits = str(scaled)
    point = exponent + 1
    if point <= 0:
        return "0." + "0" * -point + digits
    if point >= len(digits):
        return digits + "0" * (point - len(digits))
    return digits[:point] + "." + digits[point:]


def _refuse(text: str, what: str) -> InputError:
    return InputError(f"target {_shown(text)} {what}")


def _shown(text: str) -> str:
    return repr(text if len(text) <= 60 else text[:57] + "...")


def _number(token: str, text: str) -> Fraction:
    """A decimal literal, exactly, its exponent bounded before it is applied."""
    mantissa, _, exponent = token.lower().partition("e")
    if exponent and abs(int(exponent)) > MAX_LITERAL_EXPONENT:
        raise _refuse(text, f"holds the number {token[:20]!r}, whose exponent is beyond +-{MAX_LITERAL_EXPONENT}; "
                            f"allowed: targets from {float(TARGET_RANGE[0]):g} to {float(TARGET_RANGE[1]):g}")
    return Fraction(token)


def _in_range(text: str, value: Fraction | float) -> None:
    low, high = TARGET_RANGE
    if not value > 0:
        raise _refuse(text, f"= {float(value):.6g} must be greater than 0")
    if not low <= value <= high:
        raise _refuse(text, f"= {float(value):.6g} is outside what gear trains express; allowed: targets from "
                            f"{float(low):g} to {float(high):g} (output turns per input turn)")


def _plain(text: str) -> Target | None:
    """A decimal or a fraction of two decimals, read without sympy; None for anything else."""
    match = _PLAIN.fullmatch(text)
    if match is None:
        return None
    value = _number(match.group(1), text)
    if match.group(2) is not None:
        divisor = _number(match.group(2), text)
        if divisor == 0:
            raise _refuse(text, f"cannot be read: it divides by zero; allowed: {ALLOWED_NAMES}")
        value /= divisor
    _in_range(text, value)
    return Target(text.strip(), value, float(value), value, value)


# --- expressions (sympy) ------------------------------------------------------------------------------------

def _tables() -> tuple[dict[str, Any], dict[str, tuple[Callable[..., Any], Callable[..., Any], int]]]:
    """Constants and functions: (sympy builder, mpmath guard, arity)."""
    import mpmath
    import sympy

    constants = {"pi": (sympy.pi, mpmath.pi), "π": (sympy.pi, mpmath.pi), "tau": (2 * sympy.pi, 2 * mpmath.pi),
                 "e": (sympy.E, mpmath.e), "E": (sympy.E, mpmath.e)}
    functions = {
        "sqrt": (sympy.sqrt, mpmath.sqrt, 1),
        "cbrt": (lambda x: sympy.root(x, 3), lambda x: mpmath.root(x, 3), 1),
        "root": (sympy.root, mpmath.root, 2),
        "exp": (sympy.exp, mpmath.exp, 1),
        "ln": (sympy.log, mpmath.log, 1),
        "log": (sympy.log, mpmath.log, 1),
        "log10": (lambda x: sympy.log(x, 10), lambda x: mpmath.log(x, 10), 1),
        "log2": (lambda x: sympy.log(x, 2), lambda x: mpmath.log(x, 2), 1),
        "sin": (sympy.sin, mpmath.sin, 1), "cos": (sympy.cos, mpmath.cos, 1), "tan": (sympy.tan, mpmath.tan, 1),
        "asin": (sympy.asin, mpmath.asin, 1), "acos": (sympy.acos, mpmath.acos, 1),
        "atan": (sympy.atan, mpmath.atan, 1),
        "sinh": (sympy.sinh, mpmath.sinh, 1), "cosh": (sympy.cosh, mpmath.cosh, 1),
        "tanh": (sympy.tanh, mpmath.tanh, 1),
        "abs": (sympy.Abs, abs, 1),
    }
    return constants, functions


def _tokens(text: str) -> list[str]:
    tokens, pos = [], 0
    stripped = text.rstrip()
    while pos < len(stripped):
        match = re.compile(_TOKEN).match(stripped, pos)
        if not match:
            raise InputError(f"target {_shown(text)} cannot be read at {stripped[pos:pos + 10]!r}; allowed: {ALLOWED_NAMES}")
        tokens.append(next(g for g in match.groups() if g is not None))
        pos = match.end()
    return tokens


@dataclass(frozen=True)
class _Node:
    """A parsed value: the exact sympy expression and its guarding mpmath value."""

    expr: Any
    guard: Any


class _Parser:
    """Recursive-descent parser over the token list; builds sympy nodes, each guarded in magnitude."""

    def __init__(self, text: str) -> None:
        import mpmath
        import sympy

        self.sympy, self.mpmath = sympy, mpmath
        self.constants, self.functions = _tables()
        self.text = text
        self.tokens = _tokens(text)
        self.pos = 0
        self.depth = 0

    def fail(self, what: str) -> InputError:
        return InputError(f"target {_shown(self.text)} cannot be read: {what}; allowed: {ALLOWED_NAMES}")

    def peek(self) -> str | None:
        return self.tokens[self.pos] if self.pos < len(self.tokens) else None

    def take(self) -> str:
        token = self.peek()
        if token is None:
            raise self.fail("it ends too early")
        self.pos += 1
        return token

    def expect(self, token: str) -> None:
        if self.take() != token:
            raise self.fail(f"expected {token!r}")

    def checked(self, expr: Any, guard: Any) -> _Node:
        """The node, once its guarding value is finite and within 10^+-MAX_MAGNITUDE (or 0)."""
        mp = self.mpmath
        size = abs(guard)
        if not mp.isfinite(size):
            raise InputError(f"target {_shown(self.text)} is not a finite number; allowed: a finite real ratio "
                             f"from {float(TARGET_RANGE[0]):g} to {float(TARGET_RANGE[1]):g}")
        if size != 0 and abs(mp.log10(size)) > MAX_MAGNITUDE:
            raise InputError(f"target {_shown(self.text)} has a part of about 10^{int(mp.log10(size))}, beyond "
                             f"10^+-{MAX_MAGNITUDE}; allowed: targets from {float(TARGET_RANGE[0]):g} to "
                             f"{float(TARGET_RANGE[1]):g} and parts within 10^+-{MAX_MAGNITUDE}")
        return _Node(expr, guard)

    def guarded(self, compute: Callable[[], Any]) -> Any:
        with self.mpmath.workprec(_GUARD_BITS):
            try:
                return compute()
            except (ValueError, ZeroDivisionError, OverflowError) as exc:
                raise InputError(f"target {_shown(self.text)} has no numeric value ({exc}); allowed: a finite "
                                 "real ratio greater than 0") from None

    def parse(self) -> _Node:
        if not self.tokens:
            raise self.fail("it is empty")
        node = self.expr()
        if self.peek() is not None:
            raise self.fail(f"unexpected {self.peek()!r}")
        return node

    def expr(self) -> _Node:
        node = self.term()
        while self.peek() in ("+", "-"):
            op, right = self.take(), self.term()
            if op == "+":
                node = self.checked(node.expr + right.expr, self.guarded(lambda: node.guard + right.guard))
            else:
                node = self.checked(node.expr - right.expr, self.guarded(lambda: node.guard - right.guard))
        return node

    def term(self) -> _Node:
        node = self.unary()
        while self.peek() in ("*", "/"):
            op = self.take()
            right = self.unary()
            if op == "/" and right.expr == 0:
                raise self.fail("it divides by zero")
            if op == "*":
                node = self.checked(node.expr * right.expr, self.guarded(lambda: node.guard * right.guard))
            else:
                node = self.checked(node.expr / right.expr, self.guarded(lambda: node.guard / right.guard))
        return node

    def unary(self) -> _Node:
        if self.peek() in ("+", "-"):
            sign = self.take()
            node = self.nested(self.unary)
            return node if sign == "+" else _Node(-node.expr, -node.guard)
        return self.power()

    def nested(self, parse: Callable[[], _Node]) -> _Node:
        self.depth += 1
        if self.depth > MAX_DEPTH:
            raise self.fail(f"it nests deeper than {MAX_DEPTH} levels")
        try:
            return parse()
        finally:
            self.depth -= 1

    def power(self) -> _Node:
        base = self.atom()
        if self.peek() in ("^", "**"):
            self.take()
            exponent = self.nested(self.unary)
            size = abs(exponent.guard)
            if size > _MAX_EXPONENT:
                raise self.fail(f"exponent {self.mpmath.nstr(exponent.guard, 6)} is larger than {_MAX_EXPONENT} in size")
            if base.guard == 0 and self.mpmath.re(exponent.guard) <= 0:
                raise self.fail("it divides by zero")
            guard = self.guarded(lambda: self.mpmath.power(base.guard, exponent.guard))
            node = self.checked(None, guard)
            return _Node(base.expr ** exponent.expr, node.guard)
        return base

    def atom(self) -> _Node:
        token = self.take()
        if token == "(":
            node = self.nested(self.expr)
            self.expect(")")
            return node
        if token[0].isdigit() or token[0] == ".":
            exact = _number(token, self.text)
            guard = self.guarded(lambda: self.mpmath.mpf(exact.numerator) / exact.denominator)
            return self.checked(self.sympy.Rational(exact.numerator, exact.denominator), guard)
        if token in self.constants:
            expr, guard = self.constants[token]
            return _Node(expr, self.guarded(lambda: +guard))
        if token in self.functions:
            return self.nested(lambda: self.call(token))
        raise self.fail(f"unknown name or symbol {token!r}")

    def call(self, name: str) -> _Node:
        build, guard, arity = self.functions[name]
        self.expect("(")
        args = [self.expr()]
        while self.peek() == ",":
            self.take()
            args.append(self.expr())
        self.expect(")")
        if len(args) != arity:
            raise self.fail(f"{name}() takes {arity} argument(s), got {len(args)}")
        value = self.guarded(lambda: guard(*[a.guard for a in args]))
        node = self.checked(None, value)
        return _Node(build(*[a.expr for a in args]), node.guard)


def _check_value(text: str, node: _Node) -> Any:
    import sympy

    expr = node.expr
    if expr.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo):
        raise InputError(f"target {_shown(text)} is not a finite number; allowed: a finite real ratio greater than 0")
    try:
        value = sympy.N(expr, APPROX_DIGITS + 10, maxn=400)
    except (TypeError, ValueError, ArithmeticError) as exc:
        raise InputError(f"target {_shown(text)} has no numeric value ({exc})") from None
    if value.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo) or not value.is_number:
        raise InputError(f"target {_shown(text)} is not a finite number; allowed: a finite real ratio greater than 0")
    real, imag = value.as_real_imag()
    if imag != 0 and abs(imag) > abs(real) * sympy.Float(10) ** (-APPROX_DIGITS):
        raise InputError(f"target {_shown(text)} is not a real number (it evaluates to {sympy.N(value, 6)}); "
                         "allowed: a real ratio greater than 0")
    if not real > 0:
        raise InputError(f"target {_shown(text)} = {sympy.N(real, 6)} must be greater than 0")
    return real


def _fraction_of(real: Any) -> Fraction:
    """The exact rational value of ``real`` rounded to APPROX_DIGITS significant digits."""
    import sympy

    rational = sympy.Rational(sympy.Float(real, APPROX_DIGITS))
    return Fraction(int(rational.p), int(rational.q))


def parse_target(text: str) -> Target:
    """Parse a target ratio safely, exactly and within bounded time.

    Parameters
    ----------
    text : str
        A decimal (``29.530588853``), a fraction (``127/20``) or an expression
        (``2*pi``, ``25.4/(8*pi)``, ``sqrt(2)``); at most ``MAX_TEXT``
        characters.

    Returns
    -------
    Target
        Its value lies within ``TARGET_RANGE``.

    Raises
    ------
    InputError
        Unreadable, too long, nested too deep, not real, not finite, not
        greater than 0, or outside ``TARGET_RANGE`` (also for any part of
        an expression beyond ``10^+-MAX_MAGNITUDE``).
    """
    if not isinstance(text, str):
        text = str(text)
    if len(text) > MAX_TEXT:
        raise _refuse(text, f"has {len(text)} characters; allowed: at most {MAX_TEXT}")
    plain = _plain(text)
    if plain is not None:
        return plain
    node = _Parser(text).parse()
    real = _check_value(text, node)
    expr = node.expr
    rational = Fraction(int(expr.p), int(expr.q)) if expr.is_Rational else None
    approx = rational if rational is not None else _fraction_of(real)
    _in_range(text, approx)
    return Target(text.strip(), expr, float(approx), rational, approx)
