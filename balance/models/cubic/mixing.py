"""A cubic equation of state for a gas mixture: the van der Waals one-fluid mixing rules.

    a = Σᵢ Σⱼ yᵢ yⱼ (1 - kᵢⱼ) √(aᵢ aⱼ),    b = Σᵢ yᵢ bᵢ

with each component's aᵢ(T) and bᵢ from its own critical constants (the pure
cubic's), and kᵢⱼ the binary interaction parameters (:mod:`balance.interaction`:
bundled with their source, or given in the worksheet).

Each component's √aᵢ is linear in a function g(T) of temperature alone —
√aᵢ = αᵢ + βᵢ √T for the Soave α (√a_c (1 + m) - √a_c m √(T/Tc)),
βᵢ T^-1/4 for Redlich-Kwong, a constant for van der Waals — so at a fixed
composition the mixture's a(T) = A0 + A1 g + A2 g² is as cheap as a pure
fluid's, and a fixed-composition mixture is a one-fluid cubic to which the
pure cubic's formulas, searches and volume roots apply unchanged
(:class:`CubicMixture` is a :class:`~.eos.Cubic` with that a(T) and b).

What is the mixture's own: the fugacity coefficient of each component,

    ln φᵢ = (bᵢ/b)(Z - 1) - ln(Z - B) - (A/B) L (2 Σⱼ yⱼ aᵢⱼ / a - bᵢ/b),
    L = ln((Z + σB)/(Z + εB)) / (σ - ε)   (B/Z for van der Waals),

and the phase: a single-phase root of the one-fluid can be a state that
splits into two phases of different compositions. Every state a
:class:`CubicMixture` returns has passed the tangent-plane stability test
(:mod:`.phases`); an unstable one is refused with the mixture's dew and
bubble points and its isothermal flash.
"""

from __future__ import annotations

import math
import numpy as np

from ...errors import InputError, TwoPhaseError
from ...rootfind import brent
from ...species import Species, lookup
from ...units import R
from ..base import Point, PropertyModel
from . import formulas as fm
from .eos import Cubic, cubic_roots, z_roots
from .forms import CubicForm
from .saturation import SaturationCurve


