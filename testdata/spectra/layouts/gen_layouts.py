#!/usr/bin/python3
"""Write the spectrum-layout fixtures of package spectra (issue 15) with
astropy (Debian's python3-astropy 5.2.1, python3-numpy), and what a correct
reader must get from each: expected.json.

Run from this directory with Debian's interpreter:
    /usr/bin/python3 gen_layouts.py

Every flux is invented (sines and ramps of no object). The expected values
are computed here, independently of the Go readers: wavelengths from the
arrays written (or astropy.wcs for WCS images), units converted with
astropy.units (so the Go unit grammar is checked against astropy's), inverse
variances and variances turned into sigma with numpy. Each case of
expected.json names a file, the read options (the JSON names of the Go test's
options struct), and either the expected arrays or the expected error cause.
Wavelengths are in Angstrom in the file's medium ("medium"); fluxes in the
canonical unit named by "flux_unit"; "flagged" lists the samples (in
ascending wavelength order) the file flags, "invalid" those that must be
flagged invalid (missing or non-finite values).
"""
import bz2
import gzip
import json

import numpy as np
from astropy import units as u
from astropy.io import fits
from astropy.table import MaskedColumn, Table
from astropy.wcs import WCS

FLAM = u.erg / u.s / u.cm**2 / u.AA
cases = []


def fl(a):
    return [float(x) for x in np.asarray(a, dtype=float)]


def case(file, opts=None, **kw):
    c = {"file": file, "options": opts or {}}
    c.update(kw)
    cases.append(c)


def factor(unit, to):
    """The factor astropy gives from unit to the canonical unit."""
    return float((1 * u.Unit(unit)).to(to).value)


n = 24
x = np.arange(n)
wave = np.linspace(5000.0, 5230.0, n)
base = 1.0 + 0.2 * np.sin(x / 3.0)

# 1. A table with raw (count-rate) and calibrated flux columns; the raw ones
#    come first. The calibrated flux is in a scaled unit.
funit = "1e-17 erg / (Angstrom cm2 s)"
t = fits.BinTableHDU.from_columns([
    fits.Column(name="WAVELENGTH", format="D", unit="Angstrom", array=wave),
    fits.Column(name="FLUX_REDUCED", format="E", unit="electron/s", array=(300 * base).astype(np.float32)),
    fits.Column(name="ERROR_REDUCED", format="E", unit="electron/s", array=np.full(n, 9.0, np.float32)),
    fits.Column(name="FLUX", format="E", unit=funit, array=(5 * base).astype(np.float32)),
    fits.Column(name="ERROR", format="E", unit=funit, array=np.full(n, 0.25, np.float32)),
], name="SPECTRUM")
fits.HDUList([fits.PrimaryHDU(), t]).writeto("table_raw_and_calibrated.fits", overwrite=True)
k = factor(funit, FLAM)
case("table_raw_and_calibrated.fits", wave_A=fl(wave), medium="vacuum", flux_unit="erg/s/cm2/A",
     flux=fl((5 * base).astype(np.float32) * k), unc=fl(np.full(n, 0.25, np.float32) * k), flux_scale=k,
     report={"flux": 'column "FLUX"', "uncertainty": 'column "ERROR"'})

# 2. log10 wavelengths, inverse variance, a non-zero = bad mask named
#    and_mask, flux in 1e-17 erg/s/cm2/Angstrom; one ivar of 0 (no data).
loglam = np.log10(wave)
flux = (4 * base).astype(np.float32)
ivar = np.full(n, 16.0, np.float32)
ivar[5] = 0
amask = np.zeros(n, np.int32)
amask[[2, 9]] = [1, 1 << 4]
t = fits.BinTableHDU.from_columns([
    fits.Column(name="loglam", format="D", array=loglam),
    fits.Column(name="flux", format="E", unit="1e-17 erg/s/cm2/Angstrom", array=flux),
    fits.Column(name="ivar", format="E", array=ivar),
    fits.Column(name="and_mask", format="J", array=amask),
])
fits.HDUList([fits.PrimaryHDU(), t]).writeto("table_loglam_ivar.fits", overwrite=True)
k = factor("1e-17 erg/s/cm2/Angstrom", FLAM)
with np.errstate(divide="ignore"):
    sig = 1 / np.sqrt(ivar.astype(float)) * k
