#!/usr/bin/env python3
"""Reference-data generator for stationwise.

Purpose
-------
Produces, from the Cantera library, (a) the species polynomial data that the
Rust gas model embeds and (b) frozen reference values that the Rust tests
compare against.  The Rust code implements the same definitions on its own;
this script is the independent check.

Library and data
----------------
* Cantera 3.2.0 (PyPI package ``cantera==3.2.0``; numpy 2.4.6 came with it).
  No other numerical library is used; root finding is a plain bisection
  written below.
* Species thermo: Cantera's data file ``nasa_gas.yaml`` (ships inside the
  Cantera package, ``cantera/data/nasa_gas.yaml``).  Its own header names the
  source as B.J. McBride, S. Gordon and M.A. Reno, "Coefficients for
  Calculating Thermodynamic and Transport Properties of Individual Species",
  NASA TM-4513, October 1993.  In that file the species are stored in the
  7-coefficient NASA form (Cantera model "NASA7", ranges 200-1000-6000 K; Ar
  has one range 200-6000 K).  Cantera 3.2.0 ships no 9-coefficient data for
  Ar, CO2 or H2O (its airNASA9.yaml covers only N2, O2, NO, N, O and ions), so
  all five species are taken from nasa_gas.yaml for one consistent source.
  A 7-coefficient range [c1..c7] is written in the 9-coefficient layout, with
  no loss, as [0, 0, c1, c2, c3, c4, c5, c6, c7]:
      cp/R  = a1 T^-2 + a2 T^-1 + a3 + a4 T + a5 T^2 + a6 T^3 + a7 T^4
      h/RT  = -a1 T^-2 + a2 ln(T)/T + a3 + a4 T/2 + a5 T^2/3 + a6 T^3/4
              + a7 T^4/5 + b1/T
      s/R   = -a1 T^-2/2 - a2 T^-1 + a3 ln T + a4 T + a5 T^2/2 + a6 T^3/3
              + a7 T^4/4 + b2
  with a1 = a2 = 0 these are exactly the 7-coefficient formulas.

How to rerun
------------
    pip install cantera==3.2.0
    python3 tests/gen/reference_cantera.py

(run from the repository root; the output paths are relative to this file's
location, so any working directory works).  Output is deterministic: keys
keep a fixed insertion order and floats are written with Python's repr
(shortest string that round-trips to the same double).

Files written
-------------
* src/gas/nasa9_data.rs           species coefficients and molar masses
* tests/data/cantera_species.json       cp, h, s0 of species and mixtures
* tests/data/cantera_isentropic.json    isentropic static states vs Mach
* tests/data/cantera_normal_shock.json  frozen normal-shock jump states
* tests/data/cantera_turbojet.json      single-spool turbojet design point
* tests/data/cantera_combustion.json    hydrogen and methane burnt to complete
  products, kerosene-like fuel to equilibrium products (twelve species)
"""

import json
import math
import os
import sys

import cantera as ct
import numpy as np

CANTERA_VERSION_EXPECTED = "3.2.0"
if ct.__version__ != CANTERA_VERSION_EXPECTED:
    sys.exit(
        f"expected Cantera {CANTERA_VERSION_EXPECTED}, found {ct.__version__}; "
        "install it with: pip install cantera==3.2.0"
    )

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.normpath(os.path.join(HERE, "..", ".."))
DATA_DIR = os.path.join(ROOT, "tests", "data")
RUST_OUT = os.path.join(ROOT, "src", "gas", "nasa9_data.rs")

DATA_FILE = "nasa_gas.yaml"
DATA_PATH = os.path.join(os.path.dirname(ct.__file__), "data", DATA_FILE)

# Universal gas constant: Cantera's own value (exactly N_A * k_B in J/kmol/K).
# It differs from the rounded 8314.462618 by about 1.8e-11 relative; Cantera's
# is used everywhere here.
R_U = ct.gas_constant
T_REF = 298.15  # K, reference temperature of the sensible enthalpy

SPECIES = ["N2", "O2", "Ar", "CO2", "H2O"]  # names as in nasa_gas.yaml
RUST_NAMES = {"N2": "N2", "O2": "O2", "Ar": "AR", "CO2": "CO2", "H2O": "H2O",
              "CO": "CO", "H2": "H2", "OH": "OH", "O": "O", "H": "H", "NO": "NO",
              "N": "N", "CH4": "CH4"}
# Species written to the Rust data: the five of air and lean products, the
# seven minor species of equilibrium products, and methane (a fuel whose own
# entry temperature is accounted by its polynomial; hydrogen is also one).
MINOR = ["CO", "H2", "OH", "O", "H", "NO", "N"]
RUST_SPECIES = SPECIES + MINOR + ["CH4"]

# Dry air, U.S. Standard Atmosphere 1976 major constituents, normalised.
AIR_RAW = {"N2": 0.780840, "O2": 0.209476, "Ar": 0.009340, "CO2": 0.000314}

# Fuel CH_n: atomic masses are Cantera's element weights (C 12.011, H 1.008).
W_C = ct.Element("C").weight
W_H = ct.Element("H").weight
assert W_C == 12.011 and W_H == 1.008, (W_C, W_H)
N_HC_DEFAULT = 1.92


def fuel_molar_mass(n):
    return W_C + n * W_H


