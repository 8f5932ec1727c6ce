#!/usr/bin/env python3
"""Derives the built-in Wilson, NRTL and UNIQUAC parameters of the pairs that have no
printed parameter set at hand, from each pair's azeotrope at 1 atm (CRC Handbook,
'Azeotropic Data for Binary Mixtures', typed from memory), by the classical two-point
method: at the azeotrope x = y, so gamma_i = P / Psat_i(T_az) (modified Raoult's law), and
the model's two energies are solved so that it gives both gamma_i at x_az, T_az. Psat is
the library's own correlation (data/components.json), so the model reproduces the azeotrope
with the library's vapour pressures exactly.

NRTL takes alpha = 0.3 (Renon and Prausnitz 1968 suggest 0.3 for most systems; common
practice). UNIQUAC takes the library's r and q (data/binary_pairs.json). Also prints each
pair's bubble-temperature range at 1 atm (the T_min_K, T_max_K of the entry).

Wilson is left out for ethanol-water: the set derived from the azeotrope misses the
dilute end of the handbook T-x-y table by 3.6 K (the NRTL set by 0.6 K), so the library
offers NRTL and UNIQUAC for that pair.

Usage: python3 tools/derive_pairs.py  (numpy 2.4.6, scipy 1.17.1, as bindings/python/requirements-ci.txt)
Rewrites the derived entries of data/binary_pairs.json and the 1-atm range of every entry.
"""
import json
import math
import pathlib
import sys

from scipy.optimize import brentq, fsolve

ROOT = pathlib.Path(__file__).resolve().parent.parent
LIB = {c["name"]: c for c in json.loads((ROOT / "data/components.json").read_text())["components"]}
PAIRS = json.loads((ROOT / "data/binary_pairs.json").read_text())
R_CAL = 8.314462618 / 4.184  # cal/(mol K)
P_ATM = 101325.0

# Molar volumes at 25 degC, cm3/mol: molar mass over the CRC density at 25 degC (from memory).
VOLUME = {
    "water": 18.07, "ethanol": 58.68, "2-propanol": 76.95, "acetone": 74.05, "chloroform": 80.72,
    "ethyl acetate": 98.56, "benzene": 89.41, "cyclohexane": 108.75,
}

# (component 1, component 2): (T_az degC, x1 at the azeotrope), CRC azeotrope table at
# 1 atm, mass % converted to mole fraction with the library's molar masses (from memory).
AZEOTROPES = {
    ("ethanol", "water"): (78.15, 0.894),
    ("2-propanol", "water"): (80.4, 0.675),
    ("acetone", "chloroform"): (64.5, 0.339),
    ("ethyl acetate", "ethanol"): (71.8, 0.540),
    ("ethanol", "benzene"): (67.9, 0.440),
    ("benzene", "cyclohexane"): (77.6, 0.568),
}


def psat(name, t):
    v = LIB[name]["vapour_pressure"]
    if v["form"] == "extended":
        return math.exp(v["A"] + v["B"] / t + v["C"] * math.log(t) + v["D"] * t ** v["E"])
    assert v["units"] == "log10-bar-K"
    return 1e5 * 10 ** (v["A"] - v["B"] / (t + v["C"]))


def wilson(x1, t, a12, a21, v1, v2):
    l12 = v2 / v1 * math.exp(-a12 / (R_CAL * t))
    l21 = v1 / v2 * math.exp(-a21 / (R_CAL * t))
    x2 = 1 - x1
    d = l12 / (x1 + x2 * l12) - l21 / (x2 + x1 * l21)
    return -math.log(x1 + x2 * l12) + x2 * d, -math.log(x2 + x1 * l21) - x1 * d


def nrtl(x1, t, b12, b21, alpha):
    t12, t21 = b12 / (R_CAL * t), b21 / (R_CAL * t)
    g12, g21 = math.exp(-alpha * t12), math.exp(-alpha * t21)
    x2 = 1 - x1
    l1 = x2**2 * (t21 * (g21 / (x1 + x2 * g21)) ** 2 + g12 * t12 / (x2 + x1 * g12) ** 2)
    l2 = x1**2 * (t12 * (g12 / (x2 + x1 * g12)) ** 2 + g21 * t21 / (x1 + x2 * g21) ** 2)
    return l1, l2


