"""The cubic's formulas, written once for plain floats and numpy arrays alike.

Every function here uses only arithmetic and the functions it is handed
(``math.log1p`` or ``numpy.log1p`` ...), so the scalar path (Python floats,
a few microseconds per state) and the vectorised path (arrays) evaluate
the very same expressions and cannot drift apart; ``tests/test_cubic_paths.py``
holds them equal to 1e-12.

Residual (departure) properties come from the closed form of the residual
Helmholtz energy at (T, v), with I = ln((v + σb)/(v + εb)) / (b(σ - ε))
(I = 1/v for van der Waals):

    A^r  = -R T ln(1 - b/v) - a I
    U^r  = (T a' - a) I
    S^r  = R ln(1 - b/v) + a' I                (at the same T and v)
    cv^r = T a'' I                              (zero for van der Waals: a'' = 0)
    departures at the same T and P: u_dep = U^r, h_dep = U^r + P v - R T,
    s_dep = S^r + R ln Z;  ln φ = A^r/(R T) + Z - 1 - ln Z

The entropy is written without ln P, s = s°(T) + S^r - R ln(R T / (v P°)),
so it is defined wherever the equation is (a search may pass through
states of negative pressure; no answer is one).
"""

from __future__ import annotations

from ...units import P_REF, R


def residual_terms(T, v, a, da, d2a, b: float, eps: float, sig: float, log1p):
    """The equation's pressure, its derivatives and the residual terms at (T, v).

    Parameters
    ----------
    T : temperature [K];  v : molar volume [m3/mol] (v > b)
    a, da, d2a : a(T) [Pa m6/mol2] and its first and second T-derivatives
    b : co-volume [m3/mol];  eps, sig : the form's ε and σ
    log1p : ``math.log1p`` or ``numpy.log1p``

    Returns (P [Pa], (∂P/∂T)_v [Pa/K], (∂P/∂v)_T [Pa mol/m3], A^r, U^r [J/mol],
    S^r, cv^r [J/(mol K)]).
    """
    RT = R * T
    ve = v + eps * b
    vs = v + sig * b
    vb = v - b
    den = ve * vs
    if sig == eps:
        I = 1.0 / v  # noqa: E741  (the integral's usual name)
    else:
        I = log1p((sig - eps) * b / ve) / (b * (sig - eps))  # noqa: E741
    P = RT / vb - a / den
    dPdT = R / vb - da / den
    dPdv = -RT / (vb * vb) + a * (ve + vs) / (den * den)
    ln_free = log1p(-b / v)
    return (P, dPdT, dPdv, -RT * ln_free - a * I, (T * da - a) * I, R * ln_free + da * I, T * d2a * I)


def caloric(T, v, ideal, residual, log):
    """(P, u, h, s, cv, (∂P/∂T)_v, (∂P/∂v)_T) at (T, v): what a search needs.

    ``ideal`` is (cp°, h°, s°) at T (:meth:`IdealGasHeatCapacity.terms`),
    ``residual`` the tuple of :func:`residual_terms`; units molar SI.
    """
    cp0, h0, s0 = ideal
    P, dPdT, dPdv, _, U_r, S_r, cv_r = residual
    RT = R * T
    u = h0 - RT + U_r
    return (P, u, u + P * v, s0 + S_r - R * log(RT / (v * P_REF)), cp0 - R + cv_r, dPdT, dPdv)


def ln_phi(T, v, P, A_r, log):
    """ln φ [-] from A^r [J/mol] at (T, v) and the pressure P [Pa] there."""
    Z = P * v / (R * T)
    return A_r / (R * T) + Z - 1.0 - log(Z)


def properties(T, v, cal, residual, log):
    """Every property at (T, v): (P, Z, u, h, s, cv, cp, u_dep, h_dep, s_dep, ln φ).

    ``cal`` is :func:`caloric`'s tuple at the same state. P must be positive
    (Z and the departures at the same T and P take its logarithm).
    """
    P, u, h, s, cv, dPdT, dPdv = cal
    A_r, U_r, S_r = residual[3], residual[4], residual[5]
    RT = R * T
    Z = P * v / RT
    lnZ = log(Z)
    return (P, Z, u, h, s, cv, cv - T * dPdT * dPdT / dPdv, U_r, U_r + P * v - RT, S_r + R * lnZ,
            A_r / RT + Z - 1.0 - lnZ)


def z_coefficients(A, B, eps: float, sig: float):
    """c2, c1, c0 of Z³ + c2 Z² + c1 Z + c0 = 0, with A = a P/(R T)², B = b P/(R T)."""
    es, e_s = eps * sig, eps + sig
    return (-(1.0 + B - e_s * B), A + es * B * B - e_s * B * (B + 1.0), -(A * B + es * B * B * (B + 1.0)))


def depressed(c2, c1, c0):
    """(p, q, discriminant, shift) of the depressed cubic t³ + p t + q, Z = t - shift."""
    shift = c2 / 3.0
    p = c1 - c2 * shift
    q = (2.0 * shift * shift - c1) * shift + c0
    half, third = 0.5 * q, p / 3.0
    return p, q, half * half + third * third * third, shift


def one_root(q, disc, cbrt, sqrt):
    """t of the one real root (discriminant > 0), by Cardano's formula."""
    sq = sqrt(disc)
    return cbrt(-q / 2.0 + sq) + cbrt(-q / 2.0 - sq)


def three_roots(p, q, sqrt, acos, cos, clip):
    """(t_smallest, t_largest) of three real roots (p < 0), by the trigonometric form."""
    r = 2.0 * sqrt(-p / 3.0)
    phi = acos(clip(3.0 * q / (p * r))) / 3.0
    return r * cos(phi + 2.0943951023931957), r * cos(phi)  # 2π/3


def deflated(z, c2, c0):
    """The other two roots' quadratic Z² + d1 Z + d0 after dividing out the root z.

    Returns (d1, d0, discriminant). Used where the closed form reports one
    root beside a vapour-like root z: at very low pressures the three-root
    discriminant is lost in round-off, while the quadratic keeps the small
    (liquid) roots to full precision (d0 = -c0/z is their product).
    """
    d1 = c2 + z
    d0 = -c0 / z
    return d1, d0, d1 * d1 - 4.0 * d0


def newton_terms(z, c2, c1, c0):
    """The cubic and its derivative at z, for polishing a root."""
    return ((z + c2) * z + c1) * z + c0, (3.0 * z + 2.0 * c2) * z + c1
