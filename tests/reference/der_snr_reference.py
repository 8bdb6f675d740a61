"""DER_SNR reference values (Stoehr, Seaman & Zender 2008, ASP Conf. Ser. 394, 505).

`der_snr` below reproduces the logic of the authors' published der_snr.py, written here from memory:
drop zero-valued pixels, then S = median(flux), N = 0.6052697 * median(|2 f[i] - f[i-2] - f[i+2]|)
(0.6052697 = 1.482602 / sqrt(6)); fewer than 5 pixels gives 0.
Inputs: the dumped A0 V spectrum (tests/reference/out/alpha_lyr_air.json) over several ranges, and
seeded Gaussian-noise arrays (numpy default_rng) whose values are written out so the TypeScript test
uses the same numbers.
Run with Debian's python:  /usr/bin/python3 tests/reference/der_snr_reference.py
Writes tests/reference/out/der_snr.json.
"""
import json
import pathlib

import numpy as np

ROOT = pathlib.Path(__file__).resolve().parents[2]


def der_snr(flux):
    flux = np.array(flux[np.where(flux != 0.0)])
    n = len(flux)
    if n > 4:
        signal = np.median(flux)
        noise = 0.6052697 * np.median(np.abs(2.0 * flux[2:n - 2] - flux[0:n - 4] - flux[4:n]))
        return float(signal / noise)
    return 0.0


dump = json.loads((ROOT / 'tests/reference/out/alpha_lyr_air.json').read_text())
wave = np.array(dump['wavelength_air'])
flux = np.array(dump['flux'])
ranges = [[3600, 7200], [4000, 5000], [5000, 6000], [6000, 7200]]
real = [{'range': r, 'snr': der_snr(flux[(wave >= r[0]) & (wave <= r[1])])} for r in ranges]

rng = np.random.default_rng(20080101)
synthetic = []
for level, sigma, n in [(100.0, 1.0, 2000), (1.0, 0.05, 2000), (50.0, 5.0, 501)]:
    values = np.array([float(f'{v:.12g}') for v in level + sigma * rng.standard_normal(n)])
    synthetic.append({'level': level, 'sigma': sigma, 'true_snr': level / sigma,
                      'flux': values.tolist(), 'snr': der_snr(values)})
# Zero-valued pixels are dropped by the reference algorithm.
gapped = np.array(synthetic[0]['flux'])
gapped[100:140] = 0.0
synthetic.append({'level': 100.0, 'sigma': 1.0, 'true_snr': 100.0, 'zeroed': [100, 140],
                  'flux': gapped.tolist(), 'snr': der_snr(gapped)})

out = {
    'made_by': 'tests/reference/der_snr_reference.py',
    'algorithm': "Stoehr et al. 2008 DER_SNR, reference code's logic reproduced from memory",
    'versions': {'numpy': np.__version__},
    'real': real,
    'synthetic': synthetic,
}
(ROOT / 'tests/reference/out/der_snr.json').write_text(json.dumps(out))
print([round(r['snr'], 2) for r in real], [round(s['snr'], 2) for s in synthetic])
