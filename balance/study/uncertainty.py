"""The uncertainty of a result from the uncertainties its inputs are typed with (JCGM 100 and 101).

An input is uncertain when its value carries an uncertainty (``P = "150 barg ± 2 bar"``; the
notation is :func:`balance.units.split_uncertainty`'s). :func:`first_order` propagates the
inputs' standard uncertainties to the kind's main results (or every column) by the law of
propagation of uncertainty to first order, inputs uncorrelated (JCGM 100:2008 5.1.2):

    u_c(y)² = Σ (cᵢ uᵢ)²,   cᵢ = ∂y/∂xᵢ (5.1.3),   U = k u_c (6.2, 6.3)

each sensitivity coefficient cᵢ by a central difference of the real solve,
(y(xᵢ + h) − y(xᵢ − h)) / 2h with h = uᵢ/10, stepped in the unit the value is typed in and
reported in SI. The step is small against uᵢ, so the difference is the slope at the value
(what the first order takes; a central difference's error, h² y'''/6, is a hundredth of what a
step of uᵢ would make), and large against the solve's own precision (1e-9 relative), so that
the difference of two solves is not round-off; a difference below that precision is no
dependence the solve can resolve, and its coefficient is 0. Each result has its budget: every input, its
value, standard uncertainty, distribution, coefficient, contribution cᵢuᵢ and share of the
variance (cᵢuᵢ)²/u_c², largest first. A case that fails at xᵢ ± h is named in the budget with
its message, and that result's u_c is not given (a sum that leaves an input out is not u_c).

:func:`monte_carlo` propagates the distributions themselves (JCGM 101:2008): N samples of the
inputs (normal, rectangular or triangular as declared), each solved; the mean, the standard
deviation and the probabilistically symmetric 95 % coverage interval (JCGM 101:2008 7.7, from
memory) of each result, and the samples that failed counted with their messages. The generator
is seeded once and every sample drawn before any is solved, so a run on N processes gives the
serial numbers.

Nothing here solves: the façade hands in ``solve_case(worksheet) -> {"ok", "message", "values",
"main"}`` (:func:`balance.api.case_row`), a module-level function a process pool can run.
"""

from __future__ import annotations

import math
import re
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field
from typing import Callable, Sequence

from ..errors import InputError, SolveError
from ..kinds import KINDS
from ..units import Uncertainty, _NUMBER, difference_scale, split_uncertainty
from ..worksheet import Worksheet
from .paths import _LIST_KEYS, _item, parse_path, values_of

#: The step of a central difference, as a fraction of the input's standard uncertainty.
STEP = 0.1
#: The relative precision the balances are solved to: two solves whose result differs by less
#: (against the largest value of its unit in the result) differ by round-off, and the
#: coefficient is taken as 0, not as that round-off over 2h.
RESOLUTION = 1e-9
#: The default coverage factor (JCGM 100:2008 6.3: k = 2 for about 95 %, from memory).
COVERAGE = 2.0
#: The coverage probability of the Monte Carlo interval.
PROBABILITY = 0.95
#: The largest Monte Carlo run taken.
MAX_SAMPLES = 1_000_000
#: Keys whose texts are words, never values (a title with a ± in it is not an input).
_WORDS = {"title", "job", "purpose", "basis", "convention", "procedure", "inside", "sketch", "name", "kind",
          "species", "model", "fractions", "source", "target", "vessel", "heat", "to", "method", "h_inside"}
_COLUMN_UNIT = re.compile(r"^(.*) \[(.+)\]$")

SolveCase = Callable[[Worksheet], dict]


@dataclass(frozen=True)
class Input:
    """One input typed with an uncertainty."""

    path: str
    """the field, as messages name it (``initial 'V-101'.P``)"""
    value_text: str
    """the value as typed, without its uncertainty"""
    uncertainty: Uncertainty
    number: float
    """the value's number as typed [its unit]"""
    after: str
    """what follows the number in the value: its unit as typed, spacing kept"""
    u_typed: float
    """the standard uncertainty [the value's unit, as a difference]"""
    scale: float
    """SI per one unit of the value's unit, as a difference"""
    si_unit: str

    @property
    def u(self) -> float:
        """The standard uncertainty [SI]."""
        return self.u_typed * self.scale

    def at(self, x: float) -> str:
        """The value's text with its number ``x`` [its unit]."""
        return f"{x!r}{self.after}"

    def as_json(self) -> dict:
        return {"input": self.path, "value": self.value_text, "uncertainty": self.uncertainty.text,
                "distribution": self.uncertainty.words, "u": _quantity(self.u, self.si_unit)}


