"""Devices solved together where propagation stalls: a tear stream and a safeguarded Newton.

Propagation (:meth:`.network.Network.solve`) works device by device. It stalls
on a loop — a feed–effluent exchanger whose hot inlet is a heater's outlet fed
by the exchanger's own cold outlet, with the heater's duty given — and on two
devices each holding one unknown that only their balances taken together fix
(a heater of given duty whose rate is unknown, feeding a mixer whose outlet
state is given). There the worksheet may still hold as many equations as
unknowns. This module finds that out the way a flowsheet is solved by hand:

1. **Tear** one stream joining two devices (then, if none will do, two):
   the consumer sees a copy of it whose enthalpy is guessed at its pressure
   (and its rate, where nothing else fixes it); the producer writes its
   outlet into a second copy. Mass crosses the tear: a rate fixed on either
   side is the other's.
2. **Propagate** the torn worksheet with the network's own rules. A tear
   that leaves something unknown, or gives something twice, is not the
   right one (the worksheet is not square through it).
3. **Close** the tear: drive (h_made − h_guessed, ṅ_made − ṅ_guessed) to
   zero by Newton's method with a forward-difference Jacobian, the step
   limited and halved until the mismatch falls (a state no flash can reach
   counts as no fall). A Jacobian with no rank says the loop does not fix
   the tear: under-specified, said per device as before.
4. The converged tear is put into the worksheet itself and propagation
   resumes; the result goes through the same checks as any other
   (every device's balances recomputed, Ṡ_gen ≥ 0, an exchanger's cross).

Nothing here runs for a worksheet that propagation solves.

Every value in SI: molar enthalpy [J/mol], pressure [Pa], rate [mol/s].
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, replace

from ...errors import BalanceError, SolveError, SpecificationError
from . import network as nw

#: The tear's mismatch counts as closed below this, relative to its scale.
CLOSED = 1e-12
#: A scaled Jacobian's smallest singular value below this: the loop leaves the tear free.
FREE = 1e-6
#: Newton steps before the loop is said not to close.
STEPS = 60
#: Molar gas constant [J/(mol K)] (CODATA 2018, exact): a scale for molar enthalpy.
R = 8.314462618
#: What a guess out of reach raises (a flash that cannot be met, a rate of the wrong sign, a value given twice).
UNREACHED = (BalanceError, ValueError, ZeroDivisionError, OverflowError)


@dataclass(frozen=True)
class Tear:
    """One stream cut in two: the consumer's copy is guessed, the producer's is made."""

    stream: str
    P: float
    """its pressure [Pa], fixed upstream of the guess"""
    rate: bool
    """whether its rate is guessed too (nothing on either side fixes it)"""

    @property
    def made(self) -> str:
        return f"{self.stream} \u27f2"  # the producer's copy: a name no worksheet can give (it is torn)


def solve(net: nw.Network) -> bool:
    """Complete a stalled network by solving its remaining unknowns together.

    Returns True with ``net`` complete (its points and rates all known), False
    where no tear makes the worksheet square (the caller then says per device
    what is missing). Raises SolveError where tears make it square but no
    guess closes their loop (and none found the loop leaving them free).
    """
    candidates = _candidates(net)
    stuck: SolveError | None = None
    free = False
    for size in (1, 2):
        for names in itertools.combinations(candidates, size):
            try:
                found = _try(net, names)
            except SpecificationError:
                free = True  # square through these tears, but the loop leaves them free
                continue
            except SolveError as exc:
                stuck = stuck or exc
                continue
            if found is None:
                continue
            tears, x = found
            _pressures_close(net, tears, x)
            devices = [d.name for d in net.devices  # those propagation left waiting
                       if any(s not in net.points or s not in net.rates for s in (*d.inlets, *d.outlets))]
            _inject(net, tears, x)
            propagate(net)
            if net.missing():
                return False
            net.note(f"devices {', '.join(devices)} solved together: stream"
                     f"{'s' if len(tears) > 1 else ''} {', '.join(repr(t.stream) for t in tears)} guessed "
                     "and the loop closed (a tear stream and Newton's method)")
            return True
    if stuck is not None and not free:
        raise stuck
    return False


def propagate(net: nw.Network) -> None:
    """The network's own propagation: every device's rules until nothing follows (as Network.solve)."""
    for _ in range(4 * len(net.devices) + 4):
        progress = False
        for d in net.devices:
            progress |= bool(nw._rates(net, d))
            progress |= bool(nw.RULES[d.kind](net, d))
        if not progress:
            break


# -- which streams to tear --------------------------------------------------------------
def _candidates(net: nw.Network) -> list[str]:
    """Streams still unknown that join two devices, with no property given but P (in worksheet order)."""
    made = {s for d in net.devices for s in d.outlets}
    used = {s for d in net.devices for s in d.inlets}
    return [name for name, spec in net.streams.items()
            if name not in net.points and name in made and name in used and set(spec.given) <= {"P"}
            and _pressure(net, name, set()) is not None]


def _producer(net: nw.Network, name: str) -> nw.DeviceSpec:
    return next(d for d in net.devices if name in d.outlets)


def _pressure(net: nw.Network, name: str, seen: set[str]) -> float | None:
    """A stream's pressure [Pa] as the devices upstream fix it, whatever its enthalpy (None if they do not)."""
    given = net.streams[name].given.get("P")
    if given is not None:
        return given
    if name in net.points:
        return net.points[name].P
    if name in seen:
        return None
    seen = seen | {name}
    d = next((d for d in net.devices if name in d.outlets), None)
    if d is None:
        return None
    if d.kind == "mixer":  # the lowest inlet's; an inlet that comes round from this outlet (a recycle) has
        ins = [P for P in (_pressure(net, s, seen) for s in d.inlets) if P is not None]  # no say of its own
        return min(ins) if ins else None
    if d.kind == "separator":
        for s in d.outlets:
            if "P" in net.streams[s].given:
                return net.streams[s].given["P"]
        return _pressure(net, d.inlets[0], seen)
    k = d.outlets.index(name) if d.kind == "exchanger" else 0
    inlet = d.inlets[k] if d.kind == "exchanger" else d.inlets[0]
    P_in = _pressure(net, inlet, seen)
    if P_in is None:
        return None
    if k < len(d.dP):
        return P_in - d.dP[k]
    if d.kind in ("heater", "cooler", "exchanger", "splitter"):
        return P_in  # no pressure drop given: none (as the network's rules take it)
    return None


