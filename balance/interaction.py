"""Binary interaction parameters kij of the cubic mixtures: the bundled set and a worksheet's own.

The van der Waals one-fluid rule of a cubic mixture, a = Σᵢ Σⱼ yᵢ yⱼ (1 − kᵢⱼ) √(aᵢ aⱼ),
takes one kij per pair of components. They come from, in this order:

* the worksheet's ``[fluid.kij]`` table (``"CH4-CO2" = 0.1``), read by :func:`read_kij`;
* the bundled file ``balance/data/kij.toml`` (ChemSep's Peng-Robinson set; its header gives
  the layout and the source). soave-redlich-kwong reads the same Peng-Robinson values (there
  is no bundled SRK set; common practice, no source); van-der-waals and redlich-kwong have none;
* otherwise 0, which :meth:`KijSet.warning` says, naming the pairs.

:func:`kij_set` puts them together as a :class:`KijSet`, which keeps, for every pair, the
value and where it came from, for the record and the output.

This module imports neither thermo (only the generator, balance/data/build_kij.py, does)
nor numpy: the species lookup, which brings numpy, is imported when a worksheet's table is read.
"""

from __future__ import annotations

import tomllib
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

from .errors import InputError

#: The bundled file (in balance/data).
DATA_FILE = "kij.toml"
#: The source of a value the worksheet gives.
GIVEN = "given in the worksheet"
#: The source of a pair neither the worksheet nor the bundled set has.
MISSING = "not in the data: 0 assumed"
#: The cubic models and the table of the bundled file each reads (None: no bundled kij).
TABLE_OF = {
    "van-der-waals": None,
    "redlich-kwong": None,
    "soave-redlich-kwong": "peng-robinson",
    "peng-robinson": "peng-robinson",
}
#: Said beside a value one model reads from another's table.
BORROWED = "the {table} value, no {model} set bundled"


@dataclass(frozen=True)
class KijSet:
    """The kij of one mixture under one cubic model, each with its source."""

    ids: tuple[str, ...]
    """component ids, in the mixture's order"""
    model: str
    """canonical model name, e.g. ``"peng-robinson"``"""
    matrix: tuple[tuple[float, ...], ...]
    """kij [-] by position in ``ids``: symmetric, zero diagonal"""
    used: tuple[tuple[str, str, float, str], ...]
    """(id_i, id_j, kij [-], source) for every pair i < j in ``ids`` order; the source is the
    bundled table's words with the value's page, :data:`GIVEN` or :data:`MISSING`"""

    def missing(self) -> tuple[tuple[str, str], ...]:
        """The pairs with no value anywhere, taken as 0."""
        return tuple((i, j) for i, j, _, source in self.used if source == MISSING)

    def warning(self) -> str | None:
        """One sentence naming the pairs taken as 0 and how to give them; None if there are none."""
        missing = self.missing()
        if not missing:
            return None
        names = ", ".join(f"{i}-{j}" for i, j in missing)
        table = TABLE_OF[self.model]
        if table is None:
            why = f"{self.model} has no bundled binary interaction parameters"
        else:
            why = f"the bundled {table} set" + ("" if table == self.model else f" (which {self.model} reads)")
            why += " has no value for " + ("it" if len(missing) == 1 else "them")
        give = "a value" if len(missing) == 1 else "values"
        return (f"kij = 0 is assumed for {names}: {why}; give {give} under [fluid.kij] in the worksheet, "
                f'like "{missing[0][0]}-{missing[0][1]}" = <value>.')

    def lines(self) -> list[str]:
        """One line per pair for the record and the output: ``CH4-CO2  kij = 0.0978  (source)``."""
        return [f"{i}-{j}  kij = {_text(value)}  ({source})" for i, j, value, source in self.used]


def _text(value: float) -> str:
    """A kij as written: up to 10 significant digits, no trailing zeros."""
    return f"{value:.10g}"


