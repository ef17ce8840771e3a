"""Bracketed one-dimensional root finding.

``brent`` is Brent's method (R. P. Brent, *Algorithms for Minimization
without Derivatives*, 1973, ch. 4): bisection safeguarding secant and
inverse quadratic interpolation, so it never leaves the bracket. It is the
algorithm behind ``scipy.optimize.brentq`` and is tested against it
(``tests/test_rootfind.py``). It lives here because importing
``scipy.optimize`` costs about 0.4 s, which every ``joulebook solve`` would
pay at start-up for one small function; scipy's multidimensional ``root`` is
still used, imported lazily, where two unknowns remain.
"""

from __future__ import annotations

import math


class NoBracket(ValueError):
    """f(a) and f(b) have the same sign."""


def brent(f, a: float, b: float, xtol: float = 1e-14, rtol: float = 4 * 2.2e-16, maxiter: int = 200,
          fa: float | None = None, fb: float | None = None) -> float:
    """A root of f in [a, b], where f(a) and f(b) differ in sign.

    Parameters
    ----------
    f : callable  the function
    a, b : float  the bracket
    xtol, rtol : float  stop when the bracket is below xtol + rtol |x|
    fa, fb : float, optional  f(a) and f(b) when already known

    >>> round(brent(lambda x: x * x - 2.0, 0.0, 2.0), 12)
    1.414213562373
    """
    fa = f(a) if fa is None else fa
    fb = f(b) if fb is None else fb
    if fa == 0.0:
        return a
    if fb == 0.0:
        return b
    if fa * fb > 0:
        raise NoBracket(f"f({a:g}) and f({b:g}) have the same sign")
    c, fc = a, fa
    d = e = b - a
    for _ in range(maxiter):
        if fb * fc > 0:
            c, fc = a, fa
            d = e = b - a
        if abs(fc) < abs(fb):
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 2.0 * rtol * abs(b) + 0.5 * xtol
        m = 0.5 * (c - b)
        if abs(m) <= tol or fb == 0.0:
            return b
        if abs(e) >= tol and abs(fa) > abs(fb):
            s = fb / fa
            if a == c:  # secant
                p = 2.0 * m * s
                q = 1.0 - s
            else:  # inverse quadratic interpolation
                q = fa / fc
                r = fb / fc
                p = s * (2.0 * m * q * (q - r) - (b - a) * (r - 1.0))
                q = (q - 1.0) * (r - 1.0) * (s - 1.0)
            if p > 0:
                q = -q
            else:
                p = -p
            if 2.0 * p < min(3.0 * m * q - abs(tol * q), abs(e * q)):
                e, d = d, p / q
            else:
                d = e = m
        else:
            d = e = m
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, m)
        fb = f(b)
    raise RuntimeError(f"brent did not converge in {maxiter} iterations")


def scan_root(f, grid, start: float | None = None, scale: float = 1.0, skip=(ValueError,),
              rtol: float = 1e-13):
    """Scan ``grid`` for a sign change of f and return the root in it.

    Grid points are evaluated lazily, outward from the one nearest ``start``
    (or from the low end), so a root near the expected value is found after
    a few evaluations. Points where f raises one of ``skip`` are treated as
    missing (a cubic has no single-phase state there). A sign change whose
    brent result does not make |f| small relative to ``scale`` is a jump
    (f is discontinuous across a two-phase region), not a root: it is
    counted and the scan goes on.

    Returns (root or None, number of jumps seen, the skipped exceptions in
    the order they were raised).
    """
    n = len(grid)
    values: dict[int, float] = {}
    skipped: list[Exception] = []

    def value(i: int) -> float:
        if i not in values:
            try:
                values[i] = float(f(grid[i]))
            except skip as exc:
                skipped.append(exc)
                values[i] = math.nan
        return values[i]

    def try_interval(i: int):
        fa, fb = value(i), value(i + 1)
        if fa == 0.0:
            return float(grid[i])
        if not (math.isfinite(fa) and math.isfinite(fb)) or fa * fb > 0:
            return None
        x = brent(f, float(grid[i]), float(grid[i + 1]), rtol=rtol, fa=fa, fb=fb)
        return x if abs(f(x)) <= 1e-7 * scale else math.nan

    if start is None:
        order = range(n)
    else:
        order = _outward(grid, start)
    jumps = 0
    for i in order:
        value(i)
        for j in (i - 1, i):  # the intervals this point closes
            if 0 <= j < n - 1 and j in values and j + 1 in values:
                x = try_interval(j)
                if x is None:
                    continue
                if math.isnan(x):
                    jumps += 1
                    continue
                return x, jumps, skipped
    return None, jumps, skipped


