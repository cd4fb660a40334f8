"""The batch of bench/batch.ts done the plain numpy way, for a side-by-side timing.

For each CSV scan in the list: np.loadtxt, np.interp onto the calibration's channels, and one
matrix product with the classical-least-squares prediction matrix (gases x channels, written by
bench/batch.ts from the same calibration); one CSV row of concentrations per scan.

Usage: python3 bench/numpy_batch.py <list.txt> <projection.json> <out.csv>
Prints one JSON line: {"scans": n, "seconds": t} (t from before reading the projection to the
last row written; interpreter start and the numpy import are not counted).
"""
import json
import sys
import time

import numpy as np


def main() -> None:
    list_path, projection_path, out_path = sys.argv[1:4]
    started = time.perf_counter()
    with open(projection_path, encoding="utf-8") as handle:
        projection = json.load(handle)
    grid = np.asarray(projection["grid"], dtype=float)
    matrix = np.asarray(projection["matrix"], dtype=float)
    with open(list_path, encoding="utf-8") as handle:
        paths = [line.strip() for line in handle if line.strip() and not line.startswith("#")]
    with open(out_path, "w", encoding="utf-8") as out:
        out.write("scan," + ",".join(projection["gases"]) + "\n")
        for path in paths:
            # '#' comment lines and the "wavenumber_cm-1,absorbance" header are skipped as comments.
            table = np.loadtxt(path, delimiter=",", comments=("#", "w"))
            absorbance = np.interp(grid, table[:, 0], table[:, 1])
            concentrations = matrix @ absorbance
            out.write(path + "," + ",".join(repr(float(c)) for c in concentrations) + "\n")
    print(json.dumps({"scans": len(paths), "seconds": time.perf_counter() - started}))


if __name__ == "__main__":
    main()
