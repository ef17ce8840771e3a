"""Build ``balance/data/species.toml`` from the packages the numbers come from.

NOT USED AT RUNTIME.  joulebook only reads the TOML file this script writes;
nothing under ``balance/`` imports this module, Cantera or ``chemicals``.
Run it by hand when the species list or a source package changes, review the
diff of species.toml, and update the checksums in tests/test_species_data.py.

How to run (in a throw-away virtualenv, never the project's own)::

    python3.11 -m venv /tmp/buildvenv
    /tmp/buildvenv/bin/pip install cantera==3.2.0 CoolProp==8.0.0 chemicals==1.5.2 numpy
    /tmp/buildvenv/bin/python balance/data/build_species.py            # rewrite species.toml
    /tmp/buildvenv/bin/python balance/data/build_species.py --check    # exit 1 if it differs

The script refuses other versions of the three packages, because every
provenance string in the file names the version the value came from.  Its
output is deterministic: the same packages give the same bytes.

Where each value comes from (the file header repeats this for readers):

* Tc, Pc, omega, M, Vc: CoolProp's fluid constants when CoolProp has the
  fluid, so that the reference model and the cubic models share them; else
  ``chemicals`` (its default method for each constant, named in the source).
  Zc is always Pc Vc / (R Tc).
* cp: the NASA 7-coefficient polynomials of Cantera's bundled nasa_gas.yaml
  when the species is there.  A species that also has a CoolProp fluid keeps
  the NASA polynomial only if it agrees with CoolProp's ideal-gas cp0 within
  ``NASA_AGREEMENT`` on 300-800 K; otherwise, and for species that have no NASA
  polynomial, two NASA-7 ranges are FITTED to CoolProp's ideal-gas cp0.
* liquid: CoolProp at 298.15 K and 101325 Pa when that state is liquid, else
  the saturated liquid at 298.15 K.

Fitted polynomials (fit_nasa): least squares on the relative cp error,
refined towards the minimax fit, cp and dcp/dT continuous at Tmid, Tmid the
best of 500-1000 K; the range and its limits are explained at fit_limits.
a6 and a7 of the low range put h = 0 and s = 0 at
298.15 K and 1 bar (an arbitrary reference: joulebook uses differences
only), those of the high range make h and s continuous at Tmid.  Each fitted
entry's source string records the maximum cp error and how far its h and s
differences from 298.15 K stray from CoolProp's ideal-gas h and s.
"""

from __future__ import annotations

import argparse
import math
import sys
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

# The extraction packages are imported by _import_packages(), from main(): the
# test run imports every module under balance/ (doctests), where they are absent.
cantera = chemicals = CoolProp = CP = None


def _import_packages() -> None:
    global cantera, chemicals, CoolProp, CP
    import cantera
    import chemicals
    import chemicals.acentric
    import chemicals.critical
    import chemicals.elements
    import chemicals.identifiers
    import CoolProp
    import CoolProp.CoolProp as CP


OUT = Path(__file__).with_name("species.toml")

VERSIONS = {"cantera": "3.2.0", "CoolProp": "8.0.0", "chemicals": "1.5.2"}
R = 8.314462618  # J/(mol K), the value balance/units.py uses
P0 = 1.0e5  # Pa, standard pressure of s°
T_REF = 298.15  # K
NASA_AGREEMENT = 0.01  # relative; the guard test checks 1 % at 300, 500, 800 K
NASA_FILE = "nasa_gas.yaml"


@dataclass
class Spec:
    key: str
    name: str
    formula: str
    aliases: list[str]
    coolprop: str | None = None
    nasa: str | None = None
    """species name in Cantera's nasa_gas.yaml (None: fit to CoolProp)"""
    chem: str | None = None
    """name ``chemicals`` resolves, for species without a CoolProp fluid"""
    liquid: bool = False
    cas: str | None = None
    """written by hand only where neither package has a CAS number"""
    fit_Tmax: float | None = None
    """upper end of a fit when not the default 1500 K (see fit_limits)"""
    atoms: int = 0
    """atoms per molecule for the classical-limit check of a fit (0: count the formula)"""
    linear: bool = False
    notes: dict[str, str] = field(default_factory=dict)


