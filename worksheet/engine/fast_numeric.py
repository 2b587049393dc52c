"""A float-and-dimension walk over the parsed tree for the plainest statements.

Most lines of a long sheet are a number with its unit (``x = 1.5 [m]``) or a claim about
names already computed (``check y > 0 [m/s]``). For those the sympy expression is needed
only when someone prints the symbolic form, so it is built lazily (``LazyForm``).

The walk covers only expressions whose double is provably the one the sympy path gives:
a number, a unit, a number times a unit, a sheet name, and their negations. These are
products of at most two doubles, and a product of two doubles does not depend on their
order; longer products and quotients would (sympy reorders and folds factors), so they
take the sympy path. Anything else not covered (an unknown name, an offset unit, a unit
whose factor carries G's uncertainty, a value that is zero, infinite or subnormal, which
the precision guard inspects) also returns None: the caller takes the sympy path, which
gives every error message.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import TYPE_CHECKING

from worksheet.engine.bindings import Origin
from worksheet.engine.figures import Figures, unit_g_power
from worksheet.engine.results import LazyForm
from worksheet.engine.translate import Typed
from worksheet.errors import WorksheetError
from worksheet.syntax import tree as t
from worksheet.units.dimension import Dimension

if TYPE_CHECKING:
    from worksheet.engine.statements import Quantity, StatementEvaluator
    from worksheet.engine.translate import Translator
    from worksheet.units.registry import ResolvedUnit

ENABLED = True
"""Switch the fast path off (tests compare both paths) by setting this to False."""

_DIMENSIONLESS = Dimension()


class _NotCovered(Exception):
    """The expression needs the sympy path."""


def fast_quantity(
    evaluator: StatementEvaluator, tr: Translator, node: t.Expr, names: bool
) -> Quantity | None:
    """The quantity of ``node`` without sympy, or None where the sympy path is needed.

    ``names`` allows sheet names (claims only: a definition's local form must be sympy).
    """
    if not ENABLED:
        return None
    from worksheet.engine.statements import Quantity

    try:
        value, dim, lone = _walk(evaluator, node, names, top=True)
    except (_NotCovered, WorksheetError, OverflowError, ZeroDivisionError):
        return None
    if not (math.isfinite(value) and (abs(value) >= 2.3e-308 or (names and value == 0))):
        return None  # the precision guard looks at these; the sympy path has it
    form = LazyForm(_form_builder(evaluator, node))
    return Quantity(Typed(form, dim), Figures(value), lone)  # type: ignore[arg-type]


def _form_builder(evaluator: StatementEvaluator, node: t.Expr) -> Callable[[], object]:
    return lambda: evaluator.translator().translate(node).expr


def _walk(
    evaluator: StatementEvaluator, node: t.Expr, names: bool, top: bool = False
) -> tuple[float, Dimension, ResolvedUnit | None]:
    """(SI double, dimension, the unit of a lone value written with one)."""
    if isinstance(node, t.Neg):
        value, dim, lone = _walk(evaluator, node.operand, names)
        if isinstance(node.operand, t.Neg) or value == 0:
            raise _NotCovered  # sympy folds these (--x is x, -0 is 0)
        return -value, dim, lone if top else None
    if isinstance(node, t.Number):
        return _number(node), _DIMENSIONLESS, None
    if isinstance(node, t.Unit):
        unit = _unit(evaluator, node)
        return unit.factor, unit.dimension, unit
    if (
        isinstance(node, t.BinOp)
        and node.op == "*"
        and isinstance(node.left, t.Number)
        and isinstance(node.right, t.Unit)
    ):
        unit = _unit(evaluator, node.right)
        return _number(node.left) * unit.factor, _DIMENSIONLESS * unit.dimension, unit
    if names and isinstance(node, t.Name):
        return _name(evaluator, node), evaluator.lookup(node.id).dimension, None  # type: ignore[union-attr]
    raise _NotCovered


def _number(node: t.Number) -> float:
    """The double sympy's Rational gives (``p / q`` by integer true division)."""
    value = node.value
    if value.denominator == 1:
        return float(value.numerator)
    return value.numerator / value.denominator


def _unit(evaluator: StatementEvaluator, node: t.Unit) -> ResolvedUnit:
    unit = evaluator.ctx.registry.resolve(node.unit, node.line, node.column)
    if unit.is_offset or unit_g_power(node.unit.source, evaluator.ctx):
        raise _NotCovered  # offset errors and G-correlated seeds belong to the sympy path
    return unit


def _name(evaluator: StatementEvaluator, node: t.Name) -> float:
    binding = evaluator.lookup(node.id)
    if (
        binding is None
        or binding.origin not in (Origin.GIVEN, Origin.DERIVED)
        or binding.value is None
        or binding.gradient
        or binding.spread is not None
        or evaluator.values.get(binding.symbol) is not binding
    ):
        raise _NotCovered
    return binding.value
