#!/usr/bin/python3
"""Writes tests/fixtures/corpus/: one known spectrum saved in the layouts that reduction pipelines and
archives write, with corpus.json saying what a right read of each file gives.

Run with Debian's interpreter (python3-astropy 5.2.1, numpy 1.24):
    /usr/bin/python3 tests/reference/make_reader_corpus.py

The known spectrum is the model standard F5-V of templates/model-v1 (rectified flux x continuum, air
wavelengths 3700-7000 Å), normalised to a median of 1, with seeded noise (S/N 150). Every file holds
that spectrum sampled on the layout's own wavelength grid, so a right read gives the air range written
in corpus.json (to 0.05 Å), the pixel count, the medium, and a radial velocity of about 0 against the
standards library; a wavelength scale taken in the wrong medium is off by about 84 km/s.

Wavelengths are computed by astropy.wcs where a layout is a standard spectral WCS (FITS WCS Paper III,
Greisen et al. 2006) and by numpy from the stated convention elsewhere (IRAF onedspec/multispec,
survey COEFF0/COEFF1 and LOGLAM, explicit arrays). Air/vacuum: the IAU formula of Morton (2000),
after Ciddor (1996), as written in ../shared/REFERENCE.md. Documentation named for each convention
is cited from memory where marked so.
"""
import gzip
import hashlib
import io
import json
import os

import astropy
import numpy as np
from astropy.io import ascii as astro_ascii
from astropy.io import fits
from astropy.table import Table
from astropy.wcs import WCS, FITSFixedWarning
import warnings

warnings.simplefilter("ignore", FITSFixedWarning)

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.normpath(os.path.join(HERE, '..', '..'))
OUT = os.path.join(ROOT, 'tests', 'fixtures', 'corpus')
MODEL_DIR = os.path.join(ROOT, 'templates', 'model-v1')
MODEL_ID = 'F5-V'
RNG = np.random.default_rng(20260311)
ENTRIES = []


# ---------------------------------------------------------------- the known spectrum

def load_known():
    with open(os.path.join(MODEL_DIR, 'manifest.json')) as fh:
        manifest = json.load(fh)
    row = [s['id'] for s in manifest['standards']].index(MODEL_ID)
    g, cg = manifest['grid'], manifest['continuumGrid']
    rect = np.fromfile(os.path.join(MODEL_DIR, 'rectified.f32'), '<f4').reshape(-1, g['length'])[row]
    cont = np.fromfile(os.path.join(MODEL_DIR, 'continuum.f32'), '<f4').reshape(-1, cg['length'])[row]
    ln_grid = np.log(g['start']) + g['step'] * np.arange(g['length'])
    ln_cont = np.log(cg['start']) + cg['step'] * np.arange(cg['length'])
    flux = rect.astype(float) * np.exp(np.interp(ln_grid, ln_cont, np.log(cont.astype(float))))
    flux /= np.median(flux)
    with open(os.path.join(MODEL_DIR, 'manifest.json'), 'rb') as fh:
        sha = hashlib.sha256(fh.read()).hexdigest()
    return ln_grid, flux, sha


KNOWN_LN, KNOWN_FLUX, MANIFEST_SHA = load_known()
KNOWN_RANGE = (float(np.exp(KNOWN_LN[0])), float(np.exp(KNOWN_LN[-1])))


def air_index(vac):
    s2 = (1e4 / vac) ** 2
    return 1 + 8.34254e-5 + 2.406147e-2 / (130 - s2) + 1.5998e-4 / (38.9 - s2)


def vac_to_air(vac):
    vac = np.asarray(vac, dtype=float)
    return np.where(vac < 2000, vac, vac / air_index(vac))


def air_to_vac(air):
    air = np.asarray(air, dtype=float)
    vac = air.copy()
    for _ in range(4):
        vac = air * air_index(vac)
    return np.where(air < 2000, air, vac)


def flux_at(air):
    """The known spectrum at air wavelengths (Å), with noise at S/N 150."""
    air = np.asarray(air, dtype=float)
    f = np.interp(np.log(air), KNOWN_LN, KNOWN_FLUX)
    return f * (1 + RNG.normal(0, 1 / 150, air.shape))


# ---------------------------------------------------------------- bookkeeping

def path(name):
    return os.path.join(OUT, name)


def record(name, layout, convention, source, stored, vacuum, hdu=None, aperture=None, options=None,
           pixels=None, masked=None, error=False, warn=None, merged=None):
    """One readable file: `stored` are the wavelengths as the file states them (Å, its own medium)."""
    stored = np.asarray(stored, dtype=float)
    air = vac_to_air(stored) if vacuum else stored
    entry = {'file': name, 'layout': layout, 'convention': convention, 'source': source, 'expect': 'read',
             'pixels': int(pixels if pixels is not None else stored.size),
             'airRange': [float(np.min(air)), float(np.max(air))],
             'medium': 'vacuum' if vacuum else 'air'}
    if hdu is not None:
        entry['hdu'] = hdu
    if aperture is not None:
        entry['aperture'] = aperture
    if options:
        entry['options'] = options
    if masked is not None:
        entry['maskedPixels'] = int(masked)
    if error:
        entry['error'] = True
    if warn:
        entry['warning'] = warn
    if merged:
        entry['merged'] = merged
    ENTRIES.append(entry)


def refused(name, layout, convention, source, code, options=None):
    entry = {'file': name, 'layout': layout, 'convention': convention, 'source': source, 'expect': 'refused',
             'code': code}
    if options:
        entry['options'] = options
    ENTRIES.append(entry)


def header_of(cards):
    h = fits.Header()
    for k, v in cards:
        h[k] = v
    return h


def write_fits(name, hdus):
    fits.HDUList(hdus).writeto(path(name), overwrite=True)


def wcs_wave(header, n, axis=1):
    """Pixel -> wavelength (Å) of one spectral axis by astropy.wcs; wcslib works in SI metres."""
    w = WCS(header).sub([axis])
    world = w.all_pix2world(np.arange(n, dtype=float), 0)[0]
    factor = {'m': 1e10, 'nm': 10.0, 'Angstrom': 1.0, 'um': 1e4, '': 1.0}[str(w.wcs.cunit[0])]
    return world * factor


def f32(a):
    return np.asarray(a, dtype='>f4')


def merge_rule(segments):
    """Expected result of merging overlapping orders (the documented rule of the readers: in an overlap
    each order keeps the pixels on its side of the overlap's midpoint). Returns (pixels, lo, hi)."""
    segs = sorted([np.sort(np.asarray(s, dtype=float)) for s in segments], key=lambda s: s[0])
    merged = segs[0]
    for s in segs[1:]:
        if s[-1] <= merged[-1]:
            continue
        if s[0] < merged[-1]:
            cut = (s[0] + merged[-1]) / 2
            merged = np.concatenate([merged[merged < cut], s[s >= cut]])
        else:
            merged = np.concatenate([merged, s])
    return merged.size, merged[0], merged[-1]


WCS_PAPER = 'FITS WCS Paper III (Greisen et al. 2006, A&A 446, 747)'
FITS_STD = 'FITS Standard 4.0 (IAU FITS Working Group 2018)'
IRAF_ONED = "IRAF onedspec help 'specwcs' (from memory)"
SDSS_DM = 'SDSS data model, spec/spPlate files (from memory)'
LAMOST_DM = 'LAMOST DR low-resolution FITS description (from memory)'
CALSPEC = 'HST CALSPEC table headers (Bohlin et al.; the DATAQUAL column comment)'
ESO_P3 = 'ESO Science Data Products Standard, 1-D spectra (from memory)'
INHERIT_CONV = 'FITS INHERIT convention (registered FITS convention, from memory)'
TILE_CONV = 'FITS tiled image compression convention (Pence et al. 2009; FITS Standard 4.0 §10)'
IPAC_DOC = 'IPAC table format definition (IRSA, from memory)'
ECSV_DOC = 'Astropy ECSV format (APE 6)'
COMMON = 'common practice'

COMMON_CARDS = [('OBJECT', 'SYNTH-F5V'), ('DATE-OBS', '2026-03-14T02:10:00'), ('EXPTIME', 900.0),
                ('INSTRUME', 'KRO-SPEC')]


