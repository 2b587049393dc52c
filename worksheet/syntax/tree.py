"""The expression and statement tree the parser builds: plain frozen data with positions."""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction


@dataclass(frozen=True)
class Node:
    line: int = field(compare=False, kw_only=True)
    column: int = field(compare=False, kw_only=True)
    text: str = field(compare=False, kw_only=True, default="")
    """The source text the node was parsed from (for messages)."""


@dataclass(frozen=True)
class Number(Node):
    value: Fraction  # exact: '1.5e-3' is 3/2000
    literal: str


@dataclass(frozen=True)
class Name(Node):
    id: str


@dataclass(frozen=True)
class UnitExpr:
    """A unit inside brackets: a product of named units to rational powers, times a factor."""

    factors: tuple[tuple[str, Fraction], ...]  # (unit name, power), in written order
    scale: Fraction = Fraction(1)
    source: str = ""


@dataclass(frozen=True)
class Unit(Node):
    unit: UnitExpr


@dataclass(frozen=True)
class BinOp(Node):
    op: str  # '+', '-', '*', '/'
    left: Expr
    right: Expr


@dataclass(frozen=True)
class Neg(Node):
    operand: Expr


@dataclass(frozen=True)
class Power(Node):
    base: Expr
    exponent: Expr


@dataclass(frozen=True)
class Call(Node):
    func: str
    args: tuple[Expr, ...]


@dataclass(frozen=True)
class Equation(Node):
    """``L == R`` inside a call, as in ``solve(L == R, x)``."""

    left: Expr
    right: Expr


Expr = Number | Name | Unit | BinOp | Neg | Power | Call | Equation


# --- quick constructors ---------------------------------------------------------------------
# A frozen dataclass's __init__ sets each field through object.__setattr__, about a
# microsecond a node; a line has a dozen or more nodes. The parser builds its nodes with
# these instead, which fill the same fields (defaults included) into a fresh instance:
# the nodes are equal, hash alike and stay frozen.

_new = object.__new__


def binop(op: str, left: Expr, right: Expr, line: int, column: int) -> BinOp:
    node = _new(BinOp)
    node.__dict__.update(op=op, left=left, right=right, line=line, column=column, text="")
    return node


def name(id: str, line: int, column: int) -> Name:
    node = _new(Name)
    node.__dict__.update(id=id, line=line, column=column, text="")
    return node


def number(value: Fraction, literal: str, line: int, column: int) -> Number:
    node = _new(Number)
    node.__dict__.update(value=value, literal=literal, line=line, column=column, text="")
    return node


def power(base: Expr, exponent: Expr, line: int, column: int) -> Power:
    node = _new(Power)
    node.__dict__.update(base=base, exponent=exponent, line=line, column=column, text="")
    return node


def unit(unit: UnitExpr, line: int, column: int) -> Unit:
    node = _new(Unit)
    node.__dict__.update(unit=unit, line=line, column=column, text="")
    return node


# --- statements ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Conversion:
    """``in [UNIT]`` or ``in natural [UNIT]`` after an expression."""

    unit: UnitExpr
    natural: bool
    line: int
    column: int
    planck: bool = False  # 'in planck': G = hbar = c = k_B = 1, no unit


@dataclass(frozen=True)
class Uncertainty:
    """``+- 20%`` (relative) or ``+- 1e11 [kg]`` (absolute)."""

    relative: Fraction | None
    absolute: Expr | None


@dataclass(frozen=True)
class Ranged:
    """A ranged input: ``a .. b log`` / ``a .. b lin``, or ``x within factor F``.

    For a range the definition's expression is the low end and ``high`` the other end; for
    ``factor`` the expression is the median and ``factor`` the 68% factor (log-normal).
    """

    shape: str  # 'log', 'lin' or 'factor'
    high: Expr | None = None
    factor: Fraction | None = None
    line: int = 0
    column: int = 0


