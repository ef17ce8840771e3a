"""The reference model: a fluid's multiparameter Helmholtz-energy equation of
state, evaluated by CoolProp's HEOS backend.

* :mod:`.coolprop`  CoolProp's lazy import, the EOS's constants, the model's one
  ``AbstractState`` and the :class:`~balance.models.base.Point` of the state it holds
  (departures at the same T and P);
* :mod:`.search`    bracketed searches along paths, for the pairs CoolProp has no
  solver for and the pairs more than one state can meet;
* :mod:`.model`     :class:`Reference`: every input pair routed to one or the other.

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
"""

from .model import Reference

__all__ = ["Reference"]