# ---------------------------------------------------------------- 1-D images

def image_1d(name, layout, convention, source, cards, n, vacuum, wave_fn=None, dtype='>f4', raw_fn=None,
             descending=False, warn=None, gz=False):
    h = header_of(cards + COMMON_CARDS)
    stored = wave_fn(h, n) if wave_fn else wcs_wave(h, n)
    air = vac_to_air(stored) if vacuum else stored
    flux = flux_at(air)
    data = raw_fn(flux) if raw_fn else flux.astype(dtype)
    hdu = fits.PrimaryHDU(data=data, header=h)
    if gz:
        buf = io.BytesIO()
        fits.HDUList([hdu]).writeto(buf)
        with open(path(name), 'wb') as fh:
            fh.write(gzip.compress(buf.getvalue(), mtime=0))
    else:
        write_fits(name, [hdu])
    record(name, layout, convention, source, stored, vacuum, hdu=0, warn=warn)


def iraf_linear(h, n):
    p = np.arange(n) + 1.0
    return h['CRVAL1'] + h.get('CDELT1', h.get('CD1_1')) * (p - h.get('CRPIX1', 1.0))


def iraf_log10(h, n):
    p = np.arange(n) + 1.0
    return 10 ** (h['CRVAL1'] + h.get('CDELT1', h.get('CD1_1')) * (p - h.get('CRPIX1', 1.0)))


def coeff_log10(h, n):
    return 10 ** (h['COEFF0'] + h['COEFF1'] * np.arange(n))


