#!/usr/bin/env python3
"""SciPy cross-check for `coldpass fit`: writes fit_reference.json beside this file.

For each generated demo record in schedules-demo/ it repeats the record
analysis of src/fit.rs in NumPy (modulus from the steepest straight run of
the initial part, 0.2 % offset yield, maximum load, true plastic strain) and
fits every law with scipy.optimize.curve_fit from its own plain starting
values. tests/fit_scipy.rs compares coldpass's figures with these.
Output is deterministic: sorted keys, 12 significant digits.

    python3 tests/scipy/fit_reference.py
"""

import json
import math
from pathlib import Path

import numpy as np
from scipy.optimize import curve_fit

ROOT = Path(__file__).resolve().parents[2]
OUT = Path(__file__).resolve().parent / "fit_reference.json"

# How each record is read: the same options as `coldpass fit` is given.
RECORDS = {
    "tensile-copper-rod.csv": {"strain": 0, "stress": 1, "strain_scale": 1.0},
    "tensile-aluminium-rod.csv": {"strain": 0, "stress": 1, "strain_scale": 0.01},
    "tensile-steel-rod.csv": {
        "extension": 1,
        "force": 2,
        "force_scale": 1000.0,
        "gauge_length_mm": 50.0,
        "diameter_mm": 5.5,
    },
}

TIGHT = {"xtol": 1e-15, "ftol": 1e-15, "gtol": 1e-15, "maxfev": 100000}


def sig(v):
    return float(f"{v:.12g}")


def clean(obj):
    if isinstance(obj, dict):
        return {k: clean(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [clean(v) for v in obj]
    if isinstance(obj, (float, np.floating)):
        v = float(obj)
        return sig(v) if math.isfinite(v) else None
    if isinstance(obj, (np.integer,)):
        return int(obj)
    return obj


def read(name, cfg):
    lines = (ROOT / "schedules-demo" / name).read_text().splitlines()
    rows = [l for l in lines if l.strip() and not l.startswith("#")][1:]
    data = np.array([[float(c) for c in l.split(",")] for l in rows])
    if "strain" in cfg:
        return data[:, cfg["strain"]] * cfg["strain_scale"], data[:, cfg["stress"]]
    area = math.pi * cfg["diameter_mm"] ** 2 / 4.0
    strain = data[:, cfg["extension"]] / cfg["gauge_length_mm"]
    stress = data[:, cfg["force"]] * cfg["force_scale"] / area
    return strain, stress


def elastic_line(e, s, smax):
    end = int(np.argmax(s >= 0.5 * smax)) if np.any(s >= 0.5 * smax) else len(s)
    w = min(max(end // 3, 5), 25)
    best = None
    for i in range(w - 1, end):
        x, y = e[i - w + 1 : i + 1], s[i - w + 1 : i + 1]
        b, a = np.polyfit(x, y, 1)
        if b > 0 and (best is None or b > best[1]):
            best = (a, b)
    a, b = best
    return b, -a / b


def analyse(e, s):
    imax = int(np.argmax(s))
    uts = s[imax]
    E, toe = elastic_line(e, s, uts)
    gap = s - E * (e - toe - 0.002)
    iy = next(i for i in range(1, imax + 1) if gap[i] <= 0 and gap[i - 1] > 0)
    t = gap[iy - 1] / (gap[iy - 1] - gap[iy])
    yld = s[iy - 1] + t * (s[iy] - s[iy - 1])
    ec = e[: imax + 1] - toe
    et = np.log(1.0 + ec)
    st = s[: imax + 1] * (1.0 + ec)
    ep = et - st / E
    keep = (np.arange(imax + 1) >= iy) & (ep > 0)
    return {
        "E": E,
        "yield_mpa": yld,
        "uts_mpa": uts,
        "uniform_strain": ep[imax],
        "x": ep[keep],
        "y": st[keep],
        "et": et,
        "st": st,
    }


def result(names, popt, pcov, y, model):
    res = y - model
    return {
        "params": dict(zip(names, popt)),
        "std_errors": dict(zip(names, np.sqrt(np.diag(pcov)))),
        "rms_mpa": math.sqrt(float(np.mean(res**2))),
        "points": len(y),
    }


def fits(r):
    x, y, E = r["x"], r["y"], r["E"]
    out = {}
    f = lambda x, Y: Y + 0.0 * x
    p, c = curve_fit(f, x, y, p0=[y.mean()], **TIGHT)
    out["perfectly-plastic"] = result(["yield_mpa"], p, c, y, f(x, *p))

    f = lambda x, Y, H: Y + H * x
    p, c = curve_fit(f, x, y, p0=[y.min(), 1.0], **TIGHT)
    out["linear"] = result(["yield_mpa", "hardening_modulus_mpa"], p, c, y, f(x, *p))

    f = lambda lx, a, n: a + n * lx
    p, c = curve_fit(f, np.log(x), np.log(y), p0=[np.log(y.max()), 0.3], **TIGHT)
    k, n = math.exp(p[0]), p[1]
    h = result(["k_mpa", "n"], [k, n], c, y, k * x**n)
    h["std_errors"]["k_mpa"] = k * math.sqrt(c[0, 0])
    out["hollomon"] = h

    f = lambda x, s0, K, n: s0 + K * x**n
    p, c = curve_fit(f, x, y, p0=[0.5 * y.min(), k, n], **TIGHT)
    out["ludwik"] = result(["sigma0_mpa", "k_mpa", "n"], p, c, y, f(x, *p))

    f = lambda x, K, e0, n: K * (e0 + x) ** n
    p, c = curve_fit(f, x, y, p0=[k, 0.01, n], **TIGHT)
    out["swift"] = result(["k_mpa", "eps0", "n"], p, c, y, f(x, *p))

    f = lambda x, s0, ss, ec: ss - (ss - s0) * np.exp(-x / ec)
    p, c = curve_fit(f, x, y, p0=[y.min(), y.max(), x.max() / 3.0], **TIGHT)
    out["voce"] = result(["sigma0_mpa", "saturation_mpa", "eps_c"], p, c, y, f(x, *p))

    et, st = r["et"], r["st"]
    f = lambda e, Y: np.minimum(E * e, Y)
    p, c = curve_fit(f, et, st, p0=[st[len(st) // 2 :].mean()], **TIGHT)
    out["elastic-perfectly-plastic"] = result(["yield_mpa"], p, c, st, f(et, *p))

    def el(e, Y, H):
        ht = E * H / (E + H)
        return np.where(E * e <= Y, E * e, Y + ht * (e - Y / E))

    lin = out["linear"]["params"]
    p, c = curve_fit(el, et, st, p0=[lin["yield_mpa"], lin["hardening_modulus_mpa"]], **TIGHT)
    out["elastic-linear"] = result(["yield_mpa", "hardening_modulus_mpa"], p, c, st, el(et, *p))
    return out


def main():
    records = {}
    for name, cfg in RECORDS.items():
        r = analyse(*read(name, cfg))
        records[name] = {
            "youngs_modulus_gpa": r["E"] / 1000.0,
            "yield_mpa": r["yield_mpa"],
            "uts_mpa": r["uts_mpa"],
            "uniform_strain": r["uniform_strain"],
            "fitted_points": len(r["x"]),
            "fits": fits(r),
        }
    doc = {
        "source": "tests/scipy/fit_reference.py: scipy.optimize.curve_fit on the generated demo records",
        "records": records,
    }
    OUT.write_text(json.dumps(clean(doc), indent=2, sort_keys=True) + "\n")


if __name__ == "__main__":
    main()
