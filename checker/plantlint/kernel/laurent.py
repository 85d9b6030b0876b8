"""Exact zero tests by multiplying out in a sparse polynomial ring (python-flint ``fmpq_mpoly``).

An expression built with +, *, integer powers and rational constants from *atoms* is
read as N / D: N a polynomial with rational coefficients in the atoms, D a monomial of
them (a negative power of an atom, 1/m or 1/cos(theta), adds to D). Every other sub-
expression is an atom: a symbol, a function application (sin(x), tan(x), ...), a root
(h^(3/2) is the atom h^(1/2) cubed), a number's non-integer power, pi, the inverse of a
sum (1/(x + 1) is the atom (x + 1)^-1).

* N = 0 as a polynomial proves the expression identically zero, whatever the atoms stand
  for: it is an identity of the polynomial ring, true after substituting any values.
* N != 0 proves it non-zero only when every atom is a symbol (then N / D is a Laurent
  polynomial in independent variables, zero as a function only when N = 0); with other
  atoms (sin(x)^2 + cos(x)^2 - 1) the answer is "not decided" and the caller goes on
  with its own tests.

This is what ``sympy.expand(e) == 0`` and ``cancel(together(e)) == 0`` decide on such
expressions, with flint's arithmetic instead of sympy's tree rewriting.
"""

from __future__ import annotations

from collections.abc import Sequence
from functools import cmp_to_key

import sympy as sp
from flint import fmpq, fmpq_mpoly_ctx

from plantlint.kernel.rational import sympy_rational

#: sympy's canonical order of the arguments of a sum or a product (``_args_sortkey``).
_SORT_KEY = cmp_to_key(sp.Basic.compare)

#: Bound on the terms of an intermediate numerator (beyond it: not decided here).
MAX_TERMS = 200_000
#: Bound on an integer exponent read by multiplying out.
MAX_POWER = 64


class _Outside(Exception):
    """The expression has a part this reading does not take (a float, a huge product)."""


def identically_zero(expr: sp.Expr) -> bool | None:
    """True: ``expr`` is identically zero (proved). False: it is a non-zero Laurent
    polynomial in symbols (proved non-zero). None: not decided here."""
    if expr == 0:
        return True
    atoms: dict[sp.Expr, int] = {}
    try:
        _collect(expr, atoms, set())
    except (_Outside, RecursionError):
        return None
    if not atoms:  # a rational constant that is not 0
        return False if expr.is_Rational else None
    ctx = fmpq_mpoly_ctx.get(("a", len(atoms)))
    reader = _Reader(ctx, atoms)
    try:
        numerator, _ = reader.read(expr)
    except (_Outside, RecursionError):
        return None
    if numerator.is_zero():
        return True
    if all(a.is_Symbol for a in atoms):
        return False
    return None


def expanded(expr: sp.Expr) -> sp.Expr | None:
    """``sympy.expand(expr)``, multiplied out by flint and rebuilt with sympy's constructors,
    for a Laurent polynomial in symbols and in function applications that ``expand``
    leaves as they are (sin(x), cos(x - y), tan(theta), ...); None otherwise (then call
    ``sympy.expand``). The sum of monomials with rational coefficients is canonical, so it
    is the very expression ``expand`` returns (tests/kernel/test_laurent.py holds the two
    against each other)."""
    atoms: dict[sp.Expr, int] = {}
    try:
        _collect(expr, atoms, set())
    except (_Outside, RecursionError):
        return None
    for a in atoms:
        if not (a.is_Symbol or (isinstance(a, sp.Function) and not isinstance(a, sp.exp)
                                and a.is_commutative and sp.expand(a) == a)):
            return None
    if not atoms:
        return None
    ctx = fmpq_mpoly_ctx.get(("a", len(atoms)))
    try:
        numerator, den = _Reader(ctx, atoms).read(expr)
    except (_Outside, RecursionError):
        return None
    return _monomial_sum(numerator, den, list(atoms))


