#!/usr/bin/python3
"""Independent LTE plasma states for opacity/plasma_test.go.

Run with Debian's python3 (python3-astropy, python3-scipy):
    /usr/bin/python3 testdata/opacity/gen_plasma.py > testdata/opacity/plasma_ref.json

The Saha equation n_{j+1} n_e / n_j = 2 (U_{j+1}/U_j) (2 pi m_e k T / h^2)^{3/2}
exp(-chi_j / kT) is evaluated here in linear space with the constants of
astropy (CODATA 2018), and charge neutrality is solved for n_e with
scipy.optimize.brentq: a different language, root finder and arrangement of
the arithmetic from the Go code, which works in log space with Brent's method
of its own.

Ionisation energies: NIST ASD as quoted in REFERENCES.md for the first three
stages; the fourth is the value in linelists/element.go (the Go test checks
that the table agrees with every number here). Atomic weights: IUPAC
abridged standard atomic weights (as in linelists/element.go). Partition
functions are fixed numbers chosen for the test (passed to the Go solver by a
PartitionFunc), so the check does not depend on any level data.
"""
import json
import math

import astropy.constants as c
import astropy.units as u
from scipy.optimize import brentq

ME = c.m_e.cgs.value
K = c.k_B.cgs.value
H = c.h.cgs.value
AMU = c.u.cgs.value
EV = (1 * u.eV).to(u.erg).value

ELEMENTS = {
    # Z: (symbol, weight, ionisation energies eV, partition functions I..)
    1: ("H", 1.008, [13.598434599702], [2.0, 1.0]),
    2: ("He", 4.002602, [24.587389011, 54.4177655282], [1.0, 2.0, 1.0]),
    20: ("Ca", 40.078, [6.1131549210, 11.871719, 50.91316, 67.2732], [1.2, 2.2, 1.0, 4.0, 5.0]),
    26: ("Fe", 55.845, [7.9024681, 16.19921, 30.651, 54.91], [27.0, 42.0, 25.0, 6.0, 1.0]),
    38: ("Sr", 87.62, [5.69486745, 11.0302765, 42.88353, 56.280], [1.3, 2.15, 1.0, 4.0, 5.0]),
    60: ("Nd", 144.242, [5.52475, 10.783, 22.09, 40.60], [150.0, 120.0, 40.0, 10.0, 9.0]),
}

CASES = [
    ({20: 0.4, 38: 0.3, 60: 0.3}, 5000.0, 1e-13),
    ({20: 0.4, 38: 0.3, 60: 0.3}, 10000.0, 1e-13),
    ({20: 0.4, 38: 0.3, 60: 0.3}, 3000.0, 1e-10),
    ({20: 0.4, 38: 0.3, 60: 0.3}, 20000.0, 1e-14),
    ({1: 0.7, 2: 0.3}, 20000.0, 1e-9),
    ({26: 1.0}, 7000.0, 1e-12),
]


def stage_fractions(z, T, ne):
    sym, A, chi, U = ELEMENTS[z]
    nst = min(len(chi), z) + 1
    s = 2 * (2 * math.pi * ME * K * T / H**2) ** 1.5
    pops = [1.0]
    for j in range(nst - 1):
        phi = s * U[j + 1] / U[j] * math.exp(-chi[j] * EV / (K * T))
        pops.append(pops[-1] * phi / ne)
    tot = sum(pops)
    return [p / tot for p in pops]


def solve(comp, T, rho):
    N = {z: rho * x / (ELEMENTS[z][1] * AMU) for z, x in comp.items()}

    def g(lne):
        ne = math.exp(lne)
        q = 0.0
        for z, n in N.items():
            f = stage_fractions(z, T, ne)
            q += n * sum(j * fj for j, fj in enumerate(f))
        return ne - q

    nmax = sum(n * min(len(ELEMENTS[z][2]), z) for z, n in N.items())
    lne = brentq(g, -50.0, math.log(nmax) + 1e-12, xtol=1e-15, rtol=1e-15, maxiter=500)
    ne = math.exp(lne)
    out = []
    for z, n in sorted(N.items()):
        f = stage_fractions(z, T, ne)
        out.append({"z": z, "number_density": n, "ion": [n * fj for fj in f]})
    return ne, out


cases = []
for comp, T, rho in CASES:
    ne, els = solve(comp, T, rho)
    cases.append({
        "mass_fractions": {str(z): x for z, x in comp.items()},
        "temperature": T,
        "density": rho,
        "electron_density": ne,
        "elements": els,
    })

print(json.dumps({
    "generator": "testdata/opacity/gen_plasma.py (astropy constants, scipy brentq)",
    "elements": {str(z): {"symbol": v[0], "weight": v[1], "ionization": v[2], "partition": v[3]}
                 for z, v in ELEMENTS.items()},
    "cases": cases,
}, indent=1))
