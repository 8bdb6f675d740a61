#!/usr/bin/python3
"""Reference values of Cohen's kappa (unweighted, linear, quadratic) from scikit-learn.

Run with Debian's Python (apt-get install python3-sklearn):
    /usr/bin/python3 tests/reference/kappa_sklearn.py
Writes tests/reference/out/kappa_sklearn.json, which tests/unit/shared/agreement.test.ts reads.
"""
import json
import pathlib

import numpy as np
import sklearn
from sklearn.metrics import cohen_kappa_score


def cases():
    # Two raters, yes (1) / no (0): 20 yes-yes, 5 yes-no, 10 no-yes, 15 no-no.
    a = [1] * 20 + [1] * 5 + [0] * 10 + [0] * 15
    b = [1] * 20 + [0] * 5 + [1] * 10 + [0] * 15
    yield "textbook yes/no table", a, b
    # Five ordinal categories, hand-written.
    yield (
        "five ordinal categories",
        [1, 2, 3, 4, 5, 1, 2, 3, 4, 5, 2, 2, 3, 3, 4, 1, 5, 4, 3, 2],
        [1, 2, 3, 5, 5, 2, 2, 3, 3, 4, 2, 1, 3, 4, 4, 1, 5, 5, 2, 2],
    )
    # One category used by only one rater.
    yield "a category only one rater used", [0, 1, 2, 0, 1, 2, 0, 1], [0, 1, 2, 0, 1, 1, 3, 1]
    # Type codes with fractional subtypes (sklearn weights by the rank of each label).
    yield (
        "type codes with half subtypes",
        [40, 41, 42, 42.5, 45, 48, 50, 51.5, 52, 40, 42, 45],
        [40, 42, 42, 42.5, 46, 48, 50, 51.5, 53, 41, 42, 45],
    )
    # Luminosity-class codes (Ia = 1 … V = 6, intermediates averaged).
    yield (
        "luminosity-class codes",
        [6, 6, 5, 4, 4, 4, 3, 2, 1, 6, 5.5, 4, 4, 6, 3.5],
        [6, 5, 5, 4, 4, 3, 3, 2, 2, 6, 5, 4, 4.25, 6, 3],
    )
    # Seeded random ordinal ratings with correlated raters.
    rng = np.random.RandomState(1968)
    truth = rng.randint(0, 7, size=200)
    a = np.clip(truth + rng.randint(-1, 2, size=200), 0, 6)
    b = np.clip(truth + rng.randint(-2, 3, size=200), 0, 6)
    yield "200 seeded ordinal ratings on 7 categories", a.tolist(), b.tolist()


out = {
    "source": "scikit-learn sklearn.metrics.cohen_kappa_score",
    "sklearn_version": sklearn.__version__,
    "numpy_version": np.__version__,
    "script": "tests/reference/kappa_sklearn.py",
    "cases": [],
}
for name, a, b in cases():
    a = [float(x) for x in a]
    b = [float(x) for x in b]
    # sklearn refuses non-integer labels ("continuous"); as strings of equal width they sort in
    # numeric order, which is the order its weights use.
    la = [repr(x) for x in a]
    lb = [repr(x) for x in b]
    labels = sorted(set(la) | set(lb))
    assert labels == [repr(x) for x in sorted(set(a) | set(b))], "labels must sort numerically"
    a, b = la, lb
    out["cases"].append(
        {
            "name": name,
            "a": [float(x) for x in a],
            "b": [float(x) for x in b],
            "labels": [float(x) for x in labels],
            "unweighted": float(cohen_kappa_score(a, b)),
            "linear": float(cohen_kappa_score(a, b, weights="linear")),
            "quadratic": float(cohen_kappa_score(a, b, weights="quadratic")),
        }
    )

path = pathlib.Path(__file__).parent / "out" / "kappa_sklearn.json"
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {path} with sklearn {sklearn.__version__}")
