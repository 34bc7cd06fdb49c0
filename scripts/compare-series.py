#!/usr/bin/env python3
"""Compares two boreflux result files (HDF5) written from the same case.

For every numeric dataset: the largest relative change max|a - b| / max|a|. Per-step
series (under /series) whose step sequences differ (an adaptive run may take one step more
or less when a tolerance-level change moves its error estimate) are compared at the times
both runs stepped to; snapshots are compared only when their times agree. Numeric
attributes of /summary are compared one by one. Prints whether the files are bit-identical
and the largest relative change of any series and of any summary figure.

    python3 scripts/compare-series.py old.h5 new.h5 [--verbose]
"""
import sys

import h5py
import numpy as np


def datasets(f):
    out = {}

    def visit(name, obj):
        if isinstance(obj, h5py.Dataset) and obj.dtype.kind in "fiu":
            out[name] = np.asarray(obj[()], dtype=float)

    f.visititems(visit)
    return out


# Round-off diagnostics (balance residuals, iteration counts): their relative change says
# nothing about the results and is reported apart.
DIAGNOSTIC = ("residual", "newton_iterations", "closure", "steps")


def kind_of(name, group):
    return "round-off diagnostics" if any(d in name for d in DIAGNOSTIC) else group


def relative(x, y):
    scale = np.max(np.abs(x)) if x.size else 0.0
    diff = np.max(np.abs(x - y)) if x.size else 0.0
    return diff / scale if scale > 0 else diff


def main():
    a_path, b_path = sys.argv[1], sys.argv[2]
    verbose = "--verbose" in sys.argv
    with h5py.File(a_path, "r") as fa, h5py.File(b_path, "r") as fb:
        a, b = datasets(fa), datasets(fb)
        sa = {k: v for k, v in fa["summary"].attrs.items()} if "summary" in fa else {}
        sb = {k: v for k, v in fb["summary"].attrs.items()} if "summary" in fb else {}
    identical = True
    common = None
    if "series/time" in a and "series/time" in b:
        ta, tb = a["series/time"], b["series/time"]
        if ta.shape != tb.shape or not np.array_equal(ta, tb):
            _, ia, ib = np.intersect1d(ta, tb, return_indices=True)
            common = (ia, ib)
            print(f"steps {ta.size} vs {tb.size}; {ia.size} step times in common, compared there")
    worst = {
        "series": (0.0, None),
        "other": (0.0, None),
        "summary": (0.0, None),
        "round-off diagnostics": (0.0, None),
    }
    for name in sorted(set(a) | set(b)):
        if name not in a or name not in b:
            print(f"{name}: only in {'first' if name in a else 'second'} file")
            identical = False
            continue
        x, y = a[name], b[name]
        kind = "series" if name.startswith("series/") else "other"
        if not (x.shape == y.shape and np.array_equal(x, y, equal_nan=True)):
            identical = False
        if kind == "series" and common is not None:
            x, y = x[common[0]], y[common[1]]
        elif x.shape != y.shape:
            print(f"{name}: shape {x.shape} vs {y.shape}, not compared")
            continue
        if name.startswith("snapshots/") and not np.array_equal(a["snapshots/time"], b["snapshots/time"]):
            continue
        rel = relative(x, y)
        if verbose or rel > 0:
            print(f"{name}: relative {rel:.3e}")
        kind = kind_of(name, kind)
        if rel > worst[kind][0]:
            worst[kind] = (rel, name)
    for k in sorted(set(sa) | set(sb)):
        va, vb = sa.get(k), sb.get(k)
        try:
            xa, xb = float(va), float(vb)
        except (TypeError, ValueError):
            if str(va) != str(vb):
                identical = False
                print(f"summary {k}: text differs")
            continue
        if xa != xb and not (np.isnan(xa) and np.isnan(xb)):
            identical = False
            rel = abs(xa - xb) / max(abs(xa), 1e-300)
            print(f"summary {k}: {xa!r} vs {xb!r} (relative {rel:.3e})")
            kind = kind_of(k, "summary")
            if rel > worst[kind][0]:
                worst[kind] = (rel, k)
    print(f"identical: {identical}")
    for kind, (rel, name) in worst.items():
        print(f"largest relative change, {kind}: {rel:.3e} ({name})")


if __name__ == "__main__":
    main()
