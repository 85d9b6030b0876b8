"""Second-order Taylor forms over a box, for the Taylor-mode towers, without sympy.

Over a box x_a = c_a + r_a e_a (e_a in [-1, 1]) every value is carried as a form

    v(x) in  v0 + sum_a l_a e_a + sum_(a <= b) q_ab e_a e_b + [-err, err]

with v0, the l_a and the q_ab arb balls and err an upper bound: for every x of the box the
value lies in that set evaluated at e(x) (a Taylor model of order 2: Makino and Berz,
"Taylor models and other validated functional inclusion methods", Int. J. Pure Appl. Math.
4, 2003; with ball coefficients as in affine arithmetic: Stolfi and de Figueiredo,
Self-Validated Numerical Methods and Applications, IMPA 1997).

Sums and products keep every term up to the second order exactly, so the dependency that
makes a natural interval enclosure of M11 M22 - M12^2 hold 0 over a wide payload range
cancels (the products' quadratic parts cancel term by term), and what is left over goes to
err at the third order in the box's radius:

* X Y: the terms of x0 y0 + ... up to order 2 exactly; the rest (L_x Q_y + Q_x L_y + Q_x Q_y
  and the products with err) bounded by the sums of magnitudes.
* f(X) by Taylor's theorem at the centre: f(x0) + f'(x0) u + f''(x0) u^2 / 2 with u = X - x0
  and the Lagrange remainder |f'''(R)| rad(u)^3 / 6, f''' enclosed over the range R of X.
  Domains are checked on R (a division by a range that holds 0, a logarithm of one that
  reaches 0): :class:`UndefinedOver`, a :class:`plantlint.kernel.taylor.Undefined`.
* atan2(y, x) by atan of a quotient on the half-plane that holds the ranges (x > 0, y > 0,
  y < 0), Undefined where the ranges meet the branch cut.
* The range of a form takes each variable's own terms l_a e_a + q_aa e_a^2 as the parabola
  they are over [-1, 1] (its vertex), the mixed terms by magnitude.

:class:`FormField` is a field for :class:`plantlint.kernel.taylor.Towers` like
:class:`ArbField`: the towers, their directional derivatives along g and the decoupling
matrix come out as forms over the box, and the determinant formed from them keeps the
cancellation between its products (the inverse of a mass matrix: det of M^-1 is 1/det M,
small beside either product). arb rounds outward throughout, so every enclosure holds at
any precision.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Sequence

from flint import arb

from plantlint.kernel import decision as zd
from plantlint.kernel.enclosures import int_power, tighter
from plantlint.kernel.taylor import ArbField, Dual, Jet, Undefined, domain_error

_JETS = (Jet, Dual)  # a form meeting a jet: the jet's own arithmetic takes it
_UNIT = arb(0, 1)  # [-1, 1]
_HALF_UNIT = arb("0.5 +/- 0.5")  # [0, 1]


class UndefinedOver(Undefined):
    """A function's argument leaves its domain somewhere over the box; ``form`` is that
    argument (its terms say which sides of the box move it the most)."""

    def __init__(self, why: str, form: Any = None):
        super().__init__(why)
        self.form = form


def _magnitude(x: arb) -> arb:
    """An upper bound of |x| as an exact (zero-radius) arb."""
    return arb(abs(x).upper())


def _sum_magnitudes(values: Any) -> arb:
    total = arb(0)
    for v in values:
        total = total + _magnitude(v)
    return _magnitude(total)


def _both(a: arb | None, b: arb | None, op: Any) -> arb | None:
    return None if a is None or b is None else op(a, b)


def _merge(a: dict, b: dict, sign: int = 1) -> dict:
    out = dict(a)
    for k, v in b.items():
        if k in out:
            out[k] = out[k] + v if sign > 0 else out[k] - v
        else:
            out[k] = v if sign > 0 else -v
    return out


class Form:
    """v0 + sum l_a e_a + sum_(a <= b) q_ab e_a e_b + [-err, err] (sparse: ``lin`` maps a
    side to l_a, ``quad`` a pair (a, b), a <= b, to q_ab)."""

    __slots__ = ("v0", "lin", "quad", "err", "hull", "_sizes")

    def __init__(self, v0: arb, lin: dict[int, arb], quad: dict[tuple[int, int], arb], err: arb,
                 hull: arb | None = None, sizes: tuple[arb, arb] | None = None):
        self.v0 = v0
        self.lin = lin
        self.quad = quad
        self.err = err
        #: the natural interval enclosure, carried beside the form: over a wide box it can be
        #: the tighter one (1 + a^2 >= 1 whatever a's form says), and the range is the
        #: intersection of both; None when not known
        self.hull = hull
        self._sizes = sizes  # (sum |l_a|, sum |q_ab|) once asked: the terms never change

    # -- reading ---------------------------------------------------------------------------
    def sizes(self) -> tuple[arb, arb]:
        """Upper bounds of sum |l_a| and sum |q_ab| (how far the terms move the form)."""
        if self._sizes is None:
            self._sizes = (_sum_magnitudes(self.lin.values()), _sum_magnitudes(self.quad.values()))
        return self._sizes

    def radius(self) -> arb:
        """An upper bound of |value - v0| over the box."""
        linear, quadratic = self.sizes()
        return _magnitude(linear + quadratic + self.err)

    def deviation(self) -> arb:
        """A ball holding value - v0 over the box (tighter than +/- :meth:`radius`): each
        side's l_a e_a + q_aa e_a^2 as the parabola it is over [-1, 1]."""
        total = arb(0, self.err)
        for (a, b), q in self.quad.items():
            if a != b:
                total = total + q * _UNIT
        for a in set(self.lin) | {a for a, b in self.quad if a == b}:
            total = total + _parabola(self.lin.get(a, arb(0)), self.quad.get((a, a), arb(0)))
        return total

    def range(self) -> arb:
        """A ball holding every value over the box."""
        r = self.v0 + self.deviation()
        return r if self.hull is None else tighter(r, self.hull)

    def side_sizes(self, sides: int) -> list[float]:
        """Per side, how far its terms (linear, and quadratic with any side) move the form."""
        sizes = [0.0] * sides
        for a, t in self.lin.items():
            sizes[a] += float(abs(t).upper())
        for (a, b), t in self.quad.items():
            size = float(abs(t).upper())
            sizes[a] += size
            if b != a:
                sizes[b] += size
        return sizes

    # -- arithmetic ------------------------------------------------------------------------
    def __add__(self, o: Any) -> "Form":
        if isinstance(o, Form):
            return Form(self.v0 + o.v0, _merge(self.lin, o.lin), _merge(self.quad, o.quad), self.err + o.err,
                        _both(self.hull, o.hull, lambda a, b: a + b))
        if isinstance(o, _JETS):
            return NotImplemented
        return Form(self.v0 + o, self.lin, self.quad, self.err, None if self.hull is None else self.hull + o,
                    self._sizes)

    __radd__ = __add__

    def __neg__(self) -> "Form":
        return Form(-self.v0, {k: -v for k, v in self.lin.items()}, {k: -v for k, v in self.quad.items()},
                    self.err, None if self.hull is None else -self.hull, self._sizes)

    def __sub__(self, o: Any) -> "Form":
        if isinstance(o, Form):
            return Form(self.v0 - o.v0, _merge(self.lin, o.lin, -1), _merge(self.quad, o.quad, -1),
                        self.err + o.err, _both(self.hull, o.hull, lambda a, b: a - b))
        if isinstance(o, _JETS):
            return NotImplemented
        return Form(self.v0 - o, self.lin, self.quad, self.err, None if self.hull is None else self.hull - o,
                    self._sizes)

    def __rsub__(self, o: Any) -> "Form":
        return (-self) + o

    def scaled(self, c: arb) -> "Form":
        return Form(self.v0 * c, {k: v * c for k, v in self.lin.items()}, {k: v * c for k, v in self.quad.items()},
                    _magnitude(self.err * _magnitude(c)), None if self.hull is None else self.hull * c)

    def __mul__(self, o: Any) -> "Form":
        if isinstance(o, Form):
            return _product(self, o)
        if isinstance(o, _JETS):
            return NotImplemented
        return self.scaled(o if isinstance(o, arb) else arb(o))

    __rmul__ = __mul__

    def __truediv__(self, o: Any) -> "Form":
        if isinstance(o, Form):
            return self * form_function("inv", o)
        if isinstance(o, _JETS):
            return NotImplemented
        o = o if isinstance(o, arb) else arb(o)
        if o.contains(0):
            raise Undefined("division by a value that may be zero")
        return self.scaled(1 / o)

    def __rtruediv__(self, o: Any) -> "Form":
        return form_function("inv", self) * o

    def __repr__(self) -> str:  # pragma: no cover - for debugging
        return f"Form({self.v0}, {self.lin}, {self.quad}, {self.err})"


