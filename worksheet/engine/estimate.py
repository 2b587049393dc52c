"""Dimensional-analysis estimates: which product of powers of the inputs has the target dimension.

Pure exact linear algebra over ``Fraction`` (no floats, no sympy): the dimension matrix has
one column per input and one row per SI base dimension, and the exponents solve
``matrix @ exponents == target``.

Canonical choices, so that the same inputs in any order give the same answer (only the
order of the exponents follows the inputs):

* **Free dimensionless groups** are a basis of the null space made of *circuits*
  (groups that involve a minimal set of inputs), chosen greedily by the group key
  ``(number of inputs involved, sum of |exponents|, largest |exponent|, exponents by name)``,
  "by name" meaning in the code-point order of the input names. Each group is in lowest
  integer powers (gcd 1) with its sign fixed so that its exponents sum to a positive number
  (more in the numerator), ties broken by making the exponent of the first name in
  code-point order positive. Groups are listed in the order of the same key.
* **A particular solution** when the powers are not unique is the basic solution (one that
  uses only as many inputs as the matrix has rank) with the smallest key
  ``(largest denominator, sum of |exponents|, number of inputs, exponents by name)``:
  integer powers first, then the smallest ones. It is one member of the family, not a
  guess at the physics; the free groups say what is left open.
"""

from __future__ import annotations

from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from enum import StrEnum
from fractions import Fraction
from itertools import combinations
from math import comb, gcd, lcm
from typing import TypeVar

from worksheet.errors import EvaluationError, NameResolutionError
from worksheet.units.dimension import BASE_NAMES, Dimension

# Beyond this many column subsets the exhaustive searches give way to a plain echelon basis.
SUBSET_LIMIT = 5_000

Matrix = list[list[Fraction]]
T = TypeVar("T", Fraction, int)


class Outcome(StrEnum):
    """How the dimensional analysis came out."""

    UNIQUE = "unique"
    NOT_UNIQUE = "not unique"
    UNREACHABLE = "unreachable"


@dataclass(frozen=True)
class EstimateSolution:
    """The result of ``solve_exponents``; exponents and groups follow the order of ``names``.

    ``exponents`` is the unique solution, or one particular solution when the powers are not
    unique, or ``None`` when the target cannot be reached. ``groups`` are the free
    dimensionless groups (empty when unique). ``unreachable`` names the base dimensions
    that block the target and ``reason`` says why, for the sheet's message.
    """

    outcome: Outcome
    names: tuple[str, ...]
    exponents: tuple[Fraction, ...] | None
    groups: tuple[tuple[int, ...], ...] = ()
    unreachable: tuple[str, ...] = ()
    reason: str = ""

    @property
    def unique(self) -> bool:
        return self.outcome is Outcome.UNIQUE

    def monomial(self) -> str | None:
        """The solution in the sheet's notation, ``None`` when there is none."""
        if self.exponents is None:
            return None
        return format_monomial(self.names, self.exponents)

    def group_texts(self) -> tuple[str, ...]:
        """Each free group in the sheet's notation, e.g. ``G*M^2/(hbar*c)``."""
        return tuple(format_monomial(self.names, group) for group in self.groups)


