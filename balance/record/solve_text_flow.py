"""The text of a steady-flow solve entry: streams, devices, the check of each device, equations, warnings, cautions.

Units: the rendering takes the SI values of the steady-flow result's JSON
(K, Pa, J/mol, J/(mol*K), kg/s, mol/s, m**3/s, m/s, W, W/K) and shows them
in the record's fixed units, whatever the display: T in °C, P in bar(a),
h and s per kg (kJ/kg, kJ/(kg·K)), rates in kg/s, mol/s and m³/s, heat and
work rates and the exergy destroyed in kW, entropy generation in kW/K. The
per-kilogram values divide by the stream's own molar mass, ṁ/ṅ as recorded
(a stream without flow takes it from another stream of its species), so the
text is a function of the entry's data alone, as verify requires. The
tables' rows are also what the exported reports (:mod:`.export`) show.

Every value is the solver's: the device table's residuals are each device's
mass and energy balances recomputed from its flows after the solve
(``residual_mass``, ``residual_energy``), an independent check of the
propagation that found them.
"""

from __future__ import annotations

from .plain import closing, g, listed, table, wrap

#: The units of a steady-flow solve's text in the record.
UNITS = ("Units (fixed, whatever the display): T in °C, P in bar(a), h and s per kg, rates in kg/s, mol/s "
         "and m³/s (actual, at the stream's T and P), speeds in m/s, heat and work rates and exergy in kW, "
         "entropy generation in kW/K, cautions in °C and bar(a); the equations in molar SI; the data part "
         "in molar SI, each unit named.")

#: Words of the sign convention for rates crossing a device's boundary, by the worksheet's key.
SIGNS = {
    "work-on-system": "heat to the fluid and work done on the fluid are positive",
    "work-by-system": "heat to the fluid and work done by the fluid are positive",
}

#: A recomputed balance closes below this relative residual (the solver's own bound is 1e-9).
CLOSES = 1e-9


def _q(d, key):
    """The number of a quantity {"value", "unit"} in d, or None."""
    v = d.get(key) if isinstance(d, dict) else None
    x = v.get("value") if isinstance(v, dict) else None
    return x if isinstance(x, (int, float)) and not isinstance(x, bool) else None


def _num(d, key):
    """A plain number in d (a residual), or None."""
    x = d.get(key) if isinstance(d, dict) else None
    return x if isinstance(x, (int, float)) and not isinstance(x, bool) else None


def _table(data: dict, key: str) -> dict:
    v = data.get(key)
    return {str(k): (x if isinstance(x, dict) else {}) for k, x in v.items()} if isinstance(v, dict) else {}


_list = listed


def _molar_masses(streams: dict) -> dict[str, float]:
    """Each stream's molar mass [kg/mol], ṁ/ṅ as recorded; a stream without flow takes its species'."""
    by_species: dict[str, float] = {}
    own: dict[str, float] = {}
    for name, st in streams.items():
        m, n = _q(st, "m_dot"), _q(st, "n_dot")
        if m and n:
            own[name] = m / n
            by_species.setdefault(str(st.get("species", "")), m / n)
    return {name: own.get(name, by_species.get(str(st.get("species", "")))) for name, st in streams.items()}


def _per_kg(x, M, factor: float = 1e-3) -> str:
    return "—" if x is None or not M else g(x / M * factor)


def _scaled(x, factor: float) -> str:
    return "—" if x is None else g(x * factor)


def _celsius(x) -> str:
    return "—" if x is None else g(x - 273.15)


def fluids(data: dict) -> list[str]:
    """The species and models the solve's streams are of, in order of first appearance."""
    seen: list[str] = []
    for st in _table(data, "streams").values():
        f = f"{st.get('species', '?')}, {st.get('model', '?')}"
        if f not in seen:
            seen.append(f)
    return seen


