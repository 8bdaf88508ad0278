#!/usr/bin/python3
"""Write the small FITS test files for package spectra with astropy.io.fits
(Debian's python3-astropy 5.2.1), and the reference arrays they hold.

Run with Debian's interpreter from this directory:
    /usr/bin/python3 gen_fits.py
The data are invented (no real object). For every file, fits_reference.json
holds what astropy reads back: the wavelength of every pixel from
astropy.wcs (world coordinates in the file's own medium, in metres as astropy.wcs
normalises them; "ref_wave_unit" says which unit each file's reference uses) or the
table column, the scaled flux and uncertainty, and a few header values.
"""
import json

import numpy as np
from astropy.io import fits
from astropy.wcs import WCS

rng = np.random.default_rng(20261202)
ref = {"generator": "astropy " + __import__("astropy").__version__, "files": {}}


def common(h):
    h["OBJECT"] = "INVENTED-1"
    h["DATE-OBS"] = "2031-04-05T06:07:08"
    h["EXPTIME"] = (1200.0, "s")
    h["AIRMASS"] = 1.234


def world(hdr, n, npix_axis=1):
    w = WCS(hdr)
    return w.wcs_pix2world(np.arange(n, dtype=float), 0)[0]


def add(name, hdul, wave, flux, unc=None, extra=None):
    hdul.writeto(name, overwrite=True, output_verify="exception")
    rec = {"wavelength": [float(x) for x in wave], "flux": [float(x) for x in flux]}
    if unc is not None:
        rec["uncertainty"] = [float(x) for x in unc]
    if extra:
        rec.update(extra)
    # Read back with astropy to make sure the reference is what the file holds.
    with fits.open(name) as f:
        rec["n_hdu"] = len(f)
    ref["files"][name] = rec


# 1. Primary HDU, float32, linear WCS with CDELT1, vacuum Å.
n = 64
flux = (1e-16 * (1 + 0.3 * np.sin(np.arange(n) / 5.0))).astype(">f4")
h = fits.PrimaryHDU(flux)
common(h.header)
h.header["CTYPE1"] = "WAVE"
h.header["CUNIT1"] = "Angstrom"
h.header["CRVAL1"] = 4000.0
h.header["CDELT1"] = 2.5
h.header["CRPIX1"] = 11.0
h.header["BUNIT"] = "erg/s/cm2/Angstrom"
add("image_linear_f32.fits", fits.HDUList([h]), world(h.header, n), flux.astype(float),
    extra={"medium": "vacuum", "unit": "Angstrom", "ref_wave_unit": "m", "object": "INVENTED-1", "exptime": 1200.0,
           "airmass": 1.234, "date": "2031-04-05T06:07:08"})

# 2. Primary HDU, float64, air wavelengths in nm, CD1_1, log-linear WCS (AWAV-LOG).
n = 50
flux = 1.0 + 0.01 * np.arange(n, dtype=">f8")
h = fits.PrimaryHDU(flux)
common(h.header)
h.header["CTYPE1"] = "AWAV-LOG"
h.header["CUNIT1"] = "nm"
h.header["CRVAL1"] = 650.0
h.header["CD1_1"] = 0.2
h.header["CRPIX1"] = 1.0
add("image_loglin_f64_air.fits", fits.HDUList([h]), world(h.header, n), flux,
    extra={"medium": "air", "unit": "nm", "ref_wave_unit": "m"})

