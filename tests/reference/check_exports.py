#!/usr/bin/python3
"""Reads the committed catalogue samples back with astropy and checks every column, unit, UCD and value.

Run with Debian's Python (apt-get install python3-astropy), not the python3 first on PATH:
    npx tsx tests/unit/exports/make-samples.ts     # when the writers change
    /usr/bin/python3 tests/reference/check_exports.py
Reads tests/fixtures/exports/{catalogue,types}.{csv,ecsv,vot,fits,mrt.txt,dat,ReadMe,expected.json};
writes tests/reference/out/exports_check.json, which tests/unit/exports/samples.test.ts
reads: every check must be ok and the SHA-256 of the samples must match the committed files.
"""
import csv
import hashlib
import io
import json
import math
import pathlib
import platform
import sys
import unicodedata
import warnings

import astropy
import astropy.units as u
import numpy as np
from astropy.io import ascii, fits, votable
from astropy.io.votable.ucd import check_ucd
from astropy.table import Table

ROOT = pathlib.Path(__file__).resolve().parents[2]
SAMPLES = ROOT / "tests" / "fixtures" / "exports"
OUT = ROOT / "tests" / "reference" / "out" / "exports_check.json"
CDS_UNIT = {"": "---", "solRad": "Rsun", "solLum": "Lsun", "solMass": "Msun"}


def samples_sha256():
    h = hashlib.sha256()
    for p in sorted(SAMPLES.iterdir()):
        if p.suffix == ".ts" or p.name.endswith(".md"):
            continue
        h.update(p.name.encode() + b"\0" + p.read_bytes())
    return h.hexdigest()


def to_ascii(text):
    t = unicodedata.normalize("NFKD", text)
    t = "".join(ch for ch in t if not unicodedata.combining(ch))
    return "".join(ch if 0x20 <= ord(ch) <= 0x7E else "?" for ch in t)


def is_missing(col, i):
    v = col[i]
    if np.ma.is_masked(v):
        return True
    if isinstance(v, (float, np.floating)) and math.isnan(v):
        return True
    return False


def py(v):
    if isinstance(v, bytes):
        return v.decode("ascii")
    if isinstance(v, np.generic):
        return v.item()
    return v


class Check:
    def __init__(self, name):
        self.name = name
        self.problems = []
        self.compared = 0

    def fail(self, msg):
        self.problems.append(msg)

    def result(self):
        return {"file": self.name, "ok": not self.problems, "valuesCompared": self.compared, "problems": self.problems[:50]}


def tolerance(col, relaxed):
    if col["type"] != "double":
        return 0, 0
    if not relaxed:
        return 0, 1e-15
    f = col["format"]
    if f["notation"] == "F":
        return 0.5 * 10 ** -f["decimals"] + 1e-12, 1e-12
    return 0, 0.5 * 10 ** -f["decimals"] + 1e-12


