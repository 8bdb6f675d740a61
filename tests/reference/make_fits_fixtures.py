#!/usr/bin/python3
"""Writes the small FITS fixtures of tests/fixtures/fits/ and, beside each, the reference values
the TypeScript readers are checked against.

Run with Debian's interpreter (astropy 5.2.1, numpy 1.24 from python3-astropy / python3-numpy):
    /usr/bin/python3 tests/reference/make_fits_fixtures.py

Every <name>.fits gets a <name>.json holding, for a sample of pixel indices (0-based):
  - wavelength: as the file states it, in Angstrom, before any air/vacuum change. Computed by
    astropy.wcs (FITS WCS Paper III, Greisen et al. 2006) where the layout is a standard spectral
    WCS; by numpy from the stated convention where astropy.wcs has no notion of it (IRAF DC-FLAG,
    survey COEFF0/COEFF1, table columns) -- the "method" field says which.
  - flux (and error where the file has one): as astropy.io.fits returns it (BSCALE/BZERO applied,
    BLANK -> NaN, written as null).
Fluxes are smooth synthetic curves with a few absorption dips; no real object is modelled.
"""
import json
import os

import astropy
import numpy as np
from astropy.io import fits
from astropy.wcs import WCS

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'fixtures', 'fits')
VERSIONS = {'astropy': astropy.__version__, 'numpy': np.__version__,
            'script': 'tests/reference/make_fits_fixtures.py'}
RNG = np.random.default_rng(20240611)


def synthetic_flux(wave_aa):
    """A sloped continuum with Gaussian dips at a few Balmer-like positions (Å)."""
    w = np.asarray(wave_aa, dtype=float)
    f = 1.0 + 0.3 * (w - w.mean()) / (w.max() - w.min())
    for centre, depth, sigma in ((4101.7, 0.4, 6.0), (4340.5, 0.45, 6.0), (4861.3, 0.5, 7.0)):
        f = f - depth * np.exp(-0.5 * ((w - centre) / sigma) ** 2)
    return f + RNG.normal(0.0, 0.005, w.size)


def sample_indices(n, count=60):
    idx = sorted(set(np.linspace(0, n - 1, count).round().astype(int).tolist()) | {0, 1, n - 2, n - 1})
    return idx


def clean(values):
    return [None if not np.isfinite(v) else float(v) for v in values]


def spectral_wcs_angstrom(header, naxis1):
    """Pixel -> wavelength (Å) of axis 1 by astropy.wcs; wcslib turns spectral units into SI."""
    w = WCS(header).sub([1])
    pix = np.arange(naxis1, dtype=float)
    world = w.all_pix2world(pix, 0)[0]
    unit = str(w.wcs.cunit[0])
    factor = {'m': 1e10, 'nm': 10.0, 'Angstrom': 1.0, 'um': 1e4, '': 1.0}[unit]
    return world * factor, unit


def write(name, hdul, ref):
    path = os.path.join(OUT, name + '.fits')
    if hdul is not None:
        hdul.writeto(path, overwrite=True)
    ref.update(VERSIONS)
    ref['file'] = name + '.fits'
    with open(os.path.join(OUT, name + '.json'), 'w') as fh:
        json.dump(ref, fh, indent=None, separators=(',', ':'))
        fh.write('\n')


def ref_from(wave, flux, method, vacuum, hdu, error=None, extra=None):
    idx = sample_indices(len(wave))
    ref = {'method': method, 'vacuum': vacuum, 'hdu': hdu, 'pixels': int(len(wave)), 'indices': idx,
           'wavelength': [float(wave[i]) for i in idx], 'flux': clean([flux[i] for i in idx])}
    if error is not None:
        ref['error'] = clean([error[i] for i in idx])
    if extra:
        ref.update(extra)
    return ref


def image_fixture(name, n, cards, dtype=np.float32, vacuum=False, method='astropy.wcs', wave_fn=None,
                  raw_fn=None):
    header = fits.Header()
    for k, v in cards:
        header[k] = v
    if wave_fn is None:
        wave, _ = spectral_wcs_angstrom(header, n)
    else:
        wave = wave_fn(header, n)
    flux = synthetic_flux(wave)
    data = raw_fn(flux) if raw_fn else flux.astype(dtype)
    hdu = fits.PrimaryHDU(data=data)
    for k, v in cards:
        hdu.header[k] = v
    write(name, fits.HDUList([hdu]), {})
    # Read back through astropy so the reference flux is what the file holds after scaling.
    with fits.open(os.path.join(OUT, name + '.fits')) as back:
        stored = np.asarray(back[0].data, dtype=float)
    write(name, None, ref_from(wave, stored, method, vacuum, 0))


