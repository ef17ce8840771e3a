"""Display units: the same SI results shown in the units an engineer reads.

Three unit sets; the CLI's ``--units`` and the TUI's switch choose one.
Intensive properties are shown per unit mass (what plant data sheets use);
the JSON output stays molar SI.
"""

from __future__ import annotations

from balance.units import to_unit

UNIT_SETS = {
    "si": {
        "T": "K", "P": "kPa", "v": "m**3/kg", "u": "kJ/kg", "h": "kJ/kg", "s": "kJ/(kg*K)",
        "cv": "kJ/(kg*K)", "cp": "kJ/(kg*K)", "E": "kJ", "S": "kJ/K", "V": "m**3", "m": "kg",
        "n": "mol",
    },
    "metric": {
        "T": "degC", "P": "bar", "v": "m**3/kg", "u": "kJ/kg", "h": "kJ/kg", "s": "kJ/(kg*K)",
        "cv": "kJ/(kg*K)", "cp": "kJ/(kg*K)", "E": "kJ", "S": "kJ/K", "V": "m**3", "m": "kg",
        "n": "kmol",
    },
    "us": {
        "T": "degF", "P": "psi", "v": "ft**3/lb", "u": "Btu/lb", "h": "Btu/lb", "s": "Btu/(lb*degR)",
        "cv": "Btu/(lb*degR)", "cp": "Btu/(lb*degR)", "E": "Btu", "S": "Btu/degR", "V": "ft**3",
        "m": "lb", "n": "lbmol",
    },
}

#: SI units of the values handed to ``show`` (mass-based intensive values).
SI = {
    "T": "K", "P": "Pa", "v": "m**3/kg", "u": "J/kg", "h": "J/kg", "s": "J/(kg*K)",
    "cv": "J/(kg*K)", "cp": "J/(kg*K)", "E": "J", "S": "J/K", "V": "m**3", "m": "kg", "n": "mol",
}

_SHORT = {
    "m**3/kg": "m³/kg", "kJ/(kg*K)": "kJ/(kg·K)", "degC": "°C", "degF": "°F", "m**3": "m³",
    "ft**3/lb": "ft³/lb", "Btu/(lb*degR)": "Btu/(lb·°R)", "ft**3": "ft³", "Btu/degR": "Btu/°R",
    "psi": "psia",
}


def unit_label(kind: str, units: str) -> str:
    u = UNIT_SETS[units][kind]
    return _SHORT.get(u, u)


def show(value: float | None, kind: str, units: str, digits: int = 6) -> str:
    """An SI value (mass-based for intensive properties) in the chosen set, as text."""
    if value is None:
        return "—"
    target = UNIT_SETS[units][kind]
    try:
        converted = to_unit(value, SI[kind], target)
    except Exception:  # inf/nan from a two-phase cp: show it as it is
        converted = value
    return f"{converted:.{digits}g}"


def converter(kind: str, units: str):
    """A function taking SI values (mass-based for intensive ones) to the chosen set.

    Every display unit is linear in SI (offset for °C and °F), so two
    conversions fix it: fast enough for the points of a diagram.
    """
    target = UNIT_SETS[units][kind]
    b = to_unit(0.0, SI[kind], target)
    a = to_unit(1.0, SI[kind], target) - b
    return lambda x: a * x + b