def _monomial_sum(numerator: object, den: tuple[int, ...], order: Sequence[sp.Expr]) -> sp.Expr:
    """N / D as the sum of its monomials, built by sympy's constructors (which evaluate what
    the ring keeps apart: sqrt(3)^2 = 3); ``order`` lists the atoms by index."""
    terms = []
    for exps, coeff in numerator.terms():  # type: ignore[attr-defined]
        factors = [order[i] ** (k - d) for i, (k, d) in enumerate(zip(exps, den)) if k != d]
        terms.append(sp.Mul(sympy_rational(coeff), *factors))
    return sp.Add(*terms)


def _atom_of(e: sp.Expr) -> sp.Expr | None:
    """The atom ``e`` is read as (None when it is a sum, product, integer power or number)."""
    if e.is_Rational or e.is_Add or e.is_Mul:
        return None
    if e.is_Symbol:
        return e
    if e.is_Float or e.has(sp.zoo, sp.nan, sp.oo, -sp.oo):
        raise _Outside("float or infinity")
    if e.is_Pow and e.exp.is_Integer:
        return None
    return e


def _collect(e: sp.Expr, atoms: dict[sp.Expr, int], seen: set[sp.Expr]) -> None:
    if e in seen:
        return
    seen.add(e)
    if e.is_Pow and e.exp.is_Integer and e.exp < 0 and _inverse_atom(e.base) is not None:
        inverse = _inverse_atom(e.base)
        atoms.setdefault(inverse, len(atoms))
        return
    root = _root_of(e)
    if root is not None:
        atoms.setdefault(root[0], len(atoms))
        return
    atom = _atom_of(e)
    if atom is not None:
        atoms.setdefault(atom, len(atoms))
        return
    for a in e.args:
        _collect(a, atoms, seen)


def _inverse_atom(base: sp.Expr) -> sp.Expr | None:
    """1/base is read through the atom (base)^-1 when base is a sum (no monomial
    reading of its inverse); other bases (symbols, functions, products) are inverted
    as monomials. None: invert as a monomial."""
    if base.is_Add:
        return sp.Pow(base, -1, evaluate=False)
    return None


def _root_of(e: sp.Expr) -> tuple[sp.Expr, int] | None:
    """B^(p/q) (p/q not an integer, B not a number) as (the atom B^(1/q), p): sqrt(h) and
    h^(3/2) are powers of the one atom h^(1/2), 1/sqrt(1 + x^2) its inverse. The ring does
    not know that (h^(1/2))^2 = h: a numerator that is the zero polynomial is still zero
    (an identity whatever the atom stands for), and derivatives are exact (d B^(1/q) =
    (1/q) B^(1/q) B' / B). A number's root (2^(1/3)) is a constant atom instead."""
    if not (e.is_Pow and e.exp.is_Rational and not e.exp.is_Integer) or e.base.is_number:
        return None
    return sp.Pow(e.base, sp.Rational(1, int(e.exp.q))), int(e.exp.p)


def _root_atom(a: sp.Expr) -> bool:
    """An atom B^(1/q) of :func:`_root_of`: its powers evaluate (sqrt(h)^2 is h), so monomials
    with it are built by sympy's own constructors (:meth:`FieldRing.expr`)."""
    return _root_of(a) == (a, 1)


