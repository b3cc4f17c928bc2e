"""Targets: a ratio given as a decimal, a fraction or a math expression, kept exact.

The text is read by a small recursive-descent parser of our own that builds a
sympy expression node by node; no Python ``eval`` is ever run (sympy's own
``sympify``/``parse_expr`` do call ``eval``, so they are not used).

Grammar (``^`` and ``**`` are both powers, right-associative)::

    expr   := term (("+" | "-") term)*
    term   := unary (("*" | "/") unary)*
    unary  := ("+" | "-") unary | power
    power  := atom (("^" | "**") unary)?
    atom   := NUMBER | CONSTANT | FUNCTION "(" expr ("," expr)* ")" | "(" expr ")"

Numbers such as ``29.530588853`` or ``1.5e-3`` become exact rationals.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Callable

import sympy

from ..errors import InputError

__all__ = ["Target", "parse_target", "ALLOWED_NAMES"]

#: Significant digits of the rational stand-in used for irrational targets.
APPROX_DIGITS = 80

_CONSTANTS: dict[str, sympy.Expr] = {
    "pi": sympy.pi, "π": sympy.pi, "tau": 2 * sympy.pi, "e": sympy.E, "E": sympy.E,
}

_FUNCTIONS: dict[str, tuple[Callable[..., sympy.Expr], int]] = {
    "sqrt": (sympy.sqrt, 1),
    "cbrt": (lambda x: sympy.root(x, 3), 1),
    "root": (sympy.root, 2),
    "exp": (sympy.exp, 1),
    "ln": (sympy.log, 1),
    "log": (sympy.log, 1),
    "log10": (lambda x: sympy.log(x, 10), 1),
    "log2": (lambda x: sympy.log(x, 2), 1),
    "sin": (sympy.sin, 1), "cos": (sympy.cos, 1), "tan": (sympy.tan, 1),
    "asin": (sympy.asin, 1), "acos": (sympy.acos, 1), "atan": (sympy.atan, 1),
    "sinh": (sympy.sinh, 1), "cosh": (sympy.cosh, 1), "tanh": (sympy.tanh, 1),
    "abs": (sympy.Abs, 1),
}

#: Names the parser accepts, for error messages and ``--help``.
ALLOWED_NAMES = "numbers, + - * / ^ ( ), constants pi e tau, functions " + " ".join(sorted(_FUNCTIONS))

_TOKEN = re.compile(r"\s*(?:(\d+\.?\d*(?:[eE][+-]?\d+)?|\.\d+(?:[eE][+-]?\d+)?)|(\*\*|[-+*/^(),])|([A-Za-zπ_][A-Za-z0-9_]*))")
_MAX_EXPONENT = 1000


@dataclass(frozen=True)
class Target:
    """A target ratio (output turns per input turn).

    Attributes
    ----------
    expression : str
        The text as given.
    exact : sympy.Expr
        The exact value.
    value : float
        The value rounded to a float.
    rational : Fraction or None
        The exact value when it is rational, else None.
    approx : Fraction
        ``rational``, or an ``APPROX_DIGITS``-digit rational stand-in for an
        irrational target; every ranking compares against it exactly.
    """

    expression: str
    exact: sympy.Expr = field(compare=False)
    value: float
    rational: Fraction | None
    approx: Fraction

    def digits(self, count: int = 17) -> str:
        """The value with ``count`` significant digits."""
        return str(sympy.N(self.exact, count))


def _tokens(text: str) -> list[str]:
    tokens, pos = [], 0
    stripped = text.rstrip()
    while pos < len(stripped):
        match = _TOKEN.match(stripped, pos)
        if not match:
            raise InputError(f"target {text!r} cannot be read at {stripped[pos:pos + 10]!r}; allowed: {ALLOWED_NAMES}")
        tokens.append(next(g for g in match.groups() if g is not None))
        pos = match.end()
    return tokens


class _Parser:
    """Recursive-descent parser over the token list; builds sympy nodes."""

    def __init__(self, text: str) -> None:
        self.text = text
        self.tokens = _tokens(text)
        self.pos = 0

    def fail(self, what: str) -> InputError:
        return InputError(f"target {self.text!r} cannot be read: {what}; allowed: {ALLOWED_NAMES}")

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

    def parse(self) -> sympy.Expr:
        if not self.tokens:
            raise self.fail("it is empty")
        node = self.expr()
        if self.peek() is not None:
            raise self.fail(f"unexpected {self.peek()!r}")
        return node

    def expr(self) -> sympy.Expr:
        node = self.term()
        while self.peek() in ("+", "-"):
            node = node + self.term() if self.take() == "+" else node - self.term()
        return node

    def term(self) -> sympy.Expr:
        node = self.unary()
        while self.peek() in ("*", "/"):
            op = self.take()
            right = self.unary()
            if op == "/" and right == 0:
                raise self.fail("it divides by zero")
            node = node * right if op == "*" else node / right
        return node

    def unary(self) -> sympy.Expr:
        if self.peek() in ("+", "-"):
            return self.unary() if self.take() == "+" else -self.unary()
        return self.power()

    def power(self) -> sympy.Expr:
        base = self.atom()
        if self.peek() in ("^", "**"):
            self.take()
            exponent = self.unary()
            if exponent.is_number and abs(sympy.N(exponent, 15)) > _MAX_EXPONENT:
                raise self.fail(f"exponent {exponent} is larger than {_MAX_EXPONENT} in size")
            return base ** exponent
        return base

    def atom(self) -> sympy.Expr:
        token = self.take()
        if token == "(":
            node = self.expr()
            self.expect(")")
            return node
        if token[0].isdigit() or token[0] == ".":
            exact = Fraction(token)
            return sympy.Rational(exact.numerator, exact.denominator)
        if token in _CONSTANTS:
            return _CONSTANTS[token]
        if token in _FUNCTIONS:
            return self.call(token)
        raise self.fail(f"unknown name or symbol {token!r}")

    def call(self, name: str) -> sympy.Expr:
        function, arity = _FUNCTIONS[name]
        self.expect("(")
        args = [self.expr()]
        while self.peek() == ",":
            self.take()
            args.append(self.expr())
        self.expect(")")
        if len(args) != arity:
            raise self.fail(f"{name}() takes {arity} argument(s), got {len(args)}")
        return function(*args)


def _check_value(text: str, expr: sympy.Expr) -> sympy.Float:
    try:
        value = sympy.N(expr, APPROX_DIGITS + 10)
    except (TypeError, ValueError, ArithmeticError) as exc:
        raise InputError(f"target {text!r} has no numeric value ({exc})") from None
    if value.has(sympy.zoo, sympy.nan, sympy.oo, -sympy.oo) or not value.is_number:
        raise InputError(f"target {text!r} is not a finite number; allowed: a finite real ratio greater than 0")
    real, imag = value.as_real_imag()
    if imag != 0 and abs(imag) > abs(real) * sympy.Float(10) ** (-APPROX_DIGITS):
        raise InputError(f"target {text!r} is not a real number (it evaluates to {sympy.N(value, 6)}); allowed: a real ratio greater than 0")
    if not real > 0:
        raise InputError(f"target {text!r} = {sympy.N(real, 6)} must be greater than 0")
    return real


def _fraction_of(real: sympy.Float) -> Fraction:
    """The exact rational value of ``real`` rounded to APPROX_DIGITS significant digits."""
    rational = sympy.Rational(sympy.Float(real, APPROX_DIGITS))
    return Fraction(int(rational.p), int(rational.q))


def parse_target(text: str) -> Target:
    """Parse a target ratio safely and exactly.

    Parameters
    ----------
    text : str
        A decimal (``29.530588853``), a fraction (``127/20``) or an expression
        (``2*pi``, ``25.4/(8*pi)``, ``sqrt(2)``).

    Returns
    -------
    Target

    Raises
    ------
    InputError
        Unreadable, not real, not finite or not greater than 0.
    """
    if not isinstance(text, str):
        text = str(text)
    expr = _Parser(text).parse()
    real = _check_value(text, expr)
    rational = Fraction(int(expr.p), int(expr.q)) if expr.is_Rational else None
    approx = rational if rational is not None else _fraction_of(real)
    return Target(text.strip(), expr, float(approx), rational, approx)