def _parabola(l: arb, q: arb) -> arb:
    """A ball holding l e + q e^2 for every e in [-1, 1]."""
    if q.is_zero():
        return l * _UNIT
    if q.contains(0):
        return l * _UNIT + q * _HALF_UNIT
    ends = (q + l).union(q - l)  # e = 1 and e = -1
    if abs(l) > 2 * abs(q):  # certainly: the vertex e = -l / (2 q) lies outside [-1, 1]
        return ends
    return ends.union(-(l * l) / (4 * q))


def _product(x: Form, y: Form) -> Form:
    x0, y0 = x.v0, y.v0
    lin: dict[int, arb] = {}
    for a, t in x.lin.items():
        lin[a] = t * y0
    for a, t in y.lin.items():
        lin[a] = lin[a] + x0 * t if a in lin else x0 * t
    quad: dict[tuple[int, int], arb] = {}
    for k, t in x.quad.items():
        quad[k] = t * y0
    for k, t in y.quad.items():
        quad[k] = quad[k] + x0 * t if k in quad else x0 * t
    for a, s in x.lin.items():
        for b, t in y.lin.items():
            k = (a, b) if a <= b else (b, a)
            quad[k] = quad[k] + s * t if k in quad else s * t
    (lx, qx), (ly, qy) = x.sizes(), y.sizes()
    err = (_magnitude(x0) * y.err + _magnitude(y0) * x.err
           + lx * qy + qx * ly + qx * qy
           + (lx + qx) * y.err + (ly + qy) * x.err + x.err * y.err)
    hull = (None if x.hull is None else int_power(x.hull, 2)) if x is y else _both(x.hull, y.hull, lambda a, b: a * b)
    return Form(x0 * y0, lin, quad, _magnitude(err), hull)


