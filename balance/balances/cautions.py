"""The cautions a result that can hurt someone carries, in every kind of balance.

The disclaimer always; a pressure above 0.5 bar gauge, a metal temperature
below -29 °C and a final pressure above every initial one each add theirs.
"""

from __future__ import annotations


#: Below this metal temperature carbon steels need impact-test qualification under
#: the common pressure-vessel codes (-29 °C / -20 °F; common practice, no source).
LOW_TEMPERATURE_K = 244.15


def cautions_for(p_atm: float, initial, final) -> list[str]:
    """The cautions an engineer expects to see beside a result that can hurt someone.

    ``p_atm`` [Pa] is the atmosphere gauge pressures are read against; ``initial``
    and ``final`` are the states (:class:`balance.state.State`).
    """
    out = [
        "This is an energy-balance calculation, not a design or assessment of pressure equipment or "
        "relief systems. Apply the codes that govern your equipment (e.g. ASME VIII, EN 13445, "
        "API 520/521) and have the calculation checked by a competent, licensed engineer."
    ]
    states = [*initial, final]
    P_max = max(st.point.P for st in states)
    if P_max > p_atm + 0.5e5:
        out.append(
            f"Pressures up to {P_max / 1e5:.4g} bar(a) occur: confirm the design pressure of every vessel "
            "and pipe within the boundary and the set pressure of its relief device."
        )
    T_min = min(st.point.T for st in states)
    if T_min < LOW_TEMPERATURE_K:
        out.append(
            f"A temperature of {T_min - 273.15:.1f} °C occurs: check the minimum design metal temperature "
            "of the equipment (low-temperature embrittlement) before relying on this result."
        )
    if final.point.P > max(st.point.P for st in initial) * 1.001:
        out.append("The final pressure exceeds every initial pressure: the boundary must be rated for it.")
    return out
