"""Dumps the A0 V standard (tests/fixtures/real/alpha_lyr_stis_010.fits) for the TypeScript tests.

Reads WAVELENGTH (vacuum, Å), FLUX and STATERROR with astropy, converts wavelengths to air with the
IAU formula of Morton (2000) -- the same formula as shared/airvac.ts -- and keeps 3600-7200 Å.
Run with Debian's python:  /usr/bin/python3 tests/reference/specutils_dump_alpha_lyr.py
Writes tests/reference/out/alpha_lyr_air.json.
"""
import json
import pathlib

import astropy
import numpy as np
from astropy.io import fits

ROOT = pathlib.Path(__file__).resolve().parents[2]


def vacuum_to_air(vac):
    s2 = (1e4 / vac) ** 2
    n = 1 + 8.34254e-5 + 2.406147e-2 / (130 - s2) + 1.5998e-4 / (38.9 - s2)
    return vac / n


with fits.open(ROOT / 'tests/fixtures/real/alpha_lyr_stis_010.fits') as hdul:
    data = hdul[1].data
    vac = np.asarray(data['WAVELENGTH'], dtype=float)
    flux = np.asarray(data['FLUX'], dtype=float)
    err = np.asarray(data['STATERROR'], dtype=float)

keep = (vac >= 3600) & (vac <= 7200)
air = vacuum_to_air(vac[keep])
out = {
    'source': 'tests/fixtures/real/alpha_lyr_stis_010.fits, HDU 1, cropped to 3600-7200 Å (vacuum)',
    'made_by': 'tests/reference/specutils_dump_alpha_lyr.py',
    'versions': {'astropy': astropy.__version__, 'numpy': np.__version__},
    'wavelength_air': [round(float(x), 6) for x in air],
    'flux': [float(f'{x:.6e}') for x in flux[keep]],
    'error': [float(f'{x:.6e}') for x in err[keep]],
}
(ROOT / 'tests/reference/out').mkdir(parents=True, exist_ok=True)
(ROOT / 'tests/reference/out/alpha_lyr_air.json').write_text(json.dumps(out))
print(f'{keep.sum()} pixels, {air[0]:.2f}-{air[-1]:.2f} Å (air)')