def _composed(x: Form, d0: arb, d1: arb, d2: arb, d3: arb) -> Form:
    """f(X) from f(x0) = d0, f'(x0) = d1, f''(x0) = d2 and f''' over X's range (d3): Taylor's
    theorem with the Lagrange remainder."""
    if not all(v.is_finite() for v in (d0, d1, d2, d3)):
        raise Undefined("a value that is not finite over the box")
    u = Form(arb(0), x.lin, x.quad, x.err, None, x._sizes)
    rad = u.radius()
    out = u.scaled(d1) + _product(u, u).scaled(d2 / 2) + d0
    out.err = _magnitude(out.err + _magnitude(d3) * rad * rad * rad / 6)
    return out


def _check(name: str, r: arb, form: Any = None) -> None:
    """The domain of ``name`` over the range ``r`` (:func:`domain_error`, as balls check it)."""
    why = domain_error(name, r)
    if why is not None:
        raise UndefinedOver(why, form)


def form_function(name: str, x: Form) -> Form:
    """An elementary function of a form, with its natural enclosure f(R) as the hull."""
    r = x.range()
    _check(name, r, x)
    out = _expanded(name, x, r, x.v0)
    natural = 1 / r if name == "inv" else getattr(r, name)()
    out.hull = natural if natural.is_finite() else None
    return out


