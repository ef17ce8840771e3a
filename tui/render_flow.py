"""Rich renderings of a steady-flow result and of what a steady-flow worksheet lacks.

The same SI result the domain solved (:mod:`balance.balances.steady_flow`), shown in the
display units of :mod:`.display`: the streams (state, rates, speed), the devices (heat,
power, efficiency, entropy generation, exergy destroyed, each one's balances recomputed),
the equations with numbers, the warnings and the cautions. Where no rate is given the
network is solved per 1 kg/s of its first feed, and every rate and power is shown per kg
of that stream (kJ/kg, kg/kg), never as if it were a plant's rate.
"""

from __future__ import annotations

from rich import box
from rich.console import Group
from rich.table import Table
from rich.text import Text

from balance.balances.steady_flow.result import phase_words

from .display import UNIT_SETS, show, unit_label
from .panels import closing_panels

#: Device kinds that take work and carry an isentropic end state.
MACHINES = ("compressor", "pump", "turbine", "expander")
#: A found value is marked so in the device table (its legend says so).
FOUND = "*"
#: An entropy generation below this share of ṅ R is round-off and shown as 0 (the precision the
#: devices' balances are solved to, as the closed balance's round-off rule).
ROUND_OFF = 1e-9
#: The molar gas constant [J/(mol K)] (CODATA 2018, exact), the entropy scale of a stream.
R = 8.314462618
#: Where a stream's rate, when found, is news (a feed's, or a device's that divides or joins).
_RATE_FOUND = ("feed", "mixer", "splitter", "separator")


class _Basis:
    """How rates and powers are shown: per second (a rate is given) or per kg of a feed."""

    def __init__(self, result, units: str):
        self.units = units
        self.stream = _basis_stream(result)
        self.m_dot = result.flows[self.stream].m_dot if self.stream else None
        self.S_scale = R * max(f.n_dot for f in result.flows.values())

    @property
    def per_kg(self) -> bool:
        return self.stream is not None

    def energy(self, W: float | None, digits: int = 5) -> tuple[str, str]:
        """A heat or power [W] as (text, unit): per second, or per kg of the basis stream."""
        if self.per_kg:
            return show(None if W is None else W / self.m_dot, "h", self.units, digits), unit_label("h", self.units)
        return show(W, "Edot", self.units, digits), unit_label("Edot", self.units)

    def entropy(self, S: float | None, digits: int = 5) -> tuple[str, str]:
        """An entropy rate [W/K] as (text, unit): per second, or per kg of the basis stream; 0
        where it is round-off (below 1e-9 of ṅ R, ṅ the largest stream's molar rate)."""
        if self.round_off(S):
            S = 0.0
        if self.per_kg:
            return show(None if S is None else S / self.m_dot, "s", self.units, digits), unit_label("s", self.units)
        return show(S, "Sdot", self.units, digits), unit_label("Sdot", self.units)

    def round_off(self, S: float | None) -> bool:
        """Whether an entropy rate [W/K] is round-off (then it and its exergy destroyed show 0)."""
        return S is not None and abs(S) < ROUND_OFF * self.S_scale

    def energy_label(self) -> str:
        return unit_label("h", self.units) if self.per_kg else unit_label("Edot", self.units)

    def entropy_label(self) -> str:
        return unit_label("s", self.units) if self.per_kg else unit_label("Sdot", self.units)


def _basis_stream(result) -> str | None:
    """The stream the rates are per kg of, where no rate was given (the domain solves per
    1 kg/s of the first device inlet no device puts out): None where a rate was given."""
    if not result.basis:
        return None
    leaving = {s for d in result.problem.devices for s in d.outlets}
    feeds = [s for d in result.problem.devices for s in d.inlets if s not in leaving]
    named = [s for s in feeds if f"'{s}'" in result.basis]  # the one the basis names
    return (named or feeds or [None])[0]


def _fluids(result) -> list[str]:
    """One line per species and model: which streams it carries."""
    groups: dict[tuple[str, str], list[str]] = {}
    for name, f in result.flows.items():
        sp = f.model.species
        groups.setdefault((f"{sp.name} ({sp.id}), {f.model.label}", f.model.reference_state), []).append(name)
    lines = []
    for (label, ref), names in groups.items():
        where = "every stream" if len(groups) == 1 else "streams " + ", ".join(names)
        lines.append(f"{label}: {where}; reference state: {ref}")
    return lines