class Mixing:
    """The one-fluid mixing rules of a cubic form over a set of components.

    Parameters
    ----------
    components : tuple of Species  (pure)
    form : CubicForm
    kij : square matrix (sequence of sequences) of binary interaction parameters [-]
    """

    def __init__(self, components: tuple[Species, ...], form: CubicForm, kij):
        self.components = components
        self.form = form
        Tc = np.array([sp.Tc for sp in components])
        Pc = np.array([sp.Pc for sp in components])
        omega = np.array([sp.omega for sp in components])
        self.Tc, self.Pc, self.omega = Tc, Pc, omega
        self.b_i = form.omega_b * R * Tc / Pc
        """each component's co-volume [m3/mol]"""
        root_ac = np.sqrt(form.omega_a * R**2 * Tc**2 / Pc)
        m0, m1, m2 = form.m
        m = m0 + m1 * omega + m2 * omega * omega
        if form.alpha == "soave":  # √a = √a_c (1 + m) - √a_c m / √Tc · √T
            self.alpha, self.beta = root_ac * (1.0 + m), -root_ac * m / np.sqrt(Tc)
        elif form.alpha == "rk":  # √a = √a_c Tc^1/4 · T^-1/4
            self.alpha, self.beta = np.zeros_like(Tc), root_ac * Tc**0.25
        else:
            self.alpha, self.beta = root_ac, np.zeros_like(Tc)
        self.M = 1.0 - np.asarray(kij, dtype=float)
        """1 - kᵢⱼ (symmetric, ones on the diagonal)"""
        self.eps, self.sig = form.epsilon, form.sigma

    # -- g(T), and a(T) at a fixed composition --------------------------------
    def g_terms(self, T):
        """g(T), g', g'' (floats or arrays): √aᵢ = αᵢ + βᵢ g."""
        if self.form.alpha == "soave":
            t = T**0.5
            return t, 0.5 / t, -0.25 / (t * T)
        if self.form.alpha == "rk":
            q = T**-0.25
            return q, -0.25 * q / T, 0.3125 * q / (T * T)
        zero = 0.0 * T
        return zero, zero, zero

    def coefficients(self, y) -> tuple[float, float, float, float]:
        """(A0, A1, A2, b) of a(T) = A0 + A1 g + A2 g² [Pa m6/mol2] and b [m3/mol] at mole fractions y."""
        y = np.asarray(y, dtype=float)
        ya, yb = y * self.alpha, y * self.beta
        return (float(ya @ self.M @ ya), float(2.0 * ya @ self.M @ yb), float(yb @ self.M @ yb),
                float(y @ self.b_i))

    def a_terms(self, A: tuple, T):
        """a [Pa m6/mol2], da/dT, d²a/dT² at T [K] from :meth:`coefficients` (floats or arrays)."""
        A0, A1, A2 = A[0], A[1], A[2]
        g, dg, d2g = self.g_terms(T)
        slope = A1 + 2.0 * A2 * g
        return A0 + (A1 + A2 * g) * g, slope * dg, 2.0 * A2 * dg * dg + slope * d2g

    # -- fugacity coefficients of each component --------------------------------
    def a_matrix(self, T: float):
        """aᵢⱼ = (1 - kᵢⱼ) √(aᵢ aⱼ) [Pa m6/mol2] at T [K]: what every composition at this T shares."""
        r = self.alpha + self.beta * self.g_terms(T)[0]
        return self.M * np.outer(r, r)

    def _L(self, Z, B, log):
        if self.sig == self.eps:
            return B / Z
        return log((Z + self.sig * B) / (Z + self.eps * B)) / (self.sig - self.eps)

    # one formula set for the scalar and the vectorised path (floats or arrays, math or numpy's log)
    def _mixture_ln_phi(self, Z, A, B, log):
        """ln φ of the mixture on the root Z [-]: its residual Gibbs energy over RT, which picks the root."""
        return Z - 1.0 - log(Z - B) - A / B * self._L(Z, B, log)

    def _component_ln_phi(self, Z, A, B, bi_b, share, log):
        """ln φᵢ [-] on the root Z, with bᵢ/b and share = Σⱼ xⱼ aᵢⱼ / a (the module docstring's formula)."""
        return bi_b * (Z - 1.0) - log(Z - B) - A / B * self._L(Z, B, log) * (2.0 * share - bi_b)

    def ln_phi(self, T: float, P: float, x, root: str = "stable", aij=None):
        """(ln φᵢ array, Z, ln φ of the mixture) of composition x at T [K], P [Pa] on a root.

        ``root``: 'stable' (the root of lower Gibbs energy), 'liquid' (smallest) or 'vapour';
        ``aij``: :meth:`a_matrix` at T, where the caller has it (a test at one T asks many times).
        """
        if aij is None:
            aij = self.a_matrix(T)
        ax = aij @ x
        a, b = float(x @ ax), float(x @ self.b_i)
        RT = R * T
        A, B = a * P / (RT * RT), b * P / RT
        z_lo, z_hi, _ = z_roots(*fm.z_coefficients(A, B, self.eps, self.sig))
        if not z_lo > B:
            z_lo = z_hi
        log = math.log
        if root == "stable" and z_hi != z_lo:
            Z = z_lo if self._mixture_ln_phi(z_lo, A, B, log) < self._mixture_ln_phi(z_hi, A, B, log) else z_hi
        else:
            Z = z_lo if root == "liquid" else z_hi
        lnphi = self._component_ln_phi(Z, A, B, self.b_i / b, ax / a, log)
        return lnphi, Z, self._mixture_ln_phi(Z, A, B, log)

    def ln_phi_many(self, T, P, x):
        """ln φᵢ (n, N) and Z (N,) of compositions x (n, N) at arrays T, P (N,), on the stable roots."""
        r = self.alpha[:, None] + self.beta[:, None] * self.g_terms(T)[0][None, :]
        w = x * r
        Mw = self.M @ w
        a, b = np.sum(w * Mw, axis=0), self.b_i @ x
        RT = R * T
        A, B = a * P / (RT * RT), b * P / RT
        z_lo, z_hi, _ = cubic_roots(*fm.z_coefficients(A, B, self.eps, self.sig))
        z_lo = np.where(z_lo > B, z_lo, z_hi)
        with np.errstate(invalid="ignore", divide="ignore"):
            lower = self._mixture_ln_phi(z_lo, A, B, np.log) < self._mixture_ln_phi(z_hi, A, B, np.log)
            Z = np.where(lower, z_lo, z_hi)
            # Σⱼ xⱼ aᵢⱼ = rᵢ (M (x r))ᵢ
            lnphi = self._component_ln_phi(Z, A, B, self.b_i[:, None] / b[None, :], r * Mw / a, np.log)
        return lnphi, Z

    def wilson_K(self, T, P):
        """Wilson's K-values, Kᵢ = (Pcᵢ/P) exp(5.373 (1 + ωᵢ)(1 - Tcᵢ/T)) [-], the usual first guess."""
        if np.ndim(T):
            T, P = np.asarray(T)[None, :], np.asarray(P)[None, :]
            return (self.Pc[:, None] / P) * np.exp(5.373 * (1.0 + self.omega[:, None]) * (1.0 - self.Tc[:, None] / T))
        return (self.Pc / P) * np.exp(5.373 * (1.0 + self.omega) * (1.0 - self.Tc / T))


