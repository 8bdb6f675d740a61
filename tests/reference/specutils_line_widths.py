"""Reference equivalent widths and FWHMs of Hβ, Hγ, Hδ and Ca II K in the A0 V standard, by specutils.

Steps (the TypeScript test repeats them with the project's own code):
1. Read the dumped spectrum (tests/reference/out/alpha_lyr_air.json, from specutils_dump_alpha_lyr.py).
2. Resample it onto the project's log-λ grid (DEFAULT_GRID) with specutils's FluxConservingResampler.
3. For each line, a straight pseudo-continuum through the mean flux of the blue and red side bands
   at their midpoints (pixel boxes cut fractionally at the band edges: the definition written in
   server/spectra/measure/line.ts), divide by it, then
   equivalent_width(spec, continuum=1, regions=SpectralRegion(window)) and
   fwhm(1 - rectified, regions=SpectralRegion(window)).
The grid, windows and side bands are read from shared/lines.ts and shared/grid.ts (through tsx), so
the table stays the one source of every wavelength.
Run with Debian's python:  /usr/bin/python3 tests/reference/specutils_line_widths.py
Writes tests/reference/out/specutils_line_widths.json.
"""
import json
import pathlib
import subprocess

import astropy
import astropy.units as u
import numpy as np
import specutils
from specutils import Spectrum1D, SpectralRegion
from specutils.analysis import equivalent_width, fwhm
from specutils.manipulation import FluxConservingResampler

ROOT = pathlib.Path(__file__).resolve().parents[2]
LINE_IDS = ['h-beta', 'h-gamma', 'h-delta', 'ca-ii-k']

script = (
    "import { CLASSIFICATION_LINES } from './shared/lines.ts';"
    "import { DEFAULT_GRID, gridWavelengths } from './shared/grid.ts';"
    "console.log(JSON.stringify({ lines: CLASSIFICATION_LINES, grid: DEFAULT_GRID,"
    " wavelengths: Array.from(gridWavelengths(DEFAULT_GRID)) }))"
)
table = json.loads(subprocess.run([str(ROOT / 'node_modules/.bin/tsx'), '-e', script], cwd=ROOT,
                                  check=True, capture_output=True, text=True).stdout)
lines = {line['id']: line for line in table['lines']}
grid_wave = np.array(table['wavelengths'])

dump = json.loads((ROOT / 'tests/reference/out/alpha_lyr_air.json').read_text())
wave = np.array(dump['wavelength_air'])
flux = np.array(dump['flux'])
spec = Spectrum1D(flux=flux * u.Unit('erg / (s cm2 Angstrom)'), spectral_axis=wave * u.AA)
resampled = FluxConservingResampler(extrapolation_treatment='nan_fill')(spec, grid_wave * u.AA)
rflux = resampled.flux.value


def pixel_edges(w):
    mid = (w[1:] + w[:-1]) / 2
    return np.concatenate([[w[0] - (w[1] - w[0]) / 2], mid, [w[-1] + (w[-1] - w[-2]) / 2]])


edges = pixel_edges(grid_wave)


def band_mean(lo, hi):
    overlap = np.clip(np.minimum(edges[1:], hi) - np.maximum(edges[:-1], lo), 0, None)
    return float(np.sum(overlap * rflux) / np.sum(overlap))


results = {}
for line_id in LINE_IDS:
    line = lines[line_id]
    (b0, b1), (r0, r1), (w0, w1) = line['blue'], line['red'], line['window']
    fb, fr = band_mean(b0, b1), band_mean(r0, r1)
    wb, wr = (b0 + b1) / 2, (r0 + r1) / 2
    cont = fb + (fr - fb) * (grid_wave - wb) / (wr - wb)
    sel = (grid_wave >= min(b0, w0) - 5) & (grid_wave <= max(r1, w1) + 5)
    rect = Spectrum1D(flux=(rflux[sel] / cont[sel]) * u.dimensionless_unscaled, spectral_axis=grid_wave[sel] * u.AA)
    depth = Spectrum1D(flux=(1 - rflux[sel] / cont[sel]) * u.dimensionless_unscaled, spectral_axis=grid_wave[sel] * u.AA)
    region = SpectralRegion(w0 * u.AA, w1 * u.AA)
    results[line_id] = {
        'window': line['window'], 'blue': line['blue'], 'red': line['red'],
        'continuum_blue': fb, 'continuum_red': fr,
        'equivalent_width': float(equivalent_width(rect, continuum=1, regions=region).to_value(u.AA)),
        'fwhm': float(fwhm(depth, regions=region).to_value(u.AA)),
    }

# A few resampled flux values, to check the project's rebinning against specutils's.
probe = [int(i) for i in np.linspace(0, len(grid_wave) - 1, 40) if np.isfinite(rflux[int(i)])]
out = {
    'made_by': 'tests/reference/specutils_line_widths.py',
    'versions': {'specutils': specutils.__version__, 'astropy': astropy.__version__, 'numpy': np.__version__},
    'input': 'tests/reference/out/alpha_lyr_air.json',
    'grid': table['grid'],
    'continuum': 'straight line through overlap-weighted side-band means at the band midpoints',
    'lines': results,
    'resampled_probe': {'index': probe, 'flux': [float(rflux[i]) for i in probe]},
}
(ROOT / 'tests/reference/out/specutils_line_widths.json').write_text(json.dumps(out, indent=1))
for k, v in results.items():
    print(k, round(v['equivalent_width'], 3), round(v['fwhm'], 3))