def _section(path: str) -> str:
    return re.match(r"^\w+", path).group(0)


def uncertain_inputs(ws: Worksheet) -> tuple[Input, ...]:
    """Every field of the sections the worksheet's kind reads whose value carries an uncertainty,
    in the worksheet's order. Raises InputError naming the field for a bad uncertainty."""
    kind = KINDS.get(ws.system.kind)
    out = []
    for path, text in values_of(ws):
        if "±" not in text and "+-" not in text:
            continue
        if path.rsplit(".", 1)[-1] in _WORDS or (kind is not None and _section(path) not in kind.sections):
            continue
        value_text, unc = split_uncertainty(text, path)
        m = _NUMBER.match(value_text)
        if unc is None or not m:
            continue  # not a value: the solve reads it, or not, and says so
        u_typed = unc.standard(value_text, path)
        scale, si = difference_scale(m.group(2).strip(), path)
        out.append(Input(path, value_text, unc, float(m.group(1)), value_text[m.end(1):], u_typed, scale, si))
    return tuple(out)


def has_uncertain_inputs(ws: Worksheet) -> bool:
    """Whether any value of the worksheet is typed with an uncertainty (cheap: its texts only)."""
    return any("±" in t or "+-" in t for _, t in values_of(ws)) and bool(uncertain_inputs(ws))


# -- the cases: the worksheet with some inputs set -------------------------------------------
class _Cases:
    """Builds a case's worksheet from its inputs' texts: each field's place in the worksheet's
    layout found once (the lookup :func:`.paths.with_value` makes), every field set in one pass."""

    def __init__(self, ws: Worksheet, paths: Sequence[str]):
        self.ws = ws
        data = ws.to_dict()
        self.places = []
        for text in paths:
            path = parse_path(text, text)
            if path.section in _LIST_KEYS:
                i, keys = _item(data.get(_LIST_KEYS[path.section], []), path, text)
                self.places.append((_LIST_KEYS[path.section], i, keys))
            else:
                self.places.append((path.section, None, path.keys))

    def case(self, texts: Sequence[str | None]) -> Worksheet:
        """The worksheet with each input's text (None: as it is); raises InputError."""
        data = self.ws.to_dict()
        for (section, i, keys), text in zip(self.places, texts):
            if text is None:
                continue
            table = data[section][i] if i is not None else data[section]
            for k in keys[:-1]:
                table = table[k]
            table[keys[-1]] = text
        return Worksheet.from_dict(data)


def _solve(solve_case: SolveCase, cases: _Cases, texts: Sequence[str | None]) -> dict:
    try:
        ws = cases.case(texts)
    except InputError as exc:
        return {"ok": False, "message": str(exc), "values": {}, "main": ()}
    return solve_case(ws)


def _quantity(value: float | None, unit: str) -> dict | None:
    if value is None or not math.isfinite(value):
        return None
    return {"value": float(value), "unit": unit}


def _unit_of(column: str) -> str:
    m = _COLUMN_UNIT.match(column)
    return m.group(2) if m else ""


def coefficient_unit(y_unit: str, x_unit: str) -> str:
    """The unit of a coefficient ∂y/∂x."""
    if not x_unit:
        return y_unit
    def whole(unit: str) -> str:
        return f"({unit})" if "/" in unit or "*" in unit.replace("**", "") else unit

    return f"{whole(y_unit) if y_unit else '1'}/{whole(x_unit)}"


# -- first order (JCGM 100:2008) ---------------------------------------------------------------
@dataclass(frozen=True)
class Line:
    """One input's line in a result's budget."""

    input: Input
    c: float | None
    """the sensitivity coefficient ∂y/∂x [SI of y per SI of x]; None where it was not evaluated"""
    contribution: float
    """cᵢ uᵢ [the result's unit]"""
    share: float
    """(cᵢ uᵢ)² / u_c² [-]"""
    failed: str = ""
    """why the coefficient could not be evaluated ('' when it was)"""


