#!/usr/bin/python3
"""Reference values of the Cardelli, Clayton & Mathis (1989) extinction law from python3-extinction.

Run with Debian's Python (apt-get install python3-extinction):
    /usr/bin/python3 tests/reference/extinction_ccm89.py
Writes tests/reference/out/extinction_ccm89.json, which tests/unit/shared/extinction.test.ts reads.
"""
import json
import pathlib

import extinction
import numpy as np

# Wavenumbers (µm⁻¹) across every branch of the law: infrared 0.3–1.1, optical/NIR 1.1–3.3,
# ultraviolet 3.3–8 (with the far-UV curvature above 5.9), far ultraviolet 8–10.
x = np.concatenate(
    [
        np.linspace(0.3, 1.1, 9),
        np.linspace(1.1, 3.3, 23),
        np.linspace(3.3, 8.0, 48),
        np.linspace(8.0, 10.0, 11),
    ]
)
x = np.unique(np.round(x, 6))
wavelength = 1e4 / x  # Å
cases = []
for r_v in (2.1, 3.1, 4.0, 5.5):
    # a_v = 1 gives A(λ)/A(V).
    ratio = extinction.ccm89(wavelength, 1.0, r_v)
    cases.append({"r_v": r_v, "a_lambda_over_a_v": [float(v) for v in ratio]})

out = {
    "source": "python3-extinction extinction.ccm89(wave [Å], a_v=1, r_v)",
    "extinction_version": extinction.__version__,
    "numpy_version": np.__version__,
    "script": "tests/reference/extinction_ccm89.py",
    "wavelength_angstrom": [float(v) for v in wavelength],
    "cases": cases,
}
path = pathlib.Path(__file__).parent / "out" / "extinction_ccm89.json"
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path} with extinction {extinction.__version__}")
