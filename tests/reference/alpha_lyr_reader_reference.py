#!/usr/bin/python3
"""Reference values for reading tests/fixtures/real/alpha_lyr_stis_010.fits, from astropy.

Run with Debian's interpreter: /usr/bin/python3 tests/reference/alpha_lyr_reader_reference.py
Writes tests/reference/alpha_lyr_reader_reference.json: row count, wavelength range (Å, vacuum,
as stored), column units, and WAVELENGTH/FLUX/STATERROR at sampled rows, as astropy reads them.
"""
import json
import os

import astropy
import numpy as np
from astropy.io import fits

HERE = os.path.dirname(os.path.abspath(__file__))
PATH = os.path.join(HERE, '..', 'fixtures', 'real', 'alpha_lyr_stis_010.fits')

with fits.open(PATH) as hdul:
    t = hdul[1]
    wave = np.asarray(t.data['WAVELENGTH'], dtype=float)
    flux = np.asarray(t.data['FLUX'], dtype=float)
    err = np.asarray(t.data['STATERROR'], dtype=float)
    rows = sorted({0, 1, 1000, 2000, 3000, 4000, 5000, 6000, 7000, 8000, len(wave) - 1}
                  | set(np.nonzero((wave > 3900) & (wave < 4900))[0][::150].tolist()))
    out = {
        'source': 'astropy.io.fits', 'astropy': astropy.__version__, 'numpy': np.__version__,
        'script': 'tests/reference/alpha_lyr_reader_reference.py',
        'hdu': 1, 'extname': t.header['EXTNAME'].strip(), 'rows': int(len(wave)),
        'wavelengthMin': float(wave.min()), 'wavelengthMax': float(wave.max()),
        'ascending': bool(np.all(np.diff(wave) > 0)),
        'units': {c.name: c.unit for c in t.columns},
        'finiteFlux': int(np.isfinite(flux).sum()),
        'pixelsIn3900to4900Vacuum': int(((wave >= 3900) & (wave <= 4900)).sum()),
        'sample': {'rows': rows, 'wavelength': [float(wave[i]) for i in rows],
                   'flux': [float(flux[i]) for i in rows], 'staterror': [float(err[i]) for i in rows]},
    }
with open(os.path.join(HERE, 'alpha_lyr_reader_reference.json'), 'w') as fh:
    json.dump(out, fh, indent=1)
    fh.write('\n')
