"""The worked explanation of a result: each equation with its numbers.

Plain text, one line an equation, in SI units with kJ for energies so a
reviewer can follow every figure with a calculator.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ...units import R
from ..control_volume import TOLERANCE
from ..control_volume import factor as _factor
from ..control_volume import minus as _minus
from ..control_volume import number as _n

#: The edition of the words of a solve's texts (the explanation and the cautions, which a
#: record's solve entry holds): raise it when they change, so that replay lists an older
#: record's texts instead of judging them word for word (its quantities are still judged).
WORDING = 2


@dataclass(frozen=True)
class RoundOff:
    """The scales a result's computed energies and entropies are judged against.

    The balances are solved to ``relative`` (the solver's tolerance) of these
    scales, so a computed value smaller than that is round-off of zero: it is
    shown as 0 and said to be round-off; the result and the record's data keep
    the computed value.
    """

    energy: float
    """[J] the largest of n R T at each state and of each energy term"""
    entropy: float
    """[J/K] the largest of n R and the entropy changes"""
    relative: float = TOLERANCE

    def zero(self, value: float | None, unit: str = "J") -> bool:
        """Whether a computed value [J, or J/K with ``unit="J/K"``] is round-off of zero."""
        scale = self.entropy if unit == "J/K" else self.energy
        return value is not None and math.isfinite(value) and abs(value) < self.relative * scale

    def words(self) -> str:
        """The rule in words, with its scales (energies in kJ, entropies in J/K, as the explanation)."""
        return round_off_words(self.relative, f"{self.energy / 1e3:.6g} kJ", f"{self.entropy:.6g} J/K")


def round_off_words(relative: float, energy: str, entropy: str) -> str:
    """The round-off rule in words, its scales already written with their units."""
    rel = f"{relative:.0e}".replace("e-0", "e-")
    return (f"Round-off: a computed energy smaller than {rel} × {energy} (the largest of n R T and the "
            f"energy terms) or entropy smaller than {rel} × {entropy} (the largest of n R and the entropy "
            "changes) is shown as 0: the balances are solved to that precision; the data keep the "
            "computed values")


def _kJ(x: float, ro: RoundOff | None = None) -> str:
    if x == 0:
        return "0 kJ"
    if ro is not None and ro.zero(x):
        return "0 kJ (round-off)"
    return f"{x / 1e3:.6g} kJ"


def _JK(x: float, ro: RoundOff | None = None) -> str:
    if x == 0:
        return "0 J/K"
    if ro is not None and ro.zero(x, "J/K"):
        return "0 J/K (round-off)"
    return f"{x:.6g} J/K"




def _P(P: float) -> str:
    """A state's pressure, or that the model does not determine it (the incompressible model
    fixes v, not P, and leaves P as NaN)."""
    return f"P = {_n(P)} Pa" if math.isfinite(P) else "P not determined by the model (it fixes v, not P)"






def explain(r) -> list[str]:
    """Lines of equations with numbers substituted for a closed-system Result."""
    p = r.problem
    f = r.final
    fp = f.point
    c = p.convention
    ro = r.round_off
    # the sign convention is said beside the explanation, and its form in the first law's line
    lines = [f"Model: {p.model.label} for {p.species.name}; reference state: {p.model.reference_state}"]
    lines += [f"  {e}" for e in p.model.equations()]
    if p.species.overrides:
        lines.append("Overrides: " + ", ".join(f"{k} = {v}" for k, v in p.species.overrides))
    if p.n is None:
        lines.append(f"Amount: n = {_n(r.n)} mol, solved from the balances")
    elif len(r.initial) > 1:  # one compartment: its state line says n
        names = " + ".join(f"n({st.name})" for st in r.initial)
        lines.append(f"Amount: n = {names} = " + " + ".join(_n(st.n) for st in r.initial) + f" = {_n(r.n)} mol")
    for st in r.initial:
        pt = st.point
        lines.append(
            f"State {st.name}: T = {_n(pt.T)} K, {_P(pt.P)}, v = {_n(pt.v)} m3/mol, "
            f"u = {_n(pt.u)} J/mol, s = {_n(pt.s)} J/(mol K), n = {_n(st.n)} mol"
        )
    fixed = ", ".join(f"{k} by {w}" if w != "given" else f"{k} given" for k, w in p.final_sources.items())
    lines.append(
        f"State {f.name}: T = {_n(fp.T)} K, {_P(fp.P)}, v = {_n(fp.v)} m3/mol, "
        f"u = {_n(fp.u)} J/mol, s = {_n(fp.s)} J/(mol K)" + (f"  [{fixed}]" if fixed else "")
    )
    U1 = sum(st.U for st in r.initial)
    lines.append(f"ΔU = n u2 - Σ n u1 = {_n(r.n)} × {_factor(fp.u)}{_minus(U1)} = {_kJ(r.dU, ro)}")
    if math.isfinite(r.dU_ig) and math.isfinite(r.dU_dep):
        lines.append(
            f"  ideal-gas part Σ n (u_ig(T2) - u_ig(T1)) = {_kJ(r.dU_ig, ro)}; "
            f"departure part Σ n (u_dep2 - u_dep1) = {_kJ(r.dU_dep, ro)}"
        )
    else:
        lines.append(f"  not split into ideal-gas and departure parts: the {p.model.name} model has no "
                     "ideal-gas state")
    for t in r.terms:
        if t.kind == "boundary work":
            lines.append(_boundary_line(r, t, ro))
    Q = r.Q
    W = r.W_on
    # a sum of given terms is as typed; one with a solved term in it can be round-off
    ro_Q = ro if any(t.solved for t in r.terms if t.kind == "heat") else None
    ro_W = ro if any(t.solved for t in r.terms if t.kind != "heat") else None
    ke = f" + ΔKE ({_kJ(p.dKE)})" if p.dKE else ""
    pe = f" + ΔPE ({_kJ(p.dPE)})" if p.dPE else ""
    if c.on_system:
        lines.append(f"First law: ΔU{ke}{pe} = Q + W:  {_kJ(r.dU + p.dKE + p.dPE, ro)} = {_kJ(Q, ro_Q)} + "
                     f"{_paren(_kJ(W, ro_W), W)}")
    else:
        W_by = c.shown("work", W)
        lines.append(f"First law: ΔU{ke}{pe} = Q - W:  {_kJ(r.dU + p.dKE + p.dPE, ro)} = {_kJ(Q, ro_Q)} - "
                     f"{_paren(_kJ(W_by, ro_W), W_by)}")
    for t in r.terms:
        if t.solved and t.kind != "boundary work":
            label = "Q" if t.kind == "heat" else f"W ({c.positive_work} the system)"
            lines.append(f"  solved: {label} '{t.name}' = {_kJ(c.shown(t.kind, t.value), ro)}")
    lines.append(f"Energy balance residual, recomputed from the states: {r.residual:.2e} (relative)")
    S1 = sum(st.S for st in r.initial)
    lines.append(f"ΔS_system = n s2 - Σ n s1 = {_n(r.n)} × {_factor(fp.s)}{_minus(S1)} = {_JK(r.dS_system, ro)}")
    heats = [t for t in r.terms if t.kind == "heat"]
    if r.S_gen is not None:
        if heats:
            parts = "".join((" - " if t.value > 0 else " + ") + f"{_n(abs(t.value))}/{_n(t.T_boundary)}"
                            for t in heats)
            parts = parts[3:] if parts.startswith(" + ") else "-" + parts[3:]
            lines.append(f"ΔS_surroundings = -Σ Q/T_boundary = {parts} = {_JK(r.dS_surroundings, ro)}")
        else:
            lines.append("ΔS_surroundings = 0 J/K (no heat crosses the boundary)")
        if ro.zero(r.S_gen, "J/K") or r.S_gen == 0:
            why = "by constraint" if p.reversible else "to the precision of the calculation"
            tag = "; round-off" if r.S_gen != 0 else ""
            lines.append(f"S_gen = ΔS_system + ΔS_surroundings = 0 J/K (reversible {why}{tag})")
        else:
            lines.append(f"S_gen = ΔS_system + ΔS_surroundings = {_n(r.S_gen)} J/K ({r.S_gen / (r.n * R):.4g} n R)")
    else:
        lines.append("S_gen: not evaluated (a heat term has no boundary temperature)")
    plural = "" if r.iterations == 1 else "s"
    lines.append(f"Solver: {r.method}; {r.iterations} balance evaluation{plural}")
    if any("round-off)" in line for line in lines):
        lines.append(ro.words())
    return lines


def _paren(text: str, x: float) -> str:
    """A term's text after an operator: in parentheses when its number is negative."""
    return f"({text})" if x < 0 and not text.startswith("0") else text


