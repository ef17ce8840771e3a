"""Cubic equations of state (van der Waals, Redlich-Kwong, Soave, Peng-Robinson).

* :mod:`.forms`       the members of the generic cubic and their constants
* :mod:`.formulas`    the formulas, written once for floats and arrays
* :mod:`.eos`         :class:`Cubic`: states at (T, v) and (T, P), scalar and vectorised
* :mod:`.saturation`  the coexistence curve, solved exactly and fitted once per model
* :mod:`.flash`       every other input pair, by Newton on (T, v) with the phase decided first
* :mod:`.twins`       the pairs two states can meet (T with h, u with h)
* :mod:`.lines`       what the searches share
"""

from .eos import Cubic, cubic_roots, z_roots
from .forms import FORMS, CubicForm
from .saturation import SaturationCurve

__all__ = ["FORMS", "Cubic", "CubicForm", "SaturationCurve", "cubic_roots", "z_roots"]
