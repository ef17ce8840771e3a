"""The worked explanation of a result: each equation with its numbers.

Plain text, one line an equation, in SI units with kJ for energies so a
reviewer can follow every figure with a calculator.
"""

from __future__ import annotations

from ...units import R


def _kJ(x: float) -> str:
    return f"{x / 1e3:.6g} kJ"


def explain(r) -> list[str]:
    """Lines of equations with numbers substituted for a closed-system Result."""
    p = r.problem
    f = r.final
    fp = f.point
    c = p.convention
    lines = [f"Sign convention: {c.words}"]
    lines.append(f"Model: {p.model.label} for {p.species.name}; reference state: {p.model.reference_state}")
    lines += [f"  {e}" for e in p.model.equations()]
    if p.species.overrides:
        lines.append("Overrides: " + ", ".join(f"{k} = {v}" for k, v in p.species.overrides))
    lines.append("Mass: n2 = " + " + ".join(f"{st.n:.6g}" for st in r.initial) + f" = {r.n:.6g} mol")
    for st in r.initial:
        pt = st.point
        lines.append(
            f"State {st.name}: T = {pt.T:.6g} K, P = {pt.P:.6g} Pa, v = {pt.v:.6g} m3/mol, "
            f"u = {pt.u:.6g} J/mol, s = {pt.s:.6g} J/(mol K), n = {st.n:.6g} mol"
        )
    fixed = ", ".join(f"{k} by {w}" if w != "given" else f"{k} given" for k, w in p.final_sources.items())
    lines.append(
        f"State {f.name}: T = {fp.T:.6g} K, P = {fp.P:.6g} Pa, v = {fp.v:.6g} m3/mol, "
        f"u = {fp.u:.6g} J/mol, s = {fp.s:.6g} J/(mol K)" + (f"  [{fixed}]" if fixed else "")
    )
    U1 = sum(st.U for st in r.initial)
    lines.append(f"ΔU = n u2 - Σ n u1 = {r.n:.6g} × {fp.u:.6g} - ({U1:.6g}) = {_kJ(r.dU)}")
    lines.append(
        f"  ideal-gas part Σ n (u_ig(T2) - u_ig(T1)) = {_kJ(r.dU_ig)}; "
        f"departure part Σ n (u_dep2 - u_dep1) = {_kJ(r.dU_dep)}"
    )
    for t in r.terms:
        if t.kind == "boundary work":
            lines.append(_boundary_line(r, t))
    Q = r.Q
    W = r.W_on
    ke = f" + ΔKE ({_kJ(p.dKE)})" if p.dKE else ""
    pe = f" + ΔPE ({_kJ(p.dPE)})" if p.dPE else ""
    if c.on_system:
        lines.append(f"First law: ΔU{ke}{pe} = Q + W:  {_kJ(r.dU + p.dKE + p.dPE)} = {_kJ(Q)} + {_kJ(W)}")
    else:
        W_by = c.shown("work", W)
        lines.append(f"First law: ΔU{ke}{pe} = Q - W:  {_kJ(r.dU + p.dKE + p.dPE)} = {_kJ(Q)} - ({_kJ(W_by)})")
    for t in r.terms:
        if t.solved and t.kind != "boundary work":
            label = "Q" if t.kind == "heat" else f"W ({c.positive_work} the system)"
            lines.append(f"  solved: {label} '{t.name}' = {_kJ(c.shown(t.kind, t.value))}")
    lines.append(f"Energy balance residual, recomputed from the states: {r.residual:.2e} (relative)")
    S1 = sum(st.S for st in r.initial)
    lines.append(f"ΔS_system = n s2 - Σ n s1 = {r.n:.6g} × {fp.s:.6g} - ({S1:.6g}) = {r.dS_system:.6g} J/K")
    heats = [t for t in r.terms if t.kind == "heat"]
    if r.S_gen is not None:
        parts = " + ".join(f"{t.value:.6g}/{t.T_boundary:.6g}" for t in heats) or "0"
        lines.append(f"ΔS_surroundings = -Σ Q/T_boundary = -({parts}) = {r.dS_surroundings:.6g} J/K")
        lines.append(
            f"S_gen = ΔS_system + ΔS_surroundings = {r.S_gen:.6g} J/K"
            f" ({r.S_gen / (r.n * R):.4g} n R)" + ("  (reversible: 0 by constraint)" if p.reversible else "")
        )
    else:
        lines.append("S_gen: not evaluated (a heat term has no boundary temperature)")
    lines.append(f"Solver: {r.method}; {r.iterations} balance evaluations")
    return lines


def _boundary_line(r, t) -> str:
    p = r.problem
    first = r.initial[0].point
    fp = r.final.point
    V1 = sum(st.V for st in r.initial) + sum(c.V for c in p.initial if c.state is None)
    V2 = r.final.V
    if p.path == "rigid":
        return f"Boundary work (rigid): W_b = 0; V1 = V2 = {V2:.6g} m3"
    if p.path == "isobaric":
        return f"Boundary work (isobaric): W_b = -P (V2 - V1) = -{first.P:.6g} × ({V2:.6g} - {V1:.6g}) = {_kJ(t.value)}"
    if p.path == "isothermal":
        return (
            f"Boundary work (isothermal, reversible): W_b = -∫P dV = n (a2 - a1), a = u - T s: "
            f"{r.n:.6g} × ({fp.a:.6g} - {first.a:.6g}) = {_kJ(t.value)}"
        )
    k = p.n_poly
    return (
        f"Boundary work (polytropic, n = {k:g}): W_b = (P2 V2 - P1 V1)/(n - 1) = "
        f"({fp.P:.6g} × {V2:.6g} - {first.P:.6g} × {V1:.6g})/({k:g} - 1) = {_kJ(t.value)}"
    )
