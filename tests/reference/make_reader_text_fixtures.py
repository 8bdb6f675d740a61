#!/usr/bin/python3
"""Writes the text-spectrum fixtures of tests/fixtures/text/ and text_reference.json beside them.

Run: /usr/bin/python3 tests/reference/make_reader_text_fixtures.py
Synthetic smooth spectra (sloped continuum with Gaussian dips), 500 rows over 3800-4950 Å, in the
layouts the text reader must take. text_reference.json records, per file, the expected pixel count,
first/last wavelength in Å (as written, before any air/vacuum change), the first flux value, the
vacuum statement, and for refusal cases the expected refusal code.
"""
import json
import os

import numpy as np

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), '..', 'fixtures', 'text')
N = 500
WAVE = 3800.0 + 2.3 * np.arange(N)
FLUX = 1.0 + 0.2 * (WAVE - 4400) / 1150 - 0.4 * np.exp(-0.5 * ((WAVE - 4340.5) / 6.0) ** 2)
ERR = np.full(N, 0.01)
FLUX = np.round(FLUX, 6)


def rows(fmt, sep, cols):
    return [sep.join(fmt(c[i]) for c in cols) for i in range(N)]


def g(x):
    return f'{float(x):.6g}' if abs(x) >= 1e4 else f'{float(x):.6f}'


def fortran(x):
    m, e = f'{x:.8E}'.split('E')
    return f'{m}D{e}'


files = {}
files['two_columns_space.txt'] = (['# synthetic test spectrum', '# columns: wavelength (Angstrom) flux'] +
                                  rows(g, '  ', [WAVE, FLUX]), '\n', {'pixels': N, 'vacuum': None})
files['header_nm_error.csv'] = (['wavelength(nm),flux,error'] + rows(g, ',', [WAVE / 10, FLUX, ERR]), '\n',
                                {'pixels': N, 'vacuum': None, 'error': 0.01})
files['tab_ivar_vacuum.tsv'] = (['# vacuum wavelengths', 'wave [Angstrom]\tflux\tivar'] +
                                rows(g, '\t', [WAVE, FLUX, 1 / ERR ** 2]), '\n',
                                {'pixels': N, 'vacuum': True, 'error': 0.01})
files['fortran_d_exponents.dat'] = (['! written by a Fortran reduction step', '! lambda flux sigma'] +
                                    rows(fortran, ' ', [WAVE, FLUX, ERR]), '\n',
                                    {'pixels': N, 'vacuum': None, 'error': 0.01})
files['semicolon_commented_header.csv'] = (['# lambda;flux'] + rows(g, ';', [WAVE, FLUX]), '\n',
                                           {'pixels': N, 'vacuum': None})
files['crlf_bom.txt'] = (['\ufeff# air wavelengths'] + rows(g, ' ', [WAVE, FLUX]), '\r\n',
                         {'pixels': N, 'vacuum': False})
files['descending.txt'] = (rows(g, ' ', [WAVE[::-1], FLUX[::-1]]), '\n', {'pixels': N, 'vacuum': None, 'reversed': True})
junk = rows(g, ' ', [WAVE, FLUX])
junk[250] = '4375.0 abc'
files['junk_line.txt'] = (junk, '\n', {'refused': 'TEXT_MALFORMED'})
ragged = rows(g, ' ', [WAVE, FLUX, ERR])
ragged[100] = ragged[100].rsplit(' ', 1)[0]
files['ragged_rows.txt'] = (ragged, '\n', {'refused': 'LENGTH_MISMATCH'})
unsorted = rows(g, ' ', [WAVE, FLUX])
unsorted[10], unsorted[11] = unsorted[11], unsorted[10]
files['unsorted.txt'] = (unsorted, '\n', {'refused': 'UNSORTED_WAVELENGTHS'})
dup = rows(g, ' ', [WAVE, FLUX])
dup[21] = dup[20]
files['duplicated.txt'] = (dup, '\n', {'refused': 'DUPLICATE_WAVELENGTHS'})
files['all_nan_flux.txt'] = ([f'{g(w)} nan' for w in WAVE], '\n', {'refused': 'NO_VALID_FLUX'})
files['red_only.txt'] = (rows(g, ' ', [WAVE + 2000, FLUX]), '\n', {'refused': 'NO_COVERAGE'})

os.makedirs(OUT, exist_ok=True)
ref = {'script': 'tests/reference/make_reader_text_fixtures.py', 'numpy': np.__version__, 'files': {}}
for name, (lines, eol, expect) in files.items():
    with open(os.path.join(OUT, name), 'w', newline='') as fh:
        fh.write(eol.join(lines) + eol)
    if 'refused' not in expect:
        w = WAVE[::-1] if expect.get('reversed') else WAVE
        expect.update({'firstWavelength': float(min(w)), 'lastWavelength': float(max(w)), 'firstFlux': float(FLUX[0])})
    ref['files'][name] = expect
with open(os.path.join(OUT, 'text_reference.json'), 'w') as fh:
    json.dump(ref, fh, indent=1)
    fh.write('\n')