case("table_loglam_ivar.fits", wave_A=fl(10**loglam), medium="vacuum", flux_unit="erg/s/cm2/A",
     flux=fl(flux * k), unc=[None if not np.isfinite(v) else float(v) for v in sig], flagged=[2, 9], invalid=[5])
case("table_loglam_ivar.fits", {"ignore_mask": True}, wave_A=fl(10**loglam), medium="vacuum",
     flux_unit="erg/s/cm2/A", flux=fl(flux * k), unc=[None if not np.isfinite(v) else float(v) for v in sig],
     flagged=[], invalid=[5])

# 3. A mask column GOODPIX whose 1 means good; flux in mJy (F_nu).
good = np.ones(n, np.int16)
good[[4, 11, 12]] = 0
t = Table()
t["WAVE"] = wave * u.AA
t["FLUX"] = (2 * base) * u.mJy
t["FLUX_ERR"] = np.full(n, 0.1) * u.mJy
t["GOODPIX"] = good
t.write("table_goodpix_mjy.fits", overwrite=True)
case("table_goodpix_mjy.fits", wave_A=fl(wave), medium="vacuum", flux_unit="mJy", flux=fl(2 * base),
     unc=fl(np.full(n, 0.1)), flagged=[4, 11, 12])

# 4. astropy's own unit strings in TUNITn: a Table of Quantities written to
#    FITS (astropy writes the FITS form, e.g. "Angstrom-1 cm-2 erg s-1"), and
#    one in Jy with wavelengths in micron.
t = Table()
t["wavelength"] = (wave / 1e4) * u.micron
t["flux"] = (3e-16 * base) * FLAM
t["flux_error"] = np.full(n, 1e-17) * FLAM
t.write("table_astropy_units.fits", overwrite=True)
with fits.open("table_astropy_units.fits") as f:
    tunit = f[1].header["TUNIT2"]
case("table_astropy_units.fits", wave_A=fl(wave / 1e4 * 1e4), medium="vacuum", flux_unit="erg/s/cm2/A",
     flux=fl(3e-16 * base), unc=fl(np.full(n, 1e-17)), tunit_written=tunit)
t = Table()
t["WAVE"] = (wave / 1e4) * u.um
t["F_NU"] = (5e-4 * base) * u.Jy
t.write("table_fnu_jy.fits", overwrite=True)
case("table_fnu_jy.fits", wave_A=fl(wave), medium="vacuum", flux_unit="Jy", flux=fl(5e-4 * base), unc=None)

# 5. Image extensions SCI, ERR, DQ (quality flags with their reasons),
#    flux in a scaled unit; the same file gzip-compressed under a name
#    without .gz, and bzip2-compressed.
sci = (2 * base).astype(">f4")
err = np.full(n, 0.1, ">f4")
dq = np.zeros(n, ">i2")
dq[[3, 7, 8]] = [4, 16, 4]
h0 = fits.PrimaryHDU()
h0.header["OBJECT"] = "INVENTED-5"
h1 = fits.ImageHDU(sci, name="SCI")
h1.header.update(CTYPE1="WAVE", CUNIT1="Angstrom", CRVAL1=5000.0, CDELT1=10.0, CRPIX1=1.0,
                 BUNIT="10**(-17) erg/s/cm2/Angstrom")
h2 = fits.ImageHDU(err, name="ERR")
h3 = fits.ImageHDU(dq, name="DQ")
fits.HDUList([h0, h1, h2, h3]).writeto("image_sci_err_dq.fits", overwrite=True)
w = WCS(h1.header).wcs_pix2world(np.arange(n, dtype=float), 0)[0] * 1e10  # m → Å
k = factor("1e-17 erg/s/cm2/Angstrom", FLAM)
exp = dict(wave_A=fl(w), medium="vacuum", flux_unit="erg/s/cm2/A", flux=fl(sci.astype(float) * k),
           unc=fl(err.astype(float) * k), flagged=[3, 7, 8], flag_values={"DQ": {"4": 2, "16": 1}})
case("image_sci_err_dq.fits", **exp)
raw = open("image_sci_err_dq.fits", "rb").read()
with open("image_sci_err_dq_gzipped.fits", "wb") as fo, gzip.GzipFile(fileobj=fo, mode="wb", mtime=0) as g:
    g.write(raw)
case("image_sci_err_dq_gzipped.fits", compression="gzip", **exp)
open("image_sci_err_dq.fits.bz2", "wb").write(bz2.compress(raw))
case("image_sci_err_dq.fits.bz2", compression="bzip2", **exp)
case("image_sci_err_dq.fits", {"ignore_mask": True}, **dict(exp, flagged=[], flag_values={}))