def main():
    os.makedirs(OUT, exist_ok=True)
    common = [('OBJECT', 'SYNTH-A'), ('RA', '12:00:00.0'), ('DEC', '+10:00:00'),
              ('DATE-OBS', '2023-04-01T02:03:04'), ('EXPTIME', 600.0), ('INSTRUME', 'TESTSPEC')]

    # 1. Linear air wavelengths, CDELT1, float32; 4000 pixels (also the reader benchmark file).
    image_fixture('image_awav_cdelt_f32', 4000,
                  [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3600.0), ('CDELT1', 0.5),
                   ('CRPIX1', 1.0), ('BUNIT', 'erg/s/cm2/Angstrom'), ('SPECRES', 2000.0)] + common)

    # 2. Vacuum (WAVE), CD1_1, nm, float64, reference pixel off the first pixel.
    image_fixture('image_wave_cd_nm_f64', 3000,
                  [('CTYPE1', 'WAVE'), ('CUNIT1', 'nm'), ('CRVAL1', 440.0), ('CD1_1', 0.05),
                   ('CRPIX1', 1500.5)] + common, dtype=np.float64, vacuum=True)

    # 3. WAVE-LOG (Paper III logarithmic axis: lambda = CRVAL exp(CDELT (p - CRPIX) / CRVAL)).
    image_fixture('image_wavelog', 3000,
                  [('CTYPE1', 'WAVE-LOG'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3700.0), ('CDELT1', 0.37),
                   ('CRPIX1', 1.0)], vacuum=True)

    # 4. IRAF log10-linear: DC-FLAG = 1, log10(lambda) = CRVAL1 + CDELT1 (p - CRPIX1).
    def dcflag_wave(header, n):
        p = np.arange(n) + 1.0
        return 10 ** (header['CRVAL1'] + header['CDELT1'] * (p - header['CRPIX1']))
    image_fixture('image_dcflag_log10', 2500,
                  [('CTYPE1', 'LINEAR'), ('CRVAL1', np.log10(3750.0)), ('CDELT1', 1e-4), ('CRPIX1', 1.0),
                   ('DC-FLAG', 1)], method='numpy: IRAF DC-FLAG=1 convention', wave_fn=dcflag_wave)

    # 5. Survey style: log10(lambda) = COEFF0 + COEFF1 i (i from 0), vacuum flagged by VACUUM = T.
    def coeff_wave(header, n):
        return 10 ** (header['COEFF0'] + header['COEFF1'] * np.arange(n))
    image_fixture('image_coeff_log10_vacuum', 2200,
                  [('COEFF0', 3.5700), ('COEFF1', 1e-4), ('VACUUM', True)],
                  vacuum=True, method='numpy: COEFF0/COEFF1 survey convention', wave_fn=coeff_wave)

    # 6. 16-bit integers with BSCALE/BZERO and BLANK pixels; no CTYPE1 or CUNIT1 (Å by convention).
    def int16_raw(flux):
        raw = np.round((flux * 100.0 - 100.0) / 0.01).astype('>i2')
        raw[[10, 11, 500]] = -32768
        return raw
    image_fixture('image_int16_bscale_blank', 1800,
                  [('CRVAL1', 3800.0), ('CDELT1', 0.7), ('CRPIX1', 1.0), ('BSCALE', 0.01), ('BZERO', 100.0),
                   ('BLANK', -32768)], raw_fn=int16_raw, method='astropy.wcs')

    # 7. 32-bit integers, CUNIT1 in micrometres.
    image_fixture('image_int32_um', 1500,
                  [('CTYPE1', 'AWAV'), ('CUNIT1', 'um'), ('CRVAL1', 0.38), ('CDELT1', 0.0001), ('CRPIX1', 1.0)],
                  raw_fn=lambda f: np.round(f * 1e6).astype('>i4'))

    # 8. 8-bit unsigned pixels with BZERO, a descending axis in metres.
    image_fixture('image_uint8_desc_m', 1200,
                  [('CTYPE1', 'AWAV'), ('CUNIT1', 'm'), ('CRVAL1', 5.2e-7), ('CDELT1', -1.1e-10),
                   ('CRPIX1', 1.0), ('BZERO', 0.0), ('BSCALE', 0.01)],
                  raw_fn=lambda f: np.clip(np.round(f * 100.0), 0, 255).astype(np.uint8))

    # 9. Reducer multispec output: NAXIS=3 (n x 1 x 4 planes), equispec linear, BANDID names the planes.
    n = 2000
    hdr = fits.Header()
    for k, v in [('CTYPE1', 'LINEAR'), ('CRVAL1', 3650.0), ('CD1_1', 0.65), ('CRPIX1', 1.0),
                 ('CTYPE2', 'LINEAR'), ('CTYPE3', 'LINEAR'), ('CD2_2', 1.0), ('CD3_3', 1.0),
                 ('WAT0_001', 'system=equispec'), ('WAT1_001', 'wtype=linear label=Wavelength units=angstroms'),
                 ('WAT2_001', 'wtype=linear'), ('WAT3_001', 'wtype=linear'),
                 ('BANDID1', 'spectrum - background fit, weights variance, clean yes'),
                 ('BANDID2', 'raw - background fit, weights none, clean no'),
                 ('BANDID3', 'background - background fit'),
                 ('BANDID4', 'sigma - background fit, weights variance, clean yes'), ('APNUM1', '1 1 10.5 20.5')]:
        hdr[k] = v
    wave, _ = spectral_wcs_angstrom(hdr, n)
    flux = synthetic_flux(wave)
    cube = np.zeros((4, 1, n), dtype=np.float32)
    cube[0, 0] = flux
    cube[1, 0] = flux * 1.1
    cube[2, 0] = 0.05
    cube[3, 0] = 0.02 + 0.001 * np.arange(n) / n
    write('image_multispec_3d', fits.HDUList([fits.PrimaryHDU(data=cube, header=hdr)]),
          ref_from(wave, cube[0, 0].astype(float), 'astropy.wcs (axis 1)', False, 0,
                   error=cube[3, 0].astype(float)))

    # 10. Two apertures in a 2-D multispec-style image: the first row is read.
    n = 1600
    hdr = fits.Header()
    for k, v in [('CTYPE1', 'LINEAR'), ('CRVAL1', 3700.0), ('CDELT1', 0.8), ('CRPIX1', 1.0),
                 ('APNUM1', '1 1 10.5 20.5'), ('APNUM2', '2 2 30.5 40.5')]:
        hdr[k] = v
    wave, _ = spectral_wcs_angstrom(hdr, n)
    img = np.vstack([synthetic_flux(wave), synthetic_flux(wave) * 0.5]).astype(np.float32)
    write('image_multispec_2d', fits.HDUList([fits.PrimaryHDU(data=img, header=hdr)]),
          ref_from(wave, img[0].astype(float), 'astropy.wcs (axis 1)', False, 0))

    # 11. A 2-D frame (many rows): not a spectrum.
    frame = RNG.normal(100.0, 5.0, (60, 80)).astype(np.float32)
    write('image_2d_frame', fits.HDUList([fits.PrimaryHDU(data=frame)]),
          {'refused': 'NOT_A_SPECTRUM', 'method': 'none: refusal case'})

    # 12. Binary table, one row per pixel: WAVE in nm (D), FLUX (E), IVAR (E), air stated by AIRORVAC.
    n = 4000
    wave_nm = 360.0 + 0.03 * np.arange(n)
    flux = synthetic_flux(wave_nm * 10)
    ivar = np.full(n, 1.0 / 0.01 ** 2)
    ivar[[5, 6]] = 0.0
    cols = fits.ColDefs([fits.Column('WAVE', 'D', unit='nm', array=wave_nm),
                         fits.Column('FLUX', 'E', unit='erg/s/cm2/Angstrom', array=flux),
                         fits.Column('IVAR', 'E', array=ivar)])
    tab = fits.BinTableHDU.from_columns(cols, name='SPECTRUM')
    tab.header['AIRORVAC'] = 'air'
    prim = fits.PrimaryHDU()
    for k, v in common:
        prim.header[k] = v
    write('table_rows_nm_ivar', fits.HDUList([prim, tab]),
          ref_from(wave_nm * 10, flux.astype(np.float32).astype(float), 'numpy: column values x 10 (nm -> Å)',
                   False, 1, error=clean(1 / np.sqrt(ivar)), extra={'maskedIndices': [5, 6]}))

    # 13. Binary table, one row of array columns: LAMBDA (Å, vacuum per the VACUUM keyword), FLUX_DENSITY, SIGMA.
    n = 2000
    wave = 3850.0 + 0.5 * np.arange(n)
    flux = synthetic_flux(wave)
    sigma = np.full(n, 0.02, dtype=np.float32)
    cols = fits.ColDefs([fits.Column('lambda', f'{n}D', unit='Angstrom', array=wave[None, :]),
                         fits.Column('Flux_Density', f'{n}E', unit='adu', array=flux[None, :]),
                         fits.Column('sigma', f'{n}E', unit='adu', array=sigma[None, :])])
    tab = fits.BinTableHDU.from_columns(cols)
    tab.header['VACUUM'] = (True, 'wavelengths are in vacuum')
    write('table_array_row_vacuum', fits.HDUList([fits.PrimaryHDU(), tab]),
          ref_from(wave, flux.astype(np.float32).astype(float), 'numpy: column values', True, 1,
                   error=sigma.astype(float)))

    # 14. Survey-style LOGLAM table (log10 Å), FLUX, IVAR; HISTORY says vacuum.
    n = 2500
    loglam = (3.57 + 1e-4 * np.arange(n)).astype(np.float32)
    wave = 10 ** loglam.astype(float)
    flux = synthetic_flux(wave)
    cols = fits.ColDefs([fits.Column('flux', 'E', array=flux), fits.Column('loglam', 'E', array=loglam),
                         fits.Column('ivar', 'E', array=np.full(n, 400.0))])
    tab = fits.BinTableHDU.from_columns(cols, name='COADD')
    tab.header.add_history('All wavelengths are in vacuum.')
    write('table_loglam', fits.HDUList([fits.PrimaryHDU(), tab]),
          ref_from(wave, flux.astype(np.float32).astype(float), 'numpy: 10**LOGLAM (float32 column)', True, 1,
                   error=[0.05] * n))

    # 15. Multi-extension: empty primary, a 2-D frame, a table spectrum, a 1-D sky spectrum image.
    n = 1500
    wave = 3800.0 + 0.9 * np.arange(n)
    flux = synthetic_flux(wave)
    frame = fits.ImageHDU(data=RNG.normal(0, 1, (40, 50)).astype(np.float32), name='FRAME')
    cols = fits.ColDefs([fits.Column('WAVELENGTH', 'D', unit='Angstrom', array=wave),
                         fits.Column('FLUX', 'E', array=flux), fits.Column('ERR', 'E', array=np.full(n, 0.03))])
    sci = fits.BinTableHDU.from_columns(cols, name='SCI')
    sky_hdr = fits.Header()
    for k, v in [('CTYPE1', 'AWAV'), ('CUNIT1', 'Angstrom'), ('CRVAL1', 3900.0), ('CDELT1', 1.2), ('CRPIX1', 1.0)]:
        sky_hdr[k] = v
    sky_n = 900
    sky_wave, _ = spectral_wcs_angstrom(sky_hdr, sky_n)
    sky_flux = (0.2 + 0.01 * np.sin(np.arange(sky_n) / 10)).astype(np.float32)
    sky = fits.ImageHDU(data=sky_flux, header=sky_hdr, name='SKY')
    ref = ref_from(wave, flux.astype(np.float32).astype(float), 'numpy: column values', False, 2,
                   error=[float(np.float32(0.03))] * n)
    sky_ref = ref_from(sky_wave, sky_flux.astype(float), 'astropy.wcs', False, 3)
    ref['spectrumHdus'] = [2, 3]
    ref['sky'] = sky_ref
    write('mef_frame_table_sky', fits.HDUList([fits.PrimaryHDU(), frame, sci, sky]), ref)

    # 16. Table without a flux column: not a spectrum.
    cols = fits.ColDefs([fits.Column('WAVE', 'D', array=np.arange(500.0) + 4000),
                         fits.Column('TEMP', 'E', array=np.zeros(500))])
    write('table_no_flux', fits.HDUList([fits.PrimaryHDU(), fits.BinTableHDU.from_columns(cols)]),
          {'refused': 'NOT_A_SPECTRUM', 'method': 'none: refusal case'})


if __name__ == '__main__':
    main()