def solve_exponents(target: Dimension, inputs: Sequence[tuple[str, Dimension]]) -> EstimateSolution:
    """Find the powers of the inputs whose product has the target dimension.

    >>> L, T = Dimension.of(length=1), Dimension.of(time=1)
    >>> found = solve_exponents(L, [("c", L / T), ("t", T)])
    >>> found.outcome.value, found.monomial()
    ('unique', 'c*t')
    """
    names = tuple(name for name, _ in inputs)
    repeated = sorted({name for name in names if names.count(name) > 1})
    if repeated:
        raise NameResolutionError(f"estimate names {', '.join(repeated)} more than once")
    # Work in code-point order of the names so that the input order cannot matter.
    order = sorted(range(len(names)), key=lambda i: names[i])
    sorted_names = [names[i] for i in order]
    columns = [inputs[i][1].exponents for i in order]
    matrix: Matrix = [[col[row] for col in columns] for row in range(len(BASE_NAMES))]
    rank = _rank(matrix)
    groups_sorted = _groups(matrix, rank, sorted_names)
    groups = tuple(_unsort(group, order) for group in groups_sorted)

    rhs = list(target.exponents)
    augmented = [[*row, value] for row, value in zip(matrix, rhs, strict=True)]
    if _rank(augmented) > rank:
        blocked, reason = _explain_unreachable(matrix, rhs, names)
        return EstimateSolution(Outcome.UNREACHABLE, names, None, groups, blocked, reason)
    particular = _particular(matrix, rhs, rank, sorted_names)
    exponents = _unsort(particular, order)
    outcome = Outcome.UNIQUE if not groups else Outcome.NOT_UNIQUE
    return EstimateSolution(outcome, names, exponents, groups)


def format_monomial(names: Sequence[str], exponents: Sequence[Fraction | int]) -> str:
    """The product of ``name^exponent`` in the sheet's notation, names in the given order.

    Integer powers are written as a fraction of products; when some exponent is not an
    integer, the common denominator ``q`` of all exponents is taken out as one outer
    power ``(...)^(1/q)``. Zero exponents are left out; no factor at all is ``1``.

    >>> format_monomial(["hbar", "c", "k_B", "r_s"], [1, 1, -1, -1])
    'hbar*c/(k_B*r_s)'
    >>> format_monomial(["hbar", "c", "d"], [1, 1, -4])
    'hbar*c/d^4'
    >>> half = Fraction(1, 2)
    >>> format_monomial(["hbar", "c", "G", "k_B"], [half, 5 * half, -half, -1])
    '(hbar*c^5/(G*k_B^2))^(1/2)'
    >>> format_monomial(["G", "M"], [-3 * half, 0])
    '1/G^(3/2)'
    """
    powers = [Fraction(p) for p in exponents]
    if len(powers) != len(names):
        raise EvaluationError("format_monomial needs one exponent per name")
    root = lcm(*(p.denominator for p in powers)) if powers else 1
    whole = [int(p * root) for p in powers]
    top = [_factor(n, p) for n, p in zip(names, whole, strict=True) if p > 0]
    bottom = [_factor(n, -p) for n, p in zip(names, whole, strict=True) if p < 0]
    text = "*".join(top) if top else "1"
    if bottom:
        below = bottom[0] if len(bottom) == 1 else "(" + "*".join(bottom) + ")"
        text = f"{text}/{below}"
    if root == 1:
        return text
    if len(top) + len(bottom) == 1:
        # One factor: its own rational power, no outer root.
        name, power = next((n, p) for n, p in zip(names, powers, strict=True) if p)
        single = f"{name}^({abs(power.numerator)}/{power.denominator})"
        return single if power > 0 else f"1/{single}"
    return f"({text})^(1/{root})"


def _factor(name: str, power: int) -> str:
    return name if power == 1 else f"{name}^{power}"


def _unsort(values: Sequence[T], order: Sequence[int]) -> tuple[T, ...]:
    """Put values computed in name order back into input order."""
    result: list[T] = list(values)
    for position, index in enumerate(order):
        result[index] = values[position]
    return tuple(result)


# --- exact linear algebra -------------------------------------------------------------


def _rref(matrix: Matrix) -> tuple[Matrix, list[int]]:
    """Reduced row echelon form and the pivot columns, on a copy."""
    rows = [list(row) for row in matrix]
    pivots: list[int] = []
    ncols = len(rows[0]) if rows else 0
    r = 0
    for c in range(ncols):
        pick = next((i for i in range(r, len(rows)) if rows[i][c] != 0), None)
        if pick is None:
            continue
        rows[r], rows[pick] = rows[pick], rows[r]
        lead = rows[r][c]
        rows[r] = [value / lead for value in rows[r]]
        for i in range(len(rows)):
            if i != r and rows[i][c] != 0:
                factor = rows[i][c]
                rows[i] = [a - factor * b for a, b in zip(rows[i], rows[r], strict=True)]
        pivots.append(c)
        r += 1
        if r == len(rows):
            break
    return rows, pivots


