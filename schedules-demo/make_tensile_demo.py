#!/usr/bin/env python3
"""Writes the generated tensile demo records tensile-*.csv beside this script.

GENERATED DEMO DATA, not measurements: an invented rod supplier (Brennock Rod
Works) and three invented tests, each made from a flow law plus an elastic
part, necking after maximum load and seeded noise on the load. Run it again
and the files come out byte for byte the same.

    python3 schedules-demo/make_tensile_demo.py
"""

import math
from pathlib import Path

import numpy as np

HERE = Path(__file__).resolve().parent


def curve(flow, e_mpa, elastic_pts, plastic_pts, neck_pts, neck_strain, neck_drop):
    """Engineering strain and stress (MPa) of a test, noise-free.

    Elastic line up to flow(0), then the flow law in true plastic strain,
    converted with eps_t = eps_p + sigma/E, e = exp(eps_t) - 1, s = sigma exp(-eps_t);
    past maximum load the engineering stress falls as a parabola by `neck_drop`
    (a fraction of UTS) over `neck_strain` of engineering strain.
    """
    s_yield = flow(0.0)
    e_el = np.linspace(0.0, s_yield / e_mpa, elastic_pts, endpoint=False)
    s_el = e_mpa * e_el  # small strains: engineering = true here to 1e-4
    ep = np.linspace(0.0, 1.0, 20001)
    st = flow(ep)
    et = ep + st / e_mpa
    s_eng = st * np.exp(-et)
    iu = int(np.argmax(s_eng))
    eu, su = math.expm1(et[iu]), s_eng[iu]
    # plastic points evenly spaced in engineering strain up to maximum load
    e_pl = np.linspace(math.expm1(et[0]), eu, plastic_pts)
    s_pl = np.interp(e_pl, np.expm1(et[: iu + 1]), s_eng[: iu + 1])
    t = np.linspace(0.0, 1.0, neck_pts + 1)[1:]
    e_nk = eu + neck_strain * t
    s_nk = su * (1.0 - neck_drop * t**2)
    return np.concatenate([e_el, e_pl, e_nk]), np.concatenate([s_el, s_pl, s_nk])


def write(name, header_lines, columns, rows, fmts):
    path = HERE / name
    with path.open("w", newline="\n") as f:
        for line in header_lines:
            f.write(f"# {line}\n")
        f.write(",".join(columns) + "\n")
        for row in rows:
            f.write(",".join(fmt.format(v) for fmt, v in zip(fmts, row)) + "\n")


MARK = "GENERATED DEMO DATA (invented supplier and tests; not measurements)."


def copper(rng):
    # Swift K=330 MPa, e0=0.015, n=0.48; E=117 GPa; load-cell noise 0.35 MPa.
    flow = lambda e: 330.0 * (0.015 + e) ** 0.48
    e, s = curve(flow, 117_000.0, 40, 400, 60, 0.12, 0.35)
    s = s + rng.normal(0.0, 0.35, s.size)
    s[0] = 0.0
    write(
        "tensile-copper-rod.csv",
        [
            MARK,
            "Brennock Rod Works, 8.0 mm annealed ETP copper rod, heat C-2291, tested at 20 C.",
            "Made from Swift K=330 MPa, eps0=0.015, n=0.48, E=117 GPa, noise 0.35 MPa (make_tensile_demo.py).",
        ],
        ["Engineering strain", "Engineering stress (MPa)"],
        zip(e, np.maximum(s, 0.0)),
        ["{:.7f}", "{:.2f}"],
    )


def steel(rng):
    # Ludwik s0=250 MPa, K=480 MPa, n=0.5; E=205 GPa; 5.5 mm rod, 50 mm gauge,
    # force in kN with 15 N noise.
    flow = lambda e: 250.0 + 480.0 * np.power(e, 0.5)
    e, s = curve(flow, 205_000.0, 40, 350, 50, 0.10, 0.30)
    area = math.pi * 5.5**2 / 4.0
    force_kn = s * area / 1000.0 + rng.normal(0.0, 0.015, s.size)
    force_kn[0] = 0.0
    ext_mm = e * 50.0
    write(
        "tensile-steel-rod.csv",
        [
            MARK,
            "Brennock Rod Works, 5.5 mm low-carbon steel wire rod (annealed), coil S-0418, gauge length 50 mm.",
            "Made from Ludwik s0=250 MPa, K=480 MPa, n=0.5, E=205 GPa, noise 15 N (make_tensile_demo.py).",
        ],
        ["Time (s)", "Extension (mm)", "Force (kN)"],
        zip(np.arange(e.size) * 0.1, ext_mm, np.maximum(force_kn, 0.0)),
        ["{:.1f}", "{:.5f}", "{:.4f}"],
    )