@lru_cache(maxsize=1)
def _bundled() -> dict[str, tuple[str, dict[tuple[str, str], tuple[float, str]]]]:
    """The bundled file, by table: (source words, {(id_i, id_j): (kij, page)}) with both orders of each pair."""
    raw = tomllib.loads(resources.files("balance.data").joinpath(DATA_FILE).read_text(encoding="utf-8"))
    out = {}
    for table, body in raw.items():
        pairs = {}
        for key, entry in body["kij"].items():
            i, j = key.split(" ")
            pairs[(i, j)] = pairs[(j, i)] = (float(entry["kij"]), entry["page"])
        out[table] = (body["source"], pairs)
    return out


def _model(model: str) -> str:
    if model not in TABLE_OF:
        raise InputError("fluid.model", f"binary interaction parameters belong to the cubic models "
                                        f"({', '.join(TABLE_OF)}); got {model!r}")
    return model


def _bundled_source(model: str, page: str) -> str:
    table = TABLE_OF[model]
    words = f"{_bundled()[table][0]}, {page}"
    return words if table == model else f"{words}; {BORROWED.format(table=table, model=model)}"


def bundled_pairs(model: str = "peng-robinson") -> tuple[tuple[str, str, float, str], ...]:
    """Every pair the bundled file gives ``model``: (id_i, id_j, kij [-], source), in file order."""
    table = TABLE_OF[_model(model)]
    if table is None:
        return ()
    seen: set[frozenset] = set()
    out = []
    for (i, j), (value, page) in _bundled()[table][1].items():
        if frozenset((i, j)) not in seen:  # each pair is held in both orders, the file's first
            seen.add(frozenset((i, j)))
            out.append((i, j, value, _bundled_source(model, page)))
    return tuple(out)


