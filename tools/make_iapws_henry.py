#!/usr/bin/env python3
"""Generate the Henry's-constant reference fixture from the IAPWS guideline on Henry's
constants of gases in water (IAPWS G7-04), as implemented by the iapws PyPI package.

Run from the repository root, inside the pinned environment (tools/requirements.txt):

    python3 tools/make_iapws_henry.py

Writes tests/fixtures/iapws_henry.csv: for each gas the guideline covers in H2O, ten
temperatures evenly spaced over the package's validity range (it warns outside it), and
Henry's constant in MPa. Deterministic: fixed grids, floats written with repr().
"""

import os
import sys
import warnings

import iapws
from iapws._iapws import _Henry

PINNED_IAPWS = "1.5.5"
GASES = ["He", "Ne", "Ar", "Kr", "Xe", "H2", "N2", "O2", "CO", "CO2", "H2S", "CH4", "C2H6", "SF6"]

REPO = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def warns(t, gas):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        _Henry(t, gas)
        return bool(caught)


def validity(gas):
    """The package's validity range, to 0.01 K, found from where it starts to warn."""
    lo, hi = 200.0, 700.0
    ends = []
    for inside, outside in ((400.0, lo), (400.0, hi)):
        a, b = inside, outside
        while abs(a - b) > 0.001:
            m = 0.5 * (a + b)
            if warns(m, gas):
                b = m
            else:
                a = m
        ends.append(round(a, 2))
    return ends


def main():
    if iapws.__version__ != PINNED_IAPWS:
        sys.exit("iapws %s expected, %s found" % (PINNED_IAPWS, iapws.__version__))
    lines = [
        "# source: IAPWS G7-04, Guideline on the Henry's Constant and Vapor-Liquid Distribution "
        "Constant for Gases in H2O and D2O at High Temperatures (2004)",
        "# computed with the iapws PyPI package, version %s, iapws._iapws._Henry (H2O solvent)" % iapws.__version__,
        "# made by tools/make_iapws_henry.py; T_min_K and T_max_K are where the package stops warning",
        "gas,T_K,H_MPa,T_min_K,T_max_K",
    ]
    for gas in GASES:
        lo, hi = validity(gas)
        for i in range(10):
            t = round(lo + (hi - lo) * i / 9, 2)
            t = min(max(t, lo), hi)
            lines.append("%s,%r,%r,%r,%r" % (gas, t, float(_Henry(t, gas)), lo, hi))
    with open(os.path.join(REPO, "tests", "fixtures", "iapws_henry.csv"), "w", newline="\n") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