# --------------------------------------------------------------------------
# Cantera objects
# --------------------------------------------------------------------------
ALL_SPECIES = {s.name: s for s in ct.Species.list_from_file(DATA_FILE)}
SP = {name: ALL_SPECIES[name] for name in SPECIES}
GAS = ct.Solution(thermo="ideal-gas", species=[SP[n] for n in SPECIES])
assert list(GAS.species_names) == SPECIES
MW = {n: float(GAS.molecular_weights[i]) for i, n in enumerate(SPECIES)}
P_REF_CANTERA = float(GAS.reference_pressure)
# Every species written to the Rust data, in one Solution for its weights.
GAS_ALL = ct.Solution(thermo="ideal-gas", species=[ALL_SPECIES[n] for n in SPECIES + [
    "CO", "H2", "OH", "O", "H", "NO", "N", "CH4"]])
MW_ALL = {n: float(GAS_ALL.molecular_weights[i]) for i, n in enumerate(GAS_ALL.species_names)}
assert all(MW_ALL[n] == MW[n] for n in SPECIES)


def bisect(fun, lo, hi):
    """Bracketed bisection down to adjacent doubles (deterministic)."""
    flo, fhi = fun(lo), fun(hi)
    if flo == 0.0:
        return lo
    if fhi == 0.0:
        return hi
    if (flo > 0) == (fhi > 0):
        raise RuntimeError(f"root not bracketed: f({lo})={flo}, f({hi})={fhi}")
    for _ in range(2000):
        mid = 0.5 * (lo + hi)
        if mid <= lo or mid >= hi:
            break
        fm = fun(mid)
        if fm == 0.0:
            return mid
        if (fm > 0) == (flo > 0):
            lo, flo = mid, fm
        else:
            hi, fhi = mid, fm
    root = 0.5 * (lo + hi)
    assert (hi - lo) <= 1e-12 * abs(root)
    return root


class Mixture:
    """Frozen ideal-gas mixture evaluated through a Cantera Solution.

    cp(T)  = Cantera cp_mass                          [J/kg/K]
    h(T)   = Cantera enthalpy_mass (absolute, incl. formation) [J/kg]
    s0(T)  = sum_i x_i s_i°(T) / M_mix, the mole-fraction-weighted polynomial
             standard-state entropy WITHOUT the ideal mixing term
             -R sum x_i ln x_i and without any pressure term   [J/kg/K]
    Composition never changes, so the mixing term cancels in every entropy
    difference used here.
    """

    def __init__(self, name, x):
        self.name = name
        tot = sum(x.values())
        self.x = {n: x.get(n, 0.0) / tot for n in SPECIES}
        self.xvec = np.array([self.x[n] for n in SPECIES])
        GAS.TPX = 300.0, P_REF_CANTERA, self.xvec
        self.molar_mass = float(GAS.mean_molecular_weight)
        self.r = R_U / self.molar_mass

    def _set(self, t):
        GAS.TPX = t, P_REF_CANTERA, self.xvec

    def cp(self, t):
        self._set(t)
        return float(GAS.cp_mass)

    def h(self, t):
        self._set(t)
        return float(GAS.enthalpy_mass)

    def s0(self, t):
        self._set(t)
        return float(np.dot(GAS.X, GAS.standard_entropies_R)) * self.r

    def hs(self, t):
        return self.h(t) - self.h(T_REF)

    def gamma(self, t):
        c = self.cp(t)
        return c / (c - self.r)

    def a(self, t):
        return math.sqrt(self.gamma(t) * self.r * t)


def dry_air():
    return Mixture("dry_air", dict(AIR_RAW))


AIR = dry_air()


def products_moles_per_kg_air(far, n=N_HC_DEFAULT):
    """kmol of each species per kg of dry air after complete lean combustion."""
    mol = {s: AIR.x[s] / AIR.molar_mass for s in SPECIES}
    nf = far / fuel_molar_mass(n)
    mol["CO2"] += nf
    mol["H2O"] += nf * n / 2.0
    mol["O2"] -= nf * (1.0 + n / 4.0)
    if mol["O2"] < 0.0:
        raise ValueError("rich mixture: fuel-air ratio above stoichiometric")
    return mol


def products(far, n=N_HC_DEFAULT, name=None):
    mol = products_moles_per_kg_air(far, n)
    mix = Mixture(name or f"products_far_{far!r}_n_{n!r}", mol)
    mass = sum(mol[s] * MW[s] for s in SPECIES)
    assert abs(mass - (1.0 + far)) <= 1e-14 * (1.0 + far), mass
    return mix


def stoichiometric_far(n=N_HC_DEFAULT):
    o2 = AIR.x["O2"] / AIR.molar_mass
    return o2 / (1.0 + n / 4.0) * fuel_molar_mass(n)


# --------------------------------------------------------------------------
# (a) species coefficients in 9-coefficient layout, checked against Cantera
# --------------------------------------------------------------------------
def nasa9_ranges(name):
    th = ALL_SPECIES[name].thermo
    if not isinstance(th, ct.NasaPoly2):
        raise RuntimeError(f"{name}: unexpected thermo type {type(th).__name__}")
    c = [float(v) for v in th.coeffs]
    # Cantera NasaPoly2.coeffs layout: [T_mid, high c1..c7, low c1..c7]
    t_mid_cantera = c[0]
    high7, low7 = c[1:8], c[8:15]
    t_min, t_max = float(th.min_temp), float(th.max_temp)
    if name == "Ar":
        # single range 200-6000 K stored by Cantera with T_mid = 6000 and
        # identical halves; we use the same split as the other species.
        assert high7 == low7 and t_mid_cantera == t_max
        t_mid = 1000.0
    else:
        t_mid = t_mid_cantera
    assert (t_min, t_mid, t_max) == (200.0, 1000.0, 6000.0), (name, t_min, t_mid, t_max)
    return t_min, t_mid, t_max, [0.0, 0.0] + low7, [0.0, 0.0] + high7


