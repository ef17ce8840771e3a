"""Display units: the same SI results shown in the units an engineer reads.

Three unit sets, and a fourth, "typed", made from the worksheet (:func:`use_typed`): each
kind of value in the unit it was typed in; the CLI's ``--units`` and the TUI's switch
choose one.
Intensive properties are shown per unit mass (what plant data sheets use);
the JSON output stays molar SI.
"""

from __future__ import annotations

import math

from balance.units import to_unit as _pint_to_unit

#: Display units pint's default registry lacks, as SI amounts per unit: the pound-mole is
#: 453.59237 mol (the avoirdupois pound, 0.45359237 kg exactly: NIST SP 811).
_BY_HAND = {"lbmol": ("mol", 453.59237), "lbmol/h": ("mol/s", 453.59237 / 3600.0)}


def to_unit(value: float, unit: str, target: str) -> float:
    """``value`` in ``unit`` converted to ``target`` (pint, or the factors of :data:`_BY_HAND`)."""
    if target in _BY_HAND and unit == _BY_HAND[target][0]:
        return value / _BY_HAND[target][1]
    return _pint_to_unit(value, unit, target)

UNIT_SETS = {
    "si": {
        "T": "K", "P": "kPa", "v": "m**3/kg", "u": "kJ/kg", "h": "kJ/kg", "s": "kJ/(kg*K)",
        "cv": "kJ/(kg*K)", "cp": "kJ/(kg*K)", "E": "kJ", "S": "kJ/K", "V": "m**3", "m": "kg",
        "n": "mol", "Edot": "kW", "Sdot": "kW/K", "mdot": "kg/s", "ndot": "mol/s", "Vdot": "m**3/s",
        "vel": "m/s",
    },
    "metric": {
        "T": "degC", "P": "bar", "v": "m**3/kg", "u": "kJ/kg", "h": "kJ/kg", "s": "kJ/(kg*K)",
        "cv": "kJ/(kg*K)", "cp": "kJ/(kg*K)", "E": "kJ", "S": "kJ/K", "V": "m**3", "m": "kg",
        "n": "kmol", "Edot": "kW", "Sdot": "kW/K", "mdot": "kg/h", "ndot": "kmol/h", "Vdot": "m**3/h",
        "vel": "m/s",
    },
    "us": {
        "T": "degF", "P": "psi", "v": "ft**3/lb", "u": "Btu/lb", "h": "Btu/lb", "s": "Btu/(lb*degR)",
        "cv": "Btu/(lb*degR)", "cp": "Btu/(lb*degR)", "E": "Btu", "S": "Btu/degR", "V": "ft**3",
        "m": "lb", "n": "lbmol", "Edot": "Btu/h", "Sdot": "Btu/(h*degR)", "mdot": "lb/h", "ndot": "lbmol/h",
        "Vdot": "ft**3/min", "vel": "ft/s",
    },
}
UNIT_SETS["typed"] = dict(UNIT_SETS["metric"])  # until a worksheet is shown (use_typed)

#: SI units of the values handed to ``show`` (mass-based intensive values).
SI = {
    "T": "K", "P": "Pa", "v": "m**3/kg", "u": "J/kg", "h": "J/kg", "s": "J/(kg*K)",
    "cv": "J/(kg*K)", "cp": "J/(kg*K)", "E": "J", "S": "J/K", "V": "m**3", "m": "kg", "n": "mol",
    # the rates of steady flow: power, entropy rate, mass, molar and actual volume rates, speed
    "Edot": "W", "Sdot": "W/K", "mdot": "kg/s", "ndot": "mol/s", "Vdot": "m**3/s", "vel": "m/s",
}

_SHORT = {
    "m**3/kg": "m³/kg", "kJ/(kg*K)": "kJ/(kg·K)", "degC": "°C", "degF": "°F", "m**3": "m³",
    "ft**3/lb": "ft³/lb", "Btu/(lb*degR)": "Btu/(lb·°R)", "ft**3": "ft³", "Btu/degR": "Btu/°R",
    "psi": "psia", "bar": "bar(a)", "m**3/s": "m³/s", "m**3/h": "m³/h", "ft**3/min": "ft³/min",
    "Btu/(h*degR)": "Btu/(h·°R)",
}


#: What the "typed" set takes from a worksheet: each display kind, the dimension it is read
#: as, and the fields typed in it (a state's property or amount; a heat or work term).
_TYPED_FROM = {
    "T": ("temperature", ("T",)), "P": ("pressure", ("P",)), "v": ("specific_volume", ("v",)),
    "u": ("specific_energy", ("u",)), "h": ("specific_energy", ("h",)), "s": ("specific_entropy", ("s",)),
    "V": ("volume", ("V",)), "m": ("mass", ("m",)), "n": ("amount", ("n",)), "E": ("energy", ("Q", "W")),
    # a steady-flow worksheet's rates: its devices' heat and power, its streams' mass and molar rates
    "Edot": ("power", ("Q_dot", "W_dot")), "mdot": ("mass_rate", ("rate",)), "ndot": ("molar_rate", ("rate",)),
}