def compare_values(chk, table, expected, text_form, relaxed=False, strings="exact"):
    """strings: exact | ascii-rstrip | ascii-strip."""
    names = [c["name"] for c in expected["columns"]]
    if list(table.colnames) != names:
        chk.fail(f"column names {list(table.colnames)} != {names}")
        return
    if len(table) != len(expected["rows"]):
        chk.fail(f"{len(table)} rows, expected {len(expected['rows'])}")
        return
    for c in expected["columns"]:
        col = table[c["name"]]
        atol, rtol = tolerance(c, relaxed)
        for i, row in enumerate(expected["rows"]):
            want = row.get(c["name"])
            chk.compared += 1
            if c["type"] == "string" and want == "":
                want = None
            if want is None:
                if not is_missing(col, i) and not (c["type"] in ("string", "datetime") and py(col[i]) == ""):
                    chk.fail(f"{c['name']}[{i}]: wanted missing, got {py(col[i])!r}")
                continue
            if is_missing(col, i):
                chk.fail(f"{c['name']}[{i}]: missing, wanted {want!r}")
                continue
            got = py(col[i])
            if c["type"] == "boolean":
                if text_form and isinstance(got, str):
                    got = {"T": True, "F": False}.get(got, got)
                if bool(got) != want or not isinstance(got, (bool, np.bool_)):
                    chk.fail(f"{c['name']}[{i}]: {got!r} != {want!r}")
            elif c["type"] == "int":
                if int(got) != want:
                    chk.fail(f"{c['name']}[{i}]: {got!r} != {want!r}")
            elif c["type"] == "double":
                # A value printed to d decimals is off by up to half a unit in the last place plus the
                # float's own rounding, a few ulps of the value (MJD near 6e4 has ulps of 7e-12).
                slack = atol + 4 * math.ulp(abs(want)) if atol > 0 else 0
                if not math.isclose(float(got), want, rel_tol=rtol, abs_tol=slack) and not (rtol == 0 and atol == 0 and float(got) == want):
                    chk.fail(f"{c['name']}[{i}]: {got!r} != {want!r} (atol {atol}, rtol {rtol})")
            else:
                w = want
                if strings == "ascii-rstrip":
                    w = to_ascii(want).rstrip()
                elif strings == "ascii-strip":
                    w = to_ascii(want).strip()
                if got != w:
                    chk.fail(f"{c['name']}[{i}]: {got!r} != {w!r}")


def same_unit(chk, where, got, vo):
    want = None if vo == "" else u.Unit(vo, format="vounit")
    if want is None:
        if got not in (None, "", u.dimensionless_unscaled):
            chk.fail(f"{where}: unit {got!r}, wanted none")
        return
    if got is None or u.Unit(got) != want:
        chk.fail(f"{where}: unit {got!r} != {vo!r}")


def check_votable(stem, expected):
    chk = Check(f"{stem}.vot")
    path = SAMPLES / f"{stem}.vot"
    out = io.StringIO()
    valid = votable.validate(str(path), output=out)
    report = out.getvalue()
    if not valid or "Warning" in report or "Error" in report or "W" in "".join(l[:3] for l in report.splitlines() if l.startswith(("W", "E"))):
        chk.fail("validator: " + report.strip().replace("\n", " | ")[:2000])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        vt = votable.parse(str(path), verify="exception")
    t = vt.get_first_table()
    if vt.version != "1.4":
        chk.fail(f"version {vt.version}")
    for f, c in zip(t.fields, expected["columns"]):
        if f.ucd != c["ucd"]:
            chk.fail(f"FIELD {f.name}: ucd {f.ucd!r} != {c['ucd']!r}")
        if not check_ucd(f.ucd, check_controlled_vocabulary=True):
            chk.fail(f"FIELD {f.name}: {f.ucd!r} is not UCD1+")
        if (f.description or "") != c["description"]:
            chk.fail(f"FIELD {f.name}: description {f.description!r}")
        same_unit(chk, f"FIELD {f.name}", f.unit, c["unit"])
    params = {p.name: p for p in vt.resources[0].params}
    for p in expected["params"]:
        got = params.get(p["name"])
        if got is None:
            chk.fail(f"PARAM {p['name']} missing")
        elif py(got.value) != p["value"] and str(py(got.value)) != str(p["value"]):
            chk.fail(f"PARAM {p['name']}: {py(got.value)!r} != {p['value']!r}")
    compare_values(chk, t.to_table(), expected, text_form=False)
    return chk.result()