# -- the torn worksheet -------------------------------------------------------------------
def _torn(net: nw.Network, tears: tuple[Tear, ...], x: list[float]) -> nw.Network:
    """The worksheet with each tear cut: the guessed copy given (P, h) [and its rate], the made copy free;
    every rate the stalled network knew, known."""
    streams, i = [], 0
    guessed: dict[str, float] = {}
    by_name = {t.stream: t for t in tears}
    for name, spec in net.streams.items():
        t = by_name.get(name)
        if t is None:
            streams.append(spec)
            continue
        h = x[i]
        i += 1
        n = spec.n_dot
        if t.rate:
            n = x[i]
            i += 1
            guessed[name] = n
        streams.append(replace(spec, given={"P": t.P, "h": h}, n_dot=n))
        streams.append(replace(spec, name=t.made))
    devices = [replace(d, outlets=tuple(by_name[s].made if s in by_name else s for s in d.outlets))
               for d in net.devices]
    torn = nw.Network(streams, devices)
    for name, n in net.rates.items():
        torn.rates.setdefault(name, n)
        if name in by_name:
            torn.rates.setdefault(by_name[name].made, n)
    torn.basis = net.basis
    return torn


def _propagate_torn(torn: nw.Network, tears: tuple[Tear, ...]) -> None:
    """Propagate, letting a rate cross each tear whose rate is not guessed, until nothing follows."""
    for _ in range(4 * len(torn.devices) + 4):
        propagate(torn)
        crossed = False
        for t in tears:
            if t.rate:
                continue
            a, b = t.stream, t.made
            if a in torn.rates and b not in torn.rates:
                torn.rates[b] = torn.rates[a]
                crossed = True
            elif b in torn.rates and a not in torn.rates:
                torn.rates[a] = torn.rates[b]
                crossed = True
        if not crossed:
            return