def stream_rows(data: dict) -> tuple[list[str], list[list[str]], str]:
    """Headers, rows and column alignment of the streams' states, one stream a row (record units);
    a fluid column where the streams are not all of one species and model, the quality where a
    stream has one."""
    streams = _table(data, "streams")
    M = _molar_masses(streams)
    several = len(fluids(data)) > 1
    wet = any(_q(st, "x") is not None for st in streams.values())
    dew = any("dew_point" in st for st in streams.values())  # a cubic mixture's envelope at the stream's P
    headers = ["stream", *(["fluid"] if several else []), "T °C", "P bar(a)", "h kJ/kg", "s kJ/(kg·K)",
               *(["x"] if wet else []), "phase", *(["dew °C", "bubble °C"] if dew else [])]
    rows = []
    for name, st in streams.items():
        fluid = [f"{st.get('species', '?')}, {st.get('model', '?')}"] if several else []
        x = [_scaled(_q(st, "x"), 1.0)] if wet else []
        edges = [_celsius(_q(st, "dew_point")), _celsius(_q(st, "bubble_point"))] if dew else []
        rows.append([name, *fluid, _celsius(_q(st, "T")), _scaled(_q(st, "P"), 1e-5), _per_kg(_q(st, "h"), M[name]),
                     _per_kg(_q(st, "s"), M[name]), *x, str(st.get("phase", "—")), *edges])
    return headers, rows, "l" + "l" * several + "r" * (4 + wet) + "l" + "rr" * dew


def rate_rows(data: dict) -> tuple[list[str], list[list[str]], str]:
    """Headers, rows and column alignment of the streams' rates, one stream a row: mass, molar,
    actual volume and speed (see :func:`rates_given` for how a given rate was read)."""
    rows = []
    for name, st in _table(data, "streams").items():
        speed = _q(st, "velocity")
        rows.append([name, _scaled(_q(st, "m_dot"), 1.0), _scaled(_q(st, "n_dot"), 1.0),
                     _scaled(_q(st, "V_dot"), 1.0), "—" if not speed else g(speed)])
    return ["stream", "ṁ kg/s", "ṅ mol/s", "V̇ m³/s", "speed m/s"], rows, "lrrrr"


def rates_given(data: dict) -> list[str]:
    """How each rate the worksheet gives was read (its standard conditions, for a standard volume),
    and what a speed not given means."""
    streams = _table(data, "streams")
    out = [f"stream '{name}': rate read as {st['rate_read_as']}" for name, st in streams.items()
           if st.get("rate_read_as")]
    if any(not _q(st, "velocity") for st in streams.values()):
        out.append("speed —: none given or found (no speed or flow area): the stream's kinetic energy is taken as zero")
    return out


def device_rows(data: dict) -> tuple[list[str], list[list[str]], str]:
    """Headers and rows of the devices: heat and work rates, efficiency, entropy generation and
    exergy destroyed; '—' where a device has none (Ṡ_gen where heat crosses at no stated temperature)."""
    work = "Ẇ by kW" if data.get("convention") == "work-by-system" else "Ẇ on kW"
    rows = []
    for name, d in _table(data, "devices").items():
        rows.append([name, str(d.get("kind", "?")), _scaled(_q(d, "Q_dot"), 1e-3), _scaled(_q(d, "W_dot"), 1e-3),
                     _scaled(_q(d, "eta"), 1.0), _scaled(_q(d, "S_gen_dot"), 1e-3),
                     _scaled(_q(d, "exergy_destroyed"), 1e-3)])
    return ["device", "kind", "Q̇ kW", work, "η", "Ṡ_gen kW/K", "T0·Ṡ_gen kW"], rows, "llrrrrr"


def check_rows(data: dict) -> tuple[list[str], list[list[str]], str]:
    """Headers and rows of each device's balances recomputed from its flows (relative residuals),
    its entropy generation's sign, and what else the solve found at it (the isentropic end state
    of a machine, an exchanger's least approach)."""
    rows = []
    streams = _table(data, "streams")
    for name, d in _table(data, "devices").items():
        mass, energy = _num(d, "residual_mass"), _num(d, "residual_energy")
        S = _q(d, "S_gen_dot")
        inlets = d.get("inlets") if isinstance(d.get("inlets"), list) else []
        carried = sum(abs((_q(streams.get(str(i)), "n_dot") or 0.0) * (_q(streams.get(str(i)), "s") or 0.0))
                      for i in inlets)
        closes = all(r is not None and abs(r) <= CLOSES for r in (mass, energy))
        note = []
        if _q(d, "isentropic_T") is not None:
            note.append(f"isentropic end state T_2s = {_celsius(_q(d, 'isentropic_T'))} °C")
        if _q(d, "approach") is not None:
            note.append(f"least approach {g(_q(d, 'approach'))} K")
        rows.append([name, "—" if mass is None else f"{mass:.1e}", "—" if energy is None else f"{energy:.1e}",
                     "yes" if closes else "NO",
                     _sign(S, carried), "; ".join(note)])
    return ["device", "mass", "energy", "closes", "Ṡ_gen", "note"], rows, "lrrlll"