def check_fits(stem, expected):
    chk = Check(f"{stem}.fits")
    path = SAMPLES / f"{stem}.fits"
    raw = path.read_bytes()
    if len(raw) % 2880:
        chk.fail(f"size {len(raw)} is not a multiple of 2880")
    with fits.open(path) as hdul:
        try:
            hdul.verify("exception")
        except Exception as e:  # noqa: BLE001
            chk.fail(f"verify: {e}")
        if len(hdul) != 2 or hdul[1].header.get("XTENSION") != "BINTABLE":
            chk.fail("wanted a primary HDU and one BINTABLE")
        for hdu in hdul:
            for card in hdu.header.cards:
                img = card.image
                if len(img) % 80 or any(ord(ch) < 0x20 or ord(ch) > 0x7E for ch in img):
                    chk.fail(f"card {card.keyword}: not 80 printable ASCII characters")
                if card.keyword not in ("COMMENT", "HISTORY", "", "CONTINUE") and isinstance(card.value, (int, float, bool)) and not isinstance(card.value, str):
                    # fixed format: value right-justified to column 30
                    if img[29] == " ":
                        chk.fail(f"card {card.keyword}: value not right-justified to column 30: {img[:40]!r}")
        h = hdul[1].header
        for i, c in enumerate(expected["columns"], start=1):
            if h.get(f"TTYPE{i}") != c["name"]:
                chk.fail(f"TTYPE{i} {h.get(f'TTYPE{i}')!r}")
            if h.get(f"TUCD{i}") != c["ucd"]:
                chk.fail(f"TUCD{i} {h.get(f'TUCD{i}')!r} != {c['ucd']!r}")
            if h.get(f"TCOMM{i}") != to_ascii(c["description"]):
                chk.fail(f"TCOMM{i} {h.get(f'TCOMM{i}')!r}")
            same_unit(chk, f"TUNIT{i}", h.get(f"TUNIT{i}"), c["unit"])
            if c["type"] == "int" and h.get(f"TNULL{i}") != -2147483648:
                chk.fail(f"TNULL{i} {h.get(f'TNULL{i}')!r}")
        for p in expected["params"]:
            v = h.get(p["key"])
            if v != (to_ascii(p["value"]) if isinstance(p["value"], str) else p["value"]):
                chk.fail(f"keyword {p['key']}: {v!r} != {p['value']!r}")
            if hdul[0].header.get(p["key"]) != v:
                chk.fail(f"keyword {p['key']} differs in the primary header")
        t = Table.read(hdul[1])
        for c in expected["columns"]:
            same_unit(chk, f"column {c['name']}", t[c["name"]].unit, c["unit"])
        # astropy reads a logical 0x00 (the FITS null) as False: check those bytes in the file itself.
        logical = [c for c in expected["columns"] if c["type"] == "boolean"]
        if logical:
            start = hdul[1].fileinfo()["datLoc"]
            width = h["NAXIS1"]
            for c in logical:
                off = int(hdul[1].data.dtype.fields[c["name"]][1])
                for i, row in enumerate(expected["rows"]):
                    chk.compared += 1
                    byte = raw[start + i * width + off]
                    want = {True: 0x54, False: 0x46, None: 0}[row.get(c["name"])]
                    if byte != want:
                        chk.fail(f"{c['name']}[{i}]: byte {byte:#x} != {want:#x}")
            t.remove_columns([c["name"] for c in logical])
            expected = {**expected, "columns": [c for c in expected["columns"] if c["type"] != "boolean"]}
        compare_values(chk, t, expected, text_form=False, strings="ascii-rstrip")
    return chk.result()


