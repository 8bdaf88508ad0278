#!/usr/bin/python3
"""Reference values for physics/constants_test.go.

Run with Debian's python3-astropy (apt install python3-astropy):
    /usr/bin/python3 testdata/constants/gen_constants.py > testdata/constants/astropy_constants.json
The output is committed beside this script; the test reads it.
"""
import json

import astropy
import astropy.constants as c
import astropy.units as u

out = {
    "astropy_version": astropy.__version__,
    "codata": c.codata.__name__ if hasattr(c, "codata") else "",
    "speed_of_light_cm_s": c.c.cgs.value,
    "planck_erg_s": c.h.cgs.value,
    "boltzmann_erg_K": c.k_B.cgs.value,
    "atomic_mass_g": c.u.cgs.value,
    "electron_volt_erg": (1 * u.eV).to(u.erg).value,
    "elementary_charge_esu": c.e.esu.value,
    "electron_mass_g": c.m_e.cgs.value,
    "stefan_boltzmann_cgs": c.sigma_sb.cgs.value,
    "solar_mass_g": c.M_sun.cgs.value,
    "parsec_cm": c.pc.cgs.value,
    "megaparsec_cm": (1 * u.Mpc).to(u.cm).value,
    "day_s": (1 * u.day).to(u.s).value,
    "angstrom_cm": (1 * u.AA).to(u.cm).value,
    "micron_cm": (1 * u.um).to(u.cm).value,
    "nanometre_cm": (1 * u.nm).to(u.cm).value,
    "jansky_cgs": (1 * u.Jy).to(u.erg / u.s / u.cm**2 / u.Hz).value,
}
print(json.dumps(out, indent=1, sort_keys=True))
