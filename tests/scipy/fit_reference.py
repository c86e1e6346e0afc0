#!/usr/bin/env python3
"""SciPy cross-check for `coldpass fit`: writes fit_reference.json beside this file.

For each generated demo record in schedules-demo/ it analyses the record
from the definitions of ISO 6892-1 (from memory), written here in its own
way: Young's modulus as one scipy.stats.linregress line over the points
between 10 % and 40 % of the proof strength (iterated to a fixed point),
the 0.2 % proof strength Rp0.2 by brentq on the interpolated curve against
the offset line, the maximum force by argmax, true plastic strain by volume
constancy; then fits every law with scipy.optimize.curve_fit on the stress
residuals from its own plain starting values. tests/fit_scipy.rs compares coldpass's figures with these.
Output is deterministic: sorted keys, 12 significant digits.

    python3 tests/scipy/fit_reference.py
"""

import json
import math
from pathlib import Path

import numpy as np
from scipy.optimize import brentq, curve_fit
from scipy.stats import linregress

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
    "tensile-steel-lueders.csv": {
        "extension": 0,
        "force": 1,
        "force_scale": 1000.0,
        "gauge_length_mm": 50.0,
        "diameter_mm": 6.5,
        "sep": ";",
        "yield_drop": True,
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
    sep = cfg.get("sep", ",")
    # a semicolon export writes decimal commas
    cell = (lambda c: float(c.replace(",", "."))) if sep != "," else float
    data = np.array([[cell(c) for c in l.split(sep)] for l in rows])
    if "strain" in cfg:
        return data[:, cfg["strain"]] * cfg["strain_scale"], data[:, cfg["stress"]]
    area = math.pi * cfg["diameter_mm"] ** 2 / 4.0
    strain = data[:, cfg["extension"]] / cfg["gauge_length_mm"]
    stress = data[:, cfg["force"]] * cfg["force_scale"] / area
    return strain, stress


def proof_strength(e, s, E, toe, upto):
    """Rp0.2 (ISO 6892-1): where the curve, read as straight between its
    points, first meets the line of slope E offset by 0.2 % strain; found
    with brentq on the interpolated curve."""
    g = lambda x: np.interp(x, e, s) - E * (x - toe - 0.002)
    gp = s - E * (e - toe - 0.002)
    for i in range(1, upto + 1):
        if gp[i] <= 0 < gp[i - 1]:
            x = brentq(g, e[i - 1], e[i], xtol=1e-16, rtol=1e-15)
            return float(np.interp(x, e, s)), i
    raise ValueError("never yields")


def modulus(e, s, upto, band):
    """One least-squares line (scipy.stats.linregress) over every point of the
    rising part whose strain puts it, on the line found before, between
    band[0] and band[1] MPa."""
    return linregress(e[:upto][band[:upto]], s[:upto][band[:upto]])


def analyse(e, s):
    imax = int(np.argmax(s))
    # Start: the points whose stress lies in 5-20 % of the highest.
    first = (s >= 0.05 * s[imax]) & (s <= 0.20 * s[imax])
    lr = modulus(e, s, imax, first)
    rp = 0.5 * s[imax]
    chosen = None
    for _ in range(50):
        on_line = lr.intercept + lr.slope * e
        band = (on_line >= 0.1 * rp) & (on_line <= 0.4 * rp)
        lr = modulus(e, s, imax, band)
        E, toe = lr.slope, -lr.intercept / lr.slope
        rp, iy = proof_strength(e, s, E, toe, imax)
        key = tuple(np.flatnonzero(band[:imax]))
        if key == chosen:
            break
        chosen = key
    ec = e[: imax + 1] - toe
    et = np.log1p(ec)
    st = s[: imax + 1] * (1.0 + ec)
    ep = et - st / E
    keep = (np.arange(imax + 1) >= iy) & (ep > 0)
    return {
        "E": E,
        "E_se": lr.stderr,
        "yield_mpa": rp,
        "uts_mpa": s[imax],
        "uniform_strain": ep[imax],
        "x": ep[keep],
        "y": st[keep],
        "et": et,
        "st": st,
    }


def analyse_drop(e, s):
    """A record with a yield drop, from ISO 6892-1's definitions: the upper
    yield strength ReH is the highest stress before the force first falls,
    here the highest within the first 0.5 % strain (the drop lies at the end
    of the elastic line); the modulus is one linregress line over the points
    whose strain puts them between 10 % and 40 % of ReH on the line
    (iterated to a fixed point); the maximum force is the highest after the
    plateau."""
    early = np.flatnonzero(e < 0.005)
    ih = int(early[np.argmax(s[early])])
    reh = s[ih]
    first = (s >= 0.05 * reh) & (s <= 0.20 * reh)
    lr = modulus(e, s, ih, first)
    chosen = None
    for _ in range(50):
        on_line = lr.intercept + lr.slope * e
        band = (on_line >= 0.1 * reh) & (on_line <= 0.4 * reh)
        lr = modulus(e, s, ih, band)
        key = tuple(np.flatnonzero(band[:ih]))
        if key == chosen:
            break
        chosen = key
    E, toe = lr.slope, -lr.intercept / lr.slope
    later = np.flatnonzero(e >= 0.005)
    im = int(later[np.argmax(s[later])])
    ec = e[im] - toe
    et, st = math.log1p(ec), s[im] * (1.0 + ec)
    return {
        "youngs_modulus_gpa": E / 1000.0,
        "youngs_modulus_std_error_gpa": lr.stderr / 1000.0,
        "upper_yield_mpa": reh,
        "uts_mpa": s[im],
        "uniform_strain": et - st / E,
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

    # Hollomon in stress space, like every other law (one criterion).
    f = lambda x, K, n: K * x**n
    p, c = curve_fit(f, x, y, p0=[y.max(), 0.3], **TIGHT)
    k, n = p
    out["hollomon"] = result(["k_mpa", "n"], p, c, y, f(x, *p))

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
        if cfg.get("yield_drop"):
            records[name] = analyse_drop(*read(name, cfg))
            continue
        r = analyse(*read(name, cfg))
        records[name] = {
            "youngs_modulus_gpa": r["E"] / 1000.0,
            "youngs_modulus_std_error_gpa": r["E_se"] / 1000.0,
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
