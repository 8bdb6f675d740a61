#!/usr/bin/python3
"""Reference values for reading tests/fixtures/real/bd_75d325_stis_001.fits (an HST CALSPEC table
with a DATAQUAL column, 1 = good, 0 = bad) from astropy.

Run with Debian's interpreter: /usr/bin/python3 tests/reference/calspec_dataqual_reference.py
Writes tests/reference/out/calspec_dataqual.json: rows, the DATAQUAL convention as the column
comment states it, the pixels it flags, the stored (vacuum) range, the same range in air by the
IAU formula of Morton (2000) as written in ../shared/REFERENCE.md (λ < 2000 Å left as is), and
sampled rows.
"""
import json
import os
import warnings

import astropy
import numpy as np
from astropy.io import fits
from astropy.io.fits.verify import VerifyWarning

warnings.simplefilter('ignore', VerifyWarning)  # the file's TNULLn on float columns are not standard
HERE = os.path.dirname(os.path.abspath(__file__))
PATH = os.path.join(HERE, '..', 'fixtures', 'real', 'bd_75d325_stis_001.fits')


def vac_to_air(vac):
    s2 = (1e4 / vac) ** 2
    n = 1 + 8.34254e-5 + 2.406147e-2 / (130 - s2) + 1.5998e-4 / (38.9 - s2)
    return vac if vac < 2000 else vac / n


with fits.open(PATH) as hdul:
    t = hdul[1]
    wave = np.asarray(t.data['WAVELENGTH'], dtype=float)
    flux = np.asarray(t.data['FLUX'], dtype=float)
    err = np.asarray(t.data['STATERROR'], dtype=float)
    qual = np.asarray(t.data['DATAQUAL'], dtype=float)
    rows = sorted({0, 1, 500, 1000, 1500, 2000, 2500, 3000, len(wave) - 1} | set(np.nonzero(qual == 0)[0][:3].tolist()))
    bad = qual == 0
    out = {
        'source': 'astropy.io.fits', 'astropy': astropy.__version__, 'numpy': np.__version__,
        'script': 'tests/reference/calspec_dataqual_reference.py',
        'hdu': 1, 'extname': t.header['EXTNAME'].strip(), 'rows': int(len(wave)),
        'dataqualComment': t.header.comments['TTYPE6'],
        'dataqualValues': sorted(set(float(v) for v in qual)),
        'flaggedByDataqual': int(bad.sum()),
        'nonFiniteFlux': int((~np.isfinite(flux)).sum()),
        'negativeError': int((err < 0).sum()),
        'wavelengthMin': float(wave.min()), 'wavelengthMax': float(wave.max()),
        'airMin': float(vac_to_air(wave.min())), 'airMax': float(vac_to_air(wave.max())),
        'history': [h for h in hdul[0].header['HISTORY'] if 'vacuum' in h.lower()],
        'sample': {'rows': rows, 'wavelength': [float(wave[i]) for i in rows], 'flux': [float(flux[i]) for i in rows],
                   'staterror': [float(err[i]) for i in rows], 'dataqual': [float(qual[i]) for i in rows]},
    }
with open(os.path.join(HERE, 'out', 'calspec_dataqual.json'), 'w') as fh:
    json.dump(out, fh, indent=1)
    fh.write('\n')