# 6. A 2-D image whose rows are bands labelled by BANDIDn, in the
#    three-axis form (NAXIS1 = pixels, NAXIS2 = 1 aperture, NAXIS3 = 4
#    bands), air wavelengths by CTYPE1 = AWAV.
spec = 1.5 * base
rawb = 1.7 * base
sky = 0.3 + 0.01 * x
sigma = np.full(n, 0.05)
cube = np.stack([spec, rawb, sky, sigma])[:, None, :].astype(">f4")
h = fits.PrimaryHDU(cube)
h.header.update(CTYPE1="AWAV", CUNIT1="Angstrom", CRVAL1=6000.0, CDELT1=2.0, CRPIX1=1.0,
                BUNIT="erg/cm2/s/A")
h.header["BANDID1"] = "spectrum - optimal extraction"
h.header["BANDID2"] = "raw - simple sum"
h.header["BANDID3"] = "background - sky"
h.header["BANDID4"] = "sigma - error spectrum"
h.writeto("image_bands_labelled.fits", overwrite=True)
wb = 6000.0 + 2.0 * x
case("image_bands_labelled.fits", wave_A=fl(wb), medium="air", flux_unit="erg/s/cm2/A",
     flux=fl(spec.astype(">f4").astype(float)), unc=fl(sigma.astype(">f4").astype(float)), band=1)
case("image_bands_labelled.fits", {"band": 3, "unc_column": "none"}, wave_A=fl(wb), medium="air",
     flux_unit="erg/s/cm2/A", flux=fl(sky.astype(">f4").astype(float)), unc=None, band=3)

# 7. The four-band form with the wavelengths in a row and no labels, no WCS.
wum = wave / 1e4
rows = np.stack([wum, 2 * base, np.full(n, 0.2), 0.5 + 0 * x]).astype(">f8")
h = fits.PrimaryHDU(rows)
h.header["CUNIT1"] = "um"
h.header["BUNIT"] = "mJy"
h.writeto("image_bands_wave_row.fits", overwrite=True)
case("image_bands_wave_row.fits", error="ambiguous")
case("image_bands_wave_row.fits", {"band": 2, "unc_column": "3"}, wave_A=fl(wum * 1e4), medium="vacuum",
     flux_unit="mJy", flux=fl(2 * base), unc=fl(np.full(n, 0.2)), band=2)
case("image_bands_wave_row.fits", {"band": 2, "wave_column": "1"}, wave_A=fl(wum * 1e4), medium="vacuum",
     flux_unit="mJy", flux=fl(2 * base), unc=None, band=2)

# 8. The wavelengths in their own image extension (nm), inverse variance in
#    another; the flux has no WCS.
h1 = fits.ImageHDU((3 * base).astype(">f4"), name="FLUX")
h1.header["BUNIT"] = "erg/s/cm2/Angstrom"
h2 = fits.ImageHDU((wave / 10).astype(">f8"), name="WAVELENGTH")
h2.header["BUNIT"] = "nm"
h3 = fits.ImageHDU(np.full(n, 400.0, ">f4"), name="IVAR")
fits.HDUList([fits.PrimaryHDU(), h1, h2, h3]).writeto("image_wave_extension.fits", overwrite=True)
case("image_wave_extension.fits", wave_A=fl(wave / 10 * 10), medium="vacuum", flux_unit="erg/s/cm2/A",
     flux=fl((3 * base).astype(">f4").astype(float)), unc=fl(np.full(n, 1 / 20.0)))

# 9. A table of three rows of arrays (echelle-like orders) that overlap in
#    wavelength; and one of two segments that follow each other.
m = 10
ow = np.stack([4000 + 10.0 * np.arange(m), 4080 + 10.0 * np.arange(m), 4160 + 10.0 * np.arange(m)])
ow = ow + np.array([[0.0], [0.5], [0.25]])  # no shared wavelengths
of = np.stack([np.linspace(1, 2, m), np.linspace(2, 3, m), np.linspace(3, 4, m)])
oe = np.full((3, m), 0.1)
t = fits.BinTableHDU.from_columns([
    fits.Column(name="WAVE", format=f"{m}D", unit="Angstrom", array=ow),
    fits.Column(name="FLUX", format=f"{m}D", unit="erg/s/cm2/Angstrom", array=of),
    fits.Column(name="ERR", format=f"{m}D", unit="erg/s/cm2/Angstrom", array=oe),
])
fits.HDUList([fits.PrimaryHDU(), t]).writeto("table_orders.fits", overwrite=True)
case("table_orders.fits", error="ambiguous")
case("table_orders.fits", {"row": 2}, wave_A=fl(ow[1]), medium="vacuum", flux_unit="erg/s/cm2/A",
     flux=fl(of[1]), unc=fl(oe[1]), rows=[2])