#: Streams per table: five columns of numbers fit 80 columns; more go to a further table.
STREAMS_PER_TABLE = 5


def streams_tables(result, units: str) -> list[Table]:
    """The streams, five to a table (so that each fits 80 columns)."""
    names = list(result.flows)
    chunks = [names[i:i + STREAMS_PER_TABLE] for i in range(0, len(names), STREAMS_PER_TABLE)]
    return [streams_table(result, units, chunk, f"Streams ({k + 1} of {len(chunks)})" if len(chunks) > 1
                          else "Streams") for k, chunk in enumerate(chunks)]


def streams_table(result, units: str, names: list[str] | None = None, title: str = "Streams") -> Table:
    """Each stream a column: T, P, h, s, the quality or phase, the rates, the speed where known."""
    basis = _Basis(result, units)
    flows = [result.flows[n] for n in (names or result.flows)]
    t = Table(title=title, box=box.SIMPLE_HEAD, title_justify="left", pad_edge=False, padding=(0, 1, 0, 0))
    t.add_column("property")
    t.add_column("unit", style="dim")
    for f in flows:
        t.add_column(f.name, justify="right")
    t.add_row("T", unit_label("T", units), *(show(f.point.T, "T", units) for f in flows))
    t.add_row("P", unit_label("P", units), *(show(f.point.P, "P", units) for f in flows))
    t.add_row("h", unit_label("h", units), *(show(f.point.h / f.M, "h", units) for f in flows))
    t.add_row("s", unit_label("s", units), *(show(f.point.s / f.M, "s", units) for f in flows))
    if any(f.point.x is not None for f in flows):
        t.add_row("x", "", *("—" if f.point.x is None else f"{f.point.x:.6g}" for f in flows))
    t.add_row("phase", "", *(phase_words(f.point) for f in flows))
    edges = getattr(result, "edges", {})
    if any(f.name in edges for f in flows):  # a cubic mixture's phase envelope at each stream's pressure
        for label, k in (("dew point", 1), ("bubble point", 0)):
            t.add_row(label, unit_label("T", units),
                      *("—" if edges.get(f.name, (None, None))[k] is None else show(edges[f.name][k], "T", units)
                        for f in flows))
    if basis.per_kg:
        t.add_row("ṁ", f"kg/kg '{basis.stream}'", *(f"{f.m_dot / basis.m_dot:.6g}" for f in flows))
        t.add_row("V̇", unit_label("v", units) + f" of '{basis.stream}'",
                  *(show(f.V_dot / basis.m_dot, "v", units) for f in flows))
    else:
        t.add_row("ṁ", unit_label("mdot", units), *(show(f.m_dot, "mdot", units) for f in flows))
        t.add_row("ṅ", unit_label("ndot", units), *(show(f.n_dot, "ndot", units) for f in flows))
        t.add_row("V̇ actual", unit_label("Vdot", units), *(show(f.V_dot, "Vdot", units) for f in flows))
    if any(f.velocity for f in flows):
        t.add_row("velocity", unit_label("vel", units), *(show(f.velocity, "vel", units) for f in flows))
    if any(f.z for f in flows):
        t.add_row("z", "m", *(f"{f.z:.6g}" for f in flows))
    return t


def _found(result) -> dict[str, set[str]]:
    """Per device, which of Q, W and eta the network found (the rest were given or fixed)."""
    out = {}
    for spec in result.problem.devices:
        found = set()
        if spec.Q_dot is None:
            found.add("Q")
        if spec.W_dot is None:
            found.add("W")
        if spec.eta is None and spec.kind in MACHINES:
            found.add("eta")
        out[spec.name] = found
    return out