def check_plain_csv(stem, expected):
    """The plain CSV: one header line of labels, then rows; numbers at their display precision."""
    chk = Check(f"{stem}.csv")
    path = SAMPLES / f"{stem}.csv"
    text = path.read_bytes().decode("utf-8")
    if "\r\n" not in text or any(line and not line.endswith("\r") for line in text.split("\n")[:-1]):
        chk.fail("lines do not end in CRLF")
    if text.startswith("#"):
        chk.fail("starts with a comment line: wanted one header line")
    rows = list(csv.reader(io.StringIO(text, newline="")))
    if rows[0] != [c["name"] for c in expected["columns"]]:
        chk.fail(f"header row {rows[0]}")
    if len(rows) - 1 != len(expected["rows"]):
        chk.fail(f"{len(rows) - 1} data lines, expected {len(expected['rows'])}")
    t = ascii.read(str(path), format="csv", fill_values=[("", "0")], fast_reader=False)
    for c in expected["columns"]:
        if c["type"] == "boolean":
            continue
        col = t[c["name"]]
        atol, rtol = tolerance(c, True)
        for i, row in enumerate(expected["rows"]):
            want = row.get(c["name"])
            chk.compared += 1
            cell = rows[i + 1][[x["name"] for x in expected["columns"]].index(c["name"])]
            if want is None or (c["type"] == "string" and want == ""):
                if cell != "":
                    chk.fail(f"{c['name']}[{i}]: wanted empty, got {cell!r}")
                continue
            if c["type"] == "double":
                if not math.isclose(float(py(col[i])), want, rel_tol=rtol, abs_tol=atol + 4 * math.ulp(abs(want)) if atol > 0 else 0):
                    chk.fail(f"{c['name']}[{i}]: {py(col[i])!r} != {want!r} (atol {atol}, rtol {rtol})")
            elif c["type"] == "int":
                if int(py(col[i])) != want:
                    chk.fail(f"{c['name']}[{i}]: {py(col[i])!r} != {want!r}")
            elif cell != want:
                chk.fail(f"{c['name']}[{i}]: {cell!r} != {want!r}")
    return chk.result()


def check_ecsv(stem, expected):
    chk = Check(f"{stem}.ecsv")
    path = SAMPLES / f"{stem}.ecsv"
    t = ascii.read(str(path), format="ecsv")
    for c in expected["columns"]:
        col = t[c["name"]]
        same_unit(chk, f"column {c['name']}", col.unit, c["unit"])
        if (col.description or "") != c["description"]:
            chk.fail(f"column {c['name']}: description {col.description!r}")
        if (col.meta or {}).get("ucd") != c["ucd"]:
            chk.fail(f"column {c['name']}: ucd {(col.meta or {}).get('ucd')!r}")
    for p in expected["params"]:
        if t.meta.get(p["name"]) != p["value"]:
            chk.fail(f"meta {p['name']}: {t.meta.get(p['name'])!r}")
    compare_values(chk, t, expected, text_form=False)
    # The data part alone is RFC 4180: Python's csv module reads the same cells.
    text = path.read_bytes().decode("utf-8")
    if "\r\n" not in text or any(line and not line.endswith("\r") for line in text.split("\n")[:-1]):
        chk.fail("lines do not end in CRLF")
    rows = list(csv.reader(io.StringIO("".join(l for l in text.splitlines(keepends=True) if not l.startswith("#")), newline="")))
    if rows[0] != [c["name"] for c in expected["columns"]]:
        chk.fail(f"header row {rows[0]}")
    for i, r in enumerate(rows[1:]):
        for c, cell in zip(expected["columns"], r):
            want = expected["rows"][i].get(c["name"])
            if c["type"] in ("string", "datetime") and (want or "") != cell:
                chk.fail(f"csv module: {c['name']}[{i}] {cell!r} != {want!r}")
    return chk.result()


def check_cds(stem, expected, combined, data_name=None, readme_name=None):
    data_name = data_name or f"{stem}.dat"
    readme_name = readme_name or f"{stem}.ReadMe"
    name = f"{stem}.mrt.txt" if combined else f"{data_name} + {readme_name}"
    chk = Check(name)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        if combined:
            t = ascii.read(str(SAMPLES / f"{stem}.mrt.txt"), format="cds")
        else:
            # The ReadMe names the data file it describes; astropy finds the table by that name.
            t = ascii.read(str(SAMPLES / data_name), readme=str(SAMPLES / readme_name), format="cds")
    for w in caught:
        chk.fail(f"warning: {w.message}")
    for c in expected["columns"]:
        col = t[c["name"]]
        same_unit(chk, f"column {c['name']}", col.unit, c["unit"])
        want = to_ascii(c["description"])
        if col.description != want:
            chk.fail(f"column {c['name']}: description {col.description!r} != {want!r}")
    if combined:
        text = (SAMPLES / f"{stem}.mrt.txt").read_text("ascii").splitlines()
        last = max(i for i, l in enumerate(text) if l.startswith(("------", "=======")))
        lines = [l for l in text[last + 1 :] if l]
    else:
        lines = (SAMPLES / data_name).read_text("ascii").splitlines()
    if len({len(l) for l in lines}) > 1:
        chk.fail("records differ in length")
    compare_values(chk, t, expected, text_form=True, relaxed=True, strings="ascii-strip")
    return chk.result()