def root_near(f, x0: float, lo: float, hi: float, *, scale: float = 1.0, skip=(ValueError,),
              rtol: float = 1e-13, first_step: float = 1e-3) -> float | None:
    """A root of f near x0 in [lo, hi] (0 < lo <= x0 <= hi), found in a few evaluations, or None.

    A secant probe from x0 estimates the step to the root; steps of that
    size, doubling, go the way |f| falls until the sign changes; then
    Brent's method. Where f is smooth and monotone near x0 (a balance's
    residual in the final T or v, as a rule) this costs some eight
    evaluations. None — the caller then scans a grid (:func:`scan_root`),
    which handles the rest — when an evaluation raises one of ``skip``, |f|
    grows on the way, a bound is reached, or the root found is a jump
    (|f| above 1e-7 scale there: f is discontinuous across a dome).
    """
    try:
        f0 = f(x0)
        if f0 == 0.0:
            return x0
        x1 = min(max(x0 * (1.0 + first_step), lo), hi)
        if x1 == x0:
            x1 = max(x0 * (1.0 - first_step), lo)
        f1 = f(x1)
        slope = (f1 - f0) / (x1 - x0)
        if not (slope != 0.0 and math.isfinite(slope)):
            return None
        a, fa = x0, f0
        step = -f0 / slope
        step = max(min(step, x0), -0.5 * x0)  # at most a factor of 2 either way at first
        for _ in range(60):
            b = min(max(a + step, lo), hi)
            if b == a:
                return None
            fb = f(b)
            if fa * fb <= 0.0:
                x = brent(f, a, b, rtol=rtol, fa=fa, fb=fb)
                return x if abs(f(x)) <= 1e-7 * scale else None
            if abs(fb) >= abs(fa):
                return None  # going the wrong way, or a turning point: leave it to the scan
            a, fa = b, fb
            step *= 2.0
    except skip:
        return None
    return None


def _outward(grid, start: float):
    """Indices of a monotone grid from the point nearest ``start`` outward: i0, i0-1, i0+1, i0-2 ..."""
    n = len(grid)
    ascending = grid[0] <= grid[-1]
    lo, hi = 0, n - 1
    while lo < hi:  # the first index at or past start, in the grid's own direction
        mid = (lo + hi) // 2
        if (grid[mid] < start) if ascending else (grid[mid] > start):
            lo = mid + 1
        else:
            hi = mid
    i0 = lo if lo == 0 or abs(grid[lo] - start) < abs(grid[lo - 1] - start) else lo - 1
    yield i0
    for k in range(1, n):
        if i0 - k >= 0:
            yield i0 - k
        if i0 + k < n:
            yield i0 + k
        if i0 - k < 0 and i0 + k >= n:
            return


def newton_bracketed(fdf, lo: float, hi: float, x0: float | None = None, *, flo: float | None = None,
                     fhi: float | None = None, xtol: float = 0.0, rtol: float = 1e-14,
                     maxiter: int = 100) -> float:
    """A root of f in [lo, hi] by Newton's method kept inside a bracket.

    The safeguarded Newton iteration ("rtsafe"): each Newton step from the
    current point is taken when it stays strictly inside the bracket and
    halves the bracket's width at least every other step; otherwise the
    step bisects. The bracket shrinks to the side where f changes sign, so
    the iteration cannot leave it and converges quadratically once close.

    Parameters
    ----------
    fdf : callable  x -> (f(x), f'(x)); f' may be None where unknown (bisect)
    lo, hi : float  the bracket; f(lo) and f(hi) must differ in sign
    x0 : float, optional  the first point (default: the bracket's middle)
    flo, fhi : float, optional  f(lo) and f(hi) when already known
    xtol, rtol : float  stop when a step is below xtol + rtol |x|

    Raises NoBracket when f(lo) and f(hi) have the same sign.

    >>> round(newton_bracketed(lambda x: (x * x - 2.0, 2.0 * x), 0.0, 2.0), 12)
    1.414213562373
    """
    if flo is None:
        flo = fdf(lo)[0]
    if fhi is None:
        fhi = fdf(hi)[0]
    if flo == 0.0:
        return lo
    if fhi == 0.0:
        return hi
    if flo * fhi > 0:
        raise NoBracket(f"f({lo:g}) and f({hi:g}) have the same sign")
    if flo > 0:  # orient: f(neg) < 0 < f(pos)
        neg, pos = hi, lo
    else:
        neg, pos = lo, hi
    x = 0.5 * (lo + hi) if x0 is None or not (min(lo, hi) < x0 < max(lo, hi)) else x0
    dx = dx_old = abs(hi - lo)
    for _ in range(maxiter):
        f, df = fdf(x)
        if f == 0.0:
            return x
        if f < 0:
            neg = x
        else:
            pos = x
        a, b = (neg, pos) if neg < pos else (pos, neg)
        # Newton when its step lands inside the bracket and shrinks fast enough
        # (|f / f'| below half the step before last); bisection otherwise
        if (df is not None and df != 0.0 and math.isfinite(df) and a < x - f / df < b
                and abs(2.0 * f) <= abs(dx_old * df)):
            dx_old, dx = dx, f / df
            new = x - dx
        else:
            dx_old, new = dx, 0.5 * (a + b)
            dx = x - new
        if abs(dx) <= xtol + rtol * abs(new) or b - a <= xtol + rtol * abs(new):
            return new
        x = new
    raise RuntimeError(f"newton_bracketed did not converge in {maxiter} iterations")