def _expanded(name: str, x: Form, r: arb, c: arb) -> Form:
    """f(X) by :func:`_composed`, X's range ``r`` and centre ``c``. The bound of the third
    derivative's magnitude over R is taken where it is largest: each one below is monotone
    in x or in |x| over the function's domain (or bounded by a constant), so that is an end
    of R or of |R|; a formula evaluated on a range as wide as [3, 10^4] would round to a
    ball holding 0."""
    lo, hi, far = arb(r.lower()), arb(r.upper()), arb(abs(r).upper())
    if name == "inv":
        # 1/(c + u) = 1/c - u/c^2 + u^2/c^3 - u^3 / (c^3 (c + u)) exactly: a remainder of
        # rad^3 / (|c|^3 min |R|), where the Lagrange form's 6/R^4 would give rad^3 / min |R|^4
        i = 1 / c
        out = _composed(x, i, -i * i, 2 * i * i * i, arb(0))
        rad = x.radius()
        out.err = _magnitude(out.err + rad * rad * rad / (_magnitude(c) ** 3 * arb(abs(r).lower())))
        return out
    if name == "sqrt":  # 3 / (8 x^(5/2)), decreasing
        root = c.sqrt()
        return _composed(x, root, 1 / (2 * root), -1 / (4 * c * root), 3 / (8 * lo * lo * lo.sqrt()))
    if name == "exp":  # exp, increasing
        e = c.exp()
        return _composed(x, e, e, e, hi.exp())
    if name == "log":  # 2 / x^3, decreasing
        return _composed(x, c.log(), 1 / c, -1 / (c * c), 2 / (lo * lo * lo))
    if name == "sin":  # at most 1
        s, k = c.sin(), c.cos()
        return _composed(x, s, k, -s, arb(1))
    if name == "cos":
        s, k = c.sin(), c.cos()
        return _composed(x, k, -s, -k, arb(1))
    if name == "tan":  # (1 + t^2)(2 + 6 t^2), largest at an end of R when R holds no pole
        if not r.tan().is_finite():
            raise UndefinedOver("tan", x)
        t = c.tan()
        tr = arb(max(abs(lo.tan()).upper(), abs(hi.tan()).upper()))
        return _composed(x, t, 1 + t * t, 2 * t * (1 + t * t), (1 + tr * tr) * (2 + 6 * tr * tr))
    if name == "atan":  # |6 x^2 - 2| / (1 + x^2)^3, at most 2
        w = 1 + c * c
        return _composed(x, c.atan(), 1 / w, -2 * c / (w * w), arb(2))
    if name in ("asin", "acos"):  # (1 + 2 x^2) / (1 - x^2)^(5/2), increasing in |x|
        sign = 1 if name == "asin" else -1
        w, wr = 1 - c * c, 1 - far * far
        root = w.sqrt()
        return _composed(x, getattr(c, name)(), sign / root, sign * c / (w * root),
                         (1 + 2 * far * far) / (wr * wr * wr.sqrt()))
    if name == "sinh":  # cosh, increasing in |x|
        return _composed(x, c.sinh(), c.cosh(), c.sinh(), far.cosh())
    if name == "cosh":  # |sinh|, increasing in |x|
        return _composed(x, c.cosh(), c.sinh(), c.cosh(), far.sinh())
    if name == "tanh":  # |(1 - t^2)(6 t^2 - 2)|, at most 2
        t = c.tanh()
        s = 1 - t * t
        return _composed(x, t, s, -2 * t * s, arb(2))
    raise Undefined(name)  # pragma: no cover - every unary name of the graph is above


def form_powq(x: Form, q: Fraction) -> Form:
    """x**q for a fractional q over a positive range."""
    r = x.range()
    if not r > 0:
        raise UndefinedOver("fractional power of a value that may be non-positive", x)
    qa = arb(q.numerator) / q.denominator

    def power(b: arb, e: arb) -> arb:
        return (b.log() * e).exp()
    c = x.v0
    # q (q-1) (q-2) x^(q-3) is monotone in x > 0: its magnitude is largest at an end of R
    ends = max(power(arb(r.lower()), qa - 3).upper(), power(arb(r.upper()), qa - 3).upper())
    out = _composed(x, power(c, qa), qa * power(c, qa - 1), qa * (qa - 1) * power(c, qa - 2),
                    qa * (qa - 1) * (qa - 2) * arb(ends))
    natural = power(r, qa)
    out.hull = natural if natural.is_finite() else None
    return out