def devices_table(result, units: str) -> Table:
    """Each device a row: heat to the fluid, work in the worksheet's convention, efficiency,
    entropy generation, exergy destroyed and its recomputed balances."""
    basis = _Basis(result, units)
    p = result.problem
    found = _found(result)
    t = Table(title="Devices", box=box.SIMPLE_HEAD, title_justify="left", pad_edge=False, padding=(0, 1, 0, 0))
    E, S = basis.energy_label(), basis.entropy_label()
    for col, justify in (("device", "left"), ("kind", "left"), (f"Q̇\n{E}", "right"), (f"Ẇ\n{E}", "right"),
                         ("η\n", "right"), (f"Ṡ_gen\n{S}", "right"), (f"T0·Ṡ_gen\n{E}", "right"),
                         ("balance\nresidual", "right")):
        t.add_column(col, justify=justify)

    def mark(text: str, key: str, name: str) -> str:
        return text + FOUND if key in found[name] else text

    for d in result.devices:
        heated = d.kind in ("heater", "cooler")
        Q = mark(basis.energy(d.Q_dot)[0], "Q", d.name) if heated else "—"
        W = mark(basis.energy(p.convention.shown("work", d.W_dot))[0], "W", d.name) if d.kind in MACHINES else "—"
        eta = "—" if d.eta is None else mark(f"{d.eta:.4g}", "eta", d.name)
        S = basis.entropy(d.S_gen_dot)[0]
        X = basis.energy(0.0 if basis.round_off(d.S_gen_dot) else d.exergy_destroyed)[0]
        t.add_row(d.name, d.kind, Q, W, eta, S, X, f"{max(abs(d.mass), abs(d.energy)):.1e}")
    if result.S_gen_dot is not None:
        X = 0.0 if basis.round_off(result.S_gen_dot) else p.T0 * result.S_gen_dot
        t.add_row("network", "", "", "", "", basis.entropy(result.S_gen_dot)[0], basis.energy(X)[0], "")
    return t


def _isentropic_lines(result, units: str) -> list[str]:
    """Each machine's isentropic end state beside its actual one; each exchanger's duty and approach."""
    basis = _Basis(result, units)
    out = []
    for d in result.devices:
        if d.kind in MACHINES and d.isentropic_T is not None:
            P2 = result.flows[d.outlets[0]].point.P
            out.append(f"{d.name}: isentropic end state at {show(P2, 'P', units)} {unit_label('P', units)}: "
                       f"T_2s = {show(d.isentropic_T, 'T', units)} {unit_label('T', units)}"
                       f" (actual {show(result.flows[d.outlets[0]].point.T, 'T', units)} {unit_label('T', units)})")
        if d.approach is not None:  # the duty from the hot side's flows (the explanation gives both sides)
            hot_in, hot_out = result.flows[d.inlets[0]], result.flows[d.outlets[0]]
            duty = basis.energy(hot_in.n_dot * (hot_in.e - hot_out.e))
            out.append(f"{d.name}: duty {' '.join(duty)} from the hot side to the cold; minimum approach "
                       f"{d.approach:.4g} K" + ("" if UNIT_SETS[units]["T"] not in ("degF", "degR")
                                                else f" ({d.approach * 1.8:.4g} °F)"))
    return out


def flow_headline(result, units: str) -> str:
    """The solved unknowns in one line: each device's heat, power and efficiency found, each
    stream's temperature (and quality) found, each rate found, and the network's Ṡ_gen."""
    p = result.problem
    basis = _Basis(result, units)
    found = _found(result)
    parts = []
    for d in result.devices:
        if "Q" in found[d.name]:
            parts.append(f"{d.name} Q̇ = {' '.join(basis.energy(d.Q_dot))}")
        if "W" in found[d.name]:
            parts.append(f"{d.name} Ẇ = {' '.join(basis.energy(p.convention.shown('work', d.W_dot)))}")
        if "eta" in found[d.name] and d.eta is not None:
            parts.append(f"{d.name} η = {d.eta:.4g}")
    rate_given = {s.name for s in p.streams if s.n_dot is not None}
    made_by = {s: d.kind for d in p.devices for s in d.outlets}
    for spec in p.streams:
        f = result.flows[spec.name]
        said = []
        if len(spec.given) < 2 and "T" not in spec.given:
            said.append(f"T = {show(f.point.T, 'T', units, 5)} {unit_label('T', units)}")
        if len(spec.given) < 2 and f.point.x is not None and "x" not in spec.given:
            said.append(f"x = {f.point.x:.4g}")
        # a rate found by a balance, not passed along a line: a feed's, or what a mixer,
        # splitter or separator puts out
        if rate_given and spec.name not in rate_given and made_by.get(spec.name, "feed") in _RATE_FOUND:
            said.append(f"ṁ = {show(f.m_dot, 'mdot', units, 5)} {unit_label('mdot', units)}")
        if said:
            parts.append(f"{spec.name}: {', '.join(said)}")
    if result.S_gen_dot is not None:
        parts.append(f"Ṡ_gen = {' '.join(basis.entropy(result.S_gen_dot))}")
    if basis.per_kg:
        parts.append(f"per kg of '{basis.stream}'")
    return "; ".join(parts) or "nothing to find: every value was given"


