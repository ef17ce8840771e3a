"""The reference model: a fluid's multiparameter Helmholtz-energy equation of
state, evaluated by CoolProp's HEOS backend.

* :mod:`.coolprop`  CoolProp's lazy import, the EOS's constants, the model's one
  ``AbstractState`` and the :class:`~balance.models.base.Point` of the state it holds
  (departures at the same T and P);
* :mod:`.search`    bracketed searches along paths, for the pairs CoolProp has no
  solver for and the pairs more than one state can meet;
* :mod:`.model`     :class:`Reference`: every input pair routed to one or the other;
* :mod:`.mixture`   :class:`ReferenceMixture`: a mixture of fixed composition.

CoolProp is imported only inside methods (its import costs over a second),
and each model instance owns one low-level ``AbstractState``, created on
first use. A pickled model leaves the state behind (CoolProp's object does
not pickle; it is made again on first use); once used, it takes its
constants, reference state and equations along: the terminal app solves in
another process and shows the result without CoolProp.

Input pairs
-----------
Any two of T, P, v, u, h, s and x (quality) fix a state:

* pairs CoolProp solves itself (T-P, T-v, T-u, T-h, T-s, T-x, P-v, P-u,
  P-h, P-s, P-x, v-u, v-h, v-s, v-x, h-s) go to CoolProp first;
* the pairs CoolProp has no solver for (u-h, u-s, u-x, h-x, s-x), and any
  pair whose CoolProp solve fails, are found by the searches;
* T with u, h or s, u with h or s, x with v, u, h or s, and P with a
  liquid-like v can be met by more than one state (a compressed liquid and
  a wet mixture at the same T and h; the two sides of an isotherm's
  Joule-Thomson minimum; the two sides of the maximum of the
  saturated-vapour enthalpy; water on either side of its density maximum).
  For these pairs the whole path is scanned and, when more than one state
  qualifies, the rule every model keeps applies (:mod:`balance.models.base`):
  the state of largest volume is returned, and its note names the others.

Mixtures
--------
A mixture (a species with a composition) takes CoolProp's HEOS multi-fluid
model, the GERG-2008 form of Kunz and Wagner: each component's own reference
EOS, reducing functions of composition and, for the pairs that have one, a
departure function, with the parameters CoolProp holds for each pair (a
mixture with a pair CoolProp has none for is refused, naming every such pair;
so is a component without a CoolProp name). Unlike the pure model, u, h and s
are measured from each component's ideal gas at 298.15 K and 1 bar, as in the
ideal-gas mixture model (CoolProp's values shifted by two constants). Only
single-phase states are given: a state CoolProp's phase-stability test finds
two-phase is refused with the dew and bubble points, and quality x is not an
input. T-P and T-v are evaluated directly; every other pair is found by
searches on (T, P) or (T, v) with the phase imposed, each root then checked
for stability.
"""

from .mixture import ReferenceMixture
from .model import Reference

__all__ = ["Reference", "ReferenceMixture"]