order = np.argsort(ow.ravel(), kind="stable")
case("table_orders.fits", {"merge_rows": True}, wave_A=fl(ow.ravel()[order]), medium="vacuum",
     flux_unit="erg/s/cm2/A", flux=fl(of.ravel()[order]), unc=fl(oe.ravel()[order]), rows=[1, 2, 3])
sw = np.stack([7000 + 5.0 * np.arange(m), 7050 + 5.0 * np.arange(m)])
sf = np.stack([np.linspace(1, 2, m), np.linspace(2, 1, m)])
t = fits.BinTableHDU.from_columns([
    fits.Column(name="WAVE", format=f"{m}E", unit="Angstrom", array=sw.astype(np.float32)),
    fits.Column(name="FLUX", format=f"{m}E", unit="erg/s/cm2/Angstrom", array=sf.astype(np.float32)),
])
fits.HDUList([fits.PrimaryHDU(), t]).writeto("table_segments.fits", overwrite=True)
case("table_segments.fits", wave_A=fl(sw.ravel().astype(np.float32)), medium="vacuum", flux_unit="erg/s/cm2/A",
     flux=fl(sf.ravel().astype(np.float32)), unc=None, rows=[1, 2])

# 10. The spectrum in a later extension: the primary holds a large 2-D
#     frame, HDU 1 a 1-D image without wavelengths, HDU 2 the table.
frame = np.zeros((40, 30), np.uint8)
h1 = fits.ImageHDU(np.ones(n, ">f4"), name="PROFILE")
t = fits.BinTableHDU.from_columns([
    fits.Column(name="WAVE", format="D", unit="Angstrom", array=wave),
    fits.Column(name="FLUX", format="D", unit="mJy", array=base),
], name="SPEC1D")
fits.HDUList([fits.PrimaryHDU(frame), h1, t]).writeto("later_extension.fits", overwrite=True)
case("later_extension.fits", error="unsupported", message_has="--hdu 2")
case("later_extension.fits", {"hdu": 2}, wave_A=fl(wave), medium="vacuum", flux_unit="mJy", flux=fl(base), unc=None)
case("later_extension.fits", {"hdu": 0}, error="unsupported", message_has="--hdu")

# 11. ECSV written by astropy: units in the YAML header (a scaled flux
#     unit), metadata, a masked flux value; and the same bzip2-compressed
#     under a name that does not say so.
t = Table()
t["wavelength"] = (wave / 10) * u.nm
t["flux"] = MaskedColumn(2 * base, mask=(x == 6), unit=u.Unit("1e-17 erg / (Angstrom cm2 s)"))
t["flux_err"] = np.full(n, 0.1) * u.Unit("1e-17 erg / (Angstrom cm2 s)")
t.meta["object"] = "INVENTED-6"
t.meta["epoch"] = 2.5
t.write("spectrum.ecsv", overwrite=True)
k = factor("1e-17 erg / (Angstrom cm2 s)", FLAM)
fx = [None if i == 6 else float(v * k) for i, v in enumerate(2 * base)]
exp = dict(wave_A=fl(wave), medium="vacuum", flux_unit="erg/s/cm2/A", flux=fx, unc=fl(np.full(n, 0.1) * k),
           invalid=[6], object="INVENTED-6", epoch=2.5)
case("spectrum.ecsv", format="ECSV", **exp)
open("spectrum_ecsv_compressed.dat", "wb").write(bz2.compress(open("spectrum.ecsv", "rb").read()))
case("spectrum_ecsv_compressed.dat", format="ECSV", compression="bzip2", **exp)

# 12. Text quirks (written by hand): NA, an empty field, -nan, a row with no
#     wavelength, a metadata line that cannot be read, a mask whose 1 means
#     good (selected with mask_good).
lines = ["# object = INVENTED-7", "# exptime = long", "# epoch = 1.25",
         "wavelength,flux,flux_err,mask"]