# fmt: off
SPECIES: list[Spec] = [
    # permanent gases and noble gases
    Spec("N2",  "nitrogen", "N2", ["nitrogen", "r728"], "Nitrogen", "N2"),
    Spec("O2",  "oxygen",   "O2", ["oxygen", "r732"],   "Oxygen",   "O2"),
    Spec("Ar",  "argon",    "Ar", ["argon", "r740"],    "Argon",    "Ar"),
    Spec("He",  "helium",   "He", ["helium", "r704"],   "Helium",   "He"),
    Spec("H2",  "hydrogen", "H2", ["hydrogen", "normal hydrogen", "r702"], "Hydrogen", "H2"),
    Spec("Ne",  "neon",     "Ne", ["neon", "r720"],     "Neon",     "Ne"),
    Spec("Kr",  "krypton",  "Kr", ["krypton", "r784"],  "Krypton",  "Kr"),
    Spec("Xe",  "xenon",    "Xe", ["xenon"],            "Xenon",    "Xe"),
    # Air as CoolProp's pseudo-pure fluid; the formula gives its elements per
    # mole (N2 0.7812, O2 0.2096, Ar 0.0092, the composition CoolProp's air uses).
    Spec("Air", "air (pseudo-pure)", "N1.5624O0.4192Ar0.0092", ["dry air", "r729"], "Air",
         cas="132259-10-0", fit_Tmax=2000.0, atoms=2, linear=True,
         notes={"critical": "pseudo-pure fluid: the values are those of CoolProp's Air"}),
    # combustion products, acid gases, inorganics
    Spec("CO",  "carbon monoxide",  "CO",  ["carbon monoxide"], "CarbonMonoxide", "CO"),
    Spec("CO2", "carbon dioxide",   "CO2", ["carbon dioxide", "r744"],   "CarbonDioxide",  "CO2"),
    Spec("H2O", "water",            "H2O", ["water", "steam", "r718"],   "Water", "H2O", liquid=True),
    Spec("NO",  "nitric oxide",     "NO",  ["nitric oxide", "nitrogen monoxide"], nasa="NO",
         chem="nitric oxide"),
    Spec("NO2", "nitrogen dioxide", "NO2", ["nitrogen dioxide"], nasa="NO2", chem="nitrogen dioxide"),
    Spec("N2O", "nitrous oxide",    "N2O", ["nitrous oxide", "r744a"],   "NitrousOxide", "N2O"),
    Spec("SO2", "sulfur dioxide",   "SO2", ["sulfur dioxide", "sulphur dioxide", "r764"],
         "SulfurDioxide", "SO2", liquid=True),
    Spec("H2S", "hydrogen sulfide", "H2S", ["hydrogen sulfide", "hydrogen sulphide"],
         "HydrogenSulfide", "H2S"),
    Spec("COS", "carbonyl sulfide", "COS", ["carbonyl sulfide", "carbonyl sulphide", "ocs"],
         "CarbonylSulfide", "COS"),
    Spec("NH3", "ammonia",          "NH3", ["ammonia", "r717"], "Ammonia", "NH3", liquid=True),
    Spec("HCl", "hydrogen chloride", "HCl", ["hydrogen chloride"], "HydrogenChloride", "HCL"),
    Spec("Cl2", "chlorine",         "Cl2", ["chlorine"], "Chlorine", "CL2", liquid=True),
    Spec("SF6", "sulfur hexafluoride", "SF6", ["sulfur hexafluoride", "sulphur hexafluoride", "r846"],
         "SulfurHexafluoride", "SF6"),
    # hydrocarbons
    Spec("CH4",      "methane",    "CH4",  ["methane", "r50"], "Methane", "CH4"),
    Spec("C2H6",     "ethane",     "C2H6", ["ethane", "r170"], "Ethane",  "C2H6"),
    Spec("C3H8",     "propane",    "C3H8", ["propane", "n-propane", "r290"], "n-Propane", "C3H8",
         liquid=True),
    Spec("nC4H10",   "n-butane",   "CH3(CH2)2CH3", ["n-butane", "butane", "r600"], "n-Butane",
         "C4H10,n-butane", liquid=True),
    Spec("iC4H10",   "isobutane",  "CH(CH3)3", ["isobutane", "i-butane", "2-methylpropane", "r600a"],
         "IsoButane", "C4H10,isobutane", liquid=True),
    Spec("nC5H12",   "n-pentane",  "CH3(CH2)3CH3", ["n-pentane", "pentane", "r601"], "n-Pentane",
         "C5H12,n-pentane", liquid=True),
    Spec("iC5H12",   "isopentane", "(CH3)2CHCH2CH3", ["isopentane", "i-pentane", "2-methylbutane", "r601a"],
         "Isopentane", "C5H12,i-pentane", liquid=True),
    Spec("neoC5H12", "neopentane", "C(CH3)4", ["neopentane", "2,2-dimethylpropane", "r601b"],
         "Neopentane", "CH3C(CH3)2CH3"),
    Spec("nC6H14",   "n-hexane",   "CH3(CH2)4CH3", ["n-hexane", "hexane"], "n-Hexane",
         liquid=True),
    Spec("nC7H16",   "n-heptane",  "CH3(CH2)5CH3", ["n-heptane", "heptane"], "n-Heptane",
         "C7H16,n-heptane", liquid=True),
    Spec("nC8H18",   "n-octane",   "CH3(CH2)6CH3", ["n-octane", "octane"], "n-Octane",
         "C8H18,n-octane", liquid=True),
    Spec("C2H4",     "ethylene",   "C2H4", ["ethylene", "ethene", "r1150"], "Ethylene", "C2H4"),
    Spec("C3H6",     "propylene",  "C3H6", ["propylene", "propene", "r1270"], "Propylene",
         "C3H6,propylene", liquid=True),
    Spec("C2H2",     "acetylene",  "C2H2", ["acetylene", "ethyne"], nasa="C2H2,acetylene",
         chem="acetylene"),
    Spec("cC6H12",   "cyclohexane", "C6H12", ["cyclohexane"], "CycloHexane", "C6H12,cyclo-",
         liquid=True),
    Spec("C6H6",     "benzene",    "C6H6", ["benzene"], "Benzene", "C6H6", liquid=True),
    Spec("C7H8",     "toluene",    "C6H5CH3", ["toluene", "methylbenzene"], "Toluene", "C7H8",
         liquid=True),
    # oxygenates
    Spec("CH3OH",    "methanol",   "CH3OH", ["methanol", "meoh", "methyl alcohol"], "Methanol", "CH3OH",
         liquid=True),
    Spec("C2H5OH",   "ethanol",    "C2H5OH", ["ethanol", "etoh", "ethyl alcohol"], "Ethanol", "C2H5OH",
         liquid=True),
    Spec("CH3COCH3", "acetone",    "CH3COCH3", ["acetone", "propanone"], "Acetone",
         liquid=True),
    Spec("CH3OCH3",  "dimethyl ether", "CH3OCH3", ["dimethyl ether", "dme", "re170"], "DimethylEther",
         "CH3OCH3", liquid=True),
    # refrigerants (ammonia, CO2, propane, isobutane... are above, with their R numbers as aliases)
    Spec("R134a",    "1,1,1,2-tetrafluoroethane", "CH2FCF3", ["hfc-134a", "1,1,1,2-tetrafluoroethane"],
         "R134a", liquid=True),
    Spec("R32",      "difluoromethane", "CH2F2", ["hfc-32", "difluoromethane"], "R32", "CH2F2",
         liquid=True),
    Spec("R125",     "pentafluoroethane", "CHF2CF3", ["hfc-125", "pentafluoroethane"], "R125",
         liquid=True),
    Spec("R143a",    "1,1,1-trifluoroethane", "CH3CF3", ["hfc-143a", "1,1,1-trifluoroethane"], "R143a",
         liquid=True),
    Spec("R152a",    "1,1-difluoroethane", "CH3CHF2", ["hfc-152a", "1,1-difluoroethane"], "R152A",
         liquid=True),
    Spec("R1234yf",  "2,3,3,3-tetrafluoropropene", "CH2=CFCF3", ["hfo-1234yf", "2,3,3,3-tetrafluoropropene"],
         "R1234yf", liquid=True),
    Spec("R1234zeE", "trans-1,3,3,3-tetrafluoropropene", "CHF=CHCF3",
         ["r1234ze(e)", "r1234ze", "hfo-1234ze(e)", "trans-1,3,3,3-tetrafluoropropene"],
         "R1234ze(E)", liquid=True),
    Spec("R22",      "chlorodifluoromethane", "CHClF2", ["hcfc-22", "chlorodifluoromethane"], "R22",
         "CHCLF2", liquid=True),
    Spec("R23",      "trifluoromethane", "CHF3", ["hfc-23", "trifluoromethane", "fluoroform"], "R23",
         "CHF3"),
    Spec("R123",     "2,2-dichloro-1,1,1-trifluoroethane", "CHCl2CF3",
         ["hcfc-123", "2,2-dichloro-1,1,1-trifluoroethane"], "R123", liquid=True),
    Spec("R245fa",   "1,1,1,3,3-pentafluoropropane", "CHF2CH2CF3", ["hfc-245fa", "1,1,1,3,3-pentafluoropropane"],
         "R245fa", liquid=True),
]
# fmt: on