class _Reader:
    """Reads a sympy expression as (numerator polynomial, exponents of the monomial denominator)."""

    def __init__(self, ctx: object, atoms: dict[sp.Expr, int]):
        self.ctx = ctx
        self.atoms = atoms
        self.n = len(atoms)
        self.zero_exp = (0,) * self.n
        self.memo: dict[sp.Expr, tuple[object, tuple[int, ...]]] = {}
        self.one = ctx.constant(1)  # type: ignore[attr-defined]

    def monomial(self, exps: tuple[int, ...]) -> object:
        return self.ctx.from_dict({exps: 1})  # type: ignore[attr-defined]

    def generator(self, index: int, power: int = 1) -> tuple[object, tuple[int, ...]]:
        exps = [0] * self.n
        exps[index] = power
        return self.monomial(tuple(exps)), self.zero_exp

    def read(self, e: sp.Expr) -> tuple[object, tuple[int, ...]]:
        cached = self.memo.get(e)
        if cached is None:
            cached = self._read(e)
            self.memo[e] = cached
        return cached

    def _read(self, e: sp.Expr) -> tuple[object, tuple[int, ...]]:
        if e.is_Rational:
            return self.ctx.constant(fmpq(int(e.p), int(e.q))), self.zero_exp  # type: ignore[attr-defined]
        if e in self.atoms:
            return self.generator(self.atoms[e])
        if e.is_Add:
            parts = [self.read(a) for a in e.args]
            den = tuple(max(p[1][i] for p in parts) for i in range(self.n))
            total = self.ctx.constant(0)  # type: ignore[attr-defined]
            for num, d in parts:
                shift = tuple(a - b for a, b in zip(den, d))
                total += num * self.monomial(shift) if any(shift) else num
                self._check(total)
            return total, den
        if e.is_Mul:
            num, den = self.one, self.zero_exp
            for a in e.args:
                n2, d2 = self.read(a)
                num = num * n2
                self._check(num)
                den = tuple(x + y for x, y in zip(den, d2))
            return num, den
        if e.is_Pow and e.exp.is_Integer:
            k = int(e.exp)
            if abs(k) > MAX_POWER:
                raise _Outside("power")
            if k >= 0:
                num, den = self.read(e.base)
                out = num**k
                self._check(out)
                return out, tuple(k * x for x in den)
            inverse = _inverse_atom(e.base)
            if inverse is not None:
                if inverse not in self.atoms:
                    raise _Outside("atom")
                return self.generator(self.atoms[inverse], -k)
            num, den = self.read(e.base)
            terms = list(num.terms())  # type: ignore[attr-defined]
            if len(terms) != 1:
                raise _Outside("inverse of a sum")  # not reached: a sum's inverse is an atom
            (exps, coeff), = terms
            # 1 / (c * a^p / a^d) = (1/c) * a^d / a^p, all to the power -k
            inv = self.ctx.from_dict({tuple(den): 1 / coeff})  # type: ignore[attr-defined]
            return inv ** (-k), tuple(-k * x for x in exps)
        root = _root_of(e)
        if root is not None and root[0] in self.atoms:
            index, k = self.atoms[root[0]], root[1]
            if abs(k) > MAX_POWER:
                raise _Outside("power")
            if k > 0:
                return self.generator(index, k)
            return self.one, tuple(-k if i == index else 0 for i in range(self.n))
        raise _Outside(type(e).__name__)

    @staticmethod
    def _check(p: object) -> None:
        if len(p) > MAX_TERMS:  # type: ignore[arg-type]
            raise _Outside("too many terms")


#: Bound on the atoms of a plant's fields read by :class:`FieldRing`.
MAX_ATOMS = 64

Laurent = tuple[object, tuple[int, ...]]  # (numerator fmpq_mpoly, exponents of the monomial denominator)


def _plain_atom(a: sp.Expr) -> bool:
    """An atom whose powers ``expand`` leaves alone: a symbol, or a function application
    (not exp, whose powers combine) that ``expand`` returns unchanged."""
    return a.is_Symbol or (isinstance(a, sp.Function) and not isinstance(a, sp.exp) and a.is_commutative
                           and sp.expand(a) == a)


def _constant_atom(a: sp.Expr) -> bool:
    """An irrational constant (2^(1/3), sqrt(3)/2's sqrt(3), pi, sin(1/3)): its derivatives
    are 0; its powers may evaluate (sqrt(3)^2 is 3), so monomials with it are built by
    sympy's own constructors (:meth:`FieldRing.expr`)."""
    return a.is_number and not a.is_Rational and a.is_extended_real is True


def _inverse_of_sum(a: sp.Expr) -> bool:
    """An atom (D)^-1 of a sum D (a mass matrix's determinant, ``m_c + m_p*sin(th)^2``)."""
    return a.is_Pow and a.exp == -1 and a.base.is_Add