def check_against_yaml_text():
    """Coefficients must equal the decimal literals written in the yaml file."""
    from ruamel.yaml import YAML

    with open(DATA_PATH) as fh:
        doc = YAML(typ="safe").load(fh)
    by_name = {s["name"]: s for s in doc["species"]}
    for name in RUST_SPECIES:
        entry = by_name[name]["thermo"]
        assert entry["model"] == "NASA7", (name, entry["model"])
        _, _, _, low, high = nasa9_ranges(name)
        data = [[float(v) for v in r] for r in entry["data"]]
        if len(data) == 1:
            data = [data[0], data[0]]
        assert low[2:] == data[0] and high[2:] == data[1], name


def poly_cp_h_s(coef, t):
    a1, a2, a3, a4, a5, a6, a7, b1, b2 = coef
    cp = a1 / t**2 + a2 / t + a3 + a4 * t + a5 * t**2 + a6 * t**3 + a7 * t**4
    h = (-a1 / t**2 + a2 * math.log(t) / t + a3 + a4 * t / 2 + a5 * t**2 / 3
         + a6 * t**3 / 4 + a7 * t**4 / 5 + b1 / t)
    s = (-a1 / t**2 / 2 - a2 / t + a3 * math.log(t) + a4 * t + a5 * t**2 / 2
         + a6 * t**3 / 3 + a7 * t**4 / 4 + b2)
    return cp * R_U, h * R_U * t, s * R_U  # J/kmol/K, J/kmol, J/kmol/K


def check_polynomials():
    """Own NASA9 formulas on the emitted arrays vs Cantera, to 1e-10 relative.

    At T_mid Cantera evaluates the low range (T <= T_mid); the high range is
    checked there against Cantera at the next double above T_mid.  Relative
    error is taken against max(|value|, R*T) for h (h crosses zero near
    298 K for the elements) and against |value| for cp and s.
    """
    worst = 0.0
    for name in RUST_SPECIES:
        th = ALL_SPECIES[name].thermo
        _, t_mid, _, low, high = nasa9_ranges(name)
        cases = []
        for t in (300.0, 800.0, 1500.0, 3000.0):
            cases.append((t, t, low if t <= t_mid else high))
        cases.append((1000.0, 1000.0, low))
        cases.append((1000.0, math.nextafter(1000.0, math.inf), high))
        for t_eval, t_ct, coef in cases:
            mine = poly_cp_h_s(coef, t_eval)
            ref = (th.cp(t_ct), th.h(t_ct), th.s(t_ct))
            scales = (abs(ref[0]), max(abs(ref[1]), R_U * t_eval), abs(ref[2]))
            for m, r, sc, what in zip(mine, ref, scales, ("cp", "h", "s")):
                err = abs(m - r) / sc
                worst = max(worst, err)
                if err > 1e-10:
                    sys.exit(f"polynomial check failed: {name} {what} T={t_eval}: "
                             f"mine {m!r} cantera {r!r} rel {err:.3e}")
    return worst


def range_jumps_at_t_mid():
    """Relative jump of cp, h, s between the two ranges at T_mid (informative)."""
    out = {}
    for name in SPECIES:
        _, t_mid, _, low, high = nasa9_ranges(name)
        lo = poly_cp_h_s(low, t_mid)
        hi = poly_cp_h_s(high, t_mid)
        out[name] = [abs(a - b) / max(abs(b), R_U * t_mid) for a, b in zip(lo, hi)]
    return out


def rust_f64(v):
    s = repr(float(v))
    if not math.isfinite(v):
        raise ValueError(v)
    if "." not in s and "e" not in s and "E" not in s:
        s += ".0"
    assert float(s) == v
    return s


def rust_array(field, values, indent="    "):
    items = [rust_f64(v) for v in values]
    one = f"{indent}{field}: [{', '.join(items)}],"
    if len(one) <= 100:
        return [one]
    lines = [f"{indent}{field}: ["]
    lines += [f"{indent}    {it}," for it in items]
    lines.append(f"{indent}],")
    return lines


