"""SciPy cross-check of coldpass's Sachs drawing stress and mean flow stress.

Over a fixed grid of flow laws (every kind, a table with both `beyond`
settings) and passes (entry strain, pass strain, die semi-angle, Coulomb
friction, back tension), computes independently of coldpass:

- the Sachs slab solution for a conical die integrated with the law itself
  (Dieter, *Mechanical Metallurgy*, ch. 19; Sachs 1927):
  sigma_d = sigma_b e^(-B eps) + (1+B) int_0^eps sigma_f(eps_a+t) e^(-B(eps-t)) dt,
  B = mu cot(alpha), eps = 2 ln(D0/D1);
- the mean flow stress (1/eps) int_{eps_a}^{eps_a+eps} sigma_f de,

by scipy.integrate.quad (epsabs=0, epsrel=1e-13, limit=200, split at the
table's kinks); and over a smaller grid with die lands, shear factors and
back tension, every method from its published formula (docs/physics.md):

- Siebel (as given by Dieter): sigma_b + sigma_bar [(1 + mu/alpha) eps + (2/3) alpha];
- redundant work (Hosford & Caddell): Sachs + (Phi - 1) sigma_bar eps,
  Phi = 1 + C (Delta - 1) for Delta = (alpha/r)(1 + sqrt(1-r))^2 > 1;
- the die land's slab balance on Sachs, Siebel and redundant:
  Y - (Y - sigma_cone) exp(-4 mu L / d1) while sigma_cone < Y;
- Avitzur's upper bound with shear factor m and land L (Avitzur 1963);
- the optimum semi-angle of each method by scipy.optimize.minimize_scalar
  (bounded, xatol 1e-9 deg) on [1, 20] deg;
- force sigma_d pi d1^2 / 4, power F v1 and the adiabatic temperature rise
  beta (sigma_d - sigma_b) / (rho c),

and writes core_reference.json beside this script. The
output is deterministic (fixed grid, sorted keys, values rounded to 12
significant digits) so that CI can regenerate it and diff it against the
committed file. tests/scipy_core.rs reads it.
"""

import json
import math
import os

from scipy.integrate import quad
from scipy.optimize import minimize_scalar

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "core_reference.json")

ENTRY_DIAMETER_MM = 10.0
TABLE = [[0.0, 100.0], [0.3, 220.0], [0.9, 300.0], [1.5, 360.0]]
# A table whose flow stress falls over its middle segment (still valid).
TABLE_DIP = [[0.0, 150.0], [0.4, 320.0], [0.8, 300.0], [1.4, 340.0]]

# Law specs in coldpass's serde shape. Hollomon constants from Dieter Example
# 19.1 and Kalpakjian & Schmid Table 2.3 (annealed copper); the rest are
# plausible shapes, the check is the identity, not the material.
LAWS = [
    {"law": "perfectly-plastic", "yield_mpa": 250.0},
    {"law": "linear", "yield_mpa": 200.0, "hardening_modulus_mpa": 150.0},
    {"law": "hollomon", "k_mpa": 1300.0, "n": 0.3},
    {"law": "hollomon", "k_mpa": 315.0, "n": 0.54},
    {"law": "ludwik", "sigma0_mpa": 120.0, "k_mpa": 400.0, "n": 0.45},
    {"law": "swift", "k_mpa": 600.0, "eps0": 0.02, "n": 0.3},
    {"law": "voce", "sigma0_mpa": 80.0, "saturation_mpa": 470.0, "eps_c": 0.8},
    {"law": "points", "points": TABLE, "beyond": "slope"},
    {"law": "points", "points": TABLE, "beyond": "flat"},
    {"law": "points", "points": TABLE_DIP, "beyond": "flat"},
]
# Passes inside the tables, across their last point and wholly beyond it.
STRAINS_BEFORE = [0.0, 0.35, 1.3, 2.2]
PASS_STRAINS = [0.05, math.log(1.0 / 0.8), 0.6]
DIES = [(3.0, 0.03), (6.0, 0.09), (15.0, 0.12), (8.0, 0.0)]  # (semi-angle deg, mu)
BACK_TENSIONS_MPA = [0.0, 60.0]

QUAD = {"epsabs": 0.0, "epsrel": 1e-13, "limit": 200}


def round12(x):
    return float(f"{x:.12g}")


def table_stress(points, beyond, e):
    last = points[-1]
    if e >= last[0] and beyond == "flat":
        return last[1]
    i = 0
    while i + 2 < len(points) and e >= points[i + 1][0]:
        i += 1
    (e0, s0), (e1, s1) = points[i], points[i + 1]
    return s0 + (s1 - s0) * (e - e0) / (e1 - e0)