class FieldRing:
    """Vector fields of one plant read as Laurent polynomials in its states, parameters and
    function atoms (sin(x), cos(x - y), tan(theta), ...), roots (a tank's sqrt(h)) and
    inverses of sums (1/(w1 - c), 1/(m_c + m_p*sin(th)^2): a mass matrix's determinant),
    closed under d/dx: brackets are
    formed by formal differentiation in flint's ring (the chain rule through each atom's
    own sympy derivative) and rebuilt as sums of monomials. Without inverses of sums that
    is ``sympy.expand`` of the bracket tree differentiation gives, term for term
    (tests/kernel/test_laurent.py); with them it is the same function with the
    denominators kept as powers of the sums (expand would multiply them out).

    A rational plant took the tree route before: the tree of ad_f^k g swells with every
    order (a 7-state attitude model with one rate over (w1 - 1e-9) stopped at a 60 s
    budget in the distributions; 1.2 s in the ring)."""

    def __init__(self, states: Sequence[sp.Symbol], atoms: dict[sp.Expr, int]):
        self.n = len(atoms)
        self.ctx = fmpq_mpoly_ctx.get(("a", self.n))
        self.atoms = atoms
        self.order = list(atoms)
        self.reader = _Reader(self.ctx, atoms)
        self.zero_exp = (0,) * self.n
        self._powers: dict[tuple[int, int], sp.Expr] = {}  # atom ** k, built once
        #: atoms whose powers or products sympy may evaluate (sqrt(3)^2 = 3, sqrt(h)^2 = h):
        #: their monomials are built by sympy's constructors
        self.evaluated = frozenset(i for a, i in atoms.items() if _constant_atom(a) or _root_atom(a))
        self.states = [atoms[x] for x in states]
        #: for state k: [(atom index, d atom / d x_k as a Laurent polynomial)]
        self.chain: list[list[tuple[int, Laurent]]] = []
        for x in states:
            links: list[tuple[int, Laurent]] = []
            for a, i in atoms.items():
                if a == x:
                    links.append((i, (self.ctx.constant(1), self.zero_exp)))  # type: ignore[attr-defined]
                elif not a.is_Symbol and x in a.free_symbols:
                    links.append((i, self.reader.read(sp.diff(a, x))))
            self.chain.append(links)

    @classmethod
    def build(cls, states: Sequence[sp.Symbol], exprs: Sequence[sp.Expr]) -> "FieldRing | None":
        atoms: dict[sp.Expr, int] = {x: i for i, x in enumerate(states)}
        try:
            seen: set[sp.Expr] = set()
            for e in exprs:
                _collect(e, atoms, seen)
            done: set[sp.Expr] = set()
            while True:  # close the atoms under d/dx_k
                todo = [a for a in atoms if a not in done and not a.is_Symbol]
                if not todo:
                    break
                for a in todo:
                    done.add(a)
                    for x in states:
                        if x in a.free_symbols:
                            _collect(sp.diff(a, x), atoms, seen)
                if len(atoms) > MAX_ATOMS:
                    return None
            if not all(_plain_atom(a) or _inverse_of_sum(a) or _constant_atom(a) or _root_atom(a) for a in atoms):
                return None
            return cls(states, atoms)
        except (_Outside, RecursionError):
            return None

    def read(self, e: sp.Expr) -> Laurent | None:
        try:
            return self.reader.read(e)
        except (_Outside, RecursionError):
            return None

    def _shift(self, p: Laurent, den: tuple[int, ...]) -> object:
        if p[1] == den:
            return p[0]
        return p[0] * self.reader.monomial(tuple(a - b for a, b in zip(den, p[1])))  # type: ignore[operator]

    def add(self, p: Laurent, q: Laurent, sign: int = 1) -> Laurent:
        # most terms of a bracket are zero (a partial along a state the entry lacks): no
        # common denominator for them (the value, and so the sum written by expr, is the same)
        if q[0].is_zero():  # type: ignore[attr-defined]
            return p
        if p[0].is_zero():  # type: ignore[attr-defined]
            return q if sign == 1 else (-q[0], q[1])  # type: ignore[operator]
        den = tuple(map(max, p[1], q[1]))
        num = self._shift(p, den) + sign * self._shift(q, den)  # type: ignore[operator]
        _Reader._check(num)
        return num, den

    def mul(self, p: Laurent, q: Laurent) -> Laurent:
        if p[0].is_zero() or q[0].is_zero():  # type: ignore[attr-defined]
            return self.ctx.constant(0), self.zero_exp  # type: ignore[attr-defined]
        num = p[0] * q[0]  # type: ignore[operator]
        _Reader._check(num)
        return num, tuple(a + b for a, b in zip(p[1], q[1]))

    def _by_atom(self, p: Laurent, i: int) -> Laurent | None:
        """d p / d (atom i), or None when p does not contain it."""
        num, den = p
        d = den[i]
        if d == 0:
            if num.degrees()[i] == 0:  # type: ignore[attr-defined]
                return None
            return num.derivative(i), den  # type: ignore[attr-defined]
        # N / (D a^d): d/da = (N' a - d N) / (D a^(d+1))
        out = num.derivative(i) * self.reader.generator(i)[0] - d * num  # type: ignore[attr-defined,operator]
        return out, tuple(e + 1 if j == i else e for j, e in enumerate(den))

    def partial(self, p: Laurent, k: int) -> Laurent:
        """d p / d x_k (state k), by the chain rule through the atoms."""
        total: Laurent = (self.ctx.constant(0), self.zero_exp)  # type: ignore[attr-defined]
        for i, link in self.chain[k]:
            part = self._by_atom(p, i)
            if part is not None:
                total = self.add(total, self.mul(part, link))
        return total

    def bracket(self, X: Sequence[Laurent], Y: Sequence[Laurent]) -> list[Laurent] | None:
        """[X, Y] = DY X - DX Y; None when a numerator outgrows MAX_TERMS (the caller
        goes on by tree differentiation)."""
        out = []
        try:
            for i in range(len(self.states)):
                total: Laurent = (self.ctx.constant(0), self.zero_exp)  # type: ignore[attr-defined]
                for k in range(len(self.states)):
                    if not X[k][0].is_zero():  # type: ignore[attr-defined]
                        total = self.add(total, self.mul(self.partial(Y[i], k), X[k]))
                    if not Y[k][0].is_zero():  # type: ignore[attr-defined]
                        total = self.add(total, self.mul(self.partial(X[i], k), Y[k]), -1)
                out.append(total)
        except _Outside:
            return None
        return out

    def expr(self, p: Laurent) -> sp.Expr:
        """The sum of monomials, as sympy builds it (the form ``expand`` returns).

        Put together in sympy's canonical order (numbers first, then ``Basic.compare``, as
        ``Mul.flatten`` and ``Add.flatten`` sort) without their flattening, which would find
        nothing to combine: a monomial's factors are powers of distinct atoms, and the terms
        of a polynomial are distinct monomials. The same expression, a fraction of the time
        (held srepr for srepr against sympy's own construction in tests/kernel/test_laurent.py)."""
        num, den = p
        if self.evaluated:  # sympy may evaluate their powers: its own constructors build them
            return _monomial_sum(num, den, self.order)
        powers = self._powers
        numbers: list[sp.Expr] = []
        terms: list[sp.Expr] = []
        for exps, coeff in num.terms():  # type: ignore[attr-defined]
            factors = []
            for i, (k, d) in enumerate(zip(exps, den)):
                if k != d:
                    key = (i, k - d)
                    power = powers.get(key)
                    if power is None:
                        power = powers[key] = self.order[i] ** (k - d)
                    factors.append(power)
            c = sympy_rational(coeff)
            if not factors:
                numbers.append(c)
                continue
            factors.sort(key=_SORT_KEY)
            if c == 1:
                terms.append(factors[0] if len(factors) == 1 else sp.Mul._from_args(factors, True))
            else:
                terms.append(sp.Mul._from_args([c, *factors], True))
        terms.sort(key=_SORT_KEY)
        args = numbers + terms
        if not args:
            return sp.Integer(0)
        return args[0] if len(args) == 1 else sp.Add._from_args(args, True)