# 3. Image extension, int16 with BSCALE/BZERO, µm, plus an uncertainty extension.
n = 40
phys = 2.0 + np.linspace(-1, 1, n) ** 2
h0 = fits.PrimaryHDU()
common(h0.header)
h1 = fits.ImageHDU(phys.copy(), name="FLUX")
h1.scale("int16", bscale=1e-4, bzero=3.0)
h1.header["CTYPE1"] = "WAVE"
h1.header["CUNIT1"] = "um"
h1.header["CRVAL1"] = 1.0
h1.header["CDELT1"] = 0.005
h1.header["CRPIX1"] = 1.0
h1.header["BUNIT"] = "mJy"
err = (0.05 + 0.01 * np.arange(n)).astype(">f4")
h2 = fits.ImageHDU(err, name="ERR")
hl = fits.HDUList([h0, h1, h2])
hl.writeto("image_int16_scaled.fits", overwrite=True, output_verify="exception")
with fits.open("image_int16_scaled.fits") as f:
    stored = f[1].data.astype(float)  # astropy applies BSCALE/BZERO
    wave = world(f[1].header, n)
    raw = fits.getdata("image_int16_scaled.fits", 1, do_not_scale_image_data=True)
ref["files"]["image_int16_scaled.fits"] = {
    "wavelength": [float(x) for x in wave], "flux": [float(x) for x in stored],
    "uncertainty": [float(x) for x in err.astype(float)], "medium": "vacuum", "unit": "um",
    "ref_wave_unit": "m",
    "raw_dtype": str(raw.dtype), "n_hdu": 3}

# 4. The older log10-linear dispersion convention (DC-FLAG = 1): λ = 10^(CRVAL1 + CDELT1 (p − CRPIX1)).
n = 30
flux = np.linspace(5, 6, n).astype(">f4")
h = fits.PrimaryHDU(flux)
h.header["CRVAL1"] = np.log10(5000.0)
h.header["CDELT1"] = 1e-4
h.header["CRPIX1"] = 1.0
h.header["DC-FLAG"] = 1
wave = 10 ** (np.log10(5000.0) + 1e-4 * np.arange(n))
add("image_log10_dcflag.fits", fits.HDUList([h]), wave, flux.astype(float),
    extra={"medium": "vacuum", "unit": "Angstrom", "ref_wave_unit": "Angstrom"})

# 5. Binary table, one row per sample: WAVE (f8, Angstrom), FLUX (f4), ERR (f8), QUAL (i2).
n = 25
wave = np.linspace(8000, 8240, n)
flux = (3e-17 * (1 - 0.5 * np.exp(-0.5 * ((wave - 8120) / 20) ** 2))).astype(np.float32)
unc = np.full(n, 1e-18)
qual = np.zeros(n, dtype=np.int16)
qual[[3, 17]] = 1
cols = fits.ColDefs([
    fits.Column(name="WAVE", format="D", unit="Angstrom", array=wave),
    fits.Column(name="FLUX", format="E", unit="erg/s/cm2/Angstrom", array=flux),
    fits.Column(name="ERR", format="D", unit="erg/s/cm2/Angstrom", array=unc),
    fits.Column(name="QUAL", format="I", array=qual),
])
t = fits.BinTableHDU.from_columns(cols, name="SPECTRUM")
common(t.header)
add("table_rows.fits", fits.HDUList([fits.PrimaryHDU(), t]), wave, flux.astype(float), unc,
    extra={"medium": "vacuum", "unit": "Angstrom", "ref_wave_unit": "Angstrom", "bad": [3, 17]})

# 6. Binary table, integer columns with TSCAL/TZERO, wavelength in µm named LAMBDA,
#    flux as unsigned 16-bit (TZERO = 32768), uncertainty named SIGMA (int32 scaled).
n = 20
lam_raw = np.arange(n, dtype=np.int32) * 10 + 12000          # stored
lam = lam_raw * 1e-4 + 0.0                                    # µm: TSCAL=1e-4
flux_u16 = (np.arange(n, dtype=np.uint16) * 1000 + 30000)
sig_raw = np.arange(n, dtype=np.int32) + 100
# The stored integers are written raw and TSCALn/TZEROn set afterwards, so
# that astropy applies them when reading the reference values back.
cols = fits.ColDefs([
    fits.Column(name="LAMBDA", format="J", unit="um", array=lam_raw),
    fits.Column(name="FLUX", format="I", array=(flux_u16.astype(np.int32) - 32768).astype(np.int16)),
    fits.Column(name="SIGMA", format="J", array=sig_raw),
])
t = fits.BinTableHDU.from_columns(cols)
t.header["TSCAL1"] = 1e-4
t.header["TZERO1"] = 0.0
t.header["TZERO2"] = 32768
t.header["TSCAL3"] = 0.5
t.header["TZERO3"] = -10.0
t.writeto("table_int_scaled.fits", overwrite=True, output_verify="exception")
with fits.open("table_int_scaled.fits") as f:
    d = f[1].data
    ref["files"]["table_int_scaled.fits"] = {
        "wavelength": [float(x) for x in d["LAMBDA"]], "flux": [float(x) for x in d["FLUX"]],
        "uncertainty": [float(x) for x in d["SIGMA"]], "medium": "vacuum", "unit": "um",
        "ref_wave_unit": "um",
        "n_hdu": 2}

