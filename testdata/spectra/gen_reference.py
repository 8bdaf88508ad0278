#!/usr/bin/python3
"""Reference values for package spectra from general-purpose libraries.

Run from this directory with Debian's interpreter:
    /usr/bin/python3 gen_reference.py
Libraries (Debian packages): python3-astropy 5.2.1, python3-specutils 1.9.1,
python3-extinction 0.4.6, python3-scipy, python3-numpy. Writes
reference_values.json and blackbody_noisy.csv (an invented spectrum).
"""
import json

import numpy as np
import astropy
import astropy.units as u
import extinction
import scipy
import specutils
from astropy.modeling.models import BlackBody
from scipy.optimize import curve_fit
from specutils.utils.wcs_utils import air_to_vac, vac_to_air

out = {"versions": {"astropy": astropy.__version__, "specutils": specutils.__version__,
                    "extinction": extinction.__version__, "scipy": scipy.__version__,
                    "numpy": np.__version__}}

# Air <-> vacuum, Morton (2000) eq. 8, by specutils.
vac = np.array([2000.5, 3000.0, 4000.0, 4862.721, 5000.0, 6564.614, 8544.44, 10000.0,
                12821.59, 15000.0, 20000.0, 25000.0])
air = vac_to_air(vac * u.AA, method="Morton2000").to_value(u.AA)
air_in = np.array([2500.0, 4861.363, 6562.801, 8542.09, 10830.0, 12818.08, 21655.0])
vac_out = air_to_vac(air_in * u.AA, scheme="iteration", method="Morton2000").to_value(u.AA)
out["vac_to_air"] = {"vacuum_A": vac.tolist(), "air_A": air.tolist()}
out["air_to_vac"] = {"air_A": air_in.tolist(), "vacuum_A": vac_out.tolist()}

# Extinction A_lambda in magnitudes for A_V = R_V * E(B-V), E(B-V) = 1.
wave = np.array([1050.0, 1150.0, 1250.0, 1500.0, 1800.0, 2175.0, 2500.0, 2700.0,
                 3000.0, 3500.0, 4000.0, 4400.0, 5000.0, 5500.0, 6000.0, 7000.0, 8000.0,
                 9000.0, 10000.0, 12500.0, 16500.0, 22000.0, 30000.0])
ext = []
for rv in (2.5, 3.1, 5.0):
    ext.append({"r_v": rv, "ebv": 1.0,
                "ccm89": extinction.ccm89(wave, rv * 1.0, rv).tolist(),
                "f99": extinction.fitzpatrick99(wave, rv * 1.0, rv).tolist()})
out["extinction"] = {"wavelength_A": wave.tolist(), "cases": ext}

# Planck B_lambda from astropy.modeling.models.BlackBody, in
# erg s^-1 cm^-2 A^-1 sr^-1 (scale 1).
bw = np.array([1000.0, 3000.0, 5000.0, 8000.0, 10000.0, 20000.0, 50000.0, 2e5])
bb = []
for T in (2000.0, 5000.0, 10000.0, 40000.0):
    m = BlackBody(temperature=T * u.K, scale=1.0 * u.erg / (u.s * u.cm**2 * u.AA * u.sr))
    bb.append({"T": T, "B_lambda": m(bw * u.AA).to_value(u.erg / (u.s * u.cm**2 * u.AA * u.sr)).tolist()})
out["planck"] = {"wavelength_A": bw.tolist(), "cases": bb}

# A noisy blackbody (invented): T = 4500 K, R = 5e14 cm at D = 40 Mpc,
# F_lambda = pi B_lambda (R/D)^2, 5 % noise with known sigma; then fitted by
# scipy.optimize.curve_fit with absolute sigma as an independent fit.
rng = np.random.default_rng(4242)
T0, R0, D0 = 4500.0, 5e14, 40 * 3.0856775814913673e24
w = np.linspace(4000.0, 24000.0, 400)
bl = BlackBody(temperature=T0 * u.K, scale=1.0 * u.erg / (u.s * u.cm**2 * u.AA * u.sr))
f_true = np.pi * bl(w * u.AA).to_value(u.erg / (u.s * u.cm**2 * u.AA * u.sr)) * (R0 / D0) ** 2
sigma = 0.05 * f_true.max() * np.ones_like(w)
f_obs = f_true + rng.normal(0.0, sigma)
np.savetxt("blackbody_noisy.csv", np.column_stack([w, f_obs, sigma]), delimiter=",",
           header="# invented spectrum: noisy blackbody T=4500 K, written by gen_reference.py\n"
                  "# flux_unit = erg/s/cm2/A\nwavelength_A,flux,uncertainty", comments="",
           fmt="%.10g")


def model(w, T, s):
    b = BlackBody(temperature=T * u.K, scale=1.0 * u.erg / (u.s * u.cm**2 * u.AA * u.sr))
    return np.pi * b(w * u.AA).to_value(u.erg / (u.s * u.cm**2 * u.AA * u.sr)) * s * 1e-20


data = np.loadtxt("blackbody_noisy.csv", delimiter=",", comments="#", skiprows=3)
popt, pcov = curve_fit(model, data[:, 0], data[:, 1], p0=[5000.0, 1.0], sigma=data[:, 2],
                       absolute_sigma=True)
out["blackbody_fit"] = {"true_T": T0, "true_scale": (R0 / D0) ** 2,
                        "scipy_T": popt[0], "scipy_T_sigma": float(np.sqrt(pcov[0, 0])),
                        "scipy_scale": popt[1] * 1e-20,
                        "scipy_scale_sigma": float(np.sqrt(pcov[1, 1])) * 1e-20,
                        "chi2": float(np.sum(((data[:, 1] - model(data[:, 0], *popt)) / data[:, 2]) ** 2)),
                        "n": int(len(w))}

with open("reference_values.json", "w") as f:
    json.dump(out, f, indent=1)
print(json.dumps(out["blackbody_fit"], indent=1))