def _boundary_line(r, t, ro: RoundOff) -> str:
    p = r.problem
    c = p.convention
    first = r.initial[0].point
    fp = r.final.point
    V1 = sum(st.V for st in r.initial) + sum(c.V for c in p.initial if c.state is None)
    V2 = r.final.V
    if p.path == "rigid":
        return f"Boundary work (rigid): W_b = 0; V1 = V2 = {_n(V2)} m3"
    # W_b is work done on the system; said so, and as the convention shows it when that differs
    by = "" if c.on_system else f"; done by the system: {_kJ(c.shown('work', t.value), ro)}"
    if p.path == "isobaric":
        return (f"Boundary work (isobaric), on the system: W_b = -P (V2 - V1) = -{_n(first.P)} × "
                f"({_n(V2)}{_minus(V1)}) = {_kJ(t.value, ro)}{by}")
    if p.path == "isothermal":
        return (
            f"Boundary work (isothermal, reversible), on the system: W_b = -∫P dV = n (a2 - a1), a = u - T s: "
            f"{_n(r.n)} × ({_n(fp.a)}{_minus(first.a)}) = {_kJ(t.value, ro)}{by}"
        )
    k = p.n_poly
    if abs(k - 1.0) < 1e-12:  # P V = const: the solver's own form
        return (f"Boundary work (polytropic, n = 1), on the system: W_b = -P1 V1 ln(V2/V1) = "
                f"-{_n(first.P)} × {_n(V1)} × ln({_n(V2)}/{_n(V1)}) = {_kJ(t.value, ro)}{by}")
    return (
        f"Boundary work (polytropic, n = {k:g}), on the system: W_b = (P2 V2 - P1 V1)/(n - 1) = "
        f"({_n(fp.P)} × {_n(V2)} - {_n(first.P)} × {_n(V1)})/({k:g} - 1) = {_kJ(t.value, ro)}{by}"
    )