def aluminium(rng):
    # Voce s0=30 MPa, ss=105 MPa, ec=0.15; E=69 GPa; strain in percent.
    flow = lambda e: 105.0 - 75.0 * np.exp(-np.asarray(e) / 0.15)
    e, s = curve(flow, 69_000.0, 40, 300, 50, 0.08, 0.30)
    s = s + rng.normal(0.0, 0.2, s.size)
    s[0] = 0.0
    write(
        "tensile-aluminium-rod.csv",
        [
            MARK,
            "Brennock Rod Works, 9.5 mm EC-grade aluminium rod (1350-O), lot A-77, strain in percent.",
            "Made from Voce s0=30 MPa, ss=105 MPa, ec=0.15, E=69 GPa, noise 0.2 MPa (make_tensile_demo.py).",
        ],
        ["Strain (%)", "Stress (MPa)"],
        zip(100.0 * e, np.maximum(s, 0.0)),
        ["{:.5f}", "{:.2f}"],
    )


def steel_lueders(rng):
    # Low-carbon steel with a yield drop, exported as a European machine does
    # (semicolons, decimal commas). Elastic E=205 GPa to an upper yield of
    # 345 MPa, a Lueders plateau at constant force to true plastic strain
    # 0.018 (serrations of +-1.5 MPa), then Hollomon K=720 MPa, n=0.21;
    # 6.5 mm rod, 50 mm gauge, force in kN with 20 N noise.
    e_mpa, k, n, lu = 205_000.0, 720.0, 0.21, 0.018
    area = math.pi * 6.5**2 / 4.0
    reh = 345.0
    rel = k * lu**n * math.exp(-lu)  # engineering stress of the plateau
    e_el = np.linspace(0.0, reh / e_mpa, 60)
    s_el = e_mpa * e_el
    # plateau: constant engineering stress with a sawtooth of serrations
    ep_pl = np.linspace(0.0005, lu, 120)
    saw = 1.5 * (2.0 * ((np.arange(ep_pl.size) / 7.0) % 1.0) - 1.0)
    s_pl = rel + saw
    e_pl = np.expm1(ep_pl + rel / e_mpa)
    # hardening: Hollomon from lu to the maximum load (at true plastic strain n)
    ep_h = np.linspace(lu, n, 300)[1:]
    st_h = k * ep_h**n
    et_h = ep_h + st_h / e_mpa
    e_h, s_h = np.expm1(et_h), st_h * np.exp(-et_h)
    t = np.linspace(0.0, 1.0, 41)[1:]
    e_nk = e_h[-1] + 0.08 * t
    s_nk = s_h[-1] * (1.0 - 0.3 * t**2)
    e = np.concatenate([e_el, e_pl, e_h, e_nk])
    s = np.concatenate([s_el, s_pl, s_h, s_nk])
    force_kn = s * area / 1000.0 + rng.normal(0.0, 0.020, s.size)
    force_kn[0] = 0.0
    path = HERE / "tensile-steel-lueders.csv"
    with path.open("w", newline="\n") as f:
        for line in [
            MARK,
            "Brennock Rod Works, 6.5 mm low-carbon steel rod (as rolled), coil S-0502, gauge length 50 mm; semicolons and decimal commas as exported.",
            "Made from an upper yield of 345 MPa, a Lueders plateau to plastic strain 0.018, Hollomon K=720 MPa, n=0.21, E=205 GPa, noise 20 N (make_tensile_demo.py).",
        ]:
            f.write(f"# {line}\n")
        f.write("Extension (mm);Force (kN)\n")
        for x, y in zip(e * 50.0, np.maximum(force_kn, 0.0)):
            f.write(f"{x:.5f};{y:.4f}\n".replace(".", ","))


def main():
    copper(np.random.default_rng(20240401))
    steel(np.random.default_rng(20240402))
    aluminium(np.random.default_rng(20240403))
    steel_lueders(np.random.default_rng(20240404))


if __name__ == "__main__":
    main()