@dataclass(frozen=True)
class Statement:
    line: int
    column: int
    source: str  # the statement text without its comment, stripped


@dataclass(frozen=True)
class Definition(Statement):
    name: str
    expr: Expr
    conversion: Conversion | None
    uncertainty: Uncertainty | None
    ranged: Ranged | None = None


@dataclass(frozen=True)
class Relation(Statement):
    name: str
    params: tuple[str, ...]
    expr: Expr


@dataclass(frozen=True)
class Declaration(Statement):
    name: str
    unit: UnitExpr


@dataclass(frozen=True)
class Display(Statement):
    expr: Expr
    conversion: Conversion | None


@dataclass(frozen=True)
class Check(Statement):
    op: str  # '==', '<', '<=', '>', '>=', '~'
    left: Expr
    right: Expr
    tolerance: Fraction | None  # relative, from 'within 2%' or 'within 1e-6'
    absolute_tolerance: Expr | None  # from 'within 3 [m]'
    fraction: Fraction | None = None  # from 'in 95%': a claim over the samples


@dataclass(frozen=True)
class Scaling(Statement):
    target: str
    unit: UnitExpr | None
    around: tuple[tuple[str, Expr], ...]


@dataclass(frozen=True)
class Sweep:
    name: str
    values: tuple[Expr, ...]  # an explicit list, or the two ends of a range
    spacing: str | None  # 'log', 'lin' or None for a list
    count: int


@dataclass(frozen=True)
class Table(Statement):
    sweep: Sweep
    columns: tuple[tuple[str, UnitExpr | None], ...]


@dataclass(frozen=True)
class Plot(Statement):
    """Quantities against a swept given; ``y_scale`` None means chosen from the data."""

    sweep: Sweep
    columns: tuple[tuple[str, UnitExpr | None], ...]
    y_scale: str | None


@dataclass(frozen=True)
class Estimate(Statement):
    name: str
    unit: UnitExpr
    inputs: tuple[str, ...]


@dataclass(frozen=True)
class Variance(Statement):
    """``variance N``: each sampled input's share of N's variance."""

    target: str


@dataclass(frozen=True)
class Histogram(Statement):
    """``histogram N in [U]``: the distribution of a sampled quantity."""

    target: str
    unit: UnitExpr | None


@dataclass(frozen=True)
class Use(Statement):
    """``use "other.sheet.md"`` or ``use A, B from library "blackhole"``: names of another
    sheet brought into this one (``names`` empty: all of them)."""

    names: tuple[str, ...]
    path: str
    library: bool


@dataclass(frozen=True)
class Blank(Statement):
    """A comment-only or empty line: records nothing."""


AnyStatement = (
    Definition
    | Relation
    | Declaration
    | Display
    | Check
    | Scaling
    | Table
    | Plot
    | Estimate
    | Variance
    | Histogram
    | Use
    | Blank
)


def walk(node: Expr):
    """Every node of an expression, parents before children."""
    stack: list[Expr] = [node]
    while stack:
        current = stack.pop()
        yield current
        if isinstance(current, BinOp | Equation):
            stack.extend((current.right, current.left))
        elif isinstance(current, Neg):
            stack.append(current.operand)
        elif isinstance(current, Power):
            stack.extend((current.exponent, current.base))
        elif isinstance(current, Call):
            stack.extend(reversed(current.args))


def lone_unit_value(node: Expr) -> tuple[Fraction, Unit] | None:
    """``25 [degC]``, ``-3 [km]`` or ``[kg]``: a number written with its unit and nothing else."""
    sign = 1
    if isinstance(node, Neg):
        sign, node = -1, node.operand
    if isinstance(node, Unit):
        return Fraction(sign), node
    if (
        isinstance(node, BinOp)
        and node.op == "*"
        and isinstance(node.left, Number)
        and isinstance(node.right, Unit)
    ):
        return node.left.value * sign, node.right
    return None
