"""Writes the two invented demo step-test files beside this script.

INVENTED DEMO DATA: the parameters below are made up to look like a small supply well; they
describe no real well and are not tuned to make the analysis look good. Run with numpy and
scipy installed (versions as in tests/reference/requirements.txt):

    python3 cases/step-tests/generate.py
"""

from pathlib import Path

import numpy as np
from scipy.special import exp1

HERE = Path(__file__).resolve().parent


def main() -> None:
    rng = np.random.default_rng(2026)
    # Time series: Theis drawdown of superposed rate increments, plus a linear well loss,
    # C Q^2 and 5 mm of normal noise.
    T, S, rw, lin, C = 4e-3, 2e-4, 0.1, 15.0, 2500.0
    rates = [6, 10, 14, 18]  # L/s, four 60-min steps, readings every 5 min
    rows = []
    for n, q in enumerate(rates):
        for k in range(1, 13):
            t = n * 3600 + k * 300
            s = lin * q * 1e-3 + C * (q * 1e-3) ** 2
            prev = 0
            for i, qi in enumerate(rates[: n + 1]):
                el = t - i * 3600
                u = rw * rw * S / (4 * T * el)
                s += (qi - prev) * 1e-3 / (4 * np.pi * T) * exp1(u)
                prev = qi
            s += 0.005 * rng.standard_normal()
            rows.append((t / 60, q, s))
    with open(HERE / "demo-series.csv", "w") as f:
        f.write("# INVENTED DEMO DATA, not a field record: four 60-min steps, readings every 5 min.\n")
        f.write("# Generated from the Theis solution (T = 4e-3 m2/s, S = 2e-4, r_w = 0.1 m) plus a\n")
        f.write("# linear well loss of 15 s/m2, C = 2500 s2/m5 and 5 mm of seeded normal noise.\n")
        f.write("time_min,rate_L/s,drawdown_m\n")
        for t, q, s in rows:
            f.write(f"{t:g},{q:g},{s:.3f}\n")
    # One row per step: s = B Q + C Q^2 plus about 1 cm of noise (same generator, continued).
    B, C2 = 180.0, 2200.0
    with open(HERE / "demo-steps.csv", "w") as f:
        f.write("# INVENTED DEMO DATA, not a field record: drawdown at the end of four equal steps,\n")
        f.write("# from s = B Q + C Q^2 with B = 180 s/m2, C = 2200 s2/m5, plus about 1 cm of noise.\n")
        f.write("rate_L/s,drawdown_m\n")
        for q in [5, 10, 15, 20]:
            s = B * q * 1e-3 + C2 * (q * 1e-3) ** 2 + 0.01 * rng.standard_normal()
            f.write(f"{q},{s:.2f}\n")


if __name__ == "__main__":
    main()