@dataclass(frozen=True)
class Budget:
    """One result's uncertainty budget (JCGM 100:2008 5.1.2, inputs uncorrelated)."""

    column: str
    """the result, as :func:`balance.study.table.flatten` names it (its unit in brackets)"""
    value: float
    """the nominal result [its unit]"""
    unit: str
    lines: tuple[Line, ...]
    """largest contribution first"""
    u_c: float | None
    """the combined standard uncertainty [the result's unit]; None when an input failed"""
    k: float

    @property
    def U(self) -> float | None:
        """The expanded uncertainty k u_c [the result's unit] (JCGM 100:2008 6.2.1)."""
        return None if self.u_c is None else self.k * self.u_c

    @property
    def failed(self) -> tuple[Line, ...]:
        return tuple(li for li in self.lines if li.failed)

    def as_json(self) -> dict:
        lines = []
        for li in self.lines:
            row = li.input.as_json()
            row.pop("uncertainty")
            if li.failed:
                row["failed"] = li.failed
            else:
                row.update(c=_quantity(li.c, coefficient_unit(self.unit, li.input.si_unit)) if li.c is not None else None,
                           contribution=_quantity(li.contribution, self.unit), share=li.share)
            lines.append({k: v for k, v in row.items() if v is not None})
        out = {"result": self.column, "value": _quantity(self.value, self.unit), "budget": lines}
        if self.u_c is not None:
            out.update(u_c=_quantity(self.u_c, self.unit), U=_quantity(self.U, self.unit), k=self.k)
        else:
            out["incomplete"] = "u_c not given: " + "; ".join(f"{li.input.path} failed" for li in self.failed)
        return out


@dataclass(frozen=True)
class Propagation:
    """The uncertainty of a worksheet's results: first order, and Monte Carlo when asked."""

    inputs: tuple[Input, ...]
    budgets: tuple[Budget, ...]
    k: float
    monte_carlo: "MonteCarlo | None" = None

    METHOD = ("law of propagation of uncertainty, first order (JCGM 100:2008 5.1.2), inputs uncorrelated; "
              "sensitivity coefficients by central differences of the solve, step u/10 in the unit typed")

    def as_json(self, monte_carlo: bool = True) -> dict:
        """Plain data in SI; ``monte_carlo=False`` leaves the Monte Carlo run out (the record
        keeps the first order only)."""
        out = {"method": self.METHOD, "coverage_factor": self.k, "inputs": [i.as_json() for i in self.inputs],
               "results": [b.as_json() for b in self.budgets]}
        if monte_carlo and self.monte_carlo is not None:
            out["monte_carlo"] = self.monte_carlo.as_json()
        return out


def _nominal(ws: Worksheet, solve_case: SolveCase, nominal: dict | None) -> dict:
    nominal = nominal if nominal is not None else solve_case(ws)
    if not nominal["ok"]:
        raise SolveError(f"no uncertainty without a result: {nominal['message']}")
    return nominal


def _columns(nominal: dict, columns: Sequence[str] | str | None) -> list[str]:
    values = nominal["values"]
    if columns is None:
        return list(nominal["main"])
    if columns == "all":
        return [c for c in values if c != "warnings"]
    missing = [c for c in columns if c not in values]
    if missing:
        raise InputError("--result", f"{missing[0]!r} is no result of this worksheet; its main results are "
                                     f"{', '.join(nominal['main']) or 'none'}")
    return list(columns)


def first_order(ws: Worksheet, solve_case: SolveCase, *, columns: Sequence[str] | str | None = None,
                coverage: float = COVERAGE, nominal: dict | None = None,
                inputs: Sequence[Input] | None = None) -> Propagation:
    """The first-order uncertainty of the results (see the module docstring).

    ``columns``: the results (:func:`balance.study.table.flatten`'s columns), ``"all"`` for every
    one, default the kind's main results; ``coverage``: k of U = k u_c; ``nominal``: the nominal
    case's row when it is solved already. Raises InputError for a bad uncertainty or option,
    SolveError when the nominal case does not solve.
    """
    if not (isinstance(coverage, (int, float)) and math.isfinite(coverage) and coverage > 0):
        raise InputError("--coverage", f"the coverage factor must be a number above 0, like 2; got {coverage!r}")
    inputs = tuple(uncertain_inputs(ws) if inputs is None else inputs)
    nominal = _nominal(ws, solve_case, nominal)
    cols = _columns(nominal, columns)
    cases = _Cases(ws, [i.path for i in inputs])
    scales: dict[str, float] = {}
    for c, v in nominal["values"].items():
        scales[_unit_of(c)] = max(scales.get(_unit_of(c), 0.0), abs(v))
    # each input's coefficient on every result: (c per typed unit, or None) and why not
    slopes: list[tuple[dict, str]] = []
    for n, inp in enumerate(inputs):
        if inp.u_typed == 0:
            slopes.append(({c: 0.0 for c in cols}, ""))
            continue
        h = STEP * inp.u_typed
        ends = []
        for x in (inp.number + h, inp.number - h):
            texts = [None] * len(inputs)
            texts[n] = inp.at(x)
            row = _solve(solve_case, cases, texts)
            ends.append((x, row))
        bad = next(((x, r) for x, r in ends if not r["ok"]), None)
        if bad:
            slopes.append(({}, f"not solved at {inp.path} = {inp.at(bad[0])}: {bad[1]['message']}"))
            continue
        (_, up), (_, down) = ends
        got, why = {}, ""
        for c in cols:
            if c in up["values"] and c in down["values"]:
                a, b = up["values"][c], down["values"][c]
                same = abs(a - b) <= RESOLUTION * max(abs(a), abs(b), scales.get(_unit_of(c), 0.0))
                got[c] = 0.0 if same else (a - b) / (2 * h)
            else:
                why = why or f"at {inp.path} ± h the case has no {c}"
        slopes.append((got, why))
    budgets = []
    for c in cols:
        y, unit = nominal["values"][c], _unit_of(c)
        parts = []
        for inp, (got, why) in zip(inputs, slopes):
            if c in got:
                parts.append((inp, got[c] / inp.scale if inp.u_typed else None, got[c] * inp.u_typed, ""))
            else:
                parts.append((inp, None, 0.0, why or f"at {inp.path} ± h the case has no {c}"))
        variance = sum(p[2] ** 2 for p in parts)
        complete = not any(p[3] for p in parts)
        order = sorted(range(len(parts)), key=lambda j: (bool(parts[j][3]), -abs(parts[j][2]), j))
        lines = tuple(Line(parts[j][0], parts[j][1], parts[j][2],
                           parts[j][2] ** 2 / variance if variance > 0 and not parts[j][3] else 0.0, parts[j][3])
                      for j in order)
        budgets.append(Budget(c, y, unit, lines, math.sqrt(variance) if complete else None, float(coverage)))
    return Propagation(inputs, tuple(budgets), float(coverage))