def write_rust():
    lines = [
        "//! Species thermodynamic polynomials in the NASA Glenn 9-coefficient layout.",
        "//!",
        "//! Source: Cantera 3.2.0, data file `nasa_gas.yaml`, whose header names",
        "//! B.J. McBride, S. Gordon and M.A. Reno, \"Coefficients for Calculating",
        "//! Thermodynamic and Transport Properties of Individual Species\", NASA TM-4513",
        "//! (1993). That file stores these species in the 7-coefficient NASA form; Cantera",
        "//! 3.2.0 ships no 9-coefficient data for Ar, CO2 or H2O. Each 7-coefficient range",
        "//! `[c1..c7]` is written here, exactly, as `[0, 0, c1, c2, c3, c4, c5, c6, c7]`.",
        "//! Molar masses are Cantera's species molecular weights (kg/kmol).",
        "//!",
        "//! Generated by tests/gen/reference_cantera.py; do not edit by hand.",
        "//!",
        "//! Layout of `low` (t_min..=t_mid) and `high` (t_mid..=t_max), dimensionless,",
        "//! T in kelvin, R the universal gas constant:",
        "//!",
        "//! ```text",
        "//! [a1, a2, a3, a4, a5, a6, a7, b1, b2]",
        "//! cp/R = a1 T^-2 + a2 T^-1 + a3 + a4 T + a5 T^2 + a6 T^3 + a7 T^4",
        "//! h/RT = -a1 T^-2 + a2 ln(T)/T + a3 + a4 T/2 + a5 T^2/3 + a6 T^3/4 + a7 T^4/5 + b1/T",
        "//! s/R = -a1 T^-2/2 - a2 T^-1 + a3 ln(T) + a4 T + a5 T^2/2 + a6 T^3/3 + a7 T^4/4 + b2",
        "//! ```",
        "//!",
        "//! h is the absolute enthalpy (zero for the reference elements at 298.15 K, so it",
        "//! includes the heat of formation); s is the standard-state entropy. Cantera uses",
        "//! the low range for T <= t_mid and the high range above it; the two ranges",
        "//! differ slightly at t_mid. Ar has a single range in the source file, so its",
        "//! `low` and `high` are identical.",
        "",
        "/// One species: molar mass and the two temperature ranges.",
        "pub(crate) struct SpeciesData {",
        "    pub name: &'static str,",
        "    pub molar_mass: f64,",
        "    pub t_min: f64,",
        "    pub t_mid: f64,",
        "    pub t_max: f64,",
        "    pub low: [f64; 9],",
        "    pub high: [f64; 9],",
        "}",
    ]
    for name in RUST_SPECIES:
        t_min, t_mid, t_max, low, high = nasa9_ranges(name)
        lines += [
            "",
            f"/// {name}, molar mass {MW_ALL[name]!r} kg/kmol.",
            f"pub(crate) const {RUST_NAMES[name]}: SpeciesData = SpeciesData {{",
            f"    name: \"{name}\",",
            f"    molar_mass: {rust_f64(MW_ALL[name])},",
            f"    t_min: {rust_f64(t_min)},",
            f"    t_mid: {rust_f64(t_mid)},",
            f"    t_max: {rust_f64(t_max)},",
        ]
        lines += rust_array("low", low)
        lines += rust_array("high", high)
        lines.append("};")
    os.makedirs(os.path.dirname(RUST_OUT), exist_ok=True)
    with open(RUST_OUT, "w", newline="\n") as fh:
        fh.write("\n".join(lines) + "\n")


# --------------------------------------------------------------------------
# (b) reference values
# --------------------------------------------------------------------------
SOURCE_COMMON = (
    "Computed with Cantera 3.2.0 (PyPI) from its data file nasa_gas.yaml "
    "(NASA 7-coefficient polynomials, McBride, Gordon and Reno, NASA TM-4513, "
    "1993, as named in that file), by tests/gen/reference_cantera.py. "
    "Ideal-gas mixture of N2, O2, Ar, CO2, H2O with frozen composition; "
    "properties from a Cantera ideal-gas Solution (cp_mass, enthalpy_mass, "
    "standard_entropies_R). R_universal is Cantera's ct.gas_constant. "
    "s0 of a mixture is sum_i x_i s_i(T) / M_mix without the mixing term. "
    "Dry air: N2 0.780840, O2 0.209476, Ar 0.009340, CO2 0.000314, normalised. "
    "Products: complete lean combustion of CH_n with dry air per kg air: "
    "CO2 += nf, H2O += nf*n/2, O2 -= nf*(1+n/4), nf = f/(12.011 + n*1.008). "
    "Root finding: bisection on a bracket down to adjacent doubles. "
)
T_LIST = [200.0, 300.0, 500.0, 800.0, 1000.0, 1200.0, 1500.0, 2000.0, 2500.0, 3000.0]
MACH_LIST = [0.1, 0.5, 1.0, 1.5, 2.0, 3.0]
T_MIN_DATA, T_MAX_DATA = 200.0, 6000.0


def out_of_range(*ts):
    return any(t < T_MIN_DATA or t > T_MAX_DATA for t in ts)


def header(extra):
    return {
        "source": SOURCE_COMMON + extra,
        "r_universal": R_U,
        "r_universal_requested": 8314.462618,
        "cantera_version": ct.__version__,
        "data_file": DATA_FILE,
        "element_weights": {"C": W_C, "H": W_H, "O": ct.Element("O").weight,
                            "N": ct.Element("N").weight, "Ar": ct.Element("Ar").weight},
        "species_molar_mass": {n: MW[n] for n in SPECIES},
        "t_ref_sensible": T_REF,
        "out_of_range_note": (
            "points flagged out_of_range involve a temperature outside 200-6000 K; "
            "there the polynomial of the nearest range is extrapolated, as Cantera does"),
    }


def mixture_block(mix):
    return {"name": mix.name, "molar_mass": mix.molar_mass, "r_specific": mix.r,
            "mole_fractions": {n: mix.x[n] for n in SPECIES}}


def write_json(fname, obj):
    path = os.path.join(DATA_DIR, fname)
    os.makedirs(DATA_DIR, exist_ok=True)
    with open(path, "w", newline="\n") as fh:
        json.dump(obj, fh, indent=1, allow_nan=False)
        fh.write("\n")


