"""The reference model itself: every input pair, routed to CoolProp's solvers or the searches."""

from __future__ import annotations

from functools import cached_property

from ...errors import InputError
from ...species import Species
from ..base import SPEC_KEYS, Point, PropertyModel, choose_largest_volume, fmt_spec
from .coolprop import OTHER_MODELS, CoolPropState, coolprop
from .search import PathSearch

# Pairs whose solution may not be unique: the path is always scanned.
_SCANNED_PAIRS = {("T", "u"), ("T", "h"), ("T", "s"), ("P", "v"),
                  ("v", "x"), ("u", "x"), ("h", "x"), ("s", "x"), ("u", "h"), ("u", "s")}


def _fmt_specs(specs: dict[str, float]) -> str:
    return ", ".join(fmt_spec(k, specs[k]) for k in sorted(specs, key=SPEC_KEYS.index))


class Reference(PathSearch, CoolPropState, PropertyModel):
    """A species' reference equation of state through CoolProp HEOS.

    Parameters
    ----------
    species : Species
        Must carry a CoolProp fluid name (``species.coolprop``).

    Raises
    ------
    InputError
        field ``fluid.model``, when the species has no CoolProp name; when
        CoolProp is missing or does not know the name, on first use.
    """

    name = "reference"
    two_phase = True

    def __init__(self, species: Species):
        super().__init__(species)
        if not species.coolprop:
            raise InputError(
                "fluid.model",
                f"{species.name} has no reference equation of state (the species data gives no "
                f"CoolProp fluid name for it); the {OTHER_MODELS} models remain available",
            )
        self.fluid: str = species.coolprop
        self.label = f"reference equation of state (CoolProp HEOS: {self.fluid})"
        self._state = None
        self._equations: list[str] | None = None

    # -- the interface -------------------------------------------------------
    def at_Tv(self, T: float, v: float) -> Point:
        """The state at T [K] and molar volume v [m3/mol] (inside the dome: a wet mixture)."""
        return self.flash({"T": T, "v": v})

    def at_TP(self, T: float, P: float) -> Point:
        """The stable state at T [K] and P [Pa]; on the saturation line an InputError."""
        return self.flash({"T": T, "P": P})

    def T_bounds(self) -> tuple[float, float]:
        """The EOS's temperature range [K] (CoolProp Tmin, Tmax)."""
        return (self._c.Tmin, self._c.Tmax)

    def solve_pair(self, keys: tuple[str, str], values: tuple[float, float], field: str) -> Point:
        """The state fixed by a checked pair of T, P, v, u, h, s, x (SPEC_KEYS order, SI floats).

        CoolProp's own solver first; for a pair that more than one state can
        meet, the whole path is searched as well, and of several states the
        one of largest volume is returned with a note naming the others (the
        rule of :mod:`balance.models.base`). Raises InputError naming
        ``field`` when no state meets the pair.
        """
        specs = dict(zip(keys, values))
        if keys == ("u", "h") and specs["h"] <= specs["u"]:
            raise InputError(field, f"h - u = P v must be positive; got h = {specs['h']:.6g} J/mol, "
                                    f"u = {specs['u']:.6g} J/mol")
        direct: Point | None = None
        error: Exception | None = None
        if keys not in (("u", "h"), ("u", "s"), ("u", "x"), ("h", "x"), ("s", "x")):
            try:
                direct = self._direct(keys, specs)
            except (ValueError, RuntimeError) as exc:
                error = exc
        if direct is not None and not self._may_have_twin(keys, direct):
            return direct
        if keys == ("T", "P") or keys == ("T", "v") or keys in (("T", "x"), ("P", "x")):
            raise InputError(field, self._cannot(specs, error))
        found = self._search(keys, specs)
        chosen = choose_largest_volume(keys, values, ([direct] if direct is not None else []) + found)
        if chosen is None:
            raise InputError(field, self._cannot(specs, error))
        return chosen

    def _may_have_twin(self, keys: tuple[str, str], found: Point) -> bool:
        """Whether another state could meet the same pair, so the path must be scanned.

        At fixed P, v rises with T through gas and wet states (a gas always
        expands when heated), so only a liquid-like v can recur (water near
        its density maximum).
        """
        if keys == ("P", "v"):
            return found.phase == "liquid" or (found.phase == "supercritical" and found.v < 1.0 / self._c.rhoc)
        return keys in _SCANNED_PAIRS

    def _direct(self, keys: tuple[str, str], specs: dict[str, float]) -> Point:
        """CoolProp's own solver for the pair; raises CoolProp's ValueError."""
        CP = coolprop()
        index = {"T": CP.iT, "P": CP.iP, "v": CP.iDmolar, "u": CP.iUmolar, "h": CP.iHmolar,
                 "s": CP.iSmolar, "x": CP.iQ}
        a, b = keys
        va = 1.0 / specs[a] if a == "v" else specs[a]
        vb = 1.0 / specs[b] if b == "v" else specs[b]
        pair, v1, v2 = CP.generate_update_pair(index[a], va, index[b], vb)
        AS = self._as()
        try:
            AS.update(pair, v1, v2)
            return self._point()
        finally:
            # CoolProp 8.0 leaves the two-phase phase imposed after a (v, x) or
            # (s, x) update; the next (T, P) update on the shared state then
            # fails. The pairs _update takes (T, P, x and ρ with T) leave none.
            AS.unspecify_phase()

    # -- messages ----------------------------------------------------------------
    def _cannot(self, specs: dict[str, float], exc: Exception | None) -> str:
        """Why no state was found, with a hint where one helps."""
        c = self._c
        why = f": {exc}" if exc is not None else ": no state on the searched range meets them"
        hint = ""
        T, P = specs.get("T"), specs.get("P")
        if T is not None and P is not None and c.Ttriple <= T < c.Tc:
            try:
                self._update("QT_INPUTS", 0.0, T)
                near = abs(P / self._get("P") - 1.0) < 1e-5
            except (ValueError, RuntimeError):
                near = False
            if near or "aturation" in str(exc or ""):
                hint = ("; the state is on the saturation line, where T and P do not fix it: "
                        "near saturation give T and quality x, or P and x, instead")
        elif "x" in specs and ((T is not None and T >= c.Tc) or (P is not None and P >= c.Pc)):
            hint = (f"; quality x exists only below the critical point "
                    f"(Tc = {c.Tc:.6g} K, Pc = {c.Pc:.6g} Pa)")
        elif "Tmelt" in str(exc or "") or "melting" in str(exc or ""):
            hint = "; the state would be solid (below the melting line), which this model does not cover"
        elif T is not None and T < c.Tmin:
            hint = f"; the EOS starts at {c.Tmin:.6g} K"
        return f"CoolProp could not solve {self.fluid} at {_fmt_specs(specs)}{why}{hint}"

    # -- record ------------------------------------------------------------------
    @cached_property
    def reference_state(self) -> str:
        """Where u, h, s are measured from: CoolProp's default for the fluid,
        named when it is one of the usual conventions, with one value."""
        M = self._c.M
        conventions = (
            ("QT_INPUTS", 0.0, self._c.Ttriple, "u", 0.0, 0.0,
             "IAPWS convention, u = 0 and s = 0 for saturated liquid at the triple point"),
            ("QT_INPUTS", 0.0, 273.15, "h", 200e3, 1e3,
             "IIR convention, h = 200 kJ/kg and s = 1 kJ/(kg K) for saturated liquid at 0 °C"),
            ("QT_INPUTS", 0.0, 233.15, "h", 0.0, 0.0,
             "ASHRAE convention, h = 0 and s = 0 for saturated liquid at -40 °C"),
            ("PQ_INPUTS", 101325.0, 0.0, "h", 0.0, 0.0,
             "NBP convention, h = 0 and s = 0 for saturated liquid at 1 atm"),
        )
        which = "the offsets of the EOS's own publication"
        for pair, a, b, key, value, s_value, words in conventions:
            try:
                self._update(pair, a, b)
            except (ValueError, RuntimeError):
                continue
            if abs(self._get(key) / M - value) < 1.0 and abs(self._get("s") / M - s_value) < 0.01:
                which = words
                break
        self._update("QT_INPUTS", 0.0, self._c.Ttriple)
        return (
            f"CoolProp default reference state for {self.fluid} ({which}); saturated liquid at "
            f"the triple point {self._c.Ttriple:.6g} K has h = {self._get('h'):.6g} J/mol, "
            f"s = {self._get('s'):.6g} J/(mol K); only changes are used"
        )

    def equations(self) -> list[str]:
        """The EOS and how it is evaluated, for the record; asked of CoolProp once per model."""
        if self._equations is None:
            self._equations = self._equation_lines()
        return list(self._equations)

    def _equation_lines(self) -> list[str]:
        CP = coolprop()
        c = self._c

        def key(param):
            try:
                return CP.get_fluid_param_string(self.fluid, param) or "not given"
            except (ValueError, RuntimeError):
                return "not given"

        return [
            "a(T, ρ) = a°(T, ρ) + aʳ(T, ρ): multiparameter Helmholtz-energy equation of state "
            f"for {self.fluid} (EOS BibTeX key {key('BibTeX-EOS')}; ideal-gas part {key('BibTeX-CP0')})",
            f"evaluated by CoolProp {CP.get_global_param_string('version')}, HEOS backend; "
            f"range {c.Tmin:.6g}-{c.Tmax:.6g} K, up to {c.Pmax:.6g} Pa; "
            f"R = {c.R:.10g} J/(mol K), Tc = {c.Tc:.6g} K, Pc = {c.Pc:.6g} Pa",
            "departures at the same T and P: u_dep = u - u°(T), h_dep = h - h°(T), "
            "s_dep = s_res(T, ρ) + R ln Z (wet states: s - s°(T, ρ) + R ln Z); Z = P v / (R T); "
            "ln φ from CoolProp (wet states: (h_dep - T s_dep)/(R T), common to both phases)",
            "wet states: v, u, h, s = (1 - x)·saturated liquid + x·saturated vapour; cp = ∞; "
            "cv = (∂u/∂T)_v by central difference along the isochore",
        ]

    def warnings(self, p: Point) -> list[str]:
        """Wet or saturated states, the critical region, the EOS's range."""
        c = self._c
        out = super().warnings(p)
        if p.phase == "two-phase" and p.x is not None:
            if 0.0 < p.x < 1.0:
                out.append(
                    f"wet state (x = {p.x:.4g}): cp is infinite (heat at constant P only changes "
                    "the quality); cv is the mixture's (∂u/∂T)_v by finite difference; ln φ is the "
                    "value common to both phases"
                )
            else:
                which = "liquid" if p.x == 0.0 else "vapour"
                out.append(f"saturated {which} (x = {p.x:g}): cp and cv are those of the saturated {which}")
        Tr, Pr = p.T / c.Tc, p.P / c.Pc
        if abs(Tr - 1.0) < 0.02 and abs(Pr - 1.0) < 0.1:
            out.append(
                f"near the critical point (T/Tc = {Tr:.4f}, P/Pc = {Pr:.4f}): cp, compressibility and "
                "their uncertainty grow steeply, and a small change of input moves the state a lot"
            )
        if p.T < c.Ttriple:
            out.append(f"T = {p.T:.6g} K is below the triple point ({c.Ttriple:.6g} K): the stable phase "
                       "may be solid, which this model does not represent")
        if p.T > c.Tmax or p.P > c.Pmax:
            out.append(f"outside the EOS's stated range ({c.Tmin:.6g}-{c.Tmax:.6g} K, up to "
                       f"{c.Pmax:.6g} Pa): the values are extrapolated")
        return out