# -- Monte Carlo (JCGM 101:2008) ---------------------------------------------------------------
@dataclass(frozen=True)
class Spread:
    """One result's distribution over the samples that solved."""

    column: str
    unit: str
    count: int
    """the samples it is taken over"""
    mean: float
    sd: float
    """the standard deviation (the estimate of the standard uncertainty, JCGM 101:2008 7.6)"""
    low: float
    high: float
    """the probabilistically symmetric coverage interval's ends"""

    def as_json(self) -> dict:
        return {"result": self.column, "samples": self.count, "mean": _quantity(self.mean, self.unit),
                "standard_deviation": _quantity(self.sd, self.unit),
                "interval": {"low": _quantity(self.low, self.unit), "high": _quantity(self.high, self.unit)}}


@dataclass(frozen=True)
class MonteCarlo:
    """A Monte Carlo run: its settings, each result's spread, the samples that failed and why."""

    samples: int
    seed: int | None
    spreads: tuple[Spread, ...]
    failed: int
    failures: tuple[tuple[str, int], ...] = field(default=())
    """each distinct message, and how many samples failed with it (most first)"""
    probability: float = PROBABILITY

    @property
    def solved(self) -> int:
        return self.samples - self.failed

    def as_json(self) -> dict:
        return {"method": "Monte Carlo (JCGM 101:2008), the inputs' distributions as declared, uncorrelated",
                "samples": self.samples, "seed": self.seed, "solved": self.solved, "failed": self.failed,
                "failures": [{"message": m, "count": n} for m, n in self.failures],
                "coverage_probability": self.probability, "results": [s.as_json() for s in self.spreads]}


def draw(inputs: Sequence[Input], samples: int, seed: int | None):
    """Every sample's inputs as the numbers they are typed in, drawn up front from one generator:
    an array [input, sample] [each input's unit]."""
    import numpy as np

    rng = np.random.default_rng(seed)
    out = np.empty((len(inputs), samples))
    for n, inp in enumerate(inputs):
        dist = inp.uncertainty.distribution if inp.uncertainty.k is None else "normal"
        if dist == "rectangular":
            a = inp.u_typed * math.sqrt(3.0)  # u = a/√3 (JCGM 100:2008 4.3.7)
            out[n] = inp.number + rng.uniform(-a, a, samples)
        elif dist == "triangular":
            a = inp.u_typed * math.sqrt(6.0)  # u = a/√6 (JCGM 100:2008 4.3.9)
            out[n] = inp.number + rng.triangular(-a, 0.0, a, samples)
        else:
            out[n] = inp.number + inp.u_typed * rng.standard_normal(samples)
    return out


def _kept(row: dict, columns: Sequence[str]) -> dict:
    """A sample's row with the columns asked for only (what crosses back from a worker)."""
    values = row["values"]
    return {"ok": row["ok"], "message": row["message"], "values": {c: values[c] for c in columns if c in values}}