def _mismatch(net: nw.Network, tears: tuple[Tear, ...], x: list[float]) -> list[float] | None:
    """What the producers make less what was guessed, per tear: h [J/mol] (and ṅ [mol/s] where guessed);
    None where the torn worksheet leaves something unknown."""
    torn = _torn(net, tears, x)
    _propagate_torn(torn, tears)
    if any(s not in torn.points or s not in torn.rates for s in torn.streams):
        return None
    r, i = [], 0
    for t in tears:
        r.append(torn.points[t.made].h - x[i])
        i += 1
        if t.rate:
            r.append(torn.rates[t.made] - x[i])
            i += 1
    return r


# -- closing the tear ---------------------------------------------------------------------
def _try(net: nw.Network, names: tuple[str, ...]) -> tuple[tuple[Tear, ...], list[float]] | None:
    """The tears through ``names`` and their closed values, or None where they leave something unknown.
    Raises SpecificationError where the loop leaves them free, SolveError where it does not close."""
    for rate in itertools.product((False, True), repeat=len(names)):
        tears = tuple(Tear(s, _pressure(net, s, set()), r) for s, r in zip(names, rate)
                      if not (r and s in net.rates))
        if len(tears) != len(names):
            continue
        failed: SolveError | None = None
        for x0 in _starts(net, tears):
            try:
                r0 = _mismatch(net, tears, x0)
            except UNREACHED:
                continue  # this guess is out of reach or gives a value twice: the next one
            if r0 is None:
                break  # these tears leave something unknown whatever the guess
            try:
                return tears, _newton(net, tears, x0, r0)
            except SolveError as exc:
                failed = exc  # not closed from here: the next first guess
        if failed is not None:
            raise failed
    return None


def _starts(net: nw.Network, tears: tuple[Tear, ...]) -> list[list[float]]:
    """First guesses: each tear at the temperatures of the known streams of its fluid (between each two
    neighbours first, then each), its rate as the largest known rate of its fluid."""
    per_tear = []
    for t in tears:
        spec = net.streams[t.stream]
        Ts = sorted({p.T for s, p in net.points.items() if net.streams[s].model is spec.model})
        trial = [0.5 * (a + b) for a, b in itertools.pairwise(Ts)] + Ts
        if Ts:
            trial += [Ts[0] - 20.0, Ts[-1] + 20.0]
        hs = []
        for T in trial or [298.15]:
            try:
                hs.append(spec.model.flash({"T": T, "P": t.P}, field=f"stream '{t.stream}'").h)
            except UNREACHED:
                continue
        rates = [n for s, n in net.rates.items() if net.streams[s].model.species.id == spec.model.species.id]
        n0 = max(rates, default=1.0)
        per_tear.append([[h, n0] if t.rate else [h] for h in hs])
    return [[v for part in combo for v in part] for combo in itertools.product(*per_tear)][:64]


def _scales(net: nw.Network, tears: tuple[Tear, ...], x: list[float]) -> list[float]:
    out, i = [], 0
    for t in tears:
        T = max((p.T for p in net.points.values()), default=300.0)
        out.append(max(abs(x[i]), R * T))
        i += 1
        if t.rate:
            out.append(max(abs(x[i]), 1e-6))
            i += 1
    return out