# 7. Binary table, a single row holding whole arrays (vector columns), with air
#    wavelengths flagged by the column name AWAV.
n = 32
wave = np.linspace(6000, 6310, n)
flux = np.linspace(1, 2, n)
t = fits.BinTableHDU.from_columns([
    fits.Column(name="AWAV", format=f"{n}D", unit="Angstrom", array=wave[None, :]),
    fits.Column(name="FLUX", format=f"{n}E", array=flux[None, :].astype(np.float32)),
])
add("table_vector_air.fits", fits.HDUList([fits.PrimaryHDU(), t]), wave,
    flux.astype(np.float32).astype(float), extra={"medium": "air", "unit": "Angstrom", "ref_wave_unit": "Angstrom"})

# 8. Primary int16 image with BLANK pixels and BSCALE/BZERO, descending wavelengths
#    (negative CDELT1). astropy returns NaN for BLANK pixels when it scales.
n = 30
stored = (np.arange(n, dtype=np.int16) * 100 - 1000).astype(">i2")
blank_idx = [4, 11]
stored[blank_idx] = -32768
h = fits.PrimaryHDU(stored)
h.header["BSCALE"] = 0.01
h.header["BZERO"] = 50.0
h.header["BLANK"] = -32768
h.header["CTYPE1"] = "WAVE"
h.header["CUNIT1"] = "Angstrom"
h.header["CRVAL1"] = 9000.0
h.header["CDELT1"] = -4.0
h.header["CRPIX1"] = 1.0
h.writeto("image_int16_blank.fits", overwrite=True, output_verify="exception")
with fits.open("image_int16_blank.fits") as f:
    d = f[0].data.astype(float)
    wave = world(f[0].header, n)
ref["files"]["image_int16_blank.fits"] = {
    # Stored in file order (descending); BLANK pixels carry 0 here (JSON has no NaN).
    "wavelength": [float(x) for x in wave], "flux": [0.0 if np.isnan(x) else float(x) for x in d],
    "medium": "vacuum", "unit": "Angstrom", "ref_wave_unit": "m", "null_file_order": blank_idx,
    "nan_in_astropy": [int(i) for i in np.where(np.isnan(d))[0]], "n_hdu": 1}

# 9. Binary table with a 32-bit integer flux column with TNULL, and 64-bit wavelengths.
n = 12
wave_k = np.arange(n, dtype=np.int64) * 5 + 20000      # Å, K format
flux_j = np.arange(n, dtype=np.int32) * 7 + 100
null_idx = [0, 6]
flux_j[null_idx] = -999
t = fits.BinTableHDU.from_columns([
    fits.Column(name="WAVELENGTH", format="K", unit="Angstrom", array=wave_k),
    fits.Column(name="FLUX", format="J", null=-999, array=flux_j),
])
add("table_tnull.fits", fits.HDUList([fits.PrimaryHDU(), t]), wave_k.astype(float),
    [0.0 if i in null_idx else float(v) for i, v in enumerate(flux_j)],
    extra={"medium": "vacuum", "unit": "Angstrom", "ref_wave_unit": "Angstrom", "null": null_idx})

with open("fits_reference.json", "w") as f:
    json.dump(ref, f, indent=1)
print("wrote", len(ref["files"]), "files")