def images():
    image_1d('img-awav-linear.fits', 'FITS image, CTYPE1 AWAV, linear', 'AWAV = air wavelength axis', WCS_PAPER,
             [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0)],
             1700, False)
    image_1d('img-wave-linear.fits', 'FITS image, CTYPE1 WAVE, linear', 'WAVE = vacuum wavelength axis', WCS_PAPER,
             [('CTYPE1', 'WAVE'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3801.0), ('CDELT1', 0.9), ('CRPIX1', 1.0)],
             1900, True)
    image_1d('img-wave-cd-nm.fits', 'FITS image, CTYPE1 WAVE, CD1_1 in nm, CRPIX1 mid-array',
             'CD1_1 step; CUNIT1 nm', WCS_PAPER,
             [('CTYPE1', 'WAVE'), ('CUNIT1', 'nm'), ('CRVAL1', 460.0), ('CD1_1', 0.08), ('CRPIX1', 1000.5)],
             2000, True)
    image_1d('img-wave-log.fits', 'FITS image, CTYPE1 WAVE-LOG', 'Paper III logarithmic axis, vacuum', WCS_PAPER,
             [('CTYPE1', 'WAVE-LOG'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3790.0), ('CDELT1', 0.45), ('CRPIX1', 1.0)],
             3200, True)
    image_1d('img-awav-log.fits', 'FITS image, CTYPE1 AWAV-LOG', 'Paper III logarithmic axis, air', WCS_PAPER,
             [('CTYPE1', 'AWAV-LOG'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3790.0), ('CDELT1', 0.45), ('CRPIX1', 1.0)],
             3200, False)
    image_1d('img-linear-dcflag0.fits', 'IRAF 1-D image, CTYPE1 LINEAR, DC-FLAG 0, WAT1 units',
             'DC-FLAG 0 = linear dispersion; units from WAT1_001', IRAF_ONED,
             [('CTYPE1', 'LINEAR'), ('CRVAL1', 3805.0), ('CDELT1', 1.1), ('CD1_1', 1.1), ('CRPIX1', 1.0),
              ('DC-FLAG', 0), ('WAT0_001', 'system=world'),
              ('WAT1_001', 'wtype=linear label=Wavelength units=angstroms')],
             1500, False, wave_fn=iraf_linear)
    image_1d('img-linear-dcflag1.fits', 'IRAF 1-D image, CTYPE1 LINEAR, DC-FLAG 1',
             'DC-FLAG 1 = log10 wavelength linear in the pixel', IRAF_ONED,
             [('CTYPE1', 'LINEAR'), ('CRVAL1', float(np.log10(3800.0))), ('CDELT1', 1.2e-4), ('CRPIX1', 1.0),
              ('DC-FLAG', 1)],
             1500, False, wave_fn=iraf_log10)
    image_1d('img-pixel-dcflag0.fits', "Older IRAF 1-D image, CTYPE1 'PIXEL', DC-FLAG 0, CRVAL1/CDELT1 in Å",
             'DC-FLAG >= 0 means dispersion-corrected whatever CTYPE1 says', IRAF_ONED,
             [('CTYPE1', 'PIXEL'), ('CRVAL1', 3802.0), ('CDELT1', 1.3), ('CRPIX1', 1.0), ('DC-FLAG', 0)],
             1300, False, wave_fn=iraf_linear)
    image_1d('img-pixel-dcflag1.fits', "Older IRAF 1-D image, CTYPE1 'PIXEL', DC-FLAG 1",
             'DC-FLAG 1 = log10 dispersion', IRAF_ONED,
             [('CTYPE1', 'PIXEL'), ('CRVAL1', float(np.log10(3810.0))), ('CDELT1', 1.4e-4), ('CRPIX1', 1.0),
              ('DC-FLAG', 1)],
             1200, False, wave_fn=iraf_log10)
    image_1d('img-no-ctype.fits', 'FITS image, CRVAL1/CDELT1 without CTYPE1 or CUNIT1', 'Å assumed, air assumed',
             COMMON, [('CRVAL1', 3803.0), ('CDELT1', 1.05), ('CRPIX1', 1.0)], 1700, False, wave_fn=iraf_linear)
    image_1d('img-coeff-novacuum.fits', 'Survey image, COEFF0/COEFF1 without a VACUUM card',
             'log10 λ = COEFF0 + COEFF1 i; the survey convention is vacuum', SDSS_DM,
             [('COEFF0', 3.5800), ('COEFF1', 1e-4)], 2200, True, wave_fn=coeff_log10)
    image_1d('img-coeff-vacuum-t.fits', 'Survey image, COEFF0/COEFF1, VACUUM = T', 'VACUUM = T', SDSS_DM,
             [('COEFF0', 3.5800), ('COEFF1', 1e-4), ('VACUUM', True)], 2200, True, wave_fn=coeff_log10)
    image_1d('img-coeff-vacuum-f.fits', 'Survey image, COEFF0/COEFF1, VACUUM = F', 'VACUUM = F: air', SDSS_DM,
             [('COEFF0', 3.5800), ('COEFF1', 1e-4), ('VACUUM', False)], 2200, False, wave_fn=coeff_log10)
    image_1d('img-wave-airorvac-air.fits', "FITS image, CTYPE1 WAVE beside AIRORVAC = 'air'",
             'header contradicts itself; the explicit medium keyword outweighs the generic WAVE', WCS_PAPER,
             [('CTYPE1', 'WAVE'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0),
              ('AIRORVAC', 'air')], 1700, False, warn='contradict')
    image_1d('img-wave-vacuum-f.fits', 'FITS image, CTYPE1 WAVE beside VACUUM = F',
             'header contradicts itself; VACUUM = F outweighs the generic WAVE', WCS_PAPER,
             [('CTYPE1', 'WAVE'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0),
              ('VACUUM', False)], 1700, False, warn='contradict')
    image_1d('img-awav-um.fits', 'FITS image, AWAV in micrometres', 'CUNIT1 um', WCS_PAPER,
             [('CTYPE1', 'AWAV'), ('CUNIT1', 'um'), ('CRVAL1', 0.3805), ('CDELT1', 0.0001), ('CRPIX1', 1.0)],
             1600, False)
    image_1d('img-linear-m.fits', 'FITS image, LINEAR axis in metres', 'CUNIT1 m', FITS_STD,
             [('CTYPE1', 'LINEAR'), ('CUNIT1', 'm'), ('CRVAL1', 3.806e-7), ('CDELT1', 1.0e-10), ('CRPIX1', 1.0)],
             1600, False, wave_fn=lambda h, n: (h['CRVAL1'] + h['CDELT1'] * np.arange(n)) * 1e10)
    image_1d('img-int16-bscale.fits', 'FITS image, BITPIX 16 with BSCALE/BZERO', 'BSCALE/BZERO scaling', FITS_STD,
             [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0),
              ('BSCALE', 1e-4), ('BZERO', 1.0)],
             1700, False, raw_fn=lambda f: np.round((f - 1.0) / 1e-4).astype('>i2'))
    image_1d('img-descending.fits', 'FITS image, negative CDELT1 (red to blue)', 'descending axis', WCS_PAPER,
             [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 5500.0), ('CDELT1', -1.0), ('CRPIX1', 1.0)],
             1700, False)
    image_1d('img-awav-linear.fits.gz', 'gzip-compressed FITS image', 'gzip container', COMMON,
             [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0)],
             1700, False, gz=True)
    image_1d('img-wat-nm.fits', 'IRAF 1-D image, WAT1_001 units=nanometers', 'unit from WAT1_001', IRAF_ONED,
             [('CTYPE1', 'LINEAR'), ('CRVAL1', 380.4), ('CDELT1', 0.1), ('CD1_1', 0.1), ('CRPIX1', 1.0), ('DC-FLAG', 0),
              ('WAT0_001', 'system=world'), ('WAT1_001', 'wtype=linear label=Wavelength units=nanometers')],
             1700, False, wave_fn=lambda h, n: iraf_linear(h, n) * 10)

    # A 1 x N image (NAXIS = 2, one row).
    n = 1700
    h = header_of([('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0)])
    stored = wcs_wave(h, n)
    write_fits('img-2d-one-row.fits', [fits.PrimaryHDU(data=f32(flux_at(stored))[None, :], header=h)])
    record('img-2d-one-row.fits', 'FITS image, NAXIS = 2 with one row', 'a single row is the spectrum', FITS_STD,
           stored, False, hdu=0)

    # IRAF equispec 3-D output: n x 1 x 4 (spectrum, raw, background, sigma), BANDID names the planes.
    n = 1800
    h = header_of([('CTYPE1', 'LINEAR'), ('CRVAL1', 3800.0), ('CD1_1', 0.95), ('CDELT1', 0.95), ('CRPIX1', 1.0),
                   ('CTYPE2', 'LINEAR'), ('CTYPE3', 'LINEAR'), ('CD2_2', 1.0), ('CD3_3', 1.0), ('DC-FLAG', 0),
                   ('WAT0_001', 'system=equispec'), ('WAT1_001', 'wtype=linear label=Wavelength units=angstroms'),
                   ('WAT2_001', 'wtype=linear'), ('WAT3_001', 'wtype=linear'),
                   ('BANDID1', 'spectrum - background fit, weights variance, clean yes'),
                   ('BANDID2', 'raw - background fit, weights none, clean no'),
                   ('BANDID3', 'background - background fit'),
                   ('BANDID4', 'sigma - background fit, weights variance, clean yes'), ('APNUM1', '1 1 10.5 20.5')]
                  + COMMON_CARDS)
    stored = iraf_linear(h, n)
    flux = flux_at(stored)
    cube = np.zeros((4, 1, n), dtype='>f4')
    cube[0, 0], cube[1, 0], cube[2, 0], cube[3, 0] = flux, flux * 1.2, 0.05, flux / 150
    write_fits('img-equispec-bands.fits', [fits.PrimaryHDU(data=cube, header=h)])
    record('img-equispec-bands.fits', 'IRAF equispec image, n × 1 × 4 bands (spectrum, raw, background, sigma)',
           'BANDIDn names the planes; sigma is the 1σ error', IRAF_ONED, stored, False, hdu=0, error=True)


# ---------------------------------------------------------------- IRAF multispec

def legendre(p, pmin, pmax, coeffs):
    n = (2 * p - (pmax + pmin)) / (pmax - pmin)
    x = [np.ones_like(n), n]
    for i in range(3, len(coeffs) + 1):
        x.append(((2 * i - 3) * n * x[-1] - (i - 2) * x[-2]) / (i - 1))
    return sum(c * xi for c, xi in zip(coeffs, x))


def chebyshev(p, pmin, pmax, coeffs):
    n = (2 * p - (pmax + pmin)) / (pmax - pmin)
    x = [np.ones_like(n), n]
    for _ in range(3, len(coeffs) + 1):
        x.append(2 * n * x[-1] - x[-2])
    return sum(c * xi for c, xi in zip(coeffs, x))


def spline3(p, npieces, pmin, pmax, coeffs):
    s = (p - pmin) / (pmax - pmin) * npieces
    j = np.clip(np.floor(s).astype(int), 0, npieces - 1)
    a = (j + 1) - s
    b = s - j
    c = np.asarray(coeffs)
    return (a ** 3 * c[j] + (1 + 3 * a * (1 + a * b)) * c[j + 1] + (1 + 3 * b * (1 + a * b)) * c[j + 2]
            + b ** 3 * c[j + 3])


def spline1(p, npieces, pmin, pmax, coeffs):
    s = (p - pmin) / (pmax - pmin) * npieces
    j = np.clip(np.floor(s).astype(int), 0, npieces - 1)
    a = (j + 1) - s
    b = s - j
    c = np.asarray(coeffs)
    return a * c[j] + b * c[j + 1]


def wat_cards(key, text):
    """IRAF splits long WAT strings over WATn_001, WATn_002, ... cards of 68 characters each."""
    return [(f'{key}_{i // 68 + 1:03d}', text[i:i + 68]) for i in range(0, len(text), 68)]


def multispec(name, layout, convention, specs, npix, picked=None, merged=False, options=None, bands=None,
              ltv=0.0, source=IRAF_ONED, warn=None):
    """specs: list of (spec string, stored wavelengths of logical pixels 1..npix)."""
    text = 'wtype=multispec ' + ' '.join(f'spec{i + 1} = "{s}"' for i, (s, _) in enumerate(specs))
    cards = [('CTYPE1', 'MULTISPE'), ('CTYPE2', 'MULTISPE'), ('CD1_1', 1.0), ('CD2_2', 1.0),
             ('WAT0_001', 'system=multispec'), ('WAT1_001', 'wtype=multispec label=Wavelength units=angstroms')]
    cards += wat_cards('WAT2', text)
    for i, (s, _) in enumerate(specs):
        ap, beam = s.split()[:2]
        cards.append((f'APNUM{i + 1}', f'{ap} {beam} {10.5 + 12 * i} {18.5 + 12 * i}'))
    if ltv:
        cards += [('LTV1', ltv), ('LTM1_1', 1.0)]
    h = header_of(cards + COMMON_CARDS)
    rows = np.array([flux_at(w) for _, w in specs], dtype='>f4')
    if bands:
        cube = np.zeros((bands, len(specs), npix), dtype='>f4')
        cube[0] = rows
        for b in range(1, bands - 1):
            cube[b] = rows * 1.1
        cube[bands - 1] = rows / 150
        h['BANDID1'] = 'spectrum - background fit, weights variance, clean yes'
        h['BANDID2'] = 'raw - background fit, weights none, clean no'
        h[f'BANDID{bands}'] = 'sigma - background fit, weights variance, clean yes'
        if bands > 3:
            h['BANDID3'] = 'background - background fit'
        data = cube
    else:
        data = rows
    write_fits(name, [fits.PrimaryHDU(data=data, header=h)])
    if merged:
        count, lo, hi = merge_rule([w for _, w in specs])
        ENTRIES.append({'file': name, 'layout': layout, 'convention': convention, 'source': source,
                        'expect': 'read', 'pixels': int(count), 'airRange': [float(lo), float(hi)], 'medium': 'air',
                        'hdu': 0, 'aperture': 'merged', 'merged': len(specs), **({'options': options} if options else {})})
        return
    record(name, layout, convention, source, specs[picked - 1][1], False, hdu=0, aperture=picked, options=options,
           error=bool(bands), warn=warn)


def multispecs():
    n = 1700
    p = np.arange(1, n + 1, dtype=float)
    lin = lambda w1, dw: w1 + dw * (p - 1)
    multispec('ms-linear.fits', 'IRAF multispec, one aperture, linear (dtype 0)',
              'λ = w1 + dw (p − 1)', [(f'1 1 0 3800. 1. {n} 0. 10.5 20.5', lin(3800., 1.))], n, picked=1)
    multispec('ms-loglinear.fits', 'IRAF multispec, one aperture, log-linear (dtype 1)',
              'log10 λ = w1 + dw (p − 1)', [(f'1 1 1 3.5798 0.0001 {n} 0. 10.5 20.5', 10 ** (3.5798 + 1e-4 * (p - 1)))],
              n, picked=1)
    coeffs = [4650.0, 850.0, 12.0, -4.0]
    multispec('ms-legendre.fits', 'IRAF multispec, non-linear Legendre solution (dtype 2, ftype 2)',
              'λ = wt (w0 + Σ cᵢ Pᵢ(n)) with n normalised on [pmin, pmax]',
              [(f'1 1 2 3800. 1. {n} 0. 10.5 20.5 1. 0. 2 4 1. {n}. ' + ' '.join(map(str, coeffs)),
                legendre(p, 1.0, float(n), coeffs))], n, picked=1)
    coeffs = [4640.0, 830.0, -9.0]
    multispec('ms-chebyshev.fits', 'IRAF multispec, non-linear Chebyshev solution (dtype 2, ftype 1)',
              'λ = wt (w0 + Σ cᵢ Tᵢ(n))',
              [(f'1 1 2 3810. 1. {n} 0. 10.5 20.5 1. 2. 1 3 1. {n}. ' + ' '.join(map(str, coeffs)),
                2.0 + chebyshev(p, 1.0, float(n), coeffs))], n, picked=1)
    # Cubic spline: 4 pieces, 7 coefficients; the basis sums to 6, so coefficients are about λ/6.
    c3 = [(3600.0 + 420.0 * k) / 6 for k in range(7)]
    multispec('ms-spline3.fits', 'IRAF multispec, non-linear cubic spline (dtype 2, ftype 3)',
              'cubic B-spline in s = (p − pmin)/(pmax − pmin) · npieces',
              [(f'1 1 2 3800. 1. {n} 0. 10.5 20.5 1. 0. 3 4 1. {n}. ' + ' '.join(f'{c:.6f}' for c in c3),
                spline3(p, 4, 1.0, float(n), c3))], n, picked=1)
    c1 = [3800.0, 4230.0, 4655.0, 5075.0, 5490.0]
    multispec('ms-spline1.fits', 'IRAF multispec, non-linear linear spline (dtype 2, ftype 4)',
              'linear spline in s', [(f'1 1 2 3800. 1. {n} 0. 10.5 20.5 1. 0. 4 4 1. {n}. ' + ' '.join(map(str, c1)),
                                      spline1(p, 4, 1.0, float(n), c1))], n, picked=1)
    # A trimmed image: LTV1 = -10, so logical pixel 1 is physical pixel 11, where the function is evaluated.
    coeffs = [4650.0, 850.0, 12.0, -4.0]
    multispec('ms-legendre-ltv.fits', 'IRAF multispec Legendre solution of a trimmed image (LTV1 = -10)',
              'the dispersion is a function of the physical pixel (p_phys = p − LTV1)',
              [(f'1 1 2 3800. 1. {n} 0. 10.5 20.5 1. 0. 2 4 1. {n + 20}. ' + ' '.join(map(str, coeffs)),
                legendre(p + 10, 1.0, float(n + 20), coeffs))], n, picked=1, ltv=-10.0)
    # Three apertures, the first on the red side only: the one that covers the region is read.
    specs = [(f'1 1 0 5600. 0.8 {n} 0. 10.5 20.5', lin(5600., 0.8)),
             (f'2 2 0 3800. 1. {n} 0. 22.5 32.5', lin(3800., 1.)),
             (f'3 3 0 4600. 0.9 {n} 0. 34.5 44.5', lin(4600., 0.9))]
    multispec('ms-3ap-red-first.fits', 'IRAF multispec, three apertures, the first one red only',
              'default: the first aperture that covers the classification region; the others are named', specs, n,
              picked=2)
    # Two apertures that both cover the region; the observer picks the second.
    specs = [(f'1 1 0 3800. 1. {n} 0. 10.5 20.5', lin(3800., 1.)),
             (f'2 2 0 3850. 0.95 {n} 0. 22.5 32.5', lin(3850., 0.95))]
    multispec('ms-2ap-pick.fits', 'IRAF multispec, two apertures, aperture 2 picked by the observer',
              'the aperture option', specs, n, picked=2, options={'aperture': 2})
    multispec('ms-2ap-default.fits', 'IRAF multispec, two apertures, no choice given',
              'the first aperture that covers the region', specs, n, picked=1)
    # 3-D multispec: two apertures with four bands, sigma last.
    multispec('ms-3d-bands.fits', 'IRAF multispec 3-D (bands: spectrum, raw, background, sigma), two apertures',
              'error from the sigma band of the chosen aperture', specs, n, picked=1, bands=4)
    # Echelle orders as rows: 24 orders of 60 Å with 10 Å overlaps, merged.
    m = 900
    q = np.arange(1, m + 1, dtype=float)
    orders = []
    for k in range(24):
        w1 = 3820.0 + 50.0 * k
        dw = 60.0 / (m - 1)
        orders.append((f'{k + 1} {100 - k} 0 {w1:.3f} {dw:.8f} {m} 0. {5 + k}.5 {6 + k}.5', w1 + dw * (q - 1)))
    multispec('ms-echelle-orders.fits', 'IRAF multispec echelle, 24 orders as rows', 'orders merged: each order keeps '
              'the pixels on its side of the overlap midpoint', orders, m, merged=True)


# ---------------------------------------------------------------- survey rows, cubes, extensions

def survey_and_cubes():
    n = 3000
    i = np.arange(n)
    for name, vac_card, vacuum in (('survey-5row-vacuum.fits', [('VACUUM', True)], True),
                                   ('survey-5row-coeff.fits', [], True)):
        coeff0, coeff1 = 3.5798, 1e-4
        stored = 10 ** (coeff0 + coeff1 * i)
        flux = flux_at(vac_to_air(stored))
        ivar = np.full(n, 150.0 ** 2)
        ivar[[100, 101, 2500]] = 0
        andmask = np.zeros(n)
        andmask[[700, 701, 702, 703]] = 2 ** 23
        ormask = np.zeros(n)
        ormask[1000:1100] = 2 ** 16
        data = np.vstack([flux, ivar, stored, andmask, ormask]).astype('>f4')
        h = header_of([('COEFF0', coeff0), ('COEFF1', coeff1), ('CRVAL1', coeff0), ('CD1_1', coeff1),
                       ('CRPIX1', 1.0), ('CTYPE1', 'LINEAR'), ('DC-FLAG', 1)] + vac_card + COMMON_CARDS)
        write_fits(name, [fits.PrimaryHDU(data=data, header=h)])
        record(name, 'Survey image of 5 rows: flux, inverse variance, wavelength, and_mask, or_mask',
               'rows as the survey writes them; and_mask ≠ 0 is bad; log10 λ (COEFF0/COEFF1) is vacuum', LAMOST_DM,
               stored.astype(np.float32), vacuum, hdu=0, masked=7, error=True)

    # 1 x 1 x N cube, spectral axis third.
    n = 1800
    h = header_of([('CTYPE1', 'RA---TAN'), ('CTYPE2', 'DEC--TAN'), ('CRVAL1', 150.0), ('CRVAL2', 2.0),
                   ('CDELT1', -5.5e-5), ('CDELT2', 5.5e-5), ('CRPIX1', 1.0), ('CRPIX2', 1.0), ('CUNIT1', 'deg'),
                   ('CUNIT2', 'deg'), ('CTYPE3', 'AWAV'), ('CUNIT3', 'Angstrom'), ('CRVAL3', 3800.0),
                   ('CDELT3', 1.0), ('CRPIX3', 1.0)])
    stored = wcs_wave(h, n, axis=3)
    write_fits('cube-1x1xN-awav.fits', [fits.PrimaryHDU(data=f32(flux_at(stored))[:, None, None], header=h)])
    record('cube-1x1xN-awav.fits', 'Data cube 1 × 1 × N, spectral axis third (AWAV)',
           'the spectral axis is the one whose CTYPE is a wavelength', WCS_PAPER, stored, False, hdu=0)
    h = header_of([('CTYPE1', 'RA---TAN'), ('CTYPE2', 'DEC--TAN'), ('CRVAL1', 150.0), ('CRVAL2', 2.0),
                   ('CD1_1', -5.5e-5), ('CD2_2', 5.5e-5), ('CRPIX1', 1.0), ('CRPIX2', 1.0), ('CUNIT1', 'deg'),
                   ('CUNIT2', 'deg'), ('CTYPE3', 'WAVE'), ('CUNIT3', 'um'), ('CRVAL3', 0.3801), ('CD3_3', 0.00009),
                   ('CRPIX3', 1.0)])
    stored = wcs_wave(h, 1900, axis=3)
    write_fits('cube-1x1xN-wave-um.fits', [fits.PrimaryHDU(data=f32(flux_at(vac_to_air(stored)))[:, None, None], header=h)])
    record('cube-1x1xN-wave-um.fits', 'Data cube 1 × 1 × N, spectral axis third (WAVE, CD3_3, µm)',
           'WAVE = vacuum', WCS_PAPER, stored, True, hdu=0)


def extensions():
    n = 1700
    lin = 3800.0 + 1.0 * np.arange(n)
    wcs_cards = [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3800.0), ('CDELT1', 1.0), ('CRPIX1', 1.0)]

    # Wavelength array in its own image extension, with an error extension.
    flux = flux_at(lin)
    prim = fits.PrimaryHDU(header=header_of(COMMON_CARDS))
    write_fits('mef-wave-extension.fits', [prim, fits.ImageHDU(f32(flux), name='FLUX'),
                                           fits.ImageHDU(lin.astype('>f8'), name='WAVELENGTH'),
                                           fits.ImageHDU(f32(flux / 150), name='ERROR')])
    record('mef-wave-extension.fits', 'Multi-extension file: FLUX image, WAVELENGTH image, ERROR image',
           'companion extensions named by EXTNAME', COMMON, lin, False, hdu=1, error=True)
    # The same in nm and vacuum, stated in the primary header.
    vac_nm = (3801.0 + 0.95 * np.arange(n)) / 10
    flux = flux_at(vac_to_air(vac_nm * 10))
    prim = fits.PrimaryHDU(header=header_of(COMMON_CARDS + [('AIRORVAC', 'vac')]))
    wave_hdu = fits.ImageHDU(vac_nm.astype('>f8'), name='WAVE')
    wave_hdu.header['BUNIT'] = 'nm'
    write_fits('mef-wave-extension-nm-vac.fits', [prim, fits.ImageHDU(f32(flux), name='SCI'), wave_hdu])
    record('mef-wave-extension-nm-vac.fits', "Multi-extension file: SCI image and WAVE image in nm (BUNIT), AIRORVAC = 'vac'",
           'unit of the wavelength extension from its BUNIT', COMMON, vac_nm * 10, True, hdu=1)

    # WCS in the primary, SCI/ERR/DQ extensions inheriting it (INHERIT = T).
    flux = flux_at(lin)
    dq = np.zeros(n, dtype='>i2')
    dq[[300, 301, 302]] = 4
    prim = fits.PrimaryHDU(header=header_of(wcs_cards + COMMON_CARDS))
    exts = []
    for data, name in ((f32(flux), 'SCI'), (f32(flux / 150), 'ERR'), (dq, 'DQ')):
        e = fits.ImageHDU(data, name=name)
        e.header['INHERIT'] = True
        exts.append(e)
    write_fits('mef-sci-err-dq-inherit.fits', [prim] + exts)
    record('mef-sci-err-dq-inherit.fits', 'SCI, ERR and DQ image extensions with INHERIT = T, WCS in the primary',
           'INHERIT = T: the extension takes the primary keywords it lacks; DQ ≠ 0 is bad', INHERIT_CONV, lin, False,
           hdu=1, masked=3, error=True)
    e = fits.ImageHDU(f32(flux_at(lin)), name='SPECTRUM')
    e.header['INHERIT'] = True
    write_fits('mef-inherit.fits', [fits.PrimaryHDU(header=header_of(wcs_cards + COMMON_CARDS)), e])
    record('mef-inherit.fits', 'One image extension without WCS, INHERIT = T, WCS in the primary', 'INHERIT = T',
           INHERIT_CONV, lin, False, hdu=1)
    e = fits.ImageHDU(f32(flux_at(lin)), name='SPECTRUM')
    e.header['INHERIT'] = False
    write_fits('mef-inherit-false.fits', [fits.PrimaryHDU(header=header_of(wcs_cards + COMMON_CARDS)), e])
    refused('mef-inherit-false.fits', 'Image extension without WCS, INHERIT = F, WCS in the primary',
            'INHERIT = F forbids taking the primary keywords', INHERIT_CONV, 'NO_WAVELENGTH_SCALE')

    # Flux with QUAL and IVAR / VARIANCE extensions sharing one WCS.
    flux = flux_at(lin)
    qual = np.zeros(n, dtype='>i4')
    qual[[50, 51]] = 1
    ivar = np.full(n, 150.0 ** 2, dtype='>f4')
    ivar[[900]] = 0
    hdus = [fits.PrimaryHDU(header=header_of(COMMON_CARDS)), fits.ImageHDU(f32(flux), header=header_of(wcs_cards), name='FLUX'),
            fits.ImageHDU(ivar, header=header_of(wcs_cards), name='IVAR'),
            fits.ImageHDU(qual, header=header_of(wcs_cards), name='QUAL')]
    write_fits('mef-ivar-qual.fits', hdus)
    record('mef-ivar-qual.fits', 'FLUX, IVAR and QUAL image extensions', 'IVAR = 0 and QUAL ≠ 0 are bad', ESO_P3, lin,
           False, hdu=1, masked=3, error=True)
    hdus = [fits.PrimaryHDU(header=header_of(COMMON_CARDS)), fits.ImageHDU(f32(flux), header=header_of(wcs_cards), name='FLUX'),
            fits.ImageHDU(f32((flux / 150) ** 2), header=header_of(wcs_cards), name='VARIANCE')]
    write_fits('mef-variance.fits', hdus)
    record('mef-variance.fits', 'FLUX and VARIANCE image extensions', 'error = √variance', COMMON, lin, False, hdu=1,
           error=True)

    # Two arms: the first extension is the red arm and does not cover the classification region.
    red = 5600.0 + 0.8 * np.arange(n)
    blue = 3790.0 + 0.85 * np.arange(n)
    hdus = [fits.PrimaryHDU(header=header_of(COMMON_CARDS))]
    for w, name in ((red, 'RED'), (blue, 'BLUE')):
        hdus.append(fits.ImageHDU(f32(flux_at(w)), header=header_of([('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'),
                                                                    ('CRVAL1', float(w[0])), ('CDELT1', float(w[1] - w[0])),
                                                                    ('CRPIX1', 1.0)]), name=name))
    write_fits('two-arm-images.fits', hdus)
    record('two-arm-images.fits', 'Two arms as image extensions, the red arm first',
           'the HDU that covers the classification region is read; the other is named', COMMON, blue, False, hdu=2)
    hdus = [fits.PrimaryHDU(header=header_of(COMMON_CARDS))]
    for w, name in ((red, 'RED'), (blue, 'BLUE')):
        cols = fits.ColDefs([fits.Column('WAVE', 'D', unit='Angstrom', array=w),
                             fits.Column('FLUX', 'E', array=flux_at(w)), fits.Column('ERR', 'E', array=np.full(n, 0.01))])
        hdus.append(fits.BinTableHDU.from_columns(cols, name=name))
    write_fits('two-arm-tables.fits', hdus)
    record('two-arm-tables.fits', 'Two arms as binary tables, the red arm first', 'as above', COMMON, blue, False, hdu=2,
           error=True)

    # Tile-compressed images (RICE_1 and GZIP_1) keeping the WCS cards.
    for algo, name in (('RICE_1', 'compressed-rice.fits'), ('GZIP_1', 'compressed-gzip.fits')):
        comp = fits.CompImageHDU(data=f32(flux_at(lin)).astype(np.float32), header=header_of(wcs_cards),
                                 compression_type=algo, quantize_level=64.0 if algo == 'RICE_1' else 16.0)
        write_fits(name, [fits.PrimaryHDU(header=header_of(COMMON_CARDS)), comp])
        record(name, f'Tile-compressed image extension ({algo})', 'ZIMAGE = T binary table of compressed tiles',
               TILE_CONV, lin, False, hdu=1)

    # Echelle orders as rows of a flux image, with a wavelength image of the same shape.
    m = 900
    orders = [3820.0 + 50.0 * k + (60.0 / (m - 1)) * np.arange(m) for k in range(24)]
    flux = np.array([flux_at(w) for w in orders], dtype='>f4')
    write_fits('echelle-image-wave-image.fits', [fits.PrimaryHDU(data=flux, header=header_of(COMMON_CARDS)),
                                                 fits.ImageHDU(np.array(orders, dtype='>f8'), name='WAVE')])
    count, lo, hi = merge_rule(orders)
    ENTRIES.append({'file': 'echelle-image-wave-image.fits', 'layout': 'Echelle: 24 orders as rows of a flux image, '
                    'a WAVE image of the same shape', 'convention': 'orders merged (overlap midpoints)', 'source': COMMON,
                    'expect': 'read', 'pixels': int(count), 'airRange': [float(lo), float(hi)], 'medium': 'air', 'hdu': 0,
                    'aperture': 'merged', 'merged': 24})
    # Echelle orders as rows of a binary table of arrays.
    cols = fits.ColDefs([fits.Column('WAVE', f'{m}D', unit='Angstrom', array=np.array(orders)),
                         fits.Column('FLUX', f'{m}E', array=flux.astype(np.float32)),
                         fits.Column('ERR', f'{m}E', array=(flux / 150).astype(np.float32))])
    write_fits('echelle-table-rows.fits', [fits.PrimaryHDU(header=header_of(COMMON_CARDS)),
                                           fits.BinTableHDU.from_columns(cols, name='ORDERS')])
    ENTRIES.append({'file': 'echelle-table-rows.fits', 'layout': 'Echelle: one table row of arrays per order (24 rows)',
                    'convention': 'orders merged (overlap midpoints)', 'source': COMMON, 'expect': 'read',
                    'pixels': int(count), 'airRange': [float(lo), float(hi)], 'medium': 'air', 'hdu': 1,
                    'aperture': 'merged', 'merged': 24, 'error': True})


# ---------------------------------------------------------------- binary and ASCII tables

def table(name, layout, convention, source, columns, stored, vacuum, prim_cards=(), tab_cards=(), extname='SPECTRUM',
          masked=None, error=False, warn=None, pixels=None):
    tab = fits.BinTableHDU.from_columns(fits.ColDefs(columns), name=extname)
    for k, v in tab_cards:
        tab.header[k] = v
    write_fits(name, [fits.PrimaryHDU(header=header_of(list(prim_cards) + COMMON_CARDS)), tab])
    record(name, layout, convention, source, stored, vacuum, hdu=1, masked=masked, error=error, warn=warn, pixels=pixels)


def tables():
    n = 2400
    lin = 3800.0 + 0.7 * np.arange(n)
    f = flux_at(lin)
    table('tab-rows-airorvac-air.fits', "Binary table rows: WAVELENGTH, FLUX, ERROR; AIRORVAC = 'air'", 'AIRORVAC',
          COMMON, [fits.Column('WAVELENGTH', 'D', unit='Angstrom', array=lin), fits.Column('FLUX', 'E', array=f),
                   fits.Column('ERROR', 'E', array=f / 150)], lin, False, tab_cards=[('AIRORVAC', 'air')], error=True)
    table('tab-rows-silent.fits', 'Binary table rows: WAVE, FLUX, no medium stated', 'air assumed', COMMON,
          [fits.Column('WAVE', 'D', unit='Angstrom', array=lin), fits.Column('FLUX', 'E', array=f)], lin, False)
    table('tab-rows-descending.fits', 'Binary table rows in descending wavelength', 'reversed', COMMON,
          [fits.Column('WAVE', 'D', unit='Angstrom', array=lin[::-1]), fits.Column('FLUX', 'E', array=f[::-1])], lin,
          False)
    table('tab-rows-um.fits', 'Binary table rows, wavelength in µm', 'TUNIT um', FITS_STD,
          [fits.Column('WAVELENGTH', 'D', unit='um', array=lin / 1e4), fits.Column('FLUX', 'E', array=f)], lin, False)

    # SDSS coadd table: loglam (vacuum by the survey convention, no keyword), ivar, and_mask, or_mask.
    m = 3000
    loglam = (3.5798 + 1e-4 * np.arange(m)).astype(np.float32)
    vac = 10 ** loglam.astype(float)
    fl = flux_at(vac_to_air(vac))
    ivar = np.full(m, 150.0 ** 2, dtype=np.float32)
    ivar[[10, 11]] = 0
    and_mask = np.zeros(m, dtype=np.int32)
    and_mask[[2000, 2001, 2002]] = 1 << 23
    or_mask = np.zeros(m, dtype=np.int32)
    or_mask[500:600] = 1 << 16
    sdss_cols = [fits.Column('flux', 'E', array=fl), fits.Column('loglam', 'E', array=loglam),
                 fits.Column('ivar', 'E', array=ivar), fits.Column('and_mask', 'J', array=and_mask),
                 fits.Column('or_mask', 'J', array=or_mask), fits.Column('wdisp', 'E', array=np.full(m, 1.1)),
                 fits.Column('sky', 'E', array=np.full(m, 0.1)), fits.Column('model', 'E', array=fl)]
    table('tab-sdss-loglam.fits', 'Survey coadd table: flux, loglam, ivar, and_mask, or_mask, wdisp, sky, model',
          'LOGLAM = log10 vacuum λ (no keyword says so); and_mask ≠ 0 bad', SDSS_DM, sdss_cols, vac, True,
          extname='COADD', masked=5, error=True)
    table('tab-sdss-loglam-vacuum-t.fits', 'Survey coadd table with VACUUM = T in the primary', 'VACUUM = T', SDSS_DM,
          sdss_cols, vac, True, prim_cards=[('VACUUM', True)], extname='COADD', masked=5, error=True)

    # One row of array columns: WAVE in nm, FLUX, ERR, QUAL (0 good), ESO-style.
    k = 2100
    wave_nm = 380.0 + 0.08 * np.arange(k)
    fl = flux_at(wave_nm * 10)
    qual = np.zeros(k, dtype=np.int32)
    qual[[5, 6, 7, 8]] = 2
    table('tab-array-row-qual.fits', 'Binary table, one row of arrays: WAVE (nm), FLUX, ERR, QUAL',
          'QUAL ≠ 0 is bad', ESO_P3,
          [fits.Column('WAVE', f'{k}D', unit='nm', array=wave_nm[None, :]),
           fits.Column('FLUX', f'{k}E', unit='erg cm**(-2) s**(-1) angstrom**(-1)', array=fl[None, :]),
           fits.Column('ERR', f'{k}E', array=(fl / 150)[None, :]), fits.Column('QUAL', f'{k}J', array=qual[None, :])],
          wave_nm * 10, False, masked=4, error=True)

    # Variable-length array columns.
    vla = fits.Column('WAVE', 'PD()', unit='Angstrom', array=np.array([lin], dtype=object))
    vlf = fits.Column('FLUX', 'PE()', array=np.array([f.astype(np.float32)], dtype=object))
    table('tab-vla.fits', 'Binary table, variable-length array columns (PD/PE), one row', 'heap arrays', FITS_STD,
          [vla, vlf], lin, False)
    orders = [3820.0 + 50.0 * j + (60.0 / 899) * np.arange(900) for j in range(24)]
    tab = fits.BinTableHDU.from_columns(fits.ColDefs([
        fits.Column('WAVE', 'PD()', unit='Angstrom', array=np.array(orders, dtype=object)),
        fits.Column('FLUX', 'PE()', array=np.array([flux_at(w).astype(np.float32) for w in orders], dtype=object))]),
        name='ORDERS')
    write_fits('tab-vla-orders.fits', [fits.PrimaryHDU(header=header_of(COMMON_CARDS)), tab])
    count, lo, hi = merge_rule(orders)
    ENTRIES.append({'file': 'tab-vla-orders.fits', 'layout': 'Binary table, variable-length arrays, one row per echelle '
                    'order', 'convention': 'orders merged', 'source': FITS_STD, 'expect': 'read', 'pixels': int(count),
                    'airRange': [float(lo), float(hi)], 'medium': 'air', 'hdu': 1, 'aperture': 'merged', 'merged': 24})

    table('tab-var.fits', 'Binary table rows: WAVELENGTH, FLUX, VAR', 'error = √VAR', COMMON,
          [fits.Column('WAVELENGTH', 'D', unit='Angstrom', array=lin), fits.Column('FLUX', 'E', array=f),
           fits.Column('VAR', 'E', array=(f / 150) ** 2)], lin, False, error=True)
    mask = np.zeros(n, dtype=bool)
    mask[[40, 41]] = True
    table('tab-uncertainty-mask.fits', 'Binary table rows: wavelength, flux, uncertainty, mask (logical)',
          'uncertainty = 1σ; mask True = bad', 'specutils tabular-fits layout (from memory)',
          [fits.Column('wavelength', 'D', unit='Angstrom', array=lin), fits.Column('flux', 'E', array=f),
           fits.Column('uncertainty', 'E', array=f / 150), fits.Column('mask', 'L', array=mask)], lin, False,
          masked=2, error=True)
    dataqual = np.ones(n, dtype=np.int16)
    dataqual[[1200, 1201, 1202, 1203, 1204]] = 0
    cols = [fits.Column('WAVELENGTH', 'D', unit='ANGSTROMS', array=air_to_vac(lin)),
            fits.Column('FLUX', 'E', unit='FLAM', array=f), fits.Column('STATERROR', 'E', unit='FLAM', array=f / 150),
            fits.Column('SYSERROR', 'E', unit='FLAM', array=f / 100), fits.Column('FWHM', 'E', array=np.full(n, 5.5)),
            fits.Column('DATAQUAL', 'I', unit='NONE', array=dataqual), fits.Column('TOTEXP', 'E', array=np.full(n, 100.0))]
    tab = fits.BinTableHDU.from_columns(fits.ColDefs(cols), name='SCI')
    tab.header.comments['TTYPE6'] = 'Data quality: 1=good, 0=bad'
    prim = fits.PrimaryHDU(header=header_of(COMMON_CARDS))
    prim.header.add_history(' All wavelengths are in vacuum.')
    write_fits('tab-dataqual.fits', [prim, tab])
    record('tab-dataqual.fits', 'HST flux-standard style table with DATAQUAL (1 = good, 0 = bad)',
           'DATAQUAL = 0 is bad, as its column comment says; vacuum from HISTORY', CALSPEC, air_to_vac(lin), True, hdu=1,
           masked=5, error=True)
    qual = np.zeros(n, dtype=np.int16)
    qual[[9, 10]] = 16
    table('tab-quality.fits', 'Binary table rows with a QUALITY column', 'QUALITY ≠ 0 is bad', COMMON,
          [fits.Column('WAVE', 'D', unit='Angstrom', array=lin), fits.Column('FLUX', 'E', array=f),
           fits.Column('QUALITY', 'I', array=qual)], lin, False, masked=2)

    vac = air_to_vac(lin)
    table('tab-wave-vac-column.fits', 'Binary table rows: WAVE_VAC, FLUX', 'the column name says vacuum', COMMON,
          [fits.Column('WAVE_VAC', 'D', unit='Angstrom', array=vac), fits.Column('FLUX', 'E', array=f)], vac, True)
    table('tab-wave-air-column.fits', 'Binary table rows: WAVE_AIR, FLUX', 'the column name says air', COMMON,
          [fits.Column('WAVE_AIR', 'D', unit='Angstrom', array=lin), fits.Column('FLUX', 'E', array=f)], lin, False)
    table('tab-airorvac-vac.fits', "Binary table rows, AIRORVAC = 'vac'", 'AIRORVAC', COMMON,
          [fits.Column('WAVELENGTH', 'D', unit='Angstrom', array=vac), fits.Column('FLUX', 'E', array=f)], vac, True,
          tab_cards=[('AIRORVAC', 'vac')])
    tab = fits.BinTableHDU.from_columns(fits.ColDefs([fits.Column('WAVELENGTH', 'D', unit='Angstrom', array=vac),
                                                      fits.Column('FLUX', 'E', array=f)]), name='SPECTRUM')
    tab.header.comments['TTYPE1'] = 'vacuum wavelength'
    write_fits('tab-column-comment-vacuum.fits', [fits.PrimaryHDU(header=header_of(COMMON_CARDS)), tab])
    record('tab-column-comment-vacuum.fits', 'Binary table rows, the TTYPE1 comment says vacuum', 'column comment',
           COMMON, vac, True, hdu=1)

    # ASCII table extension.
    t = fits.TableHDU.from_columns(fits.ColDefs([fits.Column('WAVE', 'F10.3', unit='Angstrom', array=lin),
                                                 fits.Column('FLUX', 'E15.7', array=f)]), name='SPECTRUM')
    write_fits('tab-ascii.fits', [fits.PrimaryHDU(header=header_of(COMMON_CARDS)), t])
    record('tab-ascii.fits', "ASCII table extension (XTENSION = 'TABLE')", 'TFORM F/E fields', FITS_STD,
           np.round(lin, 3), False, hdu=1)


# ---------------------------------------------------------------- text

def text(name, layout, convention, source, body, stored, vacuum, encoding='utf-8', warn=None, masked=None, error=False):
    with open(path(name), 'w', encoding=encoding, newline='') as fh:
        fh.write(body)
    record(name, layout, convention, source, stored, vacuum, warn=warn, masked=masked, error=error)


def texts():
    n = 1500
    lin = 3800.0 + 1.0 * np.arange(n)
    f = flux_at(lin)
    rows = lambda w, fl, fmt='{:.3f} {:.6e}\n': ''.join(fmt.format(a, b) for a, b in zip(w, fl))
    text('txt-plain.txt', 'Text: two whitespace columns, no header', 'Å and air assumed', COMMON, rows(lin, f), lin, False)
    text('txt-csv-header.csv', 'Text: CSV with a header row wavelength,flux,error', 'header names the columns', COMMON,
         'wavelength,flux,error\n' + ''.join(f'{a:.3f},{b:.6e},{b / 150:.3e}\n' for a, b in zip(lin, f)), lin, False,
         error=True)
    nm = np.round(lin / 10, 2)
    text('txt-wavelength-nm-comment.txt', 'Text: "# Wavelength [nm]    Normalized Amplitude" comment line (library style)',
         'the unit is named only in the commented header line', COMMON,
         '# File SYNTH-F5V\n# Wavelength [nm]    Normalized Amplitude\n' + ''.join(f'   {a:.2f}         {b:.4f}\n' for a, b in zip(nm, flux_at(nm * 10) * 800)),
         nm * 10, False)
    vac = air_to_vac(lin)
    text('txt-wave-vac.txt', 'Text: header "wave_vac flux"', 'the column name says vacuum', COMMON,
         'wave_vac flux\n' + rows(vac, f), vac, True)
    text('txt-wave-air.csv', 'Text: header "wave_air,flux,err"', 'the column name says air', COMMON,
         'wave_air,flux,err\n' + ''.join(f'{a:.3f},{b:.6e},{b / 150:.3e}\n' for a, b in zip(lin, f)), lin, False, error=True)
    text('txt-lambda-angstrom-bom.tsv', 'Text: UTF-8 with a byte-order mark, header "λ (Å)<tab>flux"', 'λ with its unit',
         COMMON, '\ufeffλ (Å)\tflux\n' + ''.join(f'{a:.3f}\t{b:.6e}\n' for a, b in zip(lin, f)), lin, False)
    text('txt-keyword-preamble.txt', 'Text: FITS-like keyword lines without # before the data', 'preamble of KEY = value',
         COMMON, "OBJECT  = 'SYNTH-F5V'\nEXPTIME = 900\nDATE-OBS= '2026-03-14T02:10:00'\nCUNIT1  = 'nm'\n"
         + rows(nm, flux_at(nm * 10), '{:.2f} {:.6e}\n'), nm * 10, False)
    text('txt-colon-preamble.txt', 'Text: "Key: value" lines without # before the data', 'preamble of Key: value',
         COMMON, 'Object: SYNTH-F5V\nObserver: night crew\nExposure: 900 s\nWavelength unit: Angstrom\n\n' + rows(lin, f), lin,
         False)
    t = Table([lin, f, f / 150], names=('wave', 'flux', 'err'))
    t['wave'].unit = 'Angstrom'
    t['flux'].unit = 'erg / (Angstrom cm2 s)'
    t['err'].unit = 'erg / (Angstrom cm2 s)'
    t.meta['keywords'] = {'OBJECT': {'value': 'SYNTH-F5V'}}
    buf = io.StringIO()
    t.write(buf, format='ascii.ipac')
    text('txt-ipac.tbl', 'IPAC table: |name| rows for names, types and units', 'IPAC header rows', IPAC_DOC, buf.getvalue(),
         lin, False, error=True)
    text('txt-units-row.txt', 'Text: a header row followed by a units row', 'second row holds the units', COMMON,
         'wavelength flux error\nnm erg/s/cm2/A erg/s/cm2/A\n' + ''.join(f'{a:.2f} {b:.6e} {b / 150:.3e}\n' for a, b in zip(nm, flux_at(nm * 10))),
         nm * 10, False, error=True)
    text('txt-decimal-comma.csv', 'Text: decimal commas with ; separators', 'decimal comma', COMMON,
         'Wellenlänge;Fluss\n'.replace('Wellenlänge', 'wavelength').replace('Fluss', 'flux')
         + ''.join(f'{a:.3f};{b:.6f}\n'.replace('.', ',') for a, b in zip(lin, f)), lin, False)
    text('txt-converted-to-vacuum.txt', 'Text: comment "converted from air to vacuum"', 'the last medium named wins',
         COMMON, '# wavelengths converted from air to vacuum (Morton 2000)\n' + rows(vac, f), vac, True)
    text('txt-converted-to-air.txt', 'Text: comment "vacuum wavelengths converted to air"', 'as above', COMMON,
         '# vacuum wavelengths converted to air\n' + rows(lin, f), lin, False)
    text('txt-vacuum-comment.txt', 'Text: comment "Vacuum wavelengths"', 'comment names the medium', COMMON,
         '# Vacuum wavelengths, Angstrom\n' + rows(vac, f), vac, True)
    t = Table([nm, flux_at(nm * 10)], names=('wavelength', 'flux'))
    t['wavelength'].unit = 'nm'
    buf = io.StringIO()
    t.write(buf, format='ascii.ecsv')
    text('txt-ecsv.ecsv', 'Astropy ECSV with the unit in the YAML header', 'unit from the ECSV header', ECSV_DOC,
         buf.getvalue(), nm * 10, False)
    t = Table([lin, f], names=('wavelength', 'flux'))
    buf = io.StringIO()
    astro_ascii.write(t, buf, format='fixed_width', formats={'wavelength': '%.3f', 'flux': '%.6e'})
    text('txt-fixed-width.txt', "Astropy fixed_width table ('|' delimited)", 'pipes between columns', COMMON,
         buf.getvalue(), lin, False)
    text('txt-four-columns.txt', 'Text: four named columns wavelength flux error sky', 'columns by name', COMMON,
         'wavelength flux error sky\n' + ''.join(f'{a:.3f} {b:.6e} {b / 150:.3e} 0.1\n' for a, b in zip(lin, f)), lin,
         False, error=True)
    text('txt-tab-ivar.tsv', 'Text: tab-separated with ivar', 'error = 1/√ivar', COMMON,
         'wave\tflux\tivar\n' + ''.join(f'{a:.3f}\t{b:.6e}\t{22500 if i != 77 else 0}\n' for i, (a, b) in enumerate(zip(lin, f))),
         lin, False, masked=1, error=True)
    text('txt-latin1-angstrom.txt', 'Text in Latin-1 with "Wavelength (Å)" header', 'Latin-1 Å', COMMON,
         'Wavelength (Å)   Flux\n' + rows(lin, f), lin, False, encoding='latin-1')


# ---------------------------------------------------------------- refusals

def refusals():
    frame = RNG.normal(100, 5, (120, 200)).astype('>f4')
    write_fits('refuse-2d-frame.fits', [fits.PrimaryHDU(data=frame)])
    refused('refuse-2d-frame.fits', '2-D frame (200 × 120), not extracted', 'not a spectrum', COMMON, 'NOT_A_SPECTRUM')
    n = 1500
    h = header_of([('CTYPE1', 'FREQ'), ('CUNIT1', 'Hz'), ('CRVAL1', 7.5e14), ('CDELT1', 1e11), ('CRPIX1', 1.0)])
    write_fits('refuse-frequency-axis.fits', [fits.PrimaryHDU(data=f32(np.ones(n)), header=h)])
    refused('refuse-frequency-axis.fits', 'FITS image with a frequency axis', 'not wavelength', WCS_PAPER,
            'NO_WAVELENGTH_SCALE')
    cols = fits.ColDefs([fits.Column('WAVE', 'D', array=3800.0 + np.arange(n)), fits.Column('SKY', 'E', array=np.ones(n))])
    write_fits('refuse-table-no-flux.fits', [fits.PrimaryHDU(), fits.BinTableHDU.from_columns(cols)])
    refused('refuse-table-no-flux.fits', 'Binary table without a flux column', 'no flux', COMMON, 'NOT_A_SPECTRUM')
    write_fits('refuse-no-wcs.fits', [fits.PrimaryHDU(data=f32(np.ones(n)))])
    refused('refuse-no-wcs.fits', 'FITS image without any wavelength keywords', 'no scale', COMMON, 'NO_WAVELENGTH_SCALE')
    red = 5600.0 + np.arange(n)
    write_fits('refuse-red-only.fits', [fits.PrimaryHDU(data=f32(flux_at(red)), header=header_of(
        [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 5600.0), ('CDELT1', 1.0), ('CRPIX1', 1.0)]))])
    refused('refuse-red-only.fits', 'Spectrum 5600–7100 Å only', 'no coverage of the classification region', COMMON,
            'NO_COVERAGE')
    nm = np.round((3800.0 + np.arange(n)) / 10, 1)
    with open(path('refuse-nm-no-unit.txt'), 'w') as fh:
        fh.write(''.join(f'{a:.1f} {b:.5f}\n' for a, b in zip(nm, flux_at(nm * 10))))
    refused('refuse-nm-no-unit.txt', 'Text in nm with no unit anywhere', 'unit cannot be known', COMMON, 'NOT_OPTICAL')


def main():
    os.makedirs(OUT, exist_ok=True)
    for f in os.listdir(OUT):
        if f != 'PROVENANCE.md':
            os.remove(path(f))
    images()
    multispecs()
    survey_and_cubes()
    extensions()
    tables()
    texts()
    refusals()
    out = {'generator': 'tests/reference/make_reader_corpus.py', 'astropy': astropy.__version__, 'numpy': np.__version__,
           'knownSpectrum': {'model': MODEL_ID, 'library': 'templates/model-v1', 'manifestSha256': MANIFEST_SHA,
                             'range': KNOWN_RANGE, 'snr': 150},
           'tolerances': {'rangeAngstrom': 0.05}, 'files': ENTRIES}
    with open(path('corpus.json'), 'w') as fh:
        json.dump(out, fh, indent=1)
        fh.write('\n')
    print(f'{len(ENTRIES)} files ({sum(e["expect"] == "read" for e in ENTRIES)} readable, '
          f'{sum(e["expect"] == "refused" for e in ENTRIES)} to refuse)')


if __name__ == '__main__':
    main()