def flow_result_renderable(result, units: str = "metric", with_headline: bool = True) -> Group:
    """The result's tables, equations, warnings and cautions; ``with_headline`` starts them with
    the solved unknowns in one line (the app shows that line above its tabs instead)."""
    p = result.problem
    title = Text(p.worksheet.heading.title or "Steady-flow balance", style="bold")
    parts: list = [title, Text("Result: " + flow_headline(result, units))] if with_headline else [title]
    basis = _Basis(result, units)
    meta = [*_fluids(result),
            f"convention: {p.convention.flow_words}, e = h + V²/2 + g z",
            (f"gauge pressures read with atmosphere = {show(p.p_atm, 'P', units)} {unit_label('P', units)}; "
             f"exergy destroyed at T0 = {show(p.T0, 'T', units)} {unit_label('T', units)}")]
    if basis.per_kg:
        meta.append(f"basis: no rate is given: every rate and power per kg of stream '{basis.stream}'")
    parts.append(Text("\n".join(meta), style="dim"))
    parts.extend(streams_tables(result, units))
    read_as = [f"{name}: rate read as {words}" for name, words in p.rate_words.items()]
    if read_as:
        parts.append(Text("\n".join(read_as), style="dim"))
    parts.append(devices_table(result, units))
    parts.append(Text(f"{FOUND} found by the balances; the rest given or fixed by the device"
                      + ("" if result.S_gen_dot is not None else
                         "; Ṡ_gen —: heat crosses at no stated temperature (give T_boundary)"), style="dim"))
    iso = _isentropic_lines(result, units)
    if iso:
        parts.append(Text("\n".join(iso)))
    parts.extend(closing_panels(result, units, "Equations with numbers (molar SI, powers in kW)"))
    return Group(*parts)


def _given(spec) -> str:
    """What a device is given, in words (its kind's own values)."""
    out = []
    if spec.kind in ("heater", "cooler"):
        out.append("Q to be found" if spec.Q_dot is None else f"Q = {spec.Q_dot / 1e3:.6g} kW")
    if spec.kind in MACHINES:
        if spec.W_dot is None:
            out.append("W to be found or fixed")
        if spec.eta is not None:
            out.append(f"{'η_p' if spec.polytropic else 'η'} = {spec.eta:.4g}")
    if spec.dP:
        out.append("dP = " + ", ".join(f"{x / 1e5:.4g} bar" for x in spec.dP))
    if spec.fractions:
        out.append("fractions " + ", ".join(f"{x:.4g}" for x in spec.fractions))
    return "; ".join(out)


def flow_dof_renderable(problem, dof) -> Group:
    """What the network lacks, in words, per device; or that it is ready to solve."""
    t = Table(box=box.SIMPLE_HEAD, title="Devices and the streams they join", title_justify="left")
    t.add_column("device")
    t.add_column("in → out")
    t.add_column("given")
    for d in problem.devices:
        t.add_row(f"{d.name} ({d.kind})", f"{', '.join(d.inlets)} → {', '.join(d.outlets)}", _given(d))
    s = Table(box=box.SIMPLE_HEAD, title="Streams", title_justify="left")
    s.add_column("stream")
    s.add_column("given")
    s.add_column("rate")
    for st in problem.streams:
        s.add_row(st.name, ", ".join(st.given) or "nothing", problem.rate_words.get(st.name, "to be found")
                  if st.n_dot is not None else "to be found")
    lines = dof.message.split("; ") if not dof.ok else [dof.message]
    style = "green" if dof.ok else "red"
    return Group(Text(f"steady flow: {len(problem.devices)} devices, {len(problem.streams)} streams; "
                      "a state takes two properties, a device fixes what its equations give"),
                 t, s, *(Text(line, style=style) for line in lines))