# ---------------------------------------------------------------------------
# CoolProp helpers

def cp_state(fluid: str) -> CoolProp.AbstractState:
    return CoolProp.AbstractState("HEOS", fluid)


def cp0_R(state: CoolProp.AbstractState, T: np.ndarray) -> np.ndarray:
    """CoolProp's ideal-gas cp0/R at each T (R of this script)."""
    out = np.empty(len(T))
    for i, t in enumerate(T):
        state.update(CoolProp.DmolarT_INPUTS, 1.0e-3, float(t))
        out[i] = state.cp0molar() / R
    return out


def ideal_h_s(state: CoolProp.AbstractState, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """CoolProp's ideal-gas h [J/mol] and s° at 1 bar [J/(mol K)] at each T."""
    Rf = state.gas_constant()
    h = np.empty(len(T))
    s = np.empty(len(T))
    for i, t in enumerate(T):
        state.update(CoolProp.DmolarT_INPUTS, P0 / (Rf * float(t)), float(t))
        h[i] = state.hmolar_idealgas()
        s[i] = state.smolar_idealgas()
    return h, s


# ---------------------------------------------------------------------------
# NASA-7 helpers

def nasa_cp(a, T):
    return a[0] + T * (a[1] + T * (a[2] + T * (a[3] + T * a[4])))


def nasa_h(a, T):
    """h/(R T)"""
    return a[0] + T * (a[1] / 2 + T * (a[2] / 3 + T * (a[3] / 4 + T * a[4] / 5))) + a[5] / T


def nasa_s(a, T):
    """s°/R"""
    return a[0] * math.log(T) + T * (a[1] + T * (a[2] / 2 + T * (a[3] / 3 + T * a[4] / 4))) + a[6]


def _piecewise(T: np.ndarray, Tmid: float, low, high, fn) -> np.ndarray:
    return np.array([fn(low if t <= Tmid else high, float(t)) for t in T])


TMID_CHOICES = (500.0, 600.0, 700.0, 800.0, 900.0, 1000.0)
LAWSON_ITERATIONS = 100


def fit_limits(spec: Spec, state: CoolProp.AbstractState) -> tuple[float, float]:
    """(Tmin, Tmax) of a fitted entry.

    Tmin is 200 K, or the EOS's triple point when that is higher.  Tmax is
    1500 K (or the Spec's own), provided CoolProp's ideal-gas cp0 is
    physically credible up to there: it must rise with T and stay below the
    classical limit of the ideal gas, (3N - 2) R, or (3N - 3/2) R for a
    linear molecule.  Otherwise the range ends at the EOS's upper temperature.
    """
    Tmin = max(200.0, math.ceil(state.Ttriple() / 10.0) * 10.0)
    Tmax = spec.fit_Tmax or 1500.0
    if _credible(spec, state, Tmin, Tmax):
        return Tmin, Tmax
    Tmax = float(state.Tmax())
    if not _credible(spec, state, Tmin, Tmax):
        raise SystemExit(f"{spec.key}: CoolProp ideal-gas cp0 not credible even inside its EOS range")
    return Tmin, Tmax


def _credible(spec: Spec, state: CoolProp.AbstractState, Tmin: float, Tmax: float) -> bool:
    atoms = spec.atoms or sum(chemicals.elements.nested_formula_parser(spec.formula).values())
    limit = 3 * atoms - (1.5 if spec.linear else 2.0)
    c = cp0_R(state, np.arange(Tmin, Tmax + 0.5, 5.0))
    return bool(np.all(np.diff(c) > 0.0) and np.all(c < limit))


def _fit_two_ranges(state, Tmin: float, Tmid: float, Tmax: float):
    """a1..a5 of both ranges and the max relative cp error on a 1 K grid.

    Least squares on the relative error, refined towards the minimax fit by
    Lawson's reweighting; cp and dcp/dT equal at Tmid (equality constraints,
    solved through the KKT system).  Works in t = T/Tmid for conditioning.
    """
    Tlo = np.linspace(Tmin, Tmid, int(round(Tmid - Tmin)) + 1)
    Thi = np.linspace(Tmid, Tmax, int(round(Tmax - Tmid)) + 1)
    ylo, yhi = cp0_R(state, Tlo), cp0_R(state, Thi)

    def basis(T):
        t = np.asarray(T, dtype=float) / Tmid
        return np.vstack([t**k for k in range(5)]).T

    def dbasis(T):
        t = np.asarray(T, dtype=float) / Tmid
        return np.vstack([k * t ** (k - 1) if k else 0.0 * t for k in range(5)]).T

    n_lo = len(Tlo)
    A = np.zeros((n_lo + len(Thi), 10))
    A[:n_lo, :5] = basis(Tlo) / ylo[:, None]
    A[n_lo:, 5:] = basis(Thi) / yhi[:, None]
    b = np.ones(len(A))
    C = np.zeros((2, 10))
    C[0, :5], C[0, 5:] = basis([Tmid])[0], -basis([Tmid])[0]
    C[1, :5], C[1, 5:] = dbasis([Tmid])[0], -dbasis([Tmid])[0]
    w = np.full(len(A), 1.0 / len(A))
    best = None
    for _ in range(LAWSON_ITERATIONS):
        Aw, bw = A * np.sqrt(w)[:, None], b * np.sqrt(w)
        K = np.block([[2.0 * Aw.T @ Aw, C.T], [C, np.zeros((2, 2))]])
        x = np.linalg.solve(K, np.concatenate([2.0 * Aw.T @ bw, np.zeros(2)]))[:10]
        r = np.abs(A @ x - b)
        if best is None or r.max() < best[1]:
            best = (x, r.max())
        w = w * r
        if not w.sum() > 0.0:
            break  # an exact fit: nothing left to reweight
        w /= w.sum()
    x = best[0]
    scale = np.array([Tmid**-k for k in range(5)])
    low5 = [float(v) for v in x[:5] * scale]
    high5 = [float(v) for v in x[5:] * scale]
    T = np.concatenate([Tlo, Thi[1:]])
    y = np.concatenate([ylo, yhi[1:]])
    err = float(np.max(np.abs(_piecewise(T, Tmid, low5 + [0, 0], high5 + [0, 0], nasa_cp) / y - 1.0)))
    return low5, high5, err, T


def fit_nasa(spec: Spec, state: CoolProp.AbstractState):
    """Two NASA-7 ranges fitted to CoolProp's ideal-gas cp0; see module docstring.

    Tmid is the one of TMID_CHOICES (at least 100 K inside the range) that
    gives the smallest maximum cp error; a range too short for any of them
    is split at its middle, rounded to 10 K.
    """
    Tmin, Tmax = fit_limits(spec, state)
    choices = [t for t in TMID_CHOICES if Tmin + 100.0 <= t <= Tmax - 100.0]
    if not choices:
        choices = [round((Tmin + Tmax) / 20.0) * 10.0]
    fits = [(_fit_two_ranges(state, Tmin, t, Tmax), t) for t in choices]
    (low5, high5, cp_err, T), Tmid = min(fits, key=lambda f: f[0][2])

    # a6, a7: h = 0 and s = 0 at 298.15 K (low range), continuity at Tmid (high range)
    low = low5 + [0.0, 0.0]
    low[5] = -T_REF * nasa_h(low, T_REF)
    low[6] = -nasa_s(low, T_REF)
    high = high5 + [0.0, 0.0]
    high[5] = Tmid * (nasa_h(low, Tmid) - nasa_h(high, Tmid))
    high[6] = nasa_s(low, Tmid) - nasa_s(high, Tmid)
    low = [float(v) for v in low]
    high = [float(v) for v in high]

    # h and s differences from 298.15 K against CoolProp's ideal-gas h and s
    Tc = np.concatenate([[T_REF], T])
    hc, sc = ideal_h_s(state, Tc)
    hp = _piecewise(Tc, Tmid, low, high, nasa_h) * Tc * R
    sp = _piecewise(Tc, Tmid, low, high, nasa_s) * R
    h_err = float(np.max(np.abs((hp - hp[0]) - (hc - hc[0])) / (R * Tc)))
    s_err = float(np.max(np.abs((sp - sp[0]) - (sc - sc[0])) / R))
    text = (
        f"fitted by build_species.py to CoolProp {CoolProp.__version__} HEOS ideal-gas cp0 of "
        f"'{spec.coolprop}' on {Tmin:g}-{Tmax:g} K (the EOS's stated range ends at "
        f"{state.Tmax():g} K); max cp error {100 * cp_err:.2g} %; h and s differences from "
        f"298.15 K within {h_err:.1e} (as h/RT) and {s_err:.1e} (as s/R) of CoolProp's "
        f"ideal-gas h and s; a6/a7 set an arbitrary reference (h = 0, s = 0 at 298.15 K, 1 bar)"
    )
    return (Tmin, Tmid, Tmax), low, high, text, cp_err


# ---------------------------------------------------------------------------
# building one entry

def cas_ok(cas: str) -> bool:
    digits = cas.replace("-", "")
    body, check = digits[:-1], int(digits[-1])
    return sum((i + 1) * int(d) for i, d in enumerate(reversed(body))) % 10 == check


def sig(x: float, n: int = 12) -> float:
    """x rounded to n significant digits: drops the noise of a unit conversion."""
    return float(f"{x:.{n}g}")


def nasa_entries() -> dict:
    return {s.name: s for s in cantera.Species.list_from_file(NASA_FILE)}


def build_entry(spec: Spec, nasa_db: dict) -> tuple[dict, float | None]:
    e: dict = {"name": spec.name, "formula": spec.formula}
    src: dict[str, str] = {}
    cpv = CoolProp.__version__
    chv = chemicals.__version__

    if spec.coolprop:
        st = cp_state(spec.coolprop)
        cas = spec.cas or CP.get_fluid_param_string(spec.coolprop, "CAS")
        e["cas"] = cas
        e["aliases"] = spec.aliases
        e["M"] = sig(st.molar_mass() * 1e3)
        e["Tc"] = float(st.T_critical())
        e["Pc"] = float(st.p_critical())
        e["omega"] = float(st.acentric_factor())
        e["Vc"] = sig(1.0 / st.rhomolar_critical())
        e["Zc"] = sig(e["Pc"] * e["Vc"] / (R * e["Tc"]))
        e["coolprop"] = spec.coolprop
        crit = (f"CoolProp {cpv} fluid constants ({spec.coolprop}): T_critical, p_critical, "
                f"1/rhomolar_critical -> Vc; Zc = Pc Vc/(R Tc)")
        if "critical" in spec.notes:
            crit += f"; {spec.notes['critical']}"
        src["critical"] = crit
        src["omega"] = f"CoolProp {cpv} fluid constants ({spec.coolprop}): acentric_factor"
        src["M"] = f"CoolProp {cpv} fluid constants ({spec.coolprop}): molar_mass"
    else:
        cas = chemicals.identifiers.CAS_from_any(spec.chem)
        e["cas"] = cas
        e["aliases"] = spec.aliases
        e["M"] = sig(chemicals.elements.molecular_weight(
            chemicals.elements.nested_formula_parser(spec.formula)))
        crit = chemicals.critical
        m_tc, m_pc, m_vc = crit.Tc_methods(cas)[0], crit.Pc_methods(cas)[0], crit.Vc_methods(cas)[0]
        m_om = chemicals.acentric.omega_methods(cas)[0]
        e["Tc"] = float(crit.Tc(cas, method=m_tc))
        e["Pc"] = float(crit.Pc(cas, method=m_pc))
        e["omega"] = float(chemicals.acentric.omega(cas, method=m_om))
        e["Vc"] = sig(crit.Vc(cas, method=m_vc))
        e["Zc"] = sig(e["Pc"] * e["Vc"] / (R * e["Tc"]))
        src["critical"] = (f"chemicals {chv}, critical.Tc/Pc/Vc of CAS {cas} (methods {m_tc}, {m_pc}, "
                           f"{m_vc}); Zc = Pc Vc/(R Tc)")
        src["omega"] = f"chemicals {chv}, acentric.omega of CAS {cas} (method {m_om})"
        src["M"] = f"chemicals {chv}, elements.molecular_weight of {spec.formula} (IUPAC atomic weights)"
    if not cas_ok(cas):
        raise SystemExit(f"{spec.key}: CAS {cas} fails its check digit")

    # ideal-gas heat capacity
    fitted = None
    use_nasa = spec.nasa is not None
    if use_nasa:
        thermo = nasa_db[spec.nasa].input_data["thermo"]
        assert thermo["model"] == "NASA7" and len(thermo["temperature-ranges"]) == 3, spec.key
        Trng = [float(t) for t in thermo["temperature-ranges"]]
        low, high = [list(map(float, d)) for d in thermo["data"]]
        single = Trng[1] == Trng[2] and low == high
        if single:
            # one polynomial over the whole range (noble gases): written as two
            # identical ranges split at 1000 K, so that Tmin < Tmid < Tmax always holds
            Trng[1] = 1000.0
        if spec.coolprop:
            Tg = np.arange(max(300.0, Trng[0]), 800.0 + 0.5, 5.0)
            ref = cp0_R(cp_state(spec.coolprop), Tg)
            dev = np.max(np.abs(_piecewise(Tg, Trng[1], low, high, nasa_cp) / ref - 1.0))
            if dev > NASA_AGREEMENT:
                print(f"{spec.key}: NASA polynomial differs from CoolProp cp0 by {100 * dev:.2f} % "
                      f"on 300-800 K; fitting to CoolProp instead", file=sys.stderr)
                use_nasa = False
    if use_nasa:
        note = thermo.get("note", "").strip()
        src["cp"] = (f"Cantera {cantera.__version__} {NASA_FILE} (NASA Glenn coefficients, "
                     f"McBride, Gordon and Reno, NASA TM-4513), species {spec.nasa}"
                     + (f", note '{note}'" if note else "")
                     + ("; one polynomial over the whole range, written as two identical ranges"
                        if single else ""))
    else:
        if not spec.coolprop:
            raise SystemExit(f"{spec.key}: no NASA polynomial and no CoolProp fluid")
        Trng, low, high, text, fitted = fit_nasa(spec, cp_state(spec.coolprop))
        Trng = list(Trng)
        if spec.nasa is not None:
            text += (f"; replaces the {NASA_FILE} polynomial of {spec.nasa}, which differs from "
                     f"CoolProp's cp0 by more than {100 * NASA_AGREEMENT:g} % on 300-800 K")
        src["cp"] = text
    e["cp"] = {"T": Trng, "low": low, "high": high}

    # liquid constants
    if spec.liquid:
        st = cp_state(spec.coolprop)
        st.update(CoolProp.PT_INPUTS, 101325.0, T_REF)
        if st.phase() in (CoolProp.iphase_liquid,):
            where = f"liquid at 298.15 K and 101325 Pa"
        else:
            st.update(CoolProp.QT_INPUTS, 0.0, T_REF)
            where = f"saturated liquid at 298.15 K (p_sat = {st.p():.6g} Pa)"
        e["liquid"] = {"T": T_REF, "rho": float(st.rhomass()), "cp": float(st.cpmass())}
        src["liquid"] = f"CoolProp {cpv} HEOS ({spec.coolprop}), {where}: rhomass, cpmass"

    e["source"] = src
    return e, fitted


# ---------------------------------------------------------------------------
# writing

HEADER = """\
# joulebook species data: pure-species constants and ideal-gas heat capacities
#
# GENERATED by balance/data/build_species.py from Cantera {cantera}, CoolProp {coolprop} and
# chemicals {chemicals}; do not edit by hand (tests/test_species_data.py pins a
# checksum).  The runtime reads this file with tomllib and imports none of those
# packages.
#
# Layout.  One table per species; its key is the short id typed on the command
# line (lookups are case-insensitive and also accept name, formula, CAS number,
# CoolProp name and aliases).
#   name      display name
#   formula   molecular formula as usually written (Air: elements per mole of air)
#   cas       CAS registry number (CoolProp's, else chemicals'; Air's written by hand,
#             check digit verified)
#   aliases   other names people type, lower case
#   M         molar mass                    [g/mol]
#   Tc        critical temperature          [K]
#   Pc        critical pressure             [Pa]
#   omega     acentric factor               [-]
#   Vc        critical molar volume         [m3/mol]   (omitted when unknown)
#   Zc        Pc Vc / (R Tc)                [-]        (omitted when Vc is unknown)
#   coolprop  CoolProp fluid name of the reference model (omitted when CoolProp has none)
#   [id.cp]       ideal-gas heat capacity, two NASA 7-coefficient ranges:
#                   cp/R  = a1 + a2 T + a3 T^2 + a4 T^3 + a5 T^4
#                   h/RT  = a1 + a2 T/2 + a3 T^2/3 + a4 T^3/4 + a5 T^4/5 + a6/T
#                   s°/R  = a1 ln T + a2 T + a3 T^2/2 + a4 T^3/3 + a5 T^4/4 + a7   (at 1 bar)
#                 T = [Tmin, Tmid, Tmax] in K; low = [a1..a7] on Tmin..Tmid, high on Tmid..Tmax;
#                 R = 8.314462618 J/(mol K).  The ranges differ between species: read T.
#                 A source polynomial with a single range (noble gases) is written as
#                 two identical ranges split at 1000 K.
#   [id.liquid]   constants of the incompressible model, only for species that are
#                 liquid at 25 degC and 1 atm or usually handled as (pressurised) liquids:
#                 T [K] they were evaluated at, rho [kg/m3], cp [J/(kg K)]
#   [id.source]   where each group came from, one string per group
#                 (critical, omega, M, cp, and liquid when present), with package and version.
#
# Provenance rules.
#   * Tc, Pc, omega, M, Vc: CoolProp's fluid constants when CoolProp has the fluid, so
#     the reference model and the cubic models use the same constants; else chemicals.
#     CoolProp's Tc and Pc are the EOS's own critical point (what PropsSI('Tcrit') and
#     PropsSI('pcrit') return), written in full.  Values converted between units (M, Vc)
#     and Zc are rounded to 12 significant digits.
#   * cp: Cantera's nasa_gas.yaml when the species is there and (if CoolProp has the
#     fluid) agrees with CoolProp's ideal-gas cp0 within 1 % on 300-800 K.  Otherwise
#     the two ranges are FITTED to CoolProp's ideal-gas cp0 (source string starts
#     "fitted"): least squares on the relative error refined towards minimax, cp and
#     dcp/dT continuous at Tmid, on 200-1500 K (Air 200-2000 K; Tmin raised to the triple
#     point where higher), or only up to the EOS's own upper temperature where CoolProp's
#     ideal-gas cp0 stops rising or passes the classical limit before 1500 K.  Tmid is
#     whichever of 500, 600, ... 1000 K fits best (the middle of a short range).  The
#     source string gives the fit's maximum cp error and how closely its h and s
#     differences follow CoolProp's ideal-gas h and s.
#   * a6 and a7 of a NASA entry carry the NASA reference (formation enthalpy, third-law
#     entropy); those of a FITTED entry set an arbitrary reference (h = 0 and s° = 0 at
#     298.15 K).  Only differences are meaningful: joulebook measures h and s from the
#     ideal gas at 298.15 K and 1 bar for every species.
#   * liquid: CoolProp at 298.15 K and 101325 Pa when that state is liquid, else the
#     saturated liquid at 298.15 K (the source string gives the pressure).
"""


def fmt(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        r = repr(v)
        assert math.isfinite(v), r
        return r
    if isinstance(v, int):
        return repr(float(v))
    if isinstance(v, str):
        assert '"' not in v and "\\" not in v, v
        return f'"{v}"'
    if isinstance(v, list):
        return "[" + ", ".join(fmt(x) for x in v) + "]"
    raise TypeError(type(v))


def table(name: str, items: list[tuple[str, object]]) -> list[str]:
    width = max(len(k) for k, _ in items)
    return [f"[{name}]"] + [f"{k.ljust(width)} = {fmt(v)}" for k, v in items]


ORDER = ["name", "formula", "cas", "aliases", "M", "Tc", "Pc", "omega", "Vc", "Zc", "coolprop"]


def render(entries: dict[str, dict]) -> str:
    lines = [HEADER.format(cantera=VERSIONS["cantera"], coolprop=VERSIONS["CoolProp"],
                           chemicals=VERSIONS["chemicals"]).rstrip("\n")]
    for key, e in entries.items():
        lines.append("")
        lines += table(key, [(k, e[k]) for k in ORDER if k in e])
        lines += table(f"{key}.cp", [(k, e["cp"][k]) for k in ("T", "low", "high")])
        if "liquid" in e:
            lines += table(f"{key}.liquid", [(k, e["liquid"][k]) for k in ("T", "rho", "cp")])
        lines += table(f"{key}.source", [(k, e["source"][k]) for k in ("critical", "omega", "M", "cp", "liquid")
                                         if k in e["source"]])
    return "\n".join(lines) + "\n"


def _norm(text: str) -> str:
    """the loader's normalisation of a typed name: lower case, letters and digits only"""
    return "".join(ch for ch in text.lower() if ch.isalnum())


def check_names() -> None:
    """Every id, name, formula, CoolProp name and alias must point to one species only."""
    owner: dict[str, str] = {}
    for spec in SPECIES:
        if any(a != a.lower() for a in spec.aliases):
            raise SystemExit(f"{spec.key}: aliases must be lower case")
        for text in (spec.key, spec.name, spec.formula, spec.coolprop or "", *spec.aliases):
            n = _norm(text)
            if n and owner.setdefault(n, spec.key) != spec.key:
                raise SystemExit(f"{text!r} of {spec.key} already names {owner[n]}")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--check", action="store_true", help="compare with species.toml instead of writing it")
    args = ap.parse_args(argv)
    _import_packages()

    found = {"cantera": cantera.__version__, "CoolProp": CoolProp.__version__, "chemicals": chemicals.__version__}
    if found != VERSIONS:
        raise SystemExit(f"need {VERSIONS}, found {found}")
    check_names()

    nasa_db = nasa_entries()
    entries: dict[str, dict] = {}
    for spec in SPECIES:
        entries[spec.key], fitted = build_entry(spec, nasa_db)
        if fitted is not None:
            print(f"{spec.key:10s} fitted, T = {entries[spec.key]['cp']['T']}, max cp error "
                  f"{100 * fitted:.4f} %", file=sys.stderr)
    text = render(entries)
    if args.check:
        same = OUT.exists() and OUT.read_text(encoding="utf-8") == text
        print("species.toml is up to date" if same else "species.toml differs from a fresh build")
        return 0 if same else 1
    OUT.write_text(text, encoding="utf-8")
    print(f"wrote {OUT} ({len(entries)} species)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
