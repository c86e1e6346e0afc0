"""coldpass and SciPy side by side on the same 25-pass schedule.

The schedule of benches/schedule.rs (`core-25/*`): 8 mm down by 10 % in
diameter a pass (19 % area), an anneal after pass 13, die semi-angle 6 deg,
mu 0.05, efficiency 0.65, no back tension (bench data only). For each pass
the SciPy side computes, from the published formulas (docs/physics.md):

- the mean flow stress (closed form of the law's integral);
- ideal work and the efficiency method;
- Sachs, integrated through the die with the law (Dieter ch. 19):
  sigma_b e^(-B eps) + (1+B) int_0^eps sigma_f(eps_a+t) e^(-B(eps-t)) dt,
  by scipy.integrate.quad;
- Siebel, redundant work (Hosford & Caddell, C = 0.21) and Avitzur's upper
  bound with m = min(1, mu);
- and, for the optimum cases, the semi-angle in [1, 20] deg minimising the
  method by scipy.optimize.minimize_scalar (bounded, xatol 1e-4 deg, the
  tolerance coldpass uses).

coldpass is timed by its example `core_25_passes` (release build, the same
passes, best of several batches); SciPy by timeit (best of several rounds).
Both run in this one process tree, one after the other, so the ratio holds
on the machine it is measured on. Run from the repository root:

    .venv/bin/python benches/scipy_side_by_side.py
"""

import json
import math
import os
import subprocess
import sys
import timeit

from scipy.integrate import quad
from scipy.optimize import minimize_scalar

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
MU, DEG, ETA, C = 0.05, 6.0, 0.65, 0.21
M = min(1.0, MU)


def voce(e):
    return 470.0 - (470.0 - 80.0) * math.exp(-e / 0.8)


def voce_integral(e1, e2):
    return 470.0 * (e2 - e1) - 390.0 * 0.8 * (math.exp(-e1 / 0.8) - math.exp(-e2 / 0.8))


def hollomon(e):
    return 530.0 * max(e, 0.0) ** 0.44


def hollomon_integral(e1, e2):
    return 530.0 * (e2 ** 1.44 - e1 ** 1.44) / 1.44


LAWS = {"voce": (voce, voce_integral), "hollomon": (hollomon, hollomon_integral)}


def passes():
    out, d, strain = [], 8.0, 0.0
    for i in range(25):
        exit_d = d * 0.9
        out.append((d, exit_d, strain))
        strain += 2.0 * math.log(d / exit_d)
        d = exit_d
        if i == 12:
            strain = 0.0
    return out


def avitzur_f(a):
    s, c = math.sin(a), math.cos(a)
    k = 11.0 / 12.0
    root = math.sqrt(1.0 - k * s * s)
    return (1.0 - c * root + math.log((1.0 + math.sqrt(k)) / (math.sqrt(k) * c + root)) / math.sqrt(132.0)) / (s * s)


class Pass:
    def __init__(self, law, d0, d1, ea):
        self.f, integral = LAWS[law]
        self.ea = ea
        self.eps = 2.0 * math.log(d0 / d1)
        self.r = 1.0 - (d1 / d0) ** 2
        self.mean = integral(ea, ea + self.eps) / self.eps

    def sachs(self, a):
        b = MU / math.tan(a)
        e, ea, f = self.eps, self.ea, self.f
        w = quad(lambda t: f(ea + t) * math.exp(-b * (e - t)), 0.0, e, epsabs=0.0, epsrel=1e-11)[0]
        return (1.0 + b) * w

    def siebel(self, a):
        return self.mean * ((1.0 + MU / a) * self.eps + 2.0 / 3.0 * a)

    def redundant(self, a, sachs=None):
        d = a / self.r * (1.0 + math.sqrt(1.0 - self.r)) ** 2
        phi = 1.0 + C * (d - 1.0) if d > 1.0 else 1.0
        return (self.sachs(a) if sachs is None else sachs) + (phi - 1.0) * self.mean * self.eps

    def upper_bound(self, a):
        s, c = math.sin(a), math.cos(a)
        k = 2.0 / math.sqrt(3.0)
        half = 0.5 * self.eps
        return self.mean * (2.0 * avitzur_f(a) * half + k * (a / (s * s) - c / s) + k * M * c / s * half)

    def max(self, a):
        s = self.sachs(a)
        return max(s, self.siebel(a), self.redundant(a, s), self.upper_bound(a))

    def every_method(self, a):
        s = self.sachs(a)
        return (self.mean * self.eps, self.mean * self.eps / ETA, s, self.siebel(a),
                self.redundant(a, s), self.upper_bound(a))

    def optimum(self, method):
        f = getattr(self, method)
        res = minimize_scalar(lambda deg: f(math.radians(deg)), bounds=(1.0, 20.0),
                              method="bounded", options={"xatol": 1e-4})
        return res.x


def schedule(law, optimum):
    a = math.radians(DEG)
    total = 0.0
    for d0, d1, ea in passes():
        p = Pass(law, d0, d1, ea)
        total += p.every_method(a)[2]
        if optimum:
            total += p.optimum(optimum)
    return total


CASES = [
    ("fixed-angle/voce", "voce", None),
    ("optimum-upper-bound/voce", "voce", "upper_bound"),
    ("optimum-max/voce", "voce", "max"),
    ("fixed-angle/hollomon", "hollomon", None),
    ("optimum-max/hollomon", "hollomon", "max"),
]


def scipy_times(rounds=5):
    out = {}
    for name, law, optimum in CASES:
        timer = timeit.Timer(lambda: schedule(law, optimum))
        number, _ = timer.autorange()
        best = min(timer.repeat(repeat=rounds, number=number)) / number
        out[name] = best * 1e6
    return out


def coldpass_times():
    cmd = ["cargo", "run", "--quiet", "--release", "--example", "core_25_passes", "--", "20"]
    text = subprocess.run(cmd, cwd=ROOT, check=True, capture_output=True, text=True).stdout
    return json.loads(text)


def main():
    ours = coldpass_times()
    theirs = scipy_times()
    print(f"{'case (25 passes, every method)':34} {'coldpass us':>12} {'SciPy us':>12} {'SciPy/coldpass':>15}")
    for name, _, _ in CASES:
        print(f"{name:34} {ours[name]:12.2f} {theirs[name]:12.1f} {theirs[name] / ours[name]:15.0f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