def form_atan2(y: Form, x: Form) -> Form:
    """atan2(y, x) as atan(y/x) (x > 0), atan(y/x) +/- pi (x < 0, y away from 0) or
    +/- pi/2 - atan(x/y) (y away from 0): the half-plane that holds both ranges."""
    ry, rx = y.range(), x.range()
    if rx > 0:
        return form_function("atan", y / x)
    if ry > 0:
        return arb.pi() / 2 - form_function("atan", x / y)
    if ry < 0:
        return -arb.pi() / 2 - form_function("atan", x / y)
    raise UndefinedOver("atan2 at or across its branch cut", y)


class FormField(ArbField):
    """The towers' field of forms over one box (see the module text); constants are arb
    balls, which the forms take as they are, and a function of one is the ball field's."""

    def __init__(self, prec: int = 64):
        super().__init__(prec)

    def number(self, value: Any) -> Any:
        return value if isinstance(value, Form) else super().number(value)

    def base(self, name: str, a: Any) -> Any:
        return form_function(name, a) if isinstance(a, Form) else super().base(name, a)

    def powq(self, a: Any, q: Fraction) -> Any:
        return form_powq(a, q) if isinstance(a, Form) else super().powq(a, q)

    def atan2(self, y: Any, x: Any) -> Any:
        if isinstance(y, Form) or isinstance(x, Form):
            return form_atan2(_lifted(y), _lifted(x))
        return super().atan2(y, x)

    def is_zero(self, a: Any) -> zd.ZeroDecision:
        return zd.of_ball(value_range(a))


def _lifted(a: Any) -> Form:
    """A constant ball as a form."""
    return a if isinstance(a, Form) else Form(a, {}, {}, arb(0), a)


def value_range(v: Any) -> arb:
    """A ball holding a value over the box: a form's range, or the ball of a constant."""
    return v.range() if isinstance(v, Form) else v


def determinant(matrix: Sequence[Sequence[Any]]) -> Any:
    """det of a matrix of forms (or constant balls) over the box: by cofactors up to 3 x 3,
    so no division enters; beyond, by elimination on the pivot farthest from 0 at the
    centre (:class:`Undefined` when a pivot's range holds 0)."""
    size = len(matrix)
    if size == 1:
        return matrix[0][0]
    if size == 2:
        (a, b), (c, d) = matrix
        return a * d - b * c
    if size == 3:
        (a, b, c), (d, e, f), (g, h, i) = matrix
        return a * (e * i - f * h) - b * (d * i - f * g) + c * (d * h - e * g)
    rows = [list(row) for row in matrix]
    det: Any = arb(1)
    for k in range(size):
        def weight(i: int) -> float:
            v = rows[i][k]
            return float(abs(v.v0 if isinstance(v, Form) else v).lower())
        pivot = max(range(k, size), key=weight)
        if pivot != k:
            rows[k], rows[pivot] = rows[pivot], rows[k]
            det = -det
        p = rows[k][k]
        if not isinstance(p, Form) and p.contains(0):
            raise Undefined("a pivot that may be zero")
        det = det * p
        for i in range(k + 1, size):
            factor = rows[i][k] / p
            rows[i] = [x - factor * y for x, y in zip(rows[i], rows[k])]
    return det


def box_forms(box: Sequence[tuple[Fraction, Fraction]]) -> list[Form]:
    """The variables of a box as forms: x_a = c_a + r_a e_a, exactly."""
    forms = []
    for a, (lo, hi) in enumerate(box):
        centre, half = (lo + hi) / 2, (hi - lo) / 2
        c = arb(centre.numerator) / centre.denominator
        r = arb(half.numerator) / half.denominator
        forms.append(Form(c, {a: r} if half else {}, {}, arb(0), c + r * _UNIT))
    return forms


__all__ = ["Form", "FormField", "UndefinedOver", "box_forms", "determinant", "form_atan2", "form_function",
           "form_powq", "value_range"]