def typed_set(ws) -> dict[str, str]:
    """A unit set from a worksheet: each kind in the first unit a field of it was typed in
    (gauge pressures shown absolute, in their unit), the metric set's for the rest. A unit
    that does not convert from the kind's SI unit (a molar volume typed as v) is passed by."""
    from balance.units import unit_of

    typed = dict(UNIT_SETS["metric"])
    states = [*ws.initial, ws.final]
    texts = {key: [s.props.get(key) or s.amount.get(key) for s in states] for key in ("T", "P", "v", "u", "h", "s",
                                                                                    "V", "m", "n")}
    texts["Q"] = [t.Q for t in ws.heat]
    texts["W"] = [t.W for t in ws.work]
    for key in ("T", "P", "v", "u", "h", "s"):  # a steady-flow worksheet's streams (none in a closed one)
        texts[key] += [st.props.get(key) for st in ws.streams]
    texts["rate"] = [st.rate for st in ws.streams]
    texts["Q_dot"] = [d.values.get("Q") for d in ws.devices]
    texts["W_dot"] = [d.values.get("W") for d in ws.devices]
    for kind, (dimension, keys) in _TYPED_FROM.items():
        for text in (t for key in keys for t in texts[key]):
            unit = unit_of(text, dimension)
            if unit is not None and _converts(SI[kind], unit):
                typed[kind] = unit
                break
    if typed["E"] != UNIT_SETS["metric"]["E"] and _converts("J/K", f"({typed['E']})/K"):
        E = typed["E"]
        typed["S"] = f"{E}/K" if E.isalnum() else f"({E})/K"  # an entropy follows the energy typed
    return typed


def _converts(si: str, unit: str) -> bool:
    try:
        to_unit(1.0, si, unit)
    except Exception:  # pint's errors for a unit of another dimension, or none it knows
        return False
    return True


def use_typed(ws) -> None:
    """Make the "typed" set the units of ``ws`` (one worksheet is shown at a time)."""
    UNIT_SETS["typed"] = typed_set(ws)


def unit_label(kind: str, units: str) -> str:
    u = UNIT_SETS[units][kind]
    return _SHORT.get(u, u)


def show(value: float | None, kind: str, units: str, digits: int = 6) -> str:
    """An SI value (mass-based for intensive properties) in the chosen set, as text."""
    if value is None or value != value:  # none, or NaN: a value the model does not determine
        return "—"
    target = UNIT_SETS[units][kind]
    if value in (math.inf, -math.inf):  # a wet state's cp (the warnings say why)
        return "∞" if value > 0 else "-∞"
    # to 12 digits first: the same pressure reached by two paths (9 barg read, and the flash of a
    # stream at it) differs in its last bits, and at a half-way digit would show as 10.0132 and 10.0133
    return f"{float(f'{to_unit(value, SI[kind], target):.12g}'):.{digits}g}"


#: Pressure labels that say "absolute" where a caution or a headline names a pressure.
_ABSOLUTE = {"kPa": "kPa(a)", "bar": "bar(a)", "psi": "psia"}


def caution_value(kind: str, value: float, units: str) -> str:
    """A caution's value in the chosen set, with its unit: a temperature to 0.1 degree, a
    threshold ("T limit") to the degree, an absolute pressure to four digits.

    ``kind`` and ``value`` are as :data:`balance.balances.cautions.Show` takes them.
    """
    if kind == "P":
        P = to_unit(value, "Pa", UNIT_SETS[units]["P"])
        return f"{_plain(P, 4)} {_ABSOLUTE.get(UNIT_SETS[units]['P'], unit_label('P', units))}"
    T = to_unit(value, "K", UNIT_SETS[units]["T"])
    return f"{T:.{0 if kind == 'T limit' else 1}f} {unit_label('T', units)}"


def _plain(x: float, digits: int) -> str:
    """``digits`` significant digits without an exponent (20000, not 2e+04) where x is not tiny."""
    if x == 0 or not math.isfinite(x) or abs(x) < 1e-3:
        return f"{x:.{digits}g}"
    decimals = max(0, digits - 1 - math.floor(math.log10(abs(x))))
    text = f"{x:.{decimals}f}"
    return text.rstrip("0").rstrip(".") if "." in text else text


def temperature_step(dK: float, units: str) -> str:
    """A difference of temperatures: in kelvin, or in Fahrenheit degrees where the set's
    temperatures are °F or °R."""
    if UNIT_SETS[units]["T"] in ("degF", "degR"):
        return f"{dK * 1.8:+.4g} °F"
    return f"{dK:+.4g} K"


def caution_writer(units: str):
    """The function that writes cautions' values in the chosen set (for ``Caution.text``)."""
    return lambda kind, value: caution_value(kind, value, units)


def converter(kind: str, units: str):
    """A function taking SI values (mass-based for intensive ones) to the chosen set.

    Every display unit is linear in SI (offset for °C and °F), so two
    conversions fix it: fast enough for the points of a diagram.
    """
    target = UNIT_SETS[units][kind]
    b = to_unit(0.0, SI[kind], target)
    a = to_unit(1.0, SI[kind], target) - b
    return lambda x: a * x + b