def gen_species():
    blocks = []
    for name in SPECIES:
        mix = Mixture(name, {name: 1.0})
        blocks.append((mix, "species"))
    blocks.append((AIR, "mixture"))
    blocks.append((products(0.02), "mixture"))
    cases = []
    for mix, kind in blocks:
        pts = []
        for t in T_LIST:
            cp, h, s0 = mix.cp(t), mix.h(t), mix.s0(t)
            # cross-check s0 against Cantera's mixture entropy at P_ref
            GAS.TPX = t, P_REF_CANTERA, mix.xvec
            mixing = -mix.r * sum(x * math.log(x) for x in mix.xvec if x > 0)
            assert abs(GAS.entropy_mass - (s0 + mixing)) <= 1e-12 * abs(s0)
            # frozen sound speed agrees with Cantera's ideal-gas sound_speed
            assert abs(mix.a(t) - GAS.sound_speed) <= 1e-12 * GAS.sound_speed
            pts.append({"t": t, "cp": cp, "h": h, "s0": s0, "gamma": mix.gamma(t)})
        c = mixture_block(mix)
        c["kind"] = kind
        c["points"] = pts
        cases.append(c)
    obj = header(
        "Values per kg of the species or mixture: cp (J/kg/K), h absolute "
        "enthalpy incl. formation (J/kg), s0 polynomial standard-state entropy "
        "(J/kg/K; the data file does not state a reference pressure, Cantera "
        "labels it 101325 Pa by default; the brief calls it 1 bar - no derived "
        "quantity in these files depends on that label), gamma = cp/(cp-R_mix).")
    obj["fuel_h_to_c"] = N_HC_DEFAULT
    obj["fuel_molar_mass"] = fuel_molar_mass(N_HC_DEFAULT)
    obj["stoichiometric_far"] = stoichiometric_far(N_HC_DEFAULT)
    obj["products_far"] = 0.02
    obj["cases"] = cases
    write_json("cantera_species.json", obj)
    return obj


def static_from_total(mix, tt, pt, mach):
    """Isentropic static state at Mach `mach` from total state (tt, pt)."""
    ht = mix.h(tt)
    if mach == 0.0:
        t = tt
    else:
        def g(t):
            return 2.0 * (ht - mix.h(t)) - mach * mach * mix.gamma(t) * mix.r * t
        t = bisect(g, tt / (1.0 + 0.4 * mach * mach), tt)
    p = pt * math.exp((mix.s0(t) - mix.s0(tt)) / mix.r)
    rho = p / (mix.r * t)
    a = mix.a(t)
    v = math.sqrt(max(2.0 * (ht - mix.h(t)), 0.0))
    return {"mach": mach, "t": t, "p": p, "rho": rho, "a": a, "v": v,
            "gamma": mix.gamma(t), "out_of_range": out_of_range(t, tt)}


def total_from_static(mix, t, p, u):
    """Stagnate isentropically: h(Tt) = h + u^2/2, pt = p exp(ds0/R)."""
    target = mix.h(t) + 0.5 * u * u
    hi = t * 1.5
    while mix.h(hi) < target:
        hi *= 1.5
    tt = bisect(lambda x: mix.h(x) - target, t, hi)
    pt = p * math.exp((mix.s0(tt) - mix.s0(t)) / mix.r)
    return tt, pt


def gen_isentropic():
    cases = []
    prod = products(0.03)
    for mix, tt in ((AIR, 1500.0), (AIR, 300.0), (prod, 1800.0)):
        pt = 101325.0
        pts = [static_from_total(mix, tt, pt, m) for m in MACH_LIST]
        for q in pts:
            assert abs(q["v"] / q["a"] - q["mach"]) <= 1e-9 * q["mach"]
            # round trip
            tt2, pt2 = total_from_static(mix, q["t"], q["p"], q["v"])
            assert abs(tt2 - tt) <= 1e-9 * tt and abs(pt2 - pt) <= 1e-9 * pt
        c = mixture_block(mix)
        c["far"] = 0.0 if mix is AIR else 0.03
        c["tt"] = tt
        c["pt"] = pt
        c["points"] = pts
        cases.append(c)
    obj = header(
        "Isentropic static states from a total state: s0(T) - R_mix ln p held "
        "constant (frozen), V^2/2 = h(Tt) - h(T), a = sqrt(cp/cv R_mix T) with "
        "cv = cp - R_mix, M = V/a solved for T by bisection. Units: K, Pa, "
        "kg/m^3, m/s.")
    obj["cases"] = cases
    write_json("cantera_isentropic.json", obj)


def normal_shock(mix, t1, p1, m1):
    r = mix.r
    a1 = mix.a(t1)
    u1 = m1 * a1
    rho1 = p1 / (r * t1)
    mflux = rho1 * u1
    mom = p1 + rho1 * u1 * u1
    h0 = mix.h(t1) + 0.5 * u1 * u1

    def rho2_of(t2):
        disc = mom * mom - 4.0 * r * t2 * mflux * mflux
        return (mom + math.sqrt(max(disc, 0.0))) / (2.0 * r * t2)

    def g(t2):
        rho2 = rho2_of(t2)
        u2 = mflux / rho2
        return mix.h(t2) + 0.5 * u2 * u2 - h0

    t2max = mom * mom / (4.0 * r * mflux * mflux)
    t2 = bisect(g, t1, t2max)
    rho2 = rho2_of(t2)
    u2 = mflux / rho2
    p2 = rho2 * r * t2
    # conservation residuals
    assert abs(rho2 * u2 - mflux) <= 1e-12 * mflux
    assert abs(p2 + rho2 * u2 * u2 - mom) <= 1e-12 * mom
    assert abs(mix.h(t2) + 0.5 * u2 * u2 - h0) <= 1e-10 * abs(h0 - mix.h(T_REF))
    a2 = mix.a(t2)
    tt1, pt1 = total_from_static(mix, t1, p1, u1)
    tt2, pt2 = total_from_static(mix, t2, p2, u2)
    return {"m1": m1, "u1": u1, "rho1": rho1, "a1": a1,
            "t2": t2, "p2": p2, "rho2": rho2, "u2": u2, "m2": u2 / a2,
            "tt1": tt1, "pt1": pt1, "tt2": tt2, "pt2": pt2, "pt_ratio": pt2 / pt1,
            "out_of_range": out_of_range(t1, t2, tt1, tt2)}