class CubicMixture(Cubic):
    """A cubic equation of state for a mixture of fixed composition (van der Waals one-fluid).

    Parameters
    ----------
    species : Species  a mixture (:func:`balance.mixture.mixture`): its ``composition`` names the components
    form : CubicForm
    kij : dict, optional  (id_i, id_j) -> kᵢⱼ given in the worksheet, in place of the bundled value
    components : tuple of Species, optional  the components' constants, in the composition's order
        (by default the species data's; a test may give another source's)
    """

    def __init__(self, species: Species, form: CubicForm, kij: dict | None = None,
                 components: tuple[Species, ...] | None = None):
        from ...interaction import kij_set

        PropertyModel.__init__(self, species)
        if not species.composition:
            raise InputError("fluid.species", "a cubic mixture needs a composition")
        self.form = form
        self.name = form.name
        self.components = components or tuple(lookup(i) for i, _ in species.composition)
        self.z = np.array([y for _, y in species.composition])
        """the mixture's mole fractions [-]"""
        self.kij = kij_set([sp.id for sp in self.components], form.name, kij or {})
        """the binary interaction parameters used, each with its source"""
        self.mixing = Mixing(self.components, form, self.kij.matrix)
        self.label = f"{form.label} mixture (van der Waals one-fluid mixing, kij)"
        *self._A, self.b = self.mixing.coefficients(self.z)
        self.a_rk, self.a_given, self.b_given = None, False, False
        self._eps, self._sig = form.epsilon, form.sigma
        self.Tc_eos, self.Pc_eos = self._critical_point()
        """the one-fluid's critical point [K], [Pa]: where a mixture of this composition, kept at
        this composition, would have one; the mixture's own critical point is not this"""
        self.vc_eos = form.Zc / form.omega_b * self.b
        self.saturation_curve = SaturationCurve(self)
        """the one-fluid's coexistence: the searches' branches (a state inside it is two-phase)"""

    def __reduce__(self):
        from ...interaction import GIVEN

        given = {(i, j): k for i, j, k, source in self.kij.used if source == GIVEN}
        return (CubicMixture, (self.species, self.form, given, self.components))

    def _critical_point(self) -> tuple[float, float]:
        """Where a(T) / (b R T) = Ωa / Ωb, as for a pure cubic."""
        f = self.form
        k = f.omega_a / f.omega_b * self.b * R
        T = brent(lambda T: self.a_terms(T)[0] - k * T, 1.0, 1e5)
        return T, f.omega_b * R * T / self.b

    def a_terms(self, T):
        """a [Pa m6/mol2], da/dT, d²a/dT² at T [K] of the mixture's composition; floats or arrays."""
        return self.mixing.a_terms(self._A, T)

    # -- the phase of every state returned --------------------------------------
    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K], P [Pa]; a TwoPhaseError where the mixture splits."""
        return self.checked(super().at_TP(T, P), "state")

    def at_Tv(self, T: float, v: float, field: str = "") -> Point:
        return self.checked(super().at_Tv(T, v, field), field or "state")

    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        if keys == ("T", "P"):
            return self.checked(super().at_TP(*values), field)
        if keys == ("T", "v"):
            return self.at_Tv(values[0], values[1], field)
        return self.checked(super().solve_pair(keys, values, field), field)

    def checked(self, p: Point, field: str) -> Point:
        """``p`` when the mixture is stable there as one phase; else the refusal, with the flash."""
        from .phases import stability

        test = stability(self.mixing, p.T, p.P, self.z)
        if test.stable:
            return p
        raise self.two_phase_error(field, p.T, p.P)

    def two_phase_error(self, field: str, T: float, P: float) -> TwoPhaseError:
        from .phases import describe_split

        return TwoPhaseError(field, describe_split(self, T, P) + ". This version gives single-phase mixture "
                                    "states only: fix the state outside the phase envelope")

    def wet_error(self, field: str, where: str, T: float, x: float | None = None) -> TwoPhaseError:
        """Inside the one-fluid's dome the mixture is two-phase as well: the refusal with its envelope."""
        from .phases import describe_envelope_T

        return TwoPhaseError(field, f"{where} lies inside the two-phase region of the mixture under {self.form.label} "
                                    f"({describe_envelope_T(self, T)}). This version gives single-phase mixture "
                                    "states only: fix the state outside the phase envelope")

    def dew_bubble_T(self, P: float) -> tuple[float | None, float | None]:
        """(bubble, dew) temperatures [K] at P [Pa] (:func:`.phases.envelope_at_P`), None where the
        search finds none: what a stream table shows."""
        from .phases import envelope_at_P

        lower, upper = envelope_at_P(self.mixing, P, self.z)
        return (None if lower is None else float(lower.value), None if upper is None else float(upper.value))

    def states_TP(self, T, P) -> dict[str, np.ndarray]:
        """Every property of the one-phase state at each (T, P), and ``stable`` (bool array):
        False where the tangent-plane test finds the mixture splits (its properties are then not
        the equilibrium's)."""
        from .phases import stability_many

        out = super().states_TP(T, P)
        shape = out["T"].shape
        out["stable"] = stability_many(self.mixing, out["T"].reshape(-1), out["P"].reshape(-1), self.z).reshape(shape)
        return out

    # -- words ------------------------------------------------------------------
    def equations(self) -> list[str]:
        f = self.form
        parts = ", ".join(f"{sp.id} {y:.6g}" for sp, y in zip(self.components, self.z))
        lines = [
            f"P = R T/(v - b) - a(T)/((v + ε b)(v + σ b)),  ε = {f.epsilon:.6g}, σ = {f.sigma:.6g}",
            "one-fluid mixing (van der Waals): a = Σi Σj yi yj (1 - kij) √(ai aj),  b = Σi yi bi",
            f"components (mole fractions): {parts}",
            "ai(T) = Ωa R² Tci²/Pci α(T; Tci, ωi),  bi = Ωb R Tci/Pci  (each component's own constants), "
            + f.alpha_text,
            f"b = {self.b:.6g} m3/mol; a(T) = {self._A[0]:.6g} {self._A[1]:+.6g} g {self._A[2]:+.6g} g² Pa m6/mol2"
            + (", g = √T" if f.alpha == "soave" else ", g = T^-1/4" if f.alpha == "rk" else ""),
            "binary interaction parameters:",
            *(f"  {line}" for line in self.kij.lines()),
            "ln φi = (bi/b)(Z - 1) - ln(Z - B) - (A/B) L (2 Σj yj aij/a - bi/b),  L = ln((Z + σB)/(Z + εB))/(σ - ε)",
            "every state passes the tangent-plane stability test (Michelsen): a state where the mixture splits "
            "is refused with its dew and bubble points",
            "u = u_ig(T) + (T a' - a) I;  s = s_ig(T, P) - R Σ y ln y + R ln(1 - b/v) + a' I + R ln Z",
        ]
        return lines

    def T_bounds(self) -> tuple[float, float]:
        return (max(1.0, 0.25 * float(self.mixing.Tc.min())), 6000.0)

    def warnings(self, p: Point) -> list[str]:
        out = [w for w in super().warnings(p) if not w.startswith(f"liquid state with {self.label}")]
        if p.phase == "liquid":
            out.append(f"liquid-like mixture state with {self.label}: cubic liquid volumes are typically 5-20 % "
                       "off; the phase label follows the one-fluid's pseudo-critical point")
        missing = self.kij.warning()
        if missing:
            out.append(missing)
        return out