def _solve_chunk(job) -> list[dict]:
    """A worker's share of the samples: (solve_case, the worksheet's TOML, the inputs' paths, the
    columns, each sample's texts) -> each sample's row. Module-level: a process pool runs it."""
    solve_case, text, paths, columns, rows = job
    cases = _Cases(Worksheet.from_toml(text), paths)
    return [_kept(_solve(solve_case, cases, texts), columns) for texts in rows]


def interval(values: Sequence[float], p: float = PROBABILITY) -> tuple[float, float]:
    """The probabilistically symmetric 100p % coverage interval of ``values``: sorted, q = pM
    rounded to an integer, r = (M − q)/2 (rounded up), the r-th and (r + q)-th values
    (JCGM 101:2008 7.7.2, from memory)."""
    ys = sorted(values)
    M = len(ys)
    q = int(p * M + 0.5)
    r = max(1, (M - q + 1) // 2)
    return ys[r - 1], ys[min(M, r + q) - 1]


def monte_carlo(ws: Worksheet, solve_case: SolveCase, samples: int, *, seed: int | None = 1,
                columns: Sequence[str] | str | None = None, nominal: dict | None = None, jobs: int = 1,
                inputs: Sequence[Input] | None = None,
                progress: Callable[[int, int], None] | None = None) -> MonteCarlo:
    """``samples`` draws of the uncertain inputs, each solved (see the module docstring); on
    ``jobs`` processes with the serial numbers. Raises InputError for a bad option."""
    import numpy as np

    if not (isinstance(samples, int) and 2 <= samples <= MAX_SAMPLES):
        raise InputError("--monte-carlo", f"the number of samples must be from 2 to {MAX_SAMPLES:,}; got {samples!r}")
    if not (isinstance(jobs, int) and jobs >= 1):
        raise InputError("--jobs", f"must be 1 or more; got {jobs!r}")
    inputs = tuple(uncertain_inputs(ws) if inputs is None else inputs)
    nominal = _nominal(ws, solve_case, nominal)
    cols = _columns(nominal, columns)
    drawn = draw(inputs, samples, seed)
    rows = [[inp.at(float(drawn[n, s])) for n, inp in enumerate(inputs)] for s in range(samples)]
    paths = [i.path for i in inputs]
    solved: list[dict] = []
    if jobs == 1:
        cases = _Cases(ws, paths)
        step = max(1, samples // 100)
        for s, texts in enumerate(rows):
            solved.append(_kept(_solve(solve_case, cases, texts), cols))
            if progress is not None and (s + 1) % step == 0:
                progress(s + 1, samples)
    else:
        text = ws.to_toml()
        size = max(1, math.ceil(samples / (4 * jobs)))
        chunks = [(solve_case, text, paths, cols, rows[a:a + size]) for a in range(0, samples, size)]
        with ProcessPoolExecutor(max_workers=jobs) as pool:
            for part in pool.map(_solve_chunk, chunks):
                solved.extend(part)
                if progress is not None:
                    progress(len(solved), samples)
    failures: dict[str, int] = {}
    for r in solved:
        if not r["ok"]:
            failures[r["message"]] = failures.get(r["message"], 0) + 1
    spreads = []
    for c in cols:
        ys = np.array([r["values"][c] for r in solved if r["ok"] and c in r["values"]])
        if len(ys) < 2:
            continue
        low, high = interval(ys.tolist())
        spreads.append(Spread(c, _unit_of(c), len(ys), float(ys.mean()), float(ys.std(ddof=1)), low, high))
    listed = tuple(sorted(failures.items(), key=lambda kv: -kv[1]))
    return MonteCarlo(samples, seed, tuple(spreads), sum(failures.values()), listed)


def propagate(ws: Worksheet, solve_case: SolveCase, *, columns: Sequence[str] | str | None = None,
              coverage: float = COVERAGE, nominal: dict | None = None, samples: int | None = None,
              seed: int | None = 1, jobs: int = 1, progress: Callable[[int, int], None] | None = None) -> Propagation:
    """The first order, and a Monte Carlo run of ``samples`` when asked (not None)."""
    inputs = uncertain_inputs(ws)
    nominal = _nominal(ws, solve_case, nominal)
    found = first_order(ws, solve_case, columns=columns, coverage=coverage, nominal=nominal, inputs=inputs)
    if samples is None:
        return found
    run = monte_carlo(ws, solve_case, samples, seed=seed, columns=columns, nominal=nominal, jobs=jobs,
                      inputs=inputs, progress=progress)
    return Propagation(found.inputs, found.budgets, found.k, run)
