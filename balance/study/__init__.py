"""Studies of a worksheet: many solves of it with inputs changed.

* :mod:`.paths`        a field of the worksheet by the path messages use (``initial.V-101.P``)
* :mod:`.ranges`       what ``--vary`` takes: ``FROM..TO`` with units, or a list
* :mod:`.table`        a solve's JSON flattened to columns; the main results of each kind
* :mod:`.sweep`        the cases of a sweep (a grid, or inputs that go together), run serially or
  on a process pool with the same rows
* :mod:`.uncertainty`  the uncertainty of the results from the inputs' (JCGM 100 and 101)

Nothing here solves by itself: the façade (:mod:`balance.api`) hands in the function that solves
one case, so this package sits below it.
"""
