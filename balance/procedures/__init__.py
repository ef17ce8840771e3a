"""House procedures: a firm's way of doing a calculation, written once as data.

A procedure file (TOML; layout in the README, "House procedures") says, step by step, what
to do and why, which fields are required, which property models are allowed and when, which
acceptance checks a result must pass and who signs. :mod:`.load` reads and checks a file,
:mod:`.library` finds procedures in the firm's folders and the bundled ones, :mod:`.evaluate`
applies one to a worksheet and its result, :mod:`.practice` compares a new hire's steps with
an exercise's model answer.
"""

from .evaluate import Finding, blocking, escalated_roles, findings, required_roles
from .library import find, find_or_none, folders, listing
from .load import ProcedureError, ProcedureProblem, check_file, from_pin, load, parse
from .quantities import QUANTITIES, value_of
from .schema import Procedure

__all__ = ["Finding", "Procedure", "ProcedureError", "ProcedureProblem", "QUANTITIES", "blocking", "check_file",
           "escalated_roles", "find", "find_or_none", "findings", "folders", "from_pin", "listing", "load", "parse",
           "required_roles", "value_of"]