def flow_stress(law, e):
    """sigma_f(e), MPa, as on the reference sheet's flow-law table."""
    kind = law["law"]
    if kind == "perfectly-plastic":
        return law["yield_mpa"]
    if kind == "linear":
        return law["yield_mpa"] + law["hardening_modulus_mpa"] * e
    if kind == "hollomon":
        return law["k_mpa"] * e ** law["n"]
    if kind == "ludwik":
        return law["sigma0_mpa"] + law["k_mpa"] * e ** law["n"]
    if kind == "swift":
        return law["k_mpa"] * (law["eps0"] + e) ** law["n"]
    if kind == "voce":
        ss, s0 = law["saturation_mpa"], law["sigma0_mpa"]
        return ss - (ss - s0) * math.exp(-e / law["eps_c"])
    if kind == "points":
        return table_stress(law["points"], law["beyond"], e)
    raise ValueError(kind)


def kinks(law, lo, hi):
    if law["law"] != "points":
        return None
    inside = [p[0] for p in law["points"] if lo < p[0] < hi]
    return inside or None


def integrate(f, a, b, points):
    value, abserr = quad(f, a, b, points=points, **QUAD)
    if not abserr <= 1e-11 * abs(value):
        raise RuntimeError(f"quad did not converge on [{a}, {b}]: {value} +- {abserr}")
    return value


def case(law, strain_before, pass_strain, semi_angle_deg, mu, back):
    d0 = ENTRY_DIAMETER_MM
    d1 = round12(d0 * math.exp(-0.5 * pass_strain))
    # Everything below uses the stored diameters, so the file describes the case exactly.
    eps = 2.0 * math.log(d0 / d1)
    ea = strain_before
    b = mu / math.tan(math.radians(semi_angle_deg))
    breaks = kinks(law, ea, ea + eps)
    shifted = None if breaks is None else [x - ea for x in breaks]
    weighted = integrate(
        lambda t: flow_stress(law, ea + t) * math.exp(-b * (eps - t)), 0.0, eps, shifted
    )
    sachs = back * math.exp(-b * eps) + (1.0 + b) * weighted
    mean = integrate(lambda e: flow_stress(law, e), ea, ea + eps, breaks) / eps
    return {
        "law": law,
        "entry_diameter_mm": d0,
        "exit_diameter_mm": d1,
        "strain_before": strain_before,
        "semi_angle_deg": semi_angle_deg,
        "friction": mu,
        "back_tension_mpa": back,
        "sachs_mpa": round12(sachs),
        "mean_flow_stress_mpa": round12(mean),
    }


# ---------------------------------------------------------------- every method

METHOD_LAWS = [
    {"law": "hollomon", "k_mpa": 1300.0, "n": 0.3},
    {"law": "swift", "k_mpa": 600.0, "eps0": 0.02, "n": 0.3},
    {"law": "voce", "sigma0_mpa": 80.0, "saturation_mpa": 470.0, "eps_c": 0.8},
    {"law": "points", "points": TABLE, "beyond": "slope"},
]
# (entry mm, exit mm, strain before)
METHOD_PASSES = [(10.0, 8.94427191, 0.0), (5.0, 4.5, 0.4), (3.0, 2.9, 1.2)]
# (semi-angle deg, mu, m, land mm)
METHOD_DIES = [(6.0, 0.09, 0.09, 0.0), (8.0, 0.05, 0.3, 1.0), (12.0, 0.12, 0.12, 2.5)]
METHOD_BACK_MPA = [0.0, 40.0]
REDUNDANT_C = 0.21
EXIT_SPEED_M_S = 5.0
DENSITY_KG_M3 = 7850.0
SPECIFIC_HEAT_J_KG_K = 470.0
HEAT_FRACTION = 0.9


def avitzur_f(a):
    """Avitzur's f(alpha), alpha in radians (Avitzur 1963; docs/physics.md)."""
    s, c = math.sin(a), math.cos(a)
    k = 11.0 / 12.0
    root = math.sqrt(1.0 - k * s * s)
    log = math.log((1.0 + math.sqrt(k)) / (math.sqrt(k) * c + root))
    return (1.0 - c * root + log / math.sqrt(132.0)) / (s * s)