def gen_normal_shock():
    cases = []
    for t1 in (220.0, 600.0, 1200.0):
        pts = [normal_shock(AIR, t1, 20000.0, m1) for m1 in (1.5, 2.0, 3.0, 5.0)]
        c = mixture_block(AIR)
        c["t1"] = t1
        c["p1"] = 20000.0
        c["points"] = pts
        cases.append(c)
    obj = header(
        "Frozen normal shock in dry air: rho1 u1 = rho2 u2, p1 + rho1 u1^2 = "
        "p2 + rho2 u2^2, h1 + u1^2/2 = h2 + u2^2/2 with p = rho R_mix T; solved "
        "for T2 by bisection on [T1, T2 at the Rayleigh-line maximum], taking "
        "the subsonic (larger) density root of the momentum equation. u1 = "
        "M1 a1, M2 = u2/a2 with the frozen sound speed. Totals: h(Tt) = h + "
        "u^2/2, pt = p exp((s0(Tt) - s0(T))/R_mix). Units: K, Pa, kg/m^3, m/s.")
    obj["cases"] = cases
    write_json("cantera_normal_shock.json", obj)


def gen_turbojet():
    n = N_HC_DEFAULT
    w_air = 20.0
    t0, p0 = 288.15, 101325.0
    pr_c, eta_c = 10.0, 0.84
    tt4, dp_b, eta_b, lhv = 1450.0, 0.95, 0.995, 43.1e6
    eta_m, eta_t = 0.99, 0.89
    pr_intake = 0.99

    tt0, pt0 = t0, p0
    tt2, pt2 = tt0, pr_intake * pt0
    # compressor
    s_target = AIR.s0(tt2) + AIR.r * math.log(pr_c)
    tt3s = bisect(lambda t: AIR.s0(t) - s_target, tt2, 3000.0)
    h3 = AIR.h(tt2) + (AIR.h(tt3s) - AIR.h(tt2)) / eta_c
    tt3 = bisect(lambda t: AIR.h(t) - h3, tt2, 3000.0)
    pt3 = pr_c * pt2
    wc = AIR.h(tt3) - AIR.h(tt2)
    # combustor
    hs3 = AIR.hs(tt3)

    def energy(f):
        return hs3 + eta_b * f * lhv - (1.0 + f) * products(f, n).hs(tt4)

    far = bisect(energy, 0.0, stoichiometric_far(n))
    prod = products(far, n, name="products")
    pt4 = dp_b * pt3
    # turbine
    wt = wc / eta_m  # per kg air
    h5 = prod.h(tt4) - wt / (1.0 + far)
    tt5 = bisect(lambda t: prod.h(t) - h5, 250.0, tt4)
    h5s = prod.h(tt4) - (prod.h(tt4) - h5) / eta_t
    tt5s = bisect(lambda t: prod.h(t) - h5s, 250.0, tt4)
    pt5 = pt4 * math.exp((prod.s0(tt5s) - prod.s0(tt4)) / prod.r)
    # nozzle
    tt9, pt9 = tt5, pt5
    crit = static_from_total(prod, tt9, pt9, 1.0)
    choked = crit["p"] > p0
    if choked:
        t9, p9, v9 = crit["t"], crit["p"], crit["v"]
    else:
        s9 = prod.s0(tt9) + prod.r * math.log(p0 / pt9)
        t9 = bisect(lambda t: prod.s0(t) - s9, 150.0, tt9)
        p9 = p0
        v9 = math.sqrt(2.0 * (prod.h(tt9) - prod.h(t9)))
    rho9 = p9 / (prod.r * t9)
    w9 = w_air * (1.0 + far)
    a9 = w9 / (rho9 * v9)
    thrust = w9 * v9 + (p9 - p0) * a9
    w_fuel = w_air * far
    # energy checks
    assert abs((1.0 + far) * (prod.h(tt4) - prod.h(tt5)) - wc / eta_m) <= 1e-9 * wc

    stations = [
        {"station": "0", "tt": tt0, "pt": pt0, "far": 0.0},
        {"station": "2", "tt": tt2, "pt": pt2, "far": 0.0},
        {"station": "3", "tt": tt3, "pt": pt3, "far": 0.0},
        {"station": "4", "tt": tt4, "pt": pt4, "far": far},
        {"station": "5", "tt": tt5, "pt": pt5, "far": far},
        {"station": "9", "tt": tt9, "pt": pt9, "far": far},
    ]
    obj = header(
        "Single-spool turbojet, sea-level static, thermally perfect, frozen "
        "composition. Compressor: s0(Tt3s) = s0(Tt2) + R_air ln(PR); h3 = h2 + "
        "(h3s - h2)/eta_c. Combustor (fuel at 298.15 K): hs_air(Tt3) + eta_b f "
        "LHV = (1+f) hs_prod(f, Tt4), hs(T) = h(T) - h(298.15 K). Turbine: "
        "(1+f)(h4 - h5) = wc/eta_m; h5s = h4 - (h4 - h5)/eta_t; pt5 = pt4 "
        "exp((s0(Tt5s) - s0(Tt4))/R_prod). Convergent nozzle, no loss: choked "
        "if the isentropic M=1 static pressure exceeds p0, then exit at M=1, "
        "else expand to p0. F = W9 V9 + (p9 - p0) A9. Units: K, Pa, kg/s, N, "
        "J/kg, m^2, kg/N/s.")
    obj["inputs"] = {
        "t0": t0, "p0": p0, "mach0": 0.0, "w_air": w_air, "intake_pt_ratio": pr_intake,
        "compressor_pr": pr_c, "compressor_eta": eta_c, "tt4": tt4,
        "combustor_pt_ratio": dp_b, "combustion_eta": eta_b, "lhv": lhv,
        "fuel_h_to_c": n, "fuel_t": T_REF, "mech_eta": eta_m, "turbine_eta": eta_t,
    }
    obj["air"] = mixture_block(AIR)
    obj["products"] = mixture_block(prod)
    obj["stations"] = stations
    obj["results"] = {
        "tt3s": tt3s, "tt3": tt3, "wc": wc,
        "far": far, "w_fuel": w_fuel,
        "turbine_work_per_kg_air": wt,
        "turbine_work_per_kg_gas": wt / (1.0 + far),
        "tt5s": tt5s, "tt5": tt5,
        "nozzle_pt_over_p0": pt9 / p0,
        "nozzle_critical_pt_over_p": pt9 / crit["p"],
        "choked": choked,
        "t9": t9, "p9": p9, "rho9": rho9, "v9": v9, "a9": a9, "w9": w9,
        "gross_thrust": thrust, "net_thrust": thrust,
        "tsfc": w_fuel / thrust,
        "specific_thrust": thrust / w_air,
    }
    write_json("cantera_turbojet.json", obj)
    return obj