qw, qf, qe, qm = [], [], [], []
for i in range(12):
    wv = 8000.0 + 4 * i
    f = 1.0 + 0.05 * i
    e = 0.02
    mk = 1 if i not in (3, 8) else 0
    sf_, se_ = repr(f), repr(e)
    if i == 2:
        sf_ = "NA"
    if i == 5:
        se_ = ""
    if i == 7:
        sf_ = "-nan"
    lines.append(f"{wv!r},{sf_},{se_},{mk}")
    if i == 10:
        lines.append(",1.0,0.02,1")  # no wavelength: left out
    qw.append(wv)
    qf.append(None if i in (2, 7) else f)
    qe.append(None if i == 5 else e)
    qm.append(mk)
open("quirks.csv", "w").write("\n".join(lines) + "\n")
case("quirks.csv", {"mask_good": True}, wave_A=qw, medium="vacuum", flux_unit="arbitrary", flux=qf, unc=qe,
     flagged=[3, 8], invalid=[2, 5, 7], skipped_rows=1, missing=3, object="INVENTED-7", epoch=1.25,
     warning_has="exptime")
case("quirks.csv", wave_A=qw, medium="vacuum", flux_unit="arbitrary", flux=qf, unc=qe,
     flagged=[i for i in range(12) if i not in (3, 8)], invalid=[2, 5, 7], skipped_rows=1,
     warning_has="--mask-good 1")

# 13. An epoch that is an MJD.
open("mjd_epoch.txt", "w").write("# epoch = 60123.5\nwave_A flux\n5000 1\n5001 2\n5002 3\n")
case("mjd_epoch.txt", error="ambiguous", message_has="--days")
case("mjd_epoch.txt", {"days": 3.0}, wave_A=[5000.0, 5001.0, 5002.0], medium="vacuum", flux_unit="arbitrary",
     flux=[1.0, 2.0, 3.0], unc=None, epoch=3.0)
case("mjd_epoch.txt", {"explosion_mjd": 60121.0}, wave_A=[5000.0, 5001.0, 5002.0], medium="vacuum",
     flux_unit="arbitrary", flux=[1.0, 2.0, 3.0], unc=None, epoch=2.5)

# 14. A wavelength unit that is implausible for the program: metres written
#     as if Angstrom (a warning, not an error).
open("implausible_range.txt", "w").write("wavelength_A,flux\n0.5,1\n0.6,2\n0.7,3\n")
case("implausible_range.txt", wave_A=[0.5, 0.6, 0.7], medium="vacuum", flux_unit="arbitrary",
     flux=[1.0, 2.0, 3.0], unc=None, warning_has="outside 0.1–30 µm")

# 15. Unit strings and what astropy.units makes of them: the factor to
#     erg s-1 cm-2 Angstrom-1 (F_lambda), to erg s-1 cm-2 Hz-1 (F_nu) or to
#     Angstrom (wavelengths).
FNU = u.erg / u.s / u.cm**2 / u.Hz
unit_refs = []
for s in ["erg/s/cm2/Angstrom", "1e-17 erg/s/cm2/Angstrom", "Angstrom-1 cm-2 erg s-1", "erg / (Angstrom cm2 s)",
          "W m-2 um-1", "W/m2/nm", "10**(-17) erg/s/cm2/Angstrom", "10**-16 erg.s**-1.cm**-2.Angstrom**-1",
          "erg s^-1 cm^-2 Angstrom^-1", "J/(s m2 Angstrom)", "mW m-2 nm-1", "1e-19 W / (m2 nm)"]:
    unit_refs.append({"unit": s, "kind": "flam", "factor": factor(s, FLAM)})
for s in ["Jy", "mJy", "uJy", "erg/s/cm2/Hz", "W m-2 Hz-1", "1e-20 erg s^-1 cm^-2 Hz^-1", "Hz-1 cm-2 erg s-1"]:
    unit_refs.append({"unit": s, "kind": "fnu", "factor": factor(s, FNU)})
for s in ["Angstrom", "nm", "um", "micron", "m", "cm", "mm", "0.1 nm"]:
    unit_refs.append({"unit": s, "kind": "wave", "factor": factor(s, u.AA)})

with open("expected.json", "w") as f:
    json.dump({"generator": "astropy " + __import__("astropy").__version__ + ", numpy " + np.__version__,
               "cases": cases, "units": unit_refs}, f, indent=1)
print("wrote", len(cases), "cases")