def _sign(S: float | None, carried: float) -> str:
    """Whether a device's Ṡ_gen [W/K] keeps the second law: the solver refuses one below
    -CLOSES × the entropy its inlets carry [W/K] (at least 1 W/K), so one above that is round-off."""
    if S is None:
        return "not evaluated"
    if S >= 0:
        return "≥ 0"
    return "≈ 0, round-off" if S >= -CLOSES * max(1.0, carried) else "NEGATIVE"


def totals(data: dict) -> str:
    """The network's entropy generation and exergy destroyed, T0 stated; or why they are not evaluated."""
    T0 = _q(data, "T0")
    T0_words = "T0 not recorded" if T0 is None else f"T0 = {g(T0 - 273.15)} °C ({g(T0)} K)"
    S = _q(data, "S_gen_dot")
    if S is None:
        missing = [n for n, d in _table(data, "devices").items() if _q(d, "S_gen_dot") is None]
        return ("Ṡ_gen of the network: not evaluated, since heat crosses the boundary of " + ", ".join(missing)
                + " at no stated temperature (give its T_boundary); each other device's exergy destroyed is "
                f"T0·Ṡ_gen, with {T0_words} for the surroundings")
    ex = "—" if T0 is None else g(T0 * S / 1e3)
    return f"Ṡ_gen of the network: {g(S / 1e3)} kW/K; exergy destroyed T0·Ṡ_gen = {ex} kW, with {T0_words} for the surroundings"


def solve_text(data: dict, basis: str, pins: str) -> str:
    """The result of a steady-flow solve entry (``basis``: the inputs it was solved from, in
    words; ``pins``: the joulebook and species data it was solved with)."""
    out = [f"Solved{basis}: {data.get('title') or 'steady-flow balance'}"]
    if pins:
        out.append(pins)
    streams = _table(data, "streams")
    out.append("Species and model: " + ("; ".join(fluids(data)) or "none"))
    conv = str(data.get("convention", ""))
    out += wrap(f"Sign convention ({conv}): {SIGNS.get(conv, conv)}", "", "  ")
    out += wrap(UNITS, "", "  ")
    if data.get("basis"):
        out += wrap(f"Basis: {data['basis']}", "", "  ")
    for pin in data.get("mixtures", ()):  # a cubic mixture's composition and kij, each with its source
        parts = ", ".join(f"{k} {g(v)}" for k, v in pin.get("composition", {}).items())
        out += wrap(f"Mixture on {pin.get('model', '?')} (mole fractions): {parts}; kij:", "", "  ")
        out += [f"  {k.get('pair', '?')}  {g(k.get('value'))}  ({k.get('source', '?')})" for k in pin.get("kij", ())]
    out += ["", "Streams"]
    out += table(*stream_rows(data)) if streams else ["  (none)"]
    out += ["", "Stream rates"]
    out += table(*rate_rows(data)) if streams else ["  (none)"]
    given = rates_given(data)
    if given:
        out.append("")
    for line in given:
        out += wrap(line, "  ", "    ")
    out += ["", "Devices"]
    devices = _table(data, "devices")
    out += table(*device_rows(data)) if devices else ["  (none)"]
    out += [""] + wrap(totals(data), "", "  ")
    out += [""] + wrap(f"Each device's balances, recomputed from its flows after the solve (relative residuals; "
                       f"a balance closes at {CLOSES:g} or less)", "", "  ")
    out += table(*check_rows(data)) if devices else ["  (none)"]
    out += closing(data)
    return "\n".join(out)
