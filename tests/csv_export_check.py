#!/usr/bin/env python3
"""Outside check of `lobecast export` tables with Python's own csv module (the
reader spreadsheet-minded scripts use; it knows nothing of '#' comments).

For two samples (one over ground, one in free space):
  * the default CSV: csv.reader reads a rectangular table whose header ends in a
    `notes` column, every other cell a number (float() reads -inf too; an empty cell is NaN), the
    notes (source, safety note) in the first rows of that column, the rest empty;
  * the decimal-comma variant (--decimal-comma): csv.reader with delimiter ';'
    reads the same shape; with ',' turned into '.' every number equals the default
    table's cell for cell, and no cell holds a '.';
  * TSV: csv.reader with delimiter '\\t', the same numbers;
  * display precision against --precision full: angles and dB within 0.0005 of the
    full value, fields within 6 significant digits (5e-6 relative);
  * --precision full: directivity_dBi equals 10 log10 of h5py's /pattern/directivity
    (the grid cut phi = 0 is stored, so the export reads the same doubles);
  * --notes comments: the '#' lines come first, then the same table.
Exit status 0 when every check passes; failures print both values.
"""
import csv
import io
import math
import os
import subprocess
import sys

import h5py
import numpy as np

from check_common import arguments, check, summary



def run(exe, *args):
    r = subprocess.run([exe, *args], capture_output=True, text=True)
    if r.returncode != 0:
        print(r.stderr)
        raise SystemExit(f"lobecast {' '.join(args)} exited {r.returncode}")
    return r.stdout


def parse(text, delimiter=",", decimal_comma=False):
    rows = list(csv.reader(io.StringIO(text, newline=""), delimiter=delimiter))
    header, body = rows[0], rows[1:]
    notes = None
    if header[-1] == "notes":
        notes = [r[-1] for r in body]
        header, body = header[:-1], [r[:-1] for r in body]
    numbers = []
    for r in body:
        cells = [c.replace(",", ".") if decimal_comma else c for c in r]
        # An undefined number is an empty cell (README), read as NaN.
        numbers.append([float(c) if c != "" else math.nan for c in cells])
    return header, numbers, notes, [len(r) for r in rows]


def same(a, b):
    """Row lists equal cell for cell, nan equal to nan."""
    if len(a) != len(b):
        return False
    for ra, rb in zip(a, b):
        if len(ra) != len(rb):
            return False
        for x, y in zip(ra, rb):
            if not (x == y or (math.isnan(x) and math.isnan(y))):
                return False
    return True


def main():
    a = arguments()

    for sample in ("planar-4x4-ground.toml", "turnstile.toml"):
        result = os.path.join(a.workdir, sample.replace(".toml", ".h5"))
        if os.path.exists(result):
            os.remove(result)
        run(a.lobecast, "compute", "-q", os.path.join(a.samples, sample), "-o", result)
        cut = ["--cut", "phi=0"]

        default = run(a.lobecast, "export", result, *cut)
        header, rows, notes, widths = parse(default)
        check(len(set(widths)) == 1, f"{sample}: default CSV is not rectangular: {set(widths)}")
        check(header[:4] == ["cut_angle_deg", "theta_deg", "phi_deg", "directivity_dBi"],
              f"{sample}: header {header[:4]}")
        check(notes is not None and notes[0].startswith("lobecast export of "),
              f"{sample}: first note {notes[:1] if notes else None}")
        check(any("RF-exposure" in n for n in notes or []), f"{sample}: no safety note")
        filled = [n for n in notes or [] if n]
        check(notes is not None and notes[: len(filled)] == filled,
              f"{sample}: notes are not the first rows of the column")

        comma = run(a.lobecast, "export", result, *cut, "--decimal-comma")
        h2, rows2, notes2, widths2 = parse(comma, delimiter=";", decimal_comma=True)
        check(len(set(widths2)) == 1, f"{sample}: decimal-comma CSV is not rectangular")
        check(h2 == header and notes2 == notes, f"{sample}: decimal-comma header or notes differ")
        check(same(rows2, rows), f"{sample}: decimal-comma numbers differ from the default's")
        body = comma.split("\n", 1)[1]
        numeric_cells = [c for r in csv.reader(io.StringIO(body), delimiter=";") for c in r[:-1]]
        check(not any("." in c for c in numeric_cells), f"{sample}: a '.' in a decimal-comma cell")

        tsv = run(a.lobecast, "export", result, *cut, "--format", "tsv")
        h3, rows3, _, widths3 = parse(tsv, delimiter="\t")
        check(len(set(widths3)) == 1 and h3 == header and same(rows3, rows),
              f"{sample}: TSV differs from CSV")

        full = run(a.lobecast, "export", result, *cut, "--precision", "full")
        hf, rowsf, _, _ = parse(full)
        check(hf == header and len(rowsf) == len(rows), f"{sample}: full-precision shape")
        for r, f in zip(rows, rowsf):
            for name, d, x in zip(header, r, f):
                if math.isinf(x) or math.isnan(x):
                    ok = (d == x) or (math.isnan(d) and math.isnan(x))
                elif name.endswith("_V"):
                    ok = abs(d - x) <= 5e-6 * abs(x)
                else:
                    ok = abs(d - x) <= 0.0005 + 1e-12 * abs(x)
                if not ok:
                    check(False, f"{sample}: {name} display {d} vs full {x}")
                    break

        with h5py.File(result) as h:
            theta = h["/grid/theta_deg"][...]
            phi = h["/grid/phi_deg"][...]
            d = h["/pattern/directivity"][...]
        j = int(np.argmin(np.abs(phi - 0.0)))
        col = header.index("directivity_dBi")
        th = header.index("theta_deg")
        ph = header.index("phi_deg")
        for r in rowsf:
            if r[ph] != 0.0:
                continue
            i = int(np.argmin(np.abs(theta - r[th])))
            ref = 10 * math.log10(d[i, j]) if d[i, j] > 0 else -math.inf
            if r[col] != ref:
                check(False, f"{sample}: full directivity_dBi {r[col]!r} vs h5py {ref!r}")
                break

        comments = run(a.lobecast, "export", result, *cut, "--notes", "comments")
        lines = comments.splitlines()
        k = 0
        while k < len(lines) and lines[k].startswith("#"):
            k += 1
        check(k >= 5, f"{sample}: {k} '#' note lines")
        hc, rowsc, notesc, _ = parse("\n".join(lines[k:]) + "\n")
        check(hc == header and same(rowsc, rows) and notesc is None,
              f"{sample}: --notes comments table differs")

    return summary("csv export check")


if __name__ == "__main__":
    sys.exit(main())