def uniquac(x1, t, u12, u21, r, q):
    x = [x1, 1 - x1]
    z = 10.0
    tau = [[1.0, math.exp(-u12 / (R_CAL * t))], [math.exp(-u21 / (R_CAL * t)), 1.0]]
    sr = sum(a * b for a, b in zip(x, r))
    sq = sum(a * b for a, b in zip(x, q))
    th = [q[i] * x[i] / sq for i in range(2)]
    li = [z / 2 * (r[i] - q[i]) - (r[i] - 1) for i in range(2)]
    sxl = sum(x[i] * li[i] for i in range(2))
    s = [sum(th[k] * tau[k][j] for k in range(2)) for j in range(2)]
    out = []
    for i in range(2):
        pox = r[i] / sr
        top = q[i] * sr / (r[i] * sq)
        comb = math.log(pox) + z / 2 * q[i] * math.log(top) + li[i] - pox * sxl
        res = q[i] * (1 - math.log(s[i]) - sum(th[j] * tau[i][j] / s[j] for j in range(2)))
        out.append(comb + res)
    return out


def solve(f, guesses):
    for g in guesses:
        p, _, ok, _ = fsolve(f, g, full_output=True)
        if ok == 1 and max(abs(v) for v in f(p)) < 1e-10:
            return [round(float(v), 2) for v in p]
    return None


def bubble_t(a, b, x1, lg):
    def f(t):
        g1, g2 = lg(x1, t)
        return x1 * math.exp(g1) * psat(a, t) + (1 - x1) * math.exp(g2) * psat(b, t) - P_ATM
    return brentq(f, 250, 450)


WILSON_LEFT_OUT = {("ethanol", "water")}


def one_atm_range(a, b, lg):
    ts = [bubble_t(a, b, k / 50, lg) for k in range(0, 51)]
    return round(min(ts), 1), round(max(ts), 1)


def energy_cal(v):
    return float(v.split()[0])


def main():
    sizes = PAIRS["uniquac_components"]
    out = []
    for entry in PAIRS["pairs"]:
        if entry["source"] == "derived-azeotrope":
            continue
        a, b = entry["components"]
        nr = entry["nrtl"]
        b12, b21, alpha = energy_cal(nr["b12"]), energy_cal(nr["b21"]), nr["alpha"]
        entry["T_min_K"], entry["T_max_K"] = one_atm_range(a, b, lambda x1, tt: nrtl(x1, tt, b12, b21, alpha))
        out.append(entry)
    for (a, b), (t_c, x) in AZEOTROPES.items():
        t = t_c + 273.15
        l1, l2 = math.log(P_ATM / psat(a, t)), math.log(P_ATM / psat(b, t))
        entry = {"components": [a, b]}
        w = solve(lambda p: [u - v for u, v in zip(wilson(x, t, p[0], p[1], VOLUME[a], VOLUME[b]), (l1, l2))],
                  [[300, 600], [0, 1000], [-500, 1500], [1000, 100]])
        n = solve(lambda p: [u - v for u, v in zip(nrtl(x, t, p[0], p[1], 0.3), (l1, l2))],
                  [[200, 500], [0, 1200], [-500, 300], [500, -200]])
        rq = ([sizes[a]["r"], sizes[b]["r"]], [sizes[a]["q"], sizes[b]["q"]])
        u = solve(lambda p: [u - v for u, v in zip(uniquac(x, t, p[0], p[1], *rq), (l1, l2))],
                  [[100, 100], [-100, 300], [300, -100], [0, 0]])
        if w and (a, b) not in WILSON_LEFT_OUT:
            entry["wilson"] = {"a12": f"{w[0]} cal/mol", "a21": f"{w[1]} cal/mol",
                               "V1_cm3_per_mol": VOLUME[a], "V2_cm3_per_mol": VOLUME[b]}
        if n:
            entry["nrtl"] = {"b12": f"{n[0]} cal/mol", "b21": f"{n[1]} cal/mol", "alpha": 0.3}
        if u:
            entry["uniquac"] = {"u12": f"{u[0]} cal/mol", "u21": f"{u[1]} cal/mol"}
        entry["T_min_K"], entry["T_max_K"] = one_atm_range(a, b, lambda x1, tt: nrtl(x1, tt, n[0], n[1], 0.3))
        entry["source"] = "derived-azeotrope"
        entry["from_memory"] = True
        entry["note"] = (f"derived by tools/derive_pairs.py from the azeotrope at 1 atm, {t_c} degC, "
                         f"x({a}) = {x} (CRC azeotrope table, from memory)")
        out.append(entry)
    PAIRS["pairs"] = out
    (ROOT / "data/binary_pairs.json").write_text(json.dumps(PAIRS, indent=2, ensure_ascii=False) + "\n")
    print(f"{len(out)} pairs written", file=sys.stderr)


if __name__ == "__main__":
    main()