# --------------------------------------------------------------------------
# (c) combustion: fuels by atoms (frozen complete products) and equilibrium
# --------------------------------------------------------------------------
EQ_SPECIES = SPECIES + MINOR  # the twelve product species of an equilibrium
# Cantera reads nasa_gas.yaml with a reference pressure of one atmosphere;
# NASA TM-4513 states its standard state at 1 bar, so the equilibrium species
# are rebuilt with the same coefficients and a 1e5 Pa reference pressure.
P_STANDARD = 1.0e5


def at_one_bar(sp):
    th = sp.thermo
    out = ct.Species(sp.name, sp.composition)
    out.thermo = ct.NasaPoly2(th.min_temp, th.max_temp, P_STANDARD, th.coeffs)
    return out


GAS_EQ = ct.Solution(thermo="ideal-gas",
                     species=[at_one_bar(ALL_SPECIES[n]) for n in EQ_SPECIES])
assert GAS_EQ.reference_pressure == P_STANDARD
W_O = ct.Element("O").weight
W_N = ct.Element("N").weight


def species_h(name, t):
    """Absolute molar enthalpy of a species, J/kmol (Cantera's species thermo)."""
    return float(ALL_SPECIES[name].thermo.h(t))


def fuel_props(c, h, o, n):
    m = c * W_C + h * W_H + o * W_O + n * W_N
    nu_o2 = c + h / 4.0 - o / 2.0
    return m, nu_o2


def lhv_of(c, h, o, n, h_fuel_molar):
    """Lower heating value per kg of fuel at 298.15 K, water as vapour."""
    m, nu_o2 = fuel_props(c, h, o, n)
    react = h_fuel_molar + nu_o2 * species_h("O2", T_REF)
    prod = (c * species_h("CO2", T_REF) + h / 2.0 * species_h("H2O", T_REF)
            + n / 2.0 * species_h("N2", T_REF))
    return (react - prod) / m


def complete_moles(far, atoms):
    """kmol per kg dry air of complete lean products of a fuel by atoms."""
    c, h, o, n = atoms
    m, nu_o2 = fuel_props(c, h, o, n)
    mol = {s: 0.0 for s in EQ_SPECIES}
    for s in SPECIES:
        mol[s] = AIR.x[s] / AIR.molar_mass
    nf = far / m
    mol["CO2"] += nf * c
    mol["H2O"] += nf * h / 2.0
    mol["N2"] += nf * n / 2.0
    mol["O2"] -= nf * nu_o2
    if mol["O2"] < 0.0:
        raise ValueError("rich")
    return mol


def moles_h(mol, t):
    """Absolute enthalpy of a set of species moles at t, J."""
    return sum(k * species_h(s, t) for s, k in mol.items() if k != 0.0)


def equilibrium_h_per_kg_air(far, atoms, t, p):
    """Products of far in equilibrium at (t, p): absolute enthalpy per kg of
    dry air and the equilibrium mole fractions."""
    mol = complete_moles(far, atoms)
    x = np.array([mol[s] for s in EQ_SPECIES])
    GAS_EQ.TPX = t, p, x / x.sum()
    GAS_EQ.equilibrate("TP", rtol=1e-14, max_steps=100000)
    mass = 1.0 + far
    return mass * float(GAS_EQ.enthalpy_mass), {
        s: float(GAS_EQ.X[i]) for i, s in enumerate(EQ_SPECIES)}


def stoich_far_of(atoms):
    c, h, o, n = atoms
    m, nu_o2 = fuel_props(c, h, o, n)
    return AIR.x["O2"] / AIR.molar_mass / nu_o2 * m