def _value(value, field: str) -> float:
    """A kij [-] as given: a number, or text holding one; -1 < kij < 1."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise InputError(field, f"must be a number between -1 and 1, like 0.05; got {value!r}")
    if isinstance(value, str):
        text = value.strip().replace("\u2212", "-")  # a typographic minus pasted from a document
        try:
            number = float(text)
        except ValueError:
            hint = " (write a decimal point, not a comma)" if "," in text else ""
            raise InputError(field, f"must be a number between -1 and 1, like 0.05{hint}; got {value!r}") from None
    else:
        number = float(value)
    if not -1.0 < number < 1.0:  # also refuses nan; 1 would remove the pair's attraction altogether
        raise InputError(field, f"must lie between -1 and 1 (exclusive); got {value!r}")
    return number


#: The longest [fluid.kij] key read [characters]: two species names of at most MAX_NAME and the "-".
_MAX_KEY = 201


def pair_ids(key: str, field: str) -> tuple[str, str]:
    """The two species ids a key like ``"CH4-CO2"`` or ``"n-butane-carbon dioxide"`` names."""
    from .species import lookup

    text = key.strip()
    if len(text) > _MAX_KEY:
        raise InputError(field, f"is {len(text)} characters long; name the pair by two species ids, like \"CH4-CO2\"")
    cuts = [k for k, ch in enumerate(text) if ch == "-" and 0 < k < len(text) - 1]
    if not cuts:
        raise InputError(field, 'expected two species joined by "-", like "CH4-CO2"')
    found: dict[tuple[str, str], str] = {}
    first: InputError | None = None
    for k in cuts:  # a name may hold a dash itself (n-butane): try each one as the join
        try:
            pair = (lookup(text[:k].strip(), field).id, lookup(text[k + 1:].strip(), field).id)
        except InputError as exc:
            first = first or exc
            continue
        found.setdefault(pair, f"{text[:k].strip()}' and '{text[k + 1:].strip()}")
    if not found:
        if len(cuts) == 1:
            raise first
        raise InputError(field, 'names no two known species at any of its "-"; write the species ids, like '
                                '"CH4-CO2" (`joulebook species` lists them)')
    if len(found) > 1:
        readings = "; ".join(f"'{words}'" for words in found.values())
        raise InputError(field, f"can be read more than one way ({readings}); write the species ids, like \"CH4-CO2\"")
    return next(iter(found))


def read_kij(table: Mapping[str, object], ids: Sequence[str], field: str = "fluid.kij") -> dict[tuple[str, str], float]:
    """A worksheet's ``[fluid.kij]`` table, checked against the mixture's component ``ids``.

    Keys are two species (ids, names, formulas, CAS numbers or aliases) joined by ``-``;
    values kij [-], numbers or text, -1 < kij < 1. Returns {(id_i, id_j): kij} with each
    pair in ``ids`` order, pairs sorted that way. Raises InputError naming
    ``<field>.<key>`` for an unknown species, one that is not a component, a species
    paired with itself, a pair given twice (in either order) and a value that is not a
    number in range.
    """
    if not isinstance(table, Mapping):
        raise InputError(field, f'must be a table of pairs, like "CH4-CO2" = 0.1; got {type(table).__name__}')
    ids = tuple(ids)
    position = {sp: n for n, sp in enumerate(ids)}
    given: dict[tuple[str, str], float] = {}
    first_key: dict[tuple[str, str], str] = {}
    for key, value in table.items():
        name = f"{field}.{key}"
        i, j = pair_ids(str(key), name)
        if i == j:
            raise InputError(name, f"pairs {i} with itself; a kij joins two different components")
        for sp in (i, j):
            if sp not in position:
                raise InputError(name, f"{sp} is not a component of this mixture; its components are {', '.join(ids)}")
        if position[i] > position[j]:
            i, j = j, i
        if (i, j) in first_key:
            raise InputError(name, f"gives the pair {i}-{j} a second time (first as '{first_key[(i, j)]}')")
        first_key[(i, j)] = str(key)
        given[(i, j)] = _value(value, name)
    return dict(sorted(given.items(), key=lambda item: (position[item[0][0]], position[item[0][1]])))


def kij_set(ids: Sequence[str], model: str, given: Mapping[tuple[str, str], float] | None = None) -> KijSet:
    """The kij of the components ``ids`` under the cubic ``model`` (canonical name).

    ``given`` (from :func:`read_kij`: pair of ids -> kij [-], either order) wins over the
    bundled table the model reads; a pair in neither is 0 and listed by ``missing()``.
    """
    ids = tuple(ids)
    if len(set(ids)) != len(ids):
        twice = next(sp for sp in ids if ids.count(sp) > 1)
        raise InputError("fluid.composition", f"names {twice} twice; each component once")
    table = TABLE_OF[_model(model)]
    bundled = _bundled()[table][1] if table else {}
    position = {sp: n for n, sp in enumerate(ids)}
    own: dict[frozenset, float] = {}
    for (i, j), value in (given or {}).items():
        name = f"fluid.kij.{i}-{j}"
        if i == j or i not in position or j not in position:
            raise InputError(name, f"is not a pair of two components of this mixture ({', '.join(ids)})")
        own[frozenset((i, j))] = _value(value, name)
    matrix = [[0.0] * len(ids) for _ in ids]
    used = []
    for a, i in enumerate(ids):
        for b in range(a + 1, len(ids)):
            j = ids[b]
            if frozenset((i, j)) in own:
                value, source = own[frozenset((i, j))], GIVEN
            elif (i, j) in bundled:
                value, page = bundled[(i, j)]
                source = _bundled_source(model, page)
            else:
                value, source = 0.0, MISSING
            matrix[a][b] = matrix[b][a] = value
            used.append((i, j, value, source))
    return KijSet(ids=ids, model=model, matrix=tuple(tuple(row) for row in matrix), used=tuple(used))


__all__ = ["GIVEN", "MISSING", "TABLE_OF", "KijSet", "bundled_pairs", "kij_set", "pair_ids", "read_kij"]