def check_downloads(directory, out_path):
    """Checks one release as downloaded (catalogue.{vot,fits,csv,ecsv,zip} + expected.json from the API) the same way.
    The zip must hold ReadMe and the data file its byte-by-byte description names."""
    global SAMPLES
    import re
    import zipfile

    SAMPLES = pathlib.Path(directory)
    expected = json.loads((SAMPLES / "expected.json").read_text())
    results = []
    for fn in (check_votable, check_fits, check_plain_csv, check_ecsv):
        try:
            results.append(fn("catalogue", expected))
        except Exception as e:  # noqa: BLE001
            results.append({"file": f"catalogue ({fn.__name__})", "ok": False, "valuesCompared": 0, "problems": [f"{type(e).__name__}: {e}"]})
    try:
        with zipfile.ZipFile(SAMPLES / "catalogue.zip") as z:
            names = z.namelist()
            readme = z.read("ReadMe").decode("ascii")
            cited = re.search(r"Byte-by-byte Description of file: (\S+)", readme).group(1)
            if cited not in names:
                raise ValueError(f"the ReadMe cites {cited}, the zip holds {names}")
            z.extractall(SAMPLES / "zip")
        SAMPLES = pathlib.Path(directory) / "zip"
        results.append(check_cds("catalogue", expected, False, data_name=cited, readme_name="ReadMe"))
    except Exception as e:  # noqa: BLE001
        results.append({"file": "catalogue (zip: ReadMe + data)", "ok": False, "valuesCompared": 0, "problems": [f"{type(e).__name__}: {e}"]})
    out = {"astropy": astropy.__version__, "ok": all(r["ok"] for r in results), "checks": results}
    pathlib.Path(out_path).write_text(json.dumps(out, indent=1) + "\n")
    return 0 if out["ok"] else 1


def main():
    if len(sys.argv) == 4 and sys.argv[1] == "--downloads":
        return check_downloads(sys.argv[2], sys.argv[3])
    results = []
    for stem in ("catalogue", "types"):
        expected = json.loads((SAMPLES / f"{stem}.expected.json").read_text())
        for fn in (check_votable, check_fits, check_plain_csv, check_ecsv):
            try:
                results.append(fn(stem, expected))
            except Exception as e:  # noqa: BLE001
                results.append({"file": f"{stem} ({fn.__name__})", "ok": False, "valuesCompared": 0, "problems": [f"{type(e).__name__}: {e}"]})
        for combined in (True, False):
            try:
                results.append(check_cds(stem, expected, combined))
            except Exception as e:  # noqa: BLE001
                results.append({"file": f"{stem} (cds, combined={combined})", "ok": False, "valuesCompared": 0, "problems": [f"{type(e).__name__}: {e}"]})
    out = {
        "producedBy": "tests/reference/check_exports.py",
        "python": platform.python_version(),
        "astropy": astropy.__version__,
        "numpy": np.__version__,
        "samplesSha256": samples_sha256(),
        "ok": all(r["ok"] for r in results),
        "checks": results,
    }
    OUT.write_text(json.dumps(out, indent=1) + "\n")
    for r in results:
        print(("ok  " if r["ok"] else "FAIL"), r["file"], r["valuesCompared"], *r["problems"][:8], sep="\n    " if r["problems"] else " ")
    return 0 if out["ok"] else 1


if __name__ == "__main__":
    sys.exit(main())