def gen_combustion():
    air_h = lambda t: moles_h(complete_moles(0.0, (1, 0, 0, 0)), t)
    cases = []
    # Fuels that are species of the data file: their formation enthalpy and
    # their own entry temperature come from their polynomials; the lower
    # heating value follows from the same data.
    for fuel, atoms, t_in, t_out, t_fuel in [
        ("H2", (0.0, 2.0, 0.0, 0.0), 600.0, 1500.0, 298.15),
        ("H2", (0.0, 2.0, 0.0, 0.0), 600.0, 1500.0, 400.0),
        ("CH4", (1.0, 4.0, 0.0, 0.0), 600.0, 1500.0, 298.15),
        ("CH4", (1.0, 4.0, 0.0, 0.0), 700.0, 1700.0, 350.0),
    ]:
        m, _ = fuel_props(*atoms)
        hf = species_h(fuel, T_REF)
        lhv = lhv_of(*atoms, hf)
        hs_fuel = (species_h(fuel, t_fuel) - hf) / m
        h_in = air_h(t_in)
        h_fuel = species_h(fuel, t_fuel) / m

        def res(f):
            return moles_h(complete_moles(f, atoms), t_out) - h_in - f * h_fuel
        far = bisect(res, 1e-6, stoich_far_of(atoms))
        cases.append({
            "fuel": fuel, "atoms": list(atoms), "products": "frozen",
            "tt_in": t_in, "tt_out": t_out, "fuel_t": t_fuel,
            "lhv": lhv, "fuel_sensible_h": hs_fuel, "far": far,
            "far_stoich": stoich_far_of(atoms),
        })
    # Equilibrium products of a kerosene-like C H_1.92 given by its heating
    # value: its formation enthalpy is the one that heating value implies.
    atoms = (1.0, N_HC_DEFAULT, 0.0, 0.0)
    lhv = 43.0e6
    m, nu_o2 = fuel_props(*atoms)
    h_fuel = lhv + (atoms[0] * species_h("CO2", T_REF) + atoms[1] / 2 * species_h("H2O", T_REF)
                    - nu_o2 * species_h("O2", T_REF)) / m
    t_in, p = 800.0, 2.5e6
    h_in = air_h(t_in)
    for t_out in (1800.0, 2000.0, 2200.0):
        def res_eq(f):
            return equilibrium_h_per_kg_air(f, atoms, t_out, p)[0] - h_in - f * h_fuel

        def res_fr(f):
            return moles_h(complete_moles(f, atoms), t_out) - h_in - f * h_fuel
        far_eq = bisect(res_eq, 1e-6, stoich_far_of(atoms))
        far_fr = bisect(res_fr, 1e-6, stoich_far_of(atoms))
        _, x = equilibrium_h_per_kg_air(far_eq, atoms, t_out, p)
        cases.append({
            "fuel": "CH1.92", "atoms": list(atoms), "products": "equilibrium",
            "tt_in": t_in, "tt_out": t_out, "pt": p, "fuel_t": T_REF,
            "lhv": lhv, "far": far_eq, "far_frozen": far_fr,
            "mole_fractions": x, "far_stoich": stoich_far_of(atoms),
        })
    # Adiabatic flame temperature at stoichiometric, equilibrium products.
    fs = stoich_far_of(atoms)
    t_ad = bisect(lambda t: equilibrium_h_per_kg_air(fs, atoms, t, p)[0] - h_in - fs * h_fuel,
                  1500.0, 3500.0)
    obj = header(
        "Combustion of fuels given by their atoms C_c H_h O_o N_n per molecule, "
        "1 kg of dry air plus f kg of fuel. Frozen: complete lean products (CO2 "
        "+= c nf, H2O += h/2 nf, N2 += n/2 nf, O2 -= (c + h/4 - o/2) nf, nf = "
        "f/M_fuel); energy: H_air(Tt_in) + f h_fuel(T_fuel) = H_products(Tt_out) "
        "in absolute enthalpies of Cantera's species thermo; the fuel's own "
        "polynomial gives its formation and sensible enthalpy; lhv is -dH of "
        "complete combustion at 298.15 K with water as vapour, per kg fuel; "
        "fuel_sensible_h = h_fuel(T_fuel) - h_fuel(298.15 K) per kg. "
        "Equilibrium: the twelve species N2 O2 Ar CO2 H2O CO H2 OH O H NO N in "
        "an ideal-gas Solution with the standard state at 1e5 Pa (TM-4513's; "
        "Cantera would read the file at 101325 Pa), equilibrate('TP', "
        "rtol=1e-14) at Tt_out and pt, "
        "the fuel's formation enthalpy being the one its lhv implies with the "
        "same species data. far solved by bisection to adjacent doubles; "
        "far_frozen is the complete-products answer for the same fuel. "
        "mole_fractions are Cantera's X at the solution.")
    obj["cases"] = cases
    obj["flame"] = {"atoms": list(atoms), "lhv": lhv, "tt_in": t_in, "pt": p,
                    "far": fs, "t_adiabatic_equilibrium": t_ad}
    obj["minor_species_molar_mass"] = {n: MW_ALL[n] for n in MINOR + ["CH4"]}
    write_json("cantera_combustion.json", obj)
    return obj


def main():
    check_against_yaml_text()
    worst = check_polynomials()
    write_rust()
    sp = gen_species()
    gen_isentropic()
    gen_normal_shock()
    tj = gen_turbojet()
    gen_combustion()
    print(f"Cantera {ct.__version__}, numpy {np.__version__}, data {DATA_PATH}")
    print(f"R_universal {R_U!r}; polynomial check worst rel err {worst:.2e}")
    print("range jumps at T_mid (cp, h, s rel):",
          {k: [f"{x:.1e}" for x in v] for k, v in range_jumps_at_t_mid().items()})
    print(f"stoichiometric f (n={N_HC_DEFAULT}) = {sp['stoichiometric_far']!r}")
    r = tj["results"]
    print("turbojet:", {k: r[k] for k in ("far", "gross_thrust", "tsfc", "tt3", "tt5",
                                          "p9", "choked", "specific_thrust")})
    print("wrote", RUST_OUT, "and", DATA_DIR)


if __name__ == "__main__":
    main()