def _newton(net: nw.Network, tears: tuple[Tear, ...], x: list[float], r: list[float]) -> list[float]:
    """Newton's method on the tear, the step limited to a fifth of each scale, then halved until the
    mismatch falls; raises SolveError when the loop does not close."""
    import numpy as np  # only when a worksheet is solved together

    scale = np.array(_scales(net, tears, x))
    xv, rv = np.array(x, float), np.array(r, float)
    norm = float(np.max(np.abs(rv) / scale))
    for _ in range(STEPS):
        if norm <= CLOSED:
            return [float(v) for v in xv]
        J = np.empty((len(xv), len(xv)))
        for j in range(len(xv)):
            dx = 1e-7 * scale[j]
            xj = xv.copy()
            xj[j] += dx
            rj = _safe(net, tears, xj)
            if rj is None:
                xj[j] -= 2 * dx
                rj = _safe(net, tears, xj)
                dx = -dx
            if rj is None:
                raise _not_closed(tears, norm)
            J[:, j] = (rj - rv) / dx
        # the Jacobian in scaled units (each entry of order one where the loop fixes the tear): no rank, no
        # root to find (every guess closes the loop as well as any other, or none does)
        sigma = np.linalg.svd(J * scale[None, :] / scale[:, None], compute_uv=False)
        if sigma.min() <= FREE * max(1.0, sigma.max()):
            raise SpecificationError(_not_fixed(tears))
        step = np.linalg.solve(J, -rv)
        limit = float(np.max(np.abs(step) / (0.2 * scale)))
        if limit > 1.0:
            step /= limit
        lam = 1.0
        while lam > 1e-6:
            trial = xv + lam * step
            rt = _safe(net, tears, trial)
            if rt is not None:
                nt = float(np.max(np.abs(rt) / scale))
                if nt < norm or nt <= CLOSED:
                    break
            lam *= 0.5
        else:
            if norm <= 1e3 * CLOSED:  # no step lowers it further: the flashes' own precision
                return [float(v) for v in xv]
            raise _not_closed(tears, norm)
        xv, rv, norm = trial, rt, nt
    if norm <= 1e3 * CLOSED:
        return [float(v) for v in xv]
    raise _not_closed(tears, norm)


def _safe(net, tears, x):
    import numpy as np

    try:
        r = _mismatch(net, tears, list(x))
    except UNREACHED:
        return None
    return None if r is None else np.array(r, float)


def _not_closed(tears: tuple[Tear, ...], norm: float) -> SolveError:
    names = ", ".join(repr(t.stream) for t in tears)
    return SolveError(f"the devices around stream{'s' if len(tears) > 1 else ''} {names} must be solved together, "
                      f"but no state of {names} closes their loop (the mismatch stays {norm:.3g} of its scale): "
                      "check the duties, efficiencies and given states in the loop; no result reported")


def _not_fixed(tears: tuple[Tear, ...]) -> str:
    names = ", ".join(repr(t.stream) for t in tears)
    return (f"the devices around stream{'s' if len(tears) > 1 else ''} {names} leave it free: every state of "
            f"{names} closes their loop; give one more value in the loop (a temperature, a duty ...)")


def _pressures_close(net: nw.Network, tears: tuple[Tear, ...], x: list[float]) -> None:
    """Each tear's made copy at the pressure its guess was taken at, else the loop's pressures do not close
    (a recycle through pressure drops and no machine): raises SolveError."""
    torn = _torn(net, tears, x)
    _propagate_torn(torn, tears)
    for t in tears:
        P = torn.points[t.made].P
        if not math.isclose(P, t.P, rel_tol=1e-9):
            raise SolveError(f"stream '{t.stream}': the devices around it bring it back at {P / 1e5:.6g} bar, "
                             f"not the {t.P / 1e5:.6g} bar it left at: a loop's pressure drops need a pump or "
                             "compressor to close (or give the drops so that they sum to nothing); no result reported")


def _inject(net: nw.Network, tears: tuple[Tear, ...], x: list[float]) -> None:
    """Put the closed tear into the worksheet itself: its state (and rate, where it was guessed)."""
    i = 0
    for t in tears:
        net.points[t.stream] = net.streams[t.stream].model.flash({"P": t.P, "h": x[i]},
                                                                 field=f"stream '{t.stream}'")
        i += 1
        if t.rate:
            net.rates[t.stream] = x[i]
            i += 1


__all__ = ["Tear", "propagate", "solve"]