class Pass:
    """One pass: every method's drawing stress at any semi-angle, from the formulas."""

    def __init__(self, law, d0, d1, ea, mu, m, land, back):
        self.law, self.d0, self.d1, self.ea = law, d0, d1, ea
        self.mu, self.m, self.land, self.back = mu, m, land, back
        self.eps = 2.0 * math.log(d0 / d1)
        self.r = 1.0 - (d1 / d0) ** 2
        e = self.eps
        self.breaks = kinks(law, ea, ea + e)
        self.mean = integrate(lambda x: flow_stress(law, x), ea, ea + e, self.breaks) / e
        self.exit_flow = flow_stress(law, ea + e)

    def sachs_cone(self, a):
        b = self.mu / math.tan(a)
        e, ea = self.eps, self.ea
        shifted = None if self.breaks is None else [x - ea for x in self.breaks]
        w = integrate(lambda t: flow_stress(self.law, ea + t) * math.exp(-b * (e - t)), 0.0, e, shifted)
        return self.back * math.exp(-b * e) + (1.0 + b) * w

    def land_exit(self, cone):
        if self.land == 0.0 or cone >= self.exit_flow:
            return cone
        y = self.exit_flow
        return y - (y - cone) * math.exp(-4.0 * self.mu * self.land / self.d1)

    def delta(self, a):
        return a / self.r * (1.0 + math.sqrt(1.0 - self.r)) ** 2

    def sachs(self, a):
        return self.land_exit(self.sachs_cone(a))

    def siebel(self, a):
        return self.land_exit(self.back + self.mean * ((1.0 + self.mu / a) * self.eps + 2.0 / 3.0 * a))

    def redundant(self, a):
        d = self.delta(a)
        phi = 1.0 + REDUNDANT_C * (d - 1.0) if d > 1.0 else 1.0
        return self.land_exit(self.sachs_cone(a) + (phi - 1.0) * self.mean * self.eps)

    def upper_bound(self, a):
        s, c = math.sin(a), math.cos(a)
        half = 0.5 * self.eps
        k = 2.0 / math.sqrt(3.0)
        return self.back + self.mean * (
            2.0 * avitzur_f(a) * half
            + k * (a / (s * s) - c / s)
            + k * self.m * (c / s * half + self.land / (0.5 * self.d1))
        )

    def max(self, a):
        return max(self.sachs(a), self.siebel(a), self.redundant(a), self.upper_bound(a))

    def optimum(self, name):
        f = lambda deg: getattr(self, name)(math.radians(deg))
        res = minimize_scalar(f, bounds=(1.0, 20.0), method="bounded", options={"xatol": 1e-9})
        deg, val = res.x, res.fun
        for end in (1.0, 20.0):
            v = f(end)
            if v <= val:
                deg, val = end, v
        return deg, val


def method_case(law, d0, d1, ea, deg, mu, m, land, back):
    p = Pass(law, d0, d1, ea, mu, m, land, back)
    a = math.radians(deg)
    stresses = {
        "sachs": p.sachs(a),
        "siebel": p.siebel(a),
        "redundant": p.redundant(a),
        "upper-bound": p.upper_bound(a),
    }
    stresses["max"] = max(stresses.values())
    optimum = {}
    for name, attr in [("siebel", "siebel"), ("redundant", "redundant"),
                       ("upper-bound", "upper_bound"), ("max", "max"), ("sachs", "sachs")]:
        o_deg, o_val = p.optimum(attr)
        optimum[name] = {"semi_angle_deg": round12(o_deg), "draw_stress_mpa": round12(o_val)}
    gov = stresses["redundant"]
    force_kn = gov * math.pi * d1 * d1 / 4.0 / 1000.0
    return {
        "law": law,
        "entry_diameter_mm": d0,
        "exit_diameter_mm": d1,
        "strain_before": ea,
        "semi_angle_deg": deg,
        "friction": mu,
        "friction_factor": m,
        "land_length_mm": land,
        "back_tension_mpa": back,
        "redundant_c": REDUNDANT_C,
        "delta": round12(p.delta(a)),
        "draw_stress_mpa": {k: round12(v) for k, v in stresses.items()},
        "optimum": optimum,
        "exit_speed_m_s": EXIT_SPEED_M_S,
        "density_kg_m3": DENSITY_KG_M3,
        "specific_heat_j_kg_k": SPECIFIC_HEAT_J_KG_K,
        "heat_fraction": HEAT_FRACTION,
        "redundant_force_kn": round12(force_kn),
        "redundant_power_kw": round12(force_kn * EXIT_SPEED_M_S),
        "redundant_temperature_rise_c": round12(
            HEAT_FRACTION * (gov - back) * 1e6 / (DENSITY_KG_M3 * SPECIFIC_HEAT_J_KG_K)
        ),
    }


def main():
    cases = [
        case(law, ea, eps, deg, mu, back)
        for law in LAWS
        for ea in STRAINS_BEFORE
        for eps in PASS_STRAINS
        for deg, mu in DIES
        for back in BACK_TENSIONS_MPA
    ]
    methods = [
        method_case(law, d0, d1, ea, deg, mu, m, land, back)
        for law in METHOD_LAWS
        for d0, d1, ea in METHOD_PASSES
        for deg, mu, m, land in METHOD_DIES
        for back in METHOD_BACK_MPA
    ]
    about = (
        "Sachs drawing stress (integral form, Dieter ch. 19) and mean flow stress "
        "by scipy.integrate.quad; every method, its optimum angle, force, power and "
        "temperature rise from the published formulas (methods); regenerate with "
        "python3 tests/scipy/core_reference.py"
    )
    lines = ["{", f' "about": {json.dumps(about)},', ' "cases": [']
    rows = [json.dumps(c, sort_keys=True) for c in cases]
    lines += ["  " + r + ("," if i + 1 < len(rows) else "") for i, r in enumerate(rows)]
    lines += [" ],", ' "methods": [']
    rows = [json.dumps(c, sort_keys=True) for c in methods]
    lines += ["  " + r + ("," if i + 1 < len(rows) else "") for i, r in enumerate(rows)]
    lines += [" ]", "}"]
    with open(OUT, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