def _rank(matrix: Matrix) -> int:
    return len(_rref(matrix)[1])


def _nullspace(matrix: Matrix, ncols: int) -> list[list[Fraction]]:
    """A basis of ``{x : matrix @ x == 0}``, one vector per free column."""
    rows, pivots = _rref(matrix) if ncols else ([], [])
    basis = []
    for free in (c for c in range(ncols) if c not in pivots):
        vector = [Fraction(0)] * ncols
        vector[free] = Fraction(1)
        for row, pivot in zip(rows, pivots, strict=False):
            vector[pivot] = -row[free]
        basis.append(vector)
    return basis


def _columns(matrix: Matrix, chosen: Sequence[int]) -> Matrix:
    return [[row[c] for c in chosen] for row in matrix]


def _primitive(vector: Sequence[Fraction]) -> tuple[int, ...]:
    """The integer multiple in lowest terms (gcd 1), sign not yet fixed."""
    scale = lcm(*(v.denominator for v in vector))
    whole = [int(v * scale) for v in vector]
    divisor = gcd(*whole) or 1
    return tuple(w // divisor for w in whole)


def _orient(group: tuple[int, ...]) -> tuple[int, ...]:
    """Sign convention: exponents sum positive, else the first (by name) nonzero positive."""
    total = sum(group)
    first = next((g for g in group if g), 0)
    if total < 0 or (total == 0 and first < 0):
        return tuple(-g for g in group)
    return group


# --- free groups ----------------------------------------------------------------------


def _group_key(group: tuple[int, ...]) -> tuple:
    return (
        sum(1 for g in group if g),
        sum(abs(g) for g in group),
        max((abs(g) for g in group), default=0),
        group,
    )


def _circuits_of_size(matrix: Matrix, n: int, size: int) -> Iterator[tuple[int, ...]]:
    """Null vectors on exactly ``size`` inputs and no fewer (the matroid's circuits)."""
    for chosen in combinations(range(n), size):
        basis = _nullspace(_columns(matrix, chosen), size)
        if len(basis) != 1 or any(v == 0 for v in basis[0]):
            continue
        full = [Fraction(0)] * n
        for position, column in enumerate(chosen):
            full[column] = basis[0][position]
        yield _orient(_primitive(full))


def _extend(
    chosen: list[tuple[int, ...]], candidates: Sequence[tuple[int, ...]], wanted: int
) -> None:
    """Greedy: take each candidate, best first, that is independent of those already taken."""
    for candidate in candidates:
        if len(chosen) == wanted:
            return
        trial = [[Fraction(v) for v in group] for group in [*chosen, candidate]]
        if _rank(trial) == len(trial):
            chosen.append(candidate)


def _groups(matrix: Matrix, rank: int, names: Sequence[str]) -> list[tuple[int, ...]]:
    """The canonical basis of free dimensionless groups, in name order.

    Circuits are searched by size (the first part of the key), so the search stops as soon
    as the basis is complete; past ``SUBSET_LIMIT`` subsets, echelon vectors fill the rest.
    """
    n = len(names)
    wanted = n - rank
    chosen: list[tuple[int, ...]] = []
    examined = 0
    for size in range(1, min(rank + 1, n) + 1):
        if len(chosen) == wanted:
            break
        examined += comb(n, size)
        if examined > SUBSET_LIMIT:
            break
        _extend(chosen, sorted(set(_circuits_of_size(matrix, n, size)), key=_group_key), wanted)
    echelon = sorted((_orient(_primitive(v)) for v in _nullspace(matrix, n)), key=_group_key)
    _extend(chosen, echelon, wanted)
    return sorted(chosen, key=_group_key)


# --- a particular solution ------------------------------------------------------------


def _solution_key(solution: Sequence[Fraction]) -> tuple:
    return (
        max((v.denominator for v in solution), default=1),
        sum(abs(v) for v in solution),
        sum(1 for v in solution if v),
        tuple(solution),
    )


def _solve_on(
    matrix: Matrix, rhs: Sequence[Fraction], chosen: Sequence[int], n: int
) -> list[Fraction] | None:
    """The solution using only the chosen columns, or ``None`` if they are dependent."""
    sub = _columns(matrix, chosen)
    augmented = [[*row, value] for row, value in zip(sub, rhs, strict=True)]
    rows, pivots = _rref(augmented)
    if pivots != list(range(len(chosen))):
        return None
    solution = [Fraction(0)] * n
    for row, pivot in zip(rows, pivots, strict=False):
        solution[chosen[pivot]] = row[-1]
    return solution


def _particular(
    matrix: Matrix, rhs: Sequence[Fraction], rank: int, names: Sequence[str]
) -> list[Fraction]:
    """The simplest basic solution (the target is known to be reachable)."""
    n = len(names)
    if rank == 0:
        return [Fraction(0)] * n
    if comb(n, rank) <= SUBSET_LIMIT:
        subsets: Iterator[tuple[int, ...]] | list[tuple[int, ...]] = combinations(range(n), rank)
    else:
        subsets = [tuple(_rref(matrix)[1])]
    solutions = (_solve_on(matrix, rhs, chosen, n) for chosen in subsets)
    return min((s for s in solutions if s is not None), key=_solution_key)


# --- why a target cannot be reached ---------------------------------------------------


def _article(word: str) -> str:
    return "an" if word[0] in "aeiou" else "a"


def _listing(names: Sequence[str]) -> str:
    return ", ".join(names)


def _explain_unreachable(
    matrix: Matrix, rhs: Sequence[Fraction], names: Sequence[str]
) -> tuple[tuple[str, ...], str]:
    """The base dimensions that block the target and a sentence saying why."""
    absent = [
        base
        for base, row, value in zip(BASE_NAMES, matrix, rhs, strict=True)
        if value != 0 and not any(row)
    ]
    if absent:
        parts = []
        for base in absent:
            if not names:
                parts.append(f"{base}: there are no inputs")
            elif len(names) == 1:
                parts.append(f"{base}: {names[0]} has no {base}")
            else:
                parts.append(f"{base}: none of {_listing(names)} has {_article(base)} {base}")
        return tuple(absent), "; ".join(parts)
    # Every base dimension occurs, but only in fixed combinations: find a left null vector
    # (a relation all inputs obey) that the target breaks, on as few base dimensions as can.
    transposed = [list(column) for column in zip(*matrix, strict=True)]
    relations = [_primitive(v) for v in _nullspace(transposed, len(BASE_NAMES))]
    broken = [y for y in relations if sum(a * b for a, b in zip(y, rhs, strict=True)) != 0]
    relation = min(broken, key=lambda y: (sum(1 for v in y if v), sum(abs(v) for v in y)))
    if next(v for v in relation if v) < 0:
        relation = tuple(-v for v in relation)
    involved = tuple(base for base, y in zip(BASE_NAMES, relation, strict=True) if y)
    text = _relation_text(relation)
    value = sum(a * b for a, b in zip(relation, rhs, strict=True))
    reason = (
        f"{_listing(involved)}: in every product of powers of {_listing(names)} the exponents "
        f"satisfy {text} = 0, but for the target {text} = {value}"
    )
    return involved, reason


def _relation_text(relation: Sequence[int]) -> str:
    terms = []
    for base, coefficient in zip(BASE_NAMES, relation, strict=True):
        if not coefficient:
            continue
        size = abs(coefficient)
        term = base if size == 1 else f"{size}*{base}"
        if not terms:
            terms.append(term if coefficient > 0 else f"-{term}")
        else:
            terms.append(f"+ {term}" if coefficient > 0 else f"- {term}")
    return " ".join(terms)
