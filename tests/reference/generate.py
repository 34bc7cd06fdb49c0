#!/usr/bin/env python3
"""Regenerate the reference values in tests/data/*.json.

Run from the repository root:

    pip install -r tests/reference/requirements.txt
    python3 tests/reference/generate.py

Every file is produced by one function below whose docstring names the published
solution. Each value is computed with a general-purpose library (scipy, mpmath, numpy,
iapws); the calls and versions are written into the file under "computed_with".

Two kinds of checks run before anything is written:

* Cross-checks: every value is computed a second, independent way (Talbot against
  Stehfest, the Laplace inversion against the real-integral form, scipy against mpmath,
  closed form against numerical quadrature ...). The largest relative disagreement is
  stored as "cross_check_max_rel_diff"; above CROSS_CHECK_TOL the script exits non-zero.
* Printed-table checks: where docs/physics.md (the project physics reference) prints the same quantity, the value
  must round to the printed digits. Any mismatch makes the script exit non-zero.

Nothing is written unless all checks pass. The output is deterministic: no random
numbers, no clocks, fixed iteration order, floats written with repr (round-trip exact).

Units are SI. Head h is positive up; flow Q is positive OUTWARD from the well, so
pumping is negative; drawdown s = -h is positive for pumping.
"""

import json
import math
import platform
import sys
from pathlib import Path

import iapws
import mpmath as mp
import numpy as np
import scipy
import scipy.integrate
import scipy.interpolate
import scipy.optimize
import scipy.special

DATA_DIR = Path(__file__).resolve().parent.parent / "data"

CROSS_CHECK_TOL = 1e-8
"""Largest relative disagreement allowed between the two ways of computing a value."""

MP_DPS = 30
"""mpmath working precision (decimal digits) for Bessel functions and inversions."""

G = 9.80665
"""Standard gravity, m/s^2 (exact by definition)."""

PSI = 0.45359237 * G / 0.0254**2
"""One pound-force per square inch in Pa (exact from the definitions of lb, g and in)."""

RHO_PERIODIC = 998.207150
"""Water density (kg/m^3) prescribed for the mean-power figures of periodic.json."""

CHECK_FAILURES = []
CHECK_COUNT = [0]
ERRATA = []


# ---------------------------------------------------------------------------------------
# helpers
# ---------------------------------------------------------------------------------------


def rel_diff(a, b):
    """Relative difference |a - b| / max(|a|, |b|); 0 when both are 0.

    When either value is an mpmath number the difference is taken at MP_DPS digits,
    before rounding to a double, so disagreements below 1e-16 stay visible.
    """
    mp_types = (mp.mpf, mp.mpc)
    if isinstance(a, mp_types) or isinstance(b, mp_types):
        with mp.workdps(MP_DPS):
            a = mp.mpmathify(a)
            b = mp.mpmathify(b)
            scale = max(abs(a), abs(b))
            return 0.0 if scale == 0 else float(abs(a - b) / scale)
    a = complex(a)
    b = complex(b)
    scale = max(abs(a), abs(b))
    return 0.0 if scale == 0.0 else abs(a - b) / scale


def f(x):
    """Plain Python float (json writes it with repr, i.e. full precision)."""
    return float(x)


def check_printed(label, value, printed, erratum=None):
    """Assert that value rounds to the digits of the string printed in docs/physics.md.

    erratum: for a printed value shown (by an independent high-precision computation) to
    be off by one unit in its last digit, a short reason. The value must then lie within
    one unit of the last printed digit, and the note is reported on every run.
    """
    CHECK_COUNT[0] += 1
    value = float(value)
    mant, _, exp = printed.lower().partition("e")
    decimals = len(mant.split(".")[1]) if "." in mant else 0
    unit = 10.0 ** ((int(exp) if exp else 0) - decimals)
    target = float(printed)
    # Half a unit of the last printed digit, plus a hair for binary representation.
    allowed = (1.0 if erratum else 0.5) * unit * (1.0 + 1e-9)
    if abs(value - target) > allowed:
        CHECK_FAILURES.append(
            f"{label}: computed {value!r} does not round to printed {printed}"
        )
    elif erratum:
        ERRATA.append(f"{label}: an earlier printing of the physics reference had {printed}, computed {value!r}; {erratum}")


def versions():
    """Library versions used for this run."""
    return {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "mpmath": mp.__version__,
        "iapws": iapws.__version__,
    }


def invert(fbar, t, method):
    """Numerical inverse Laplace transform at t with mpmath at MP_DPS digits."""
    with mp.workdps(MP_DPS):
        return mp.invertlaplace(fbar, t, method=method)


def inverted_pair(fbar, t):
    """Talbot value and its relative disagreement with Stehfest."""
    talbot = invert(fbar, t, "talbot")
    stehfest = invert(fbar, t, "stehfest")
    return f(talbot), rel_diff(talbot, stehfest)


def thiem_ring(r1, r2, b, k):
    """Steady radial resistance of a ring, ln(r2/r1)/(2 pi b K), s/m^2."""
    return math.log(r2 / r1) / (2.0 * math.pi * b * k)


def quad_ring(r1, r2, b, k):
    """Same resistance by scipy.integrate.quad of dr/(2 pi r b K)."""
    val, _ = scipy.integrate.quad(
        lambda r: 1.0 / (2.0 * math.pi * r * b * k), r1, r2, epsabs=0.0, epsrel=1e-13
    )
    return val


def water(t_c):
    """(rho, mu) of water at t_c deg C and 0.101325 MPa from iapws.IAPWS95."""
    w = iapws.IAPWS95(T=273.15 + t_c, P=0.101325)
    return w.rho, w.mu


def ergun(d, n, rho, mu):
    """Ergun (1952) head-form coefficients: K (m/s), k (m^2), beta (s^2/m^2)."""
    k = n**3 * d**2 / (150.0 * (1.0 - n) ** 2)
    return k * rho * G / mu, k, 1.75 * (1.0 - n) / (G * n**3 * d)


def kozeny_carman_k(d, n):
    """Kozeny-Carman permeability with constant 180, m^2."""
    return d**2 * n**3 / (180.0 * (1.0 - n) ** 2)


SET_A = {
    "b": 10.0,
    "rw": 0.1,
    "rb": 0.2,
    "rd": 0.5,
    "R": 200.0,
    "K_pack": 5e-3,
    "cake_thickness": 2e-3,
    "K_cake": 1e-6,
    "K_invaded": 5e-5,
    "K_formation": 1e-4,
}
"""Parameter set A of docs/physics.md section 8a (without the rate)."""


def set_a_resistances(p):
    """Series resistances (s/m^2) of set A: pack, cake, invaded, formation, ideal."""
    return {
        "pack": thiem_ring(p["rw"], p["rb"], p["b"], p["K_pack"]),
        "cake": p["cake_thickness"] / (2.0 * math.pi * p["rb"] * p["b"] * p["K_cake"]),
        "invaded": thiem_ring(p["rb"], p["rd"], p["b"], p["K_invaded"]),
        "formation": thiem_ring(p["rd"], p["R"], p["b"], p["K_formation"]),
        "ideal": thiem_ring(p["rw"], p["R"], p["b"], p["K_formation"]),
    }


# ---------------------------------------------------------------------------------------
# 1. steady composite Thiem
# ---------------------------------------------------------------------------------------


def thiem_composite():
    """Steady composite Thiem solution, docs/physics.md section 8a set A; skins per docs/physics.md section 2.4.

    Thiem, G., 1906, "Hydrologische Methoden", Leipzig (from memory - verify); skin after
    Hawkins, M.F. Jr., 1956, "A note on the skin effect", Trans. AIME 207, 356-357 (from
    memory - verify); thin-cake skin derived in docs/physics.md section 2.3.
    """
    p = dict(SET_A, Q=-0.01)
    res = set_a_resistances(p)
    res["total"] = res["pack"] + res["cake"] + res["invaded"] + res["formation"]
    q = p["Q"]
    # Flow outward: h(r1) - h(r2) = Q * resistance; h(R) = 0.
    h_rd = q * res["formation"]
    h_rb_f = h_rd + q * res["invaded"]
    h_rb_p = h_rb_f + q * res["cake"]
    h_rw = h_rb_p + q * res["pack"]
    kf = p["K_formation"]
    skin = {
        "pack": (kf / p["K_pack"] - 1.0) * math.log(p["rb"] / p["rw"]),
        "cake": kf * p["cake_thickness"] / (p["K_cake"] * p["rb"]),
        "invaded": (kf / p["K_invaded"] - 1.0) * math.log(p["rd"] / p["rb"]),
    }
    skin["total"] = skin["pack"] + skin["cake"] + skin["invaded"]
    ln_r = math.log(p["R"] / p["rw"])
    efficiency = ln_r / (ln_r + skin["total"])
    rw_eff = p["rw"] * math.exp(-skin["total"])
    face_flux = q / (2.0 * math.pi * p["rb"] * p["b"])

    # Cross-checks: ring resistances by quadrature; skin by 2 pi K_f b (R_tot - R_ideal)
    # (exact for the pack and invaded rings; the cake skin equals its resistance term).
    diffs = [
        rel_diff(res["pack"], quad_ring(p["rw"], p["rb"], p["b"], p["K_pack"])),
        rel_diff(res["invaded"], quad_ring(p["rb"], p["rd"], p["b"], p["K_invaded"])),
        rel_diff(res["formation"], quad_ring(p["rd"], p["R"], p["b"], kf)),
        rel_diff(res["ideal"], quad_ring(p["rw"], p["R"], p["b"], kf)),
        rel_diff(
            skin["total"], 2.0 * math.pi * kf * p["b"] * (res["total"] - res["ideal"])
        ),
        rel_diff(h_rw, q * res["total"]),
    ]

    # docs/physics.md section 8a and 2.4 printed values (drawdown = -h for pumping).
    for key, txt in [
        ("pack", "2.206356e+00"),
        ("cake", "1.591549e+02"),
        ("invaded", "2.916644e+02"),
        ("formation", "9.535712e+02"),
        ("total", "1.406597e+03"),
        ("ideal", "1.209721e+03"),
    ]:
        check_printed(f"8a resistance {key}", res[key], txt)
    for key, txt in [
        ("pack", "0.022064"),
        ("cake", "1.591549"),
        ("invaded", "2.916644"),
        ("formation", "9.535712"),
        ("total", "14.065969"),
        ("ideal", "12.097212"),
    ]:
        check_printed(f"8a head drop {key}", -q * res[key], txt)
    check_printed("8a drawdown r_d", -h_rd, "9.535712")
    check_printed("8a drawdown r_b formation side", -h_rb_f, "12.452356")
    check_printed("8a drawdown r_b pack side", -h_rb_p, "14.043905")
    check_printed("8a drawdown rw", -h_rw, "14.065969")
    check_printed("8a Darcy flux at r_b", abs(face_flux), "7.957747e-04")
    check_printed("2.4 s_pack", skin["pack"], "-0.679284")
    check_printed("2.4 s_cake", skin["cake"], "1.000000")
    check_printed("2.4 s_inv", skin["invaded"], "0.916291")
    check_printed("2.4 s_tot", skin["total"], "1.237006")
    check_printed("2.4 E", efficiency, "0.860034")
    check_printed("2.4 rw_eff", rw_eff, "0.029025")
    check_printed(
        "2.4 2 pi K_f b (R_total - R_ideal)",
        2.0 * math.pi * kf * p["b"] * (res["total"] - res["ideal"]),
        "1.237006",
    )

    return {
        "source": (
            "Steady composite Thiem solution (Thiem, G., 1906, 'Hydrologische Methoden', "
            "Leipzig; from memory - verify), series resistances of docs/physics.md section 8a, "
            "parameter set A. Skins per docs/physics.md section 2.4 after Hawkins, M.F. Jr., 1956, "
            "'A note on the skin effect', Trans. AIME 207, 356-357 (from memory - "
            "verify); thin-cake skin derived in docs/physics.md section 2.3."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "math.log for ring resistances ln(r2/r1)/(2 pi b K)",
                "cake resistance delta_c/(2 pi r_b b K_c)",
                "math.exp for rw_eff = rw exp(-s_tot)",
                "cross-check: scipy.integrate.quad(lambda r: 1/(2 pi r b K), r1, r2, "
                "epsabs=0, epsrel=1e-13); skin identity 2 pi K_f b (R_total - R_ideal)",
            ],
        },
        "conventions": (
            "SI units; Q positive outward from the well (pumping negative); heads are "
            "signed changes from static with h(R) = 0; efficiency = ln(R/rw)/(ln(R/rw) + "
            "s_tot) (docs/physics.md section 2.4)"
        ),
        "params": {k: f(v) for k, v in p.items()},
        "expected": {
            "resistance": {k: f(res[k]) for k in
                           ["pack", "cake", "invaded", "formation", "total", "ideal"]},
            "head": {
                "rw": f(h_rw),
                "rb_pack_side": f(h_rb_p),
                "rb_formation_side": f(h_rb_f),
                "rd": f(h_rd),
            },
            "face_flux_rb": f(face_flux),
            "skin": {k: f(skin[k]) for k in ["pack", "cake", "invaded", "total"]},
            "efficiency": f(efficiency),
            "rw_eff": f(rw_eff),
        },
        "cross_check": "ring resistances by quadrature; skin identity; head sum",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 2. Theis and the finite-radius constant-rate solution
# ---------------------------------------------------------------------------------------


def finite_radius_fbar(r_d):
    """Laplace transform of the van Everdingen-Hurst constant-rate drawdown at r_d."""

    def fbar(p):
        x = mp.sqrt(p)
        return mp.besselk(0, r_d * x) / (p * x * mp.besselk(1, x))

    return fbar


def theis():
    """Theis (1935) line source against the finite-radius solution (van Everdingen & Hurst 1949).

    Theis, C.V., 1935, Trans. AGU 16, 519-524; van Everdingen, A.F., Hurst, W., 1949,
    Trans. AIME 186 (details from memory - verify). docs/physics.md section 8b and 8e (C_D = 0, Sk = 0).
    """
    b, k, ss, rw = 10.0, 1e-4, 1e-5, 0.1
    t_m, s_st = k * b, ss * b
    q_out = -0.01
    rate = -q_out
    scale = rate / (2.0 * math.pi * t_m)
    keep_tol = 5e-4
    # Target u per radius; the time is rounded to 12 significant digits (so that it is
    # a clean decimal) and u, tD are then computed from that time.
    candidates = [(1.0, (1e-4, 1e-3, 1e-2, 1e-1)),
                  (3.0, (1e-3, 1e-2, 1e-1)),
                  (10.0, (1e-3, 1e-2, 1e-1, 1.0)),
                  (30.0, (1e-4, 1e-2, 1e-1, 1.0))]
    points, rejected = [], []
    diff_exp1, diff_inv = [], []
    for r, targets in candidates:
        for u_target in targets:
            t = float(f"{r * r * s_st / (4.0 * t_m * u_target):.12g}")
            u = r * r * s_st / (4.0 * t_m * t)
            td = t_m * t / (s_st * rw * rw)
            w_u = f(scipy.special.exp1(u))
            with mp.workdps(MP_DPS):
                diff_exp1.append(rel_diff(w_u, mp.e1(u)))
            s_theis = rate / (4.0 * math.pi * t_m) * w_u
            val, d = inverted_pair(finite_radius_fbar(r / rw), td)
            diff_inv.append(d)
            s_fr = scale * val
            line_diff = abs(s_fr - s_theis) / s_theis
            row = {
                "r": f(r),
                "t": f(t),
                "u": f(u),
                "tD": f(td),
                "s_theis": s_theis,
                "s_finite_radius": f(s_fr),
                "line_source_rel_diff": f(line_diff),
            }
            (points if line_diff < keep_tol else rejected).append(row)

    # docs/physics.md section 8b well-function table and worked examples.
    for u, txt in [
        (1e-4, "8.633224705"),
        (1e-3, "6.331539364"),
        (1e-2, "4.037929577"),
        (0.1, "1.822923958"),
        (0.5, "0.5597735948"),
        (1.0, "0.2193839344"),
        (2.0, "0.04890051071"),
        (5.0, "0.001148295591"),
    ]:
        check_printed(f"8b W({u})", f(scipy.special.exp1(u)), txt)
    for r, t, u_txt, s_txt, cj_txt in [
        (10.0, 3600.0, "6.944444e-04", "5.328410", "5.327857"),
        (1.0, 60.0, "4.166667e-04", "5.734691", "5.734359"),
        (50.0, 86400.0, "7.233796e-04", "5.295948", "5.295372"),
    ]:
        u = r * r * s_st / (4.0 * t_m * t)
        check_printed(f"8b u r={r} t={t}", u, u_txt)
        check_printed(f"8b s Theis r={r}", rate / (4 * math.pi * t_m) *
                      f(scipy.special.exp1(u)), s_txt)
        check_printed(f"8b s Cooper-Jacob r={r}", rate / (4 * math.pi * t_m) *
                      (-0.5772156649 - math.log(u)), cj_txt)
    if len(points) < 10:
        CHECK_FAILURES.append(f"theis: only {len(points)} points within {keep_tol}")

    return {
        "source": (
            "Theis, C.V., 1935, 'The relation between the lowering of the piezometric "
            "surface and the rate and duration of discharge of a well using ground-water "
            "storage', Trans. AGU 16, 519-524 (line source, s = Q/(4 pi T) E1(u)); "
            "finite-radius constant-rate solution of van Everdingen, A.F., Hurst, W., "
            "1949, Trans. AIME 186 (from memory - verify). docs/physics.md section 8b, 8e."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "scipy.special.exp1(u) for W(u); cross-checked with mpmath.e1(u)",
                f"mpmath.invertlaplace(F, tD, method='talbot') with mp.mp.dps = {MP_DPS}, "
                "F(p) = mpmath.besselk(0, rD*sqrt(p)) / (p*sqrt(p)*mpmath.besselk(1, "
                "sqrt(p))), rD = r/rw, tD = T t/(S rw^2), s = |Q|/(2 pi T) * value",
                "cross-check: same F with method='stehfest'",
            ],
        },
        "conventions": (
            "SI units; Q positive outward (pumping negative); drawdown s = -h positive; "
            "t = r^2 S/(4 T u); points kept only where line_source_rel_diff = "
            f"|s_finite_radius - s_theis|/s_theis < {keep_tol}"
        ),
        "params": {
            "b": b, "K": k, "Ss": ss, "T": f(t_m), "S": f(s_st), "rw": rw, "Q": q_out,
            "line_source_keep_tol": keep_tol,
        },
        "points": points,
        "candidates_rejected": [
            {"r": row["r"], "u": row["u"],
             "line_source_rel_diff": row["line_source_rel_diff"]} for row in rejected
        ],
        "cross_check": "finite radius: Talbot vs Stehfest; W(u): scipy exp1 vs mpmath.e1",
        "cross_check_detail": {
            "finite_radius_talbot_vs_stehfest": f(max(diff_inv)),
            "exp1_scipy_vs_mpmath": f(max(diff_exp1)),
        },
        "cross_check_max_rel_diff": f(max(diff_inv + diff_exp1)),
    }


# ---------------------------------------------------------------------------------------
# 3. periodic well-face head
# ---------------------------------------------------------------------------------------


def periodic_case(t_m, s_st, rw, h0, period, radii):
    """Amplitude ratio, unwrapped lag, Q_hat at one period; scipy and mpmath values."""
    w = 2.0 * math.pi / period
    a = np.sqrt(1j * w * s_st / t_m)
    k0w = scipy.special.kv(0, a * rw)
    # Unwrap the lag on a dense radial grid that contains the requested radii exactly.
    grid = np.unique(np.concatenate(
        [np.geomspace(rw, max(radii), 4001), np.asarray(radii, dtype=float)]))
    ratio_grid = scipy.special.kv(0, a * grid) / k0w
    lag_grid = np.unwrap(-np.angle(ratio_grid))
    idx = [int(np.searchsorted(grid, r)) for r in radii]
    ratio = ratio_grid[idx]
    lag = lag_grid[idx]
    q_hat = 2.0 * math.pi * rw * t_m * a * h0 * scipy.special.kv(1, a * rw) / k0w

    diffs = []
    with mp.workdps(MP_DPS):
        a_mp = mp.sqrt(1j * w * mp.mpf(s_st) / mp.mpf(t_m))
        k0w_mp = mp.besselk(0, a_mp * mp.mpf(rw))
        for r, rr in zip(radii, ratio):
            diffs.append(rel_diff(rr, mp.besselk(0, a_mp * mp.mpf(r)) / k0w_mp))
        q_mp = (2 * mp.pi * mp.mpf(rw) * mp.mpf(t_m) * a_mp * h0
                * mp.besselk(1, a_mp * mp.mpf(rw)) / k0w_mp)
        diffs.append(rel_diff(q_hat, q_mp))
    return w, a, np.abs(ratio), lag, q_hat, diffs


def periodic():
    """Periodic well-face head in an infinite confined aquifer, docs/physics.md section 8c.

    Periodic-steady-state (frequency-domain) solution of the radial diffusion equation:
    h = Re{H0 K0(a r)/K0(a rw) e^{iwt}}, a = sqrt(i w S/T) (textbook result; no specific
    publication checked in docs/physics.md). Mean power per docs/physics.md section 7.3.
    """
    t_m, s_st, rw, h0 = 1e-3, 1e-4, 0.1, 1.0
    base = [0.2, 0.5, 1.0, 2.0, 5.0]
    cases, diffs = [], []
    for period, radii in [(2.0, base), (20.0, base + [10.0]), (100.0, base + [10.0])]:
        w, a, amp, lag, q_hat, d = periodic_case(t_m, s_st, rw, h0, period, radii)
        diffs += d
        power = 0.5 * RHO_PERIODIC * G * (h0 * np.conj(q_hat)).real
        cases.append({
            "period": f(period),
            "omega": f(w),
            "penetration_depth": f(math.sqrt(2.0 * t_m / (s_st * w))),
            "radii": [f(r) for r in radii],
            "amplitude_ratio": [f(x) for x in amp],
            "phase_lag_rad": [f(x) for x in lag],
            "q_hat_re": f(q_hat.real),
            "q_hat_im": f(q_hat.imag),
            "mean_power_w": f(power),
        })

    # docs/physics.md section 8c tables (P = 2 s including r = 10 m, P = 100 s) and 7.3 powers.
    tables = {
        2.0: [(0.2, "7.85386470e-01", "0.06889648"), (0.5, "5.11740905e-01", "0.22921076"),
              (1.0, "3.21316230e-01", "0.45762849"), (2.0, "1.61226932e-01", "0.88003157"),
              (5.0, "3.23067210e-02", "2.09376418"), (10.0, "3.19602040e-03", "4.08676878")],
        100.0: [(0.2, "8.63768903e-01", "0.02500064"), (0.5, "6.84884382e-01", "0.07295375"),
                (1.0, "5.51175855e-01", "0.12869626"), (2.0, "4.20132478e-01", "0.21523981"),
                (5.0, "2.55700031e-01", "0.42476498"), (10.0, "1.45911160e-01", "0.73352243")],
    }
    q_printed = {2.0: ("1.962563094e-03", "5.005603493e-04", "2.02539245e-03", "0.24973006",
                       "9.605832"),
                 100.0: ("1.237345672e-03", "1.959469255e-04", "1.25276475e-03", "0.15705647",
                         "6.056231")}
    for period, rows in tables.items():
        radii = [r for r, _, _ in rows]
        w, a, amp, lag, q_hat, d = periodic_case(t_m, s_st, rw, h0, period, radii)
        diffs += d
        for (r, amp_txt, lag_txt), am, lg in zip(rows, amp, lag):
            check_printed(f"8c P={period} amplitude r={r}", am, amp_txt)
            # an earlier printing of the physics reference had 4.08676878 for P = 2 s, r = 10 m; mpmath.besselk at 40
            # digits gives 2 pi - arg(K0(10 a)/K0(0.1 a)) = 4.0867687732 rad.
            lag_erratum = ("last digit off by one; mpmath.besselk at 40 digits gives "
                           "4.0867687732" if (period, r) == (2.0, 10.0) else None)
            check_printed(f"8c P={period} lag r={r}", lg, lag_txt, erratum=lag_erratum)
        re_txt, im_txt, abs_txt, lead_txt, pw_txt = q_printed[period]
        check_printed(f"8c P={period} Re Q_hat", q_hat.real, re_txt)
        check_printed(f"8c P={period} Im Q_hat", q_hat.imag, im_txt)
        check_printed(f"8c P={period} |Q_hat|", abs(q_hat), abs_txt)
        check_printed(f"8c P={period} lead", float(np.angle(q_hat)), lead_txt)
        check_printed(f"7.3 P={period} mean power",
                      0.5 * RHO_PERIODIC * G * q_hat.real * h0, pw_txt)
    w2 = 2.0 * math.pi / 2.0
    check_printed("8c P=2 Re a", float(np.sqrt(1j * w2 * s_st / t_m).real), "0.39633273")
    check_printed("8c P=2 delta", math.sqrt(2 * t_m / (s_st * w2)), "2.523133")
    check_printed("8c P=100 delta", math.sqrt(2 * t_m / (s_st * 2 * math.pi / 100)),
                  "17.841241")

    return {
        "source": (
            "Periodic steady state of the radial diffusion equation with well-face head "
            "Re{H0 e^{iwt}} in an infinite homogeneous confined aquifer: h = Re{H0 K0(a r)/"
            "K0(a rw) e^{iwt}}, a = sqrt(i w S/T), Q_hat = 2 pi rw T a H0 K1(a rw)/K0(a rw) "
            "(docs/physics.md section 8c; standard textbook result, no specific publication checked). "
            "Mean power 0.5 rho g Re(H0 conj(Q_hat)) per docs/physics.md section 7.3."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "a = numpy.sqrt(1j*w*S/T)",
                "scipy.special.kv(0, a*r) / scipy.special.kv(0, a*rw); amplitude = abs(); "
                "lag = numpy.unwrap(-numpy.angle(ratio)) on a 4001-point numpy.geomspace "
                "grid from rw that contains the listed radii",
                "Q_hat = 2*pi*rw*T*a*H0*scipy.special.kv(1, a*rw)/scipy.special.kv(0, a*rw)",
                f"cross-check: mpmath.besselk(0|1, a*r) with mp.mp.dps = {MP_DPS}",
            ],
        },
        "conventions": (
            "SI units; phase_lag_rad positive = lags the well head, unwrapped along r; "
            "q_hat is the complex amplitude of the OUTWARD well-face flow per m of H0 "
            "(m^3/s); mean_power_w is the mean power into the aquifer for H0 = 1 m"
        ),
        "params": {"T": t_m, "S": s_st, "rw": rw, "H0": h0, "rho": RHO_PERIODIC, "g": G},
        "cases": cases,
        "cross_check": "scipy.special.kv (complex) vs mpmath.besselk at 30 digits",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 4. slug test
# ---------------------------------------------------------------------------------------


def slug_fbar(alpha):
    """Laplace transform (in beta) of H/H0 for the slug test."""

    def fbar(p):
        x = mp.sqrt(p * alpha)
        k0 = mp.besselk(0, x)
        return k0 / (p * k0 + 2 * x * mp.besselk(1, x))

    return fbar


def slug_integral(alpha, beta):
    """Real-integral form of H/H0 (Cooper, Bredehoeft & Papadopulos 1967)."""
    with mp.workdps(MP_DPS):
        alpha = mp.mpf(alpha)
        beta = mp.mpf(beta)

        def integrand(u):
            d1 = u * mp.besselj(0, u) - 2 * alpha * mp.besselj(1, u)
            d2 = u * mp.bessely(0, u) - 2 * alpha * mp.bessely(1, u)
            return mp.exp(-beta * u * u / alpha) / (u * (d1 * d1 + d2 * d2))

        val = mp.quad(integrand, [0, mp.mpf("1e-6"), mp.mpf("1e-3"), mp.mpf("0.1"), 1,
                                  10, mp.inf])
        return 8 * alpha / mp.pi**2 * val


def slug_cbp():
    """Slug test, Cooper, Bredehoeft & Papadopulos (1967), docs/physics.md section 8d.

    Cooper, H.H., Bredehoeft, J.D., Papadopulos, I.S., 1967, "Response of a
    finite-diameter well to an instantaneous charge of water", Water Resour. Res. 3(1),
    263-269.
    """
    betas = [0.001, 0.01, 0.1, 0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0]
    printed = {
        1e-3: ["0.9968704845", "0.985341631", "0.9183276709", "0.729794377", "0.5729025695",
               "0.3760953918", "0.1401146302", "0.04821475157", "0.01706202598",
               "0.0056213249", "0.002653164766"],
        1e-5: ["0.9991399529", "0.9941676151", "0.9570969352", "0.8309085332",
               "0.7079382896", "0.5262772851", "0.2401686641", "0.08377628053",
               "0.02256085484", "0.00598742775", "0.002724876425"],
    }
    cases, diffs = [], []
    for alpha in (1e-3, 1e-5):
        vals = []
        for beta, txt in zip(betas, printed[alpha]):
            talbot = invert(slug_fbar(alpha), beta, "talbot")
            diffs.append(rel_diff(talbot, slug_integral(alpha, beta)))
            vals.append(f(talbot))
            check_printed(f"8d alpha={alpha} beta={beta}", vals[-1], txt)
        cases.append({"alpha": alpha, "beta": betas, "h_over_h0": vals})

    return {
        "source": (
            "Cooper, H.H., Bredehoeft, J.D., Papadopulos, I.S., 1967, 'Response of a "
            "finite-diameter well to an instantaneous charge of water', Water Resour. Res. "
            "3(1), 263-269 (docs/physics.md section 8d)."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                f"mpmath.invertlaplace(F, beta, method='talbot') with mp.mp.dps = {MP_DPS}, "
                "x = sqrt(p*alpha), F(p) = K0(x)/(p*K0(x) + 2*x*K1(x)) with "
                "mpmath.besselk",
                "cross-check: (8 alpha/pi^2) * mpmath.quad(exp(-beta u^2/alpha)/(u Delta(u)), "
                "[0, 1e-6, 1e-3, 0.1, 1, 10, inf]), Delta = [u J0 - 2 alpha J1]^2 + "
                "[u Y0 - 2 alpha Y1]^2 with mpmath.besselj / mpmath.bessely",
            ],
        },
        "conventions": (
            "alpha = rw^2 S/rc^2, beta = T t/rc^2; h_over_h0 is the well level over the "
            "initial displacement H0"
        ),
        "params": {"alpha": [1e-3, 1e-5], "beta": betas},
        "cases": cases,
        "cross_check": "Talbot inversion vs real-integral form (mpmath.quad)",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 5. constant rate with wellbore storage and skin
# ---------------------------------------------------------------------------------------


def storage_skin_fbar(c_d, skin):
    """Laplace transform of pwD with wellbore storage C_D and skin Sk."""

    def fbar(p):
        x = mp.sqrt(p)
        num = mp.besselk(0, x) + skin * x * mp.besselk(1, x)
        return num / (p * (x * mp.besselk(1, x) + c_d * p * num))

    return fbar


def papadopulos_cooper():
    """Constant rate with wellbore storage and skin, docs/physics.md section 8e.

    Papadopulos, I.S., Cooper, H.H., 1967, "Drawdown in a well of large diameter", Water
    Resour. Res. 3(1), 241-244; Agarwal, R.G., Al-Hussainy, R., Ramey, H.J., 1970, SPE J.
    10(3), 279-290 (citations from memory - verify).
    """
    tds = [1e1, 1e2, 3e2, 1e3, 3e3, 1e4, 3e4, 1e5, 3e5, 1e6, 1e7]
    printed = {  # docs/physics.md section 8e, tD = 1e1 .. 1e7
        (0.0, 0.0): ["1.650894705", "2.722894443", "3.860590596", "5.009984924",
                     "6.161035384", "7.312298533", "8.463587622"],
        (100.0, 0.0): ["0.09578724716", "0.7975425109", "3.268107344", "4.956669143",
                       "6.154827247", "7.311566624", "8.463502977"],
        (5000.0, 0.0): ["0.001998256452", "0.01990392465", "0.1938063541", "1.602439392",
                        "5.607317803", "7.273871794", "8.459332075"],
        (5000.0, 5.0): ["0.001999672658", "0.01997163636", "0.197562386", "1.799513879",
                        "9.010632148", "12.24456023", "13.45679203"],
    }
    decades = [1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7]
    cases, diffs = [], []
    for (c_d, skin), txts in printed.items():
        vals = []
        for td in tds:
            val, d = inverted_pair(storage_skin_fbar(c_d, skin), td)
            diffs.append(d)
            vals.append(val)
            if td in decades:
                check_printed(f"8e C_D={c_d} Sk={skin} tD={td}", val,
                              txts[decades.index(td)])
        cases.append({"C_D": c_d, "skin": skin, "tD": tds, "pwD": vals})
    with mp.workdps(MP_DPS):
        check_printed("8e ln 4 - gamma", f(mp.log(4) - mp.euler), "0.8090786962")

    return {
        "source": (
            "Constant-rate drawdown with wellbore storage and skin: Papadopulos, I.S., "
            "Cooper, H.H., 1967, 'Drawdown in a well of large diameter', Water Resour. Res. "
            "3(1), 241-244; Agarwal, R.G., Al-Hussainy, R., Ramey, H.J., 1970, 'An "
            "investigation of wellbore storage and skin effect in unsteady liquid flow: I. "
            "Analytical treatment', SPE J. 10(3), 279-290; C_D = 0, Sk = 0 is van "
            "Everdingen & Hurst 1949, Trans. AIME 186 (citations from memory - verify). "
            "docs/physics.md section 8e."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                f"mpmath.invertlaplace(F, tD, method='talbot') with mp.mp.dps = {MP_DPS}, "
                "x = sqrt(p), F(p) = [K0(x) + Sk x K1(x)] / (p {x K1(x) + C_D p [K0(x) + "
                "Sk x K1(x)]}) with mpmath.besselk",
                "cross-check: same F with method='stehfest'",
            ],
        },
        "conventions": (
            "tD = T t/(S rw^2), s_w = |Q|/(2 pi T) pwD (drawdown at the well, positive for "
            "pumping), C_D = rc^2/(2 S rw^2), Sk = infinitesimal skin at rw"
        ),
        "params": {"C_D_skin": [[c, s] for c, s in printed], "tD": tds},
        "cases": cases,
        "cross_check": "Talbot vs Stehfest",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 6. constant head: flow decline
# ---------------------------------------------------------------------------------------


def flow_decline_fbar(p):
    """Laplace transform of the dimensionless well flow G for a unit head step."""
    x = mp.sqrt(p)
    return mp.besselk(1, x) / (x * mp.besselk(0, x))


def flow_decline():
    """Flow decline at constant well head, Jacob & Lohman (1952), docs/physics.md section 8f.

    Jacob, C.E., Lohman, S.W., 1952, Trans. AGU 33, 559-569 (from memory - verify).
    """
    tds = [1.0, 3.0, 10.0, 30.0, 100.0, 300.0, 1e3, 1e4, 1e5, 1e6]
    printed = {1.0: "0.9837709417", 10.0: "0.5339159341", 100.0: "0.3455600043",
               1e3: "0.250964433", 1e4: "0.195931933", 1e5: "0.1603653642",
               1e6: "0.1356073249"}
    points, diffs = [], []
    for td in tds:
        val, d = inverted_pair(flow_decline_fbar, td)
        diffs.append(d)
        points.append({"tD": td, "G": val})
        if td in printed:
            check_printed(f"8f G({td})", val, printed[td])

    # Dimensional examples of docs/physics.md section 8f / 1.3 (T = 1e-3, S = 1e-4, rw = 0.1, s_w = 1).
    t_m, s_st, rw, s_w = 1e-3, 1e-4, 0.1, 1.0
    examples = []
    for t, txt in [(0.1, "2.1712175e-3"), (0.8, "1.6205096e-3")]:
        td = t_m * t / (s_st * rw * rw)
        val, d = inverted_pair(flow_decline_fbar, td)
        diffs.append(d)
        q = 2.0 * math.pi * t_m * s_w * val
        check_printed(f"8f Q at t={t}", q, txt)
        examples.append({"t": t, "tD": f(td), "G": val, "Q_inflow": f(q)})

    return {
        "source": (
            "Flow to a well at constant drawdown in an infinite confined aquifer: Jacob, "
            "C.E., Lohman, S.W., 1952, Trans. AGU 33, 559-569 (from memory - verify). "
            "docs/physics.md section 8f."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                f"mpmath.invertlaplace(F, tD, method='talbot') with mp.mp.dps = {MP_DPS}, "
                "F(p) = K1(sqrt p)/(sqrt(p) K0(sqrt p)) with mpmath.besselk",
                "cross-check: same F with method='stehfest'",
            ],
        },
        "conventions": (
            "tD = T t/(S rw^2); well flow magnitude Q = 2 pi T s_w G(tD) for a well-face "
            "head step of -s_w (flow into the well; for a head step +s_w the same magnitude "
            "flows outward)"
        ),
        "params": {"tD": tds},
        "points": points,
        "dimensional_examples": {
            "params": {"T": t_m, "S": s_st, "rw": rw, "s_w": s_w},
            "points": examples,
        },
        "cross_check": "Talbot vs Stehfest",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 7. steady radial Forchheimer
# ---------------------------------------------------------------------------------------


def forchheimer_steady():
    """Steady radial Forchheimer head drop, docs/physics.md section 4.3 (closed form derived there).

    Forchheimer, P., 1901, "Wasserbewegung durch Boden", Z. Ver. Dtsch. Ing. 45 (from
    memory - verify); pack coefficients from Ergun, S., 1952, Chem. Eng. Prog. 48(2),
    89-94.
    """
    rho, mu = water(20.0)
    k_pack, _, beta_pack = ergun(2e-3, 0.35, rho, mu)
    specs = [
        ("K = 1e-3, beta = 1e3 example",
         {"K": 1e-3, "beta": 1e3, "Q": 0.05, "b": 5.0, "r1": 0.1, "r2": 1.0},
         ("3.66467799e+00", "2.27972663e-02", "3.68747526e+00")),
        ("Ergun pack of docs/physics.md section 4.2 (d = 2 mm, n = 0.35, water at 20 C)",
         {"K": k_pack, "beta": beta_pack, "Q": 0.01, "b": 10.0, "r1": 0.1, "r2": 0.2,
          "d": 2e-3, "n": 0.35, "rho": rho, "mu": mu},
         ("4.171101e-03", "1.713195e-04", "4.3424207773e-03")),
    ]
    cases, diffs = [], []
    for name, p, txt in specs:
        qm = abs(p["Q"])
        lin = qm / (2.0 * math.pi * p["K"] * p["b"]) * math.log(p["r2"] / p["r1"])
        nl = p["beta"] * (qm / (2.0 * math.pi * p["b"])) ** 2 * (1.0 / p["r1"] - 1.0 / p["r2"])

        def grad_lin(r, p=p):
            return (qm / (2.0 * math.pi * r * p["b"])) / p["K"]

        def grad_nl(r, p=p):
            return p["beta"] * (qm / (2.0 * math.pi * r * p["b"])) ** 2

        opts = {"epsabs": 0.0, "epsrel": 1e-13}
        lin_q, _ = scipy.integrate.quad(grad_lin, p["r1"], p["r2"], **opts)
        nl_q, _ = scipy.integrate.quad(grad_nl, p["r1"], p["r2"], **opts)
        tot_q, _ = scipy.integrate.quad(lambda r: grad_lin(r) + grad_nl(r),
                                        p["r1"], p["r2"], **opts)
        diffs += [rel_diff(lin, lin_q), rel_diff(nl, nl_q), rel_diff(lin + nl, tot_q)]
        check_printed(f"4.3 {name} linear", lin, txt[0])
        check_printed(f"4.3 {name} inertial", nl, txt[1])
        check_printed(f"4.3 {name} total", lin + nl, txt[2])
        cases.append({
            "name": name,
            "params": {k: f(v) for k, v in p.items()},
            "expected": {"linear_part": f(lin), "inertial_part": f(nl), "total": f(lin + nl)},
        })

    return {
        "source": (
            "Steady radial flow with the Forchheimer law -dh/dr = q/K + beta q|q| "
            "(Forchheimer, P., 1901, 'Wasserbewegung durch Boden', Z. Ver. Dtsch. Ing. 45; "
            "from memory - verify), integrated in closed form in docs/physics.md section 4.3; pack "
            "coefficients from Ergun, S., 1952, 'Fluid flow through packed columns', Chem. "
            "Eng. Prog. 48(2), 89-94."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "closed form |Q|/(2 pi K b) ln(r2/r1) + beta (Q/(2 pi b))^2 (1/r1 - 1/r2) "
                "with math.log",
                "water at 20 C: iapws.IAPWS95(T=293.15, P=0.101325).rho and .mu",
                "cross-check: scipy.integrate.quad of (|Q|/(2 pi r b))/K + beta (|Q|/(2 pi r "
                "b))^2 over [r1, r2], epsabs=0, epsrel=1e-13",
            ],
        },
        "conventions": (
            "head drops are magnitudes h(r2) - h(r1) for pumping at rate |Q| (they reverse "
            "sign for injection); Q given as a magnitude"
        ),
        "params": {"cases": [c["name"] for c in cases]},
        "cases": cases,
        "cross_check": "closed form vs scipy.integrate.quad",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 8. grain size, water properties
# ---------------------------------------------------------------------------------------


def grain_size():
    """Water properties and grain-size permeability, docs/physics.md section 4.1, 4.2, 4.4, 5.1-5.3.

    IAPWS-95 density (Wagner & Pruss 2002) and IAPWS 2008 viscosity (Huber et al. 2009)
    via iapws; Ergun 1952; Kozeny 1927 / Carman 1937; Hazen 1892/1911 (from memory -
    verify).
    """
    diffs = []
    water_rows = []
    for t_c in range(0, 41, 5):
        rho, mu = water(float(t_c))
        water_rows.append({"t_c": float(t_c), "rho": f(rho), "mu": f(mu)})
    rho, mu = water(20.0)

    ergun_rows = []
    for d, n in [(2e-3, 0.35), (1e-3, 0.35), (2e-4, 0.35), (2e-3, 0.30)]:
        k_e, k, beta = ergun(d, n, rho, mu)
        k_kc = kozeny_carman_k(d, n)
        # Cross-check: Ergun K straight from the pressure form, 1/(150 mu (1-n)^2/(n^3 d^2))
        # divided by 1/(rho g), against k rho g/mu.
        k_direct = rho * G / (150.0 * mu * (1.0 - n) ** 2 / (n**3 * d**2))
        diffs.append(rel_diff(k_e, k_direct))
        ergun_rows.append({
            "d": d, "n": n, "K_ergun": f(k_e), "k_ergun": f(k), "beta_ergun": f(beta),
            "k_kozeny_carman": f(k_kc), "K_kozeny_carman": f(k_kc * rho * G / mu),
        })

    hazen_rows = []
    for d10_mm in (0.1, 0.2, 0.5):
        for c in (40.0, 100.0, 150.0):
            k_si = 1e-4 * c * d10_mm**2
            k_cgs = c * (d10_mm / 10.0) ** 2 * 1e-2  # cm/s -> m/s
            diffs.append(rel_diff(k_si, k_cgs))
            hazen_rows.append({"d10_mm": d10_mm, "C": c, "K": f(k_si)})

    # 4.1 inversion check with the printed K and beta.
    k41, beta41, i41 = 2.644812e-2, 1352.685, 0.1
    q41 = 2.0 * i41 / (1.0 / k41 + math.sqrt(1.0 / k41**2 + 4.0 * beta41 * abs(i41)))
    i_back = q41 / k41 + beta41 * q41 * abs(q41)
    q41_root = scipy.optimize.brentq(lambda q: q / k41 + beta41 * q * q - i41, 0.0, 1.0,
                                     xtol=1e-300, rtol=4 * np.finfo(float).eps)
    diffs += [rel_diff(i_back, i41), rel_diff(q41, q41_root)]

    # 4.4 Reynolds number example.
    q44 = 0.01 / (2.0 * math.pi * 0.1 * 10.0)
    re44 = rho * q44 * 2e-3 / mu
    darcy = 9.869233e-13

    # Printed values.
    printed_ergun = [
        ("2.644812e-02", "2.706114e-09", "1.352685e+03", "2.204010e-02"),
        ("6.612031e-03", "6.765286e-10", "2.705370e+03", "5.510026e-03"),
        ("2.644812e-04", "2.706114e-11", "1.352685e+04", "2.204010e-04"),
        ("1.436101e-02", "1.469388e-09", "2.313245e+03", "1.196751e-02"),
    ]
    for row, txt in zip(ergun_rows, printed_ergun):
        tag = f"4.2 d={row['d']} n={row['n']}"
        check_printed(f"{tag} K", row["K_ergun"], txt[0])
        check_printed(f"{tag} k", row["k_ergun"], txt[1])
        check_printed(f"{tag} beta", row["beta_ergun"], txt[2])
        check_printed(f"{tag} K_KC", row["K_kozeny_carman"], txt[3])
    check_printed("4.2 Re at equal terms n=0.35", 150 * 0.65 / 1.75, "55.71")
    check_printed("5.2 k d=0.2mm", kozeny_carman_k(2e-4, 0.35), "2.255095e-11")
    check_printed("4.1 q", q41, "2.433031095e-03")
    check_printed("4.4 q", q44, "1.591549e-3")
    check_printed("4.4 Re", re44, "3.172329")
    printed_hazen = {(0.1, 40.0): "4.0e-05", (0.1, 100.0): "1.0e-04", (0.1, 150.0): "1.5e-04",
                     (0.2, 40.0): "1.6e-04", (0.2, 100.0): "4.0e-04", (0.2, 150.0): "6.0e-04",
                     (0.5, 40.0): "1.0e-03", (0.5, 100.0): "2.5e-03", (0.5, 150.0): "3.75e-03"}
    for row in hazen_rows:
        check_printed(f"5.1 Hazen {row['d10_mm']} {row['C']}", row["K"],
                      printed_hazen[(row["d10_mm"], row["C"])])
    for t_c, rho_t, mu_t, nu_t, rgm_t, kd_t in [
        (10.0, "999.702470", "1.3058997e-03", "1.306288e-06", "7.507263e+06", "7.409093e-06"),
        (15.0, "999.102621", "1.1375676e-03", "1.138589e-06", "8.612983e+06", "8.500353e-06"),
        (20.0, "998.207150", "1.0015961e-03", "1.003395e-06", "9.773468e+06", "9.645664e-06"),
    ]:
        r_t, m_t = water(t_c)
        check_printed(f"5.3 rho {t_c}", r_t, rho_t)
        check_printed(f"5.3 mu {t_c}", m_t, mu_t)
        check_printed(f"5.3 nu {t_c}", m_t / r_t, nu_t)
        check_printed(f"5.3 rho g/mu {t_c}", r_t * G / m_t, rgm_t)
        check_printed(f"5.3 K(1 darcy) {t_c}", darcy * r_t * G / m_t, kd_t)
    rho_row = ["999.8431", "999.9666", "999.7025", "999.1026", "998.2072", "997.0476",
               "995.6495", "994.0333", "992.2164"]
    mu_row = ["1.79176", "1.51817", "1.30590", "1.13757", "1.00160", "0.890022", "0.797222",
              "0.719126", "0.652729"]
    for row, rho_t, mu_t in zip(water_rows, rho_row, mu_row):
        check_printed(f"5.3 table rho {row['t_c']}", row["rho"], rho_t)
        check_printed(f"5.3 table mu {row['t_c']}", row["mu"] * 1e3, mu_t)

    return {
        "source": (
            "Water: IAPWS-95 density (Wagner, W., Pruss, A., 2002, J. Phys. Chem. Ref. Data "
            "31) and IAPWS 2008 viscosity (Huber, M.L. et al., 2009, J. Phys. Chem. Ref. "
            "Data 38) as implemented in iapws; Ergun, S., 1952, 'Fluid flow through packed "
            "columns', Chem. Eng. Prog. 48(2), 89-94; Kozeny 1927 (Sitzungsber. Akad. Wiss. "
            "Wien 136) / Carman 1937 (Trans. Inst. Chem. Eng. 15), constant 180; Hazen, A., "
            "1892 and 1911 (Trans. ASCE 73, discussion); Forchheimer 1901. Journal details "
            "from memory - verify. docs/physics.md section 4.1, 4.2, 4.4, 5.1, 5.2, 5.3."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "iapws.IAPWS95(T=273.15+t, P=0.101325).rho and .mu",
                "Ergun: K = rho g n^3 d^2/(150 mu (1-n)^2), k = n^3 d^2/(150 (1-n)^2), "
                "beta = 1.75 (1-n)/(g n^3 d); Kozeny-Carman k = d^2 n^3/(180 (1-n)^2), "
                "K = k rho g/mu (water at 20 C from iapws)",
                "Hazen K [m/s] = 1e-4 C (d10 [mm])^2",
                "Forchheimer inversion q = 2 i/(1/K + sqrt(1/K^2 + 4 beta |i|)); "
                "cross-check scipy.optimize.brentq on q/K + beta q^2 - i and the "
                "round trip q/K + beta q|q|",
                "Reynolds number Re = rho |q| d/mu",
            ],
        },
        "conventions": "SI units; t_c in deg C; mu in Pa s; d in m except d10_mm",
        "params": {"g": G, "P_MPa": 0.101325, "t_c_for_permeability": 20.0,
                   "rho_20": f(rho), "mu_20": f(mu)},
        "water": water_rows,
        "ergun_kozeny_carman": ergun_rows,
        "hazen": hazen_rows,
        "forchheimer_inversion": {"K": k41, "beta": beta41, "i": i41, "q": f(q41)},
        "reynolds_example": {"Q": 0.01, "b": 10.0, "r": 0.1, "d": 2e-3, "q": f(q44),
                             "Re": f(re44)},
        "cross_check": (
            "Ergun K two ways; Hazen SI vs cgs form; Forchheimer inversion vs brentq "
            "and round trip"
        ),
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 9. screen orifice
# ---------------------------------------------------------------------------------------


def screen_orifice():
    """Screen entrance loss as an orifice, docs/physics.md section 3.

    Orifice equation (any fluid-mechanics text); 0.03 m/s entrance-velocity limit is
    common practice (e.g. Driscoll 1986, "Groundwater and Wells"; from memory - verify).
    """
    r_s, length = 0.1, 10.0
    rows_in = [(0.01, 0.10, 0.6, "1.591549e-02", "3.587460e-05"),
               (0.05, 0.10, 0.6, "7.957747e-02", "8.968650e-04"),
               (0.05, 0.03, 0.6, "2.652582e-01", "9.965167e-03"),
               (0.05, 0.30, 0.8, "2.652582e-02", "5.605407e-05")]
    rows, diffs = [], []
    for q, a_o, cd, v_txt, dh_txt in rows_in:
        v = q / (2.0 * math.pi * r_s * length * a_o)
        dh = math.copysign(1.0, q) * (v / cd) ** 2 / (2.0 * G)
        # Cross-check: Bernoulli form Q^2/(2 g (Cd A_open)^2) with the open area.
        area = 2.0 * math.pi * r_s * length * a_o
        diffs.append(rel_diff(dh, q * q / (2.0 * G * (cd * area) ** 2)))
        check_printed(f"3 v_slot Q={q} Ao={a_o}", v, v_txt)
        check_printed(f"3 dh Q={q} Ao={a_o}", dh, dh_txt)
        rows.append({"Q": q, "A_o": a_o, "Cd": cd, "r_s": r_s, "L": length,
                     "v_slot": f(v), "dh_screen": f(dh)})
    v_lim, a_lim = 0.03, 0.10
    q_lim = v_lim * 2.0 * math.pi * r_s * length * a_lim
    q_root = scipy.optimize.brentq(
        lambda q: q / (2.0 * math.pi * r_s * length * a_lim) - v_lim, 0.0, 1.0,
        xtol=1e-300, rtol=4 * np.finfo(float).eps)
    diffs.append(rel_diff(q_lim, q_root))
    check_printed("3 Q at 0.03 m/s", q_lim, "1.884956e-02")
    check_printed("3 0.1 ft/s", 0.1 * 0.3048, "0.03048")

    return {
        "source": (
            "Orifice equation applied to the screen open area (any fluid-mechanics text), "
            "docs/physics.md section 3; entrance-velocity limit 0.03 m/s is common practice "
            "(e.g. Driscoll 1986, 'Groundwater and Wells', 2nd ed.; from memory - verify)."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "v_slot = Q/(2 pi r_s L A_o); dh_screen = sign(Q) (v_slot/Cd)^2/(2 g), "
                "g = 9.80665",
                "cross-check: Q^2/(2 g (Cd 2 pi r_s L A_o)^2); scipy.optimize.brentq for "
                "the rate at the velocity limit",
            ],
        },
        "conventions": "SI units; dh_screen = H - h(rw), sign follows Q (outward positive)",
        "params": {"r_s": r_s, "L": length, "g": G},
        "rows": rows,
        "velocity_limit": {"v_slot": v_lim, "A_o": a_lim, "r_s": r_s, "L": length,
                           "Q": f(q_lim)},
        "cross_check": "orifice velocity form vs open-area form; brentq for the limit rate",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 10. collapse and critical gradient
# ---------------------------------------------------------------------------------------


def collapse():
    """Thin-ring collapse pressure (Timoshenko & Gere 1961) and Terzaghi critical gradient.

    docs/physics.md section 9a and 9b. Check values only: no safety factor is included.
    """
    e_mod, nu = 2.758e9, 0.38
    rho, _ = water(20.0)
    printed = {13.5: ("3300.832", "478.745", "337.196"), 17.0: ("1573.959", "228.284", "160.787"),
               21.0: ("805.867", "116.881", "82.323"), 26.0: ("412.604", "59.843", "42.149"),
               32.5: ("206.263", "29.916", "21.071")}
    rows, diffs = [], []
    for dr, (kpa_t, psi_t, m_t) in printed.items():
        pc = 2.0 * e_mod / (1.0 - nu**2) * (1.0 / (dr - 1.0)) ** 3
        # Cross-check: ring form 3 E' I/R_m^3, I = t^3/12, for a 114.3 mm OD pipe.
        od = 0.1143
        t_wall = od / dr
        r_m = (od - t_wall) / 2.0
        pc_ring = 3.0 * e_mod / (1.0 - nu**2) * (t_wall**3 / 12.0) / r_m**3
        diffs.append(rel_diff(pc, pc_ring))
        check_printed(f"9a DR={dr} kPa", pc / 1e3, kpa_t)
        check_printed(f"9a DR={dr} psi", pc / PSI, psi_t)
        check_printed(f"9a DR={dr} m", pc / (rho * G), m_t)
        rows.append({"DR": dr, "Pc_pa": f(pc), "Pc_psi": f(pc / PSI),
                     "Pc_m_water_20c": f(pc / (rho * G))})
    e_low = 2.41e9
    pc21_low = 2.0 * e_low / (1.0 - nu**2) / 20.0**3
    check_printed("9a E=2.41 GPa factor", e_low / e_mod, "0.8738")
    check_printed("9a E=2.41 GPa DR 21 kPa", pc21_low / 1e3, "704.184")

    gradient_rows = []
    for gs, n, e_t, ic_t in [(2.65, 0.35, "0.538462", "1.072500"),
                             (2.65, 0.40, "0.666667", "0.990000"),
                             (2.65, 0.45, "0.818182", "0.907500"),
                             (2.70, 0.40, "0.666667", "1.020000")]:
        e = n / (1.0 - n)
        ic = (gs - 1.0) * (1.0 - n)
        diffs.append(rel_diff(ic, (gs - 1.0) / (1.0 + e)))
        check_printed(f"9b e Gs={gs} n={n}", e, e_t)
        check_printed(f"9b i_c Gs={gs} n={n}", ic, ic_t)
        gradient_rows.append({"Gs": gs, "n": n, "e": f(e), "i_c": f(ic)})

    return {
        "source": (
            "Elastic buckling of a long thin ring under uniform external pressure, "
            "Pc = 2 E/(1 - nu^2) (1/(DR - 1))^3 (Timoshenko, S.P., Gere, J.M., 1961, "
            "'Theory of Elastic Stability'; the thermoplastic well-casing standard ASTM F480 "
            "uses this form - from memory, verify). Critical gradient i_c = (Gs - 1)(1 - n) "
            "(Terzaghi, K., 1943, 'Theoretical Soil Mechanics'). docs/physics.md section 9a, 9b. No "
            "safety factor is included; real casing and screen ratings come from the "
            "manufacturer and local well codes."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "Pc = 2 E/(1 - nu^2) / (DR - 1)^3 (plain float arithmetic)",
                "psi = Pa / (0.45359237*9.80665/0.0254^2)",
                "m of water = Pa / (rho g), rho = iapws.IAPWS95(T=293.15, P=0.101325).rho",
                "cross-check: ring form 3 E/(1 - nu^2) (t^3/12)/R_m^3 for OD 114.3 mm; "
                "i_c = (Gs - 1)/(1 + e)",
            ],
        },
        "conventions": "SI units; Pc in Pa, psi and metres of water at 20 C",
        "params": {"E": e_mod, "nu": nu, "rho_20": f(rho), "g": G, "psi_pa": f(PSI),
                   "E_low": e_low},
        "collapse": rows,
        "collapse_E_low_DR21_pa": f(pc21_low),
        "critical_gradient": gradient_rows,
        "cross_check": "DR form vs ring form; two forms of i_c",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 11. energy dissipation
# ---------------------------------------------------------------------------------------


def energy_dissipation():
    """Darcy / Forchheimer dissipation, docs/physics.md section 7.1, 7.2 (set A) and 7.4.

    Dissipation phi = rho g q . (-grad h) with Darcy's law and the Forchheimer law
    (Forchheimer 1901, from memory - verify); derived in docs/physics.md section 7.
    """
    rho, mu = water(20.0)
    diffs = []
    examples = []
    for k, q, txt in [(1e-4, 1e-3, "9.789068e+01"), (5e-3, 1e-2, "1.957814e+02")]:
        phi = rho * G * q * q / k
        check_printed(f"7.1 phi K={k} q={q}", phi, txt)
        examples.append({"K": k, "q": q, "phi_darcy": f(phi)})
    k_p, _, beta_p = ergun(2e-3, 0.35, rho, mu)
    q_p = 0.05
    visc = rho * G * q_p**2 / k_p
    inert = rho * G * beta_p * q_p**3
    # docs/physics.md section 7.1 evaluated these with the K and beta rounded as printed in 4.2
    # (2.644812e-2 m/s, 1352.685 s^2/m^2); the full-precision values stored below differ
    # from them by about 1e-7 relative. Check the printed numbers with the rounded inputs.
    check_printed("7.1 Ergun pack viscous (K as printed in 4.2)",
                  rho * G * q_p**2 / 2.644812e-2, "9.253085e+02")
    check_printed("7.1 Ergun pack inertial (beta as printed in 4.2)",
                  rho * G * 1352.685 * q_p**3, "1.655191e+03")
    check_printed("7.1 Ergun pack viscous, full precision", visc, "9.25308e+02")
    check_printed("7.1 Ergun pack inertial, full precision", inert, "1.65519e+03")
    pack_example = {"d": 2e-3, "n": 0.35, "K": f(k_p), "beta": f(beta_p), "q": q_p,
                    "phi_viscous": f(visc), "phi_inertial": f(inert)}

    p = dict(SET_A, Q=0.01)
    res = set_a_resistances(p)
    q_rate = p["Q"]
    powers = {z: rho * G * q_rate**2 * res[z] for z in ["pack", "cake", "invaded", "formation"]}
    zones = {"pack": (p["rw"], p["rb"], p["K_pack"]),
             "invaded": (p["rb"], p["rd"], p["K_invaded"]),
             "formation": (p["rd"], p["R"], p["K_formation"])}
    for z, (r1, r2, k) in zones.items():
        def phi_ring(r, k=k):
            qr = q_rate / (2.0 * math.pi * r * p["b"])
            return rho * G * qr * qr / k * 2.0 * math.pi * r * p["b"]
        val, _ = scipy.integrate.quad(phi_ring, r1, r2, epsabs=0.0, epsrel=1e-13, limit=200)
        diffs.append(rel_diff(powers[z], val))
    # Cake: rho g Q dh_cake with the jump from the flux form q_b delta_c/K_c.
    q_b = q_rate / (2.0 * math.pi * p["rb"] * p["b"])
    diffs.append(rel_diff(powers["cake"],
                          rho * G * q_rate * q_b * p["cake_thickness"] / p["K_cake"]))
    # an earlier printing of the physics reference had 1.557978e+02 W for the cake; rho g Q^2 R_c = 155.797858... W,
    # which rounds to 1.557979e+02 (the printed value is truncated).
    cake_erratum = "last digit truncated, rho g Q^2 R_c = 155.797858 W"
    for z, txt in [("pack", "2.159817"), ("cake", "1.557978e+02"), ("invaded", "2.855123e+02"),
                   ("formation", "9.334573e+02")]:
        check_printed(f"7.2 P {z}", powers[z], txt,
                      erratum=cake_erratum if z == "cake" else None)

    mean_abs_sin3, _ = scipy.integrate.quad(lambda x: abs(math.sin(x)) ** 3, 0.0, 2.0 * math.pi,
                                            points=[math.pi], epsabs=0.0, epsrel=1e-13)
    mean_abs_sin3 /= 2.0 * math.pi
    closed = 4.0 / (3.0 * math.pi)
    diffs.append(rel_diff(mean_abs_sin3, closed))
    check_printed("7.4 mean |sin|^3", mean_abs_sin3, "0.424413")

    # 7.4 kinetic-energy example.
    ke = 0.5 * rho * (1e-3 / 0.35) ** 2
    check_printed("7.4 kinetic energy density", ke, "4.07e-3")
    check_printed("7.4 dissipation", rho * G * 1e-6 / 1e-4, "97.9")

    return {
        "source": (
            "Dissipation density phi = rho g q . (-grad h) with Darcy's law and the "
            "Forchheimer law (Forchheimer, P., 1901, Z. Ver. Dtsch. Ing. 45; from memory - "
            "verify); zone powers of the steady composite Thiem solution (Thiem 1906); "
            "derived in docs/physics.md section 7.1, 7.2, 7.4. Ergun 1952 coefficients for the pack."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "water at 20 C: iapws.IAPWS95(T=293.15, P=0.101325).rho and .mu",
                "phi = rho g (q^2/K + beta |q|^3); zone P = rho g Q^2 ln(r2/r1)/(2 pi K b), "
                "cake P = rho g Q^2 delta_c/(2 pi r_b b K_c)",
                "cross-check: scipy.integrate.quad(phi(r) 2 pi r b, r1, r2, epsabs=0, "
                "epsrel=1e-13); cake via flux form",
                "scipy.integrate.quad(lambda x: abs(sin(x))**3, 0, 2 pi, points=[pi]) / "
                "(2 pi) against 4/(3 pi)",
            ],
        },
        "conventions": "SI units; phi in W/m^3, zone powers in W; rate magnitude Q",
        "params": {"rho": f(rho), "mu": f(mu), "g": G, "set_a": {k: f(v) for k, v in p.items()}},
        "darcy_examples": examples,
        "ergun_pack_example": pack_example,
        "zone_power_w": {z: f(powers[z]) for z in ["pack", "cake", "invaded", "formation"]},
        "mean_abs_sin_cubed": f(mean_abs_sin3),
        "mean_abs_sin_cubed_closed_form": f(closed),
        "cross_check": "closed forms vs scipy.integrate.quad",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 12. step-drawdown
# ---------------------------------------------------------------------------------------


def step_drawdown():
    """Synthetic step-drawdown fit s_w = B Q + C Q^2, Jacob (1947), docs/physics.md section 9d.

    Jacob, C.E., 1947, "Drawdown test to determine effective radius of artesian well",
    Trans. ASCE 112, 1047-1070 (pages from memory - verify).
    """
    b_true, c_true = 100.0, 2000.0
    qs = np.array([0.005, 0.010, 0.015, 0.020])
    s_w = b_true * qs + c_true * qs**2
    spec = s_w / qs
    design = np.column_stack([np.ones_like(qs), qs])
    (b_fit, c_fit), *_ = np.linalg.lstsq(design, spec, rcond=None)
    c_pf, b_pf = np.polyfit(qs, spec, 1)
    diffs = [rel_diff(b_fit, b_pf), rel_diff(c_fit, c_pf),
             rel_diff(b_fit, b_true), rel_diff(c_fit, c_true)]
    eff = b_true * qs / s_w
    printed = [("0.55", "110", "0.909091"), ("1.20", "120", "0.833333"),
               ("1.95", "130", "0.769231"), ("2.80", "140", "0.714286")]
    for q, s, sq, e, (s_t, sq_t, e_t) in zip(qs, s_w, spec, eff, printed):
        check_printed(f"9d s_w Q={q}", s, s_t)
        check_printed(f"9d s/Q Q={q}", sq, sq_t)
        check_printed(f"9d E Q={q}", e, e_t)
    check_printed("9d fitted B", b_fit, "100")
    check_printed("9d fitted C", c_fit, "2000")

    return {
        "source": (
            "Step-drawdown relation s_w = B Q + C Q^2 (Jacob, C.E., 1947, 'Drawdown test to "
            "determine effective radius of artesian well', Trans. ASCE 112, 1047-1070; "
            "pages from memory - verify). Synthetic data, docs/physics.md section 9d."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "s_w = B Q + C Q^2 with B = 100 s/m^2, C = 2000 s^2/m^5 (synthetic)",
                "numpy.linalg.lstsq(column_stack([1, Q]), s_w/Q, rcond=None)",
                "cross-check: numpy.polyfit(Q, s_w/Q, 1)",
            ],
        },
        "conventions": "Q is the pumping rate magnitude (m^3/s); s_w drawdown (m); E = B Q/s_w",
        "params": {"B": b_true, "C": c_true, "Q": [f(q) for q in qs]},
        "steps": [{"Q": f(q), "s_w": f(s), "s_w_over_Q": f(sq), "efficiency": f(e)}
                  for q, s, sq, e in zip(qs, s_w, spec, eff)],
        "fit": {"B": f(b_fit), "C": f(c_fit)},
        "cross_check": "lstsq vs polyfit, and fit vs the generating B, C",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 14. development devices: collapse limits, vapour bound
# ---------------------------------------------------------------------------------------

MATERIALS = {
    # E (Pa), nu, yield (Pa): handbook values the solver uses as defaults (from memory,
    # verify); see docs/devices.md.
    "pvc": (2.758e9, 0.38, 48.26e6),
    "steel": (207e9, 0.30, 241.3e6),
    "stainless": (193e9, 0.29, 206.8e6),
}


def lame_first_yield(sigma_y, dr):
    """External pressure at which the Lame hoop stress at the bore reaches sigma_y.

    Solved numerically with scipy.optimize.brentq on the stress itself (independent of the
    closed form 2 sigma_y (DR - 1)/DR^2).
    """
    b = 0.5  # outer radius, any unit: only DR matters
    a = b - 2.0 * b / dr

    def hoop_at_bore(p):
        # Lame: sigma_theta(r) = -p b^2/(b^2 - a^2) (1 + a^2/r^2), at r = a
        return p * b * b / (b * b - a * a) * 2.0 - sigma_y

    return scipy.optimize.brentq(hoop_at_bore, 0.0, sigma_y, xtol=1e-6, rtol=1e-15)


def devices():
    """Collapse limits of pipe (elastic ring buckling and first yield) and the vapour bound.

    Elastic: Timoshenko & Gere 1961, Pc = 2 E/(1 - nu^2) / (DR - 1)^3. Yield: Lame thick
    ring, first yield at the bore, P_y = 2 sigma_y (DR - 1)/DR^2 (the yield-strength collapse
    pressure of API Bulletin 5C3 / ISO/TR 10400, from memory). Vapour pressure: IAPWS-IF97
    saturation line (iapws.iapws97._PSat_T), cross-checked against the IAPWS-95 saturated
    liquid (iapws.IAPWS95(T, x=0).P).
    """
    diffs = []
    rows = []
    for material, dr in [("pvc", 17.0), ("pvc", 21.0), ("pvc", 26.0),
                         ("steel", 20.0), ("steel", 28.0), ("stainless", 20.0)]:
        e_mod, nu, sy = MATERIALS[material]
        elastic = 2.0 * e_mod / (1.0 - nu**2) / (dr - 1.0) ** 3
        y_closed = 2.0 * sy * (dr - 1.0) / dr**2
        y_lame = lame_first_yield(sy, dr)
        diffs.append(rel_diff(y_closed, y_lame))
        rows.append({"material": material, "DR": dr, "E": e_mod, "nu": nu, "yield": sy,
                     "elastic_pa": f(elastic), "yield_pa": f(y_lame),
                     "governing_pa": f(min(elastic, y_lame))})

    vapour = []
    for t_c in [4.0, 10.0, 15.0, 20.0, 25.0, 35.0]:
        t_k = t_c + 273.15
        p97 = iapws.iapws97._PSat_T(t_k) * 1e6
        p95 = iapws.IAPWS95(T=t_k, x=0).P * 1e6
        # IF97 and IAPWS-95 differ by about 1e-4 at these temperatures (IF97's stated
        # consistency); that is the cross-check here, not a round-off comparison.
        vapour.append({"T_C": t_c, "p_sat_pa": f(p97), "p_sat_iapws95_pa": f(p95)})

    # Vapour bound of the head under a sealed tool at depth d below the static level:
    # p_atm + rho g (d + H) = p_v  ->  H_min = -(p_atm - p_v)/(rho g) - d.
    t_c, depth, p_atm = 14.0, 3.0, 101325.0
    rho = iapws.IAPWS95(T=t_c + 273.15, P=0.101325).rho
    p_v = iapws.iapws97._PSat_T(t_c + 273.15) * 1e6
    h_min = -(p_atm - p_v) / (rho * G) - depth

    # Parted time under a sealed surge block over an impermeable formation (hand
    # calculation, docs/devices.md): block radius rb in casing rc, sinusoidal stroke s at f,
    # v = pi f s sin(w t). While sealed, the displacement A v leaks in past the block; the
    # column parts at t1 where A v reaches the leak at the bound, Q_L = Cd A_gap sqrt(2 g
    # |H_min|), and the gap V(t) = A (s/2)(cos w t1 - cos w t) - Q_L (t - t1) closes at t2.
    rc, rb, cd, stroke, freq = 0.1, 0.099, 0.6, 0.8, 0.5
    a_block = math.pi * rb * rb
    a_gap = math.pi * (rc * rc - rb * rb)
    w = 2.0 * math.pi * freq
    q_l = cd * a_gap * math.sqrt(2.0 * G * abs(h_min))
    t1 = math.asin(q_l / (a_block * math.pi * freq * stroke)) / w

    def gap(t):
        return a_block * 0.5 * stroke * (math.cos(w * t1) - math.cos(w * t)) - q_l * (t - t1)

    t2 = scipy.optimize.brentq(gap, 0.5 / freq, 1.0 / freq, xtol=1e-14, rtol=1e-15)
    # Cross-check: the gap at t2 by quadrature of dV/dt = A v - Q_L.
    v_quad = scipy.integrate.quad(
        lambda t: a_block * math.pi * freq * stroke * math.sin(w * t) - q_l, t1, t2,
        epsabs=1e-14, epsrel=1e-12)[0]
    diffs.append(abs(v_quad) / (a_block * stroke))

    # Steady pumping with a pump curve H_p = H0 - a Q^2 lifting from the well level to a
    # discharge z_d above static, from a confined aquifer with a skin (Thiem with Hawkins
    # skin): the well head is H = -Q (ln(R/rw) + S)/(2 pi T) and the pump runs where
    # H0 - a Q^2 = z_d - H.
    pk = {"K": 2e-4, "b": 6.0, "rw": 0.1, "R": 100.0, "K_skin": 4e-5, "r_skin": 0.2,
          "H0": 40.0, "a": 1e5, "z_d": 10.0}
    skin = (pk["K"] / pk["K_skin"] - 1.0) * math.log(pk["r_skin"] / pk["rw"])
    t_aq = pk["K"] * pk["b"]
    per_q = (math.log(pk["R"] / pk["rw"]) + skin) / (2.0 * math.pi * t_aq)

    def mismatch(q):
        return pk["H0"] - pk["a"] * q * q - pk["z_d"] - per_q * q

    q_star = scipy.optimize.brentq(mismatch, 0.0, math.sqrt(pk["H0"] / pk["a"]),
                                   xtol=1e-16, rtol=1e-15)
    # Cross-check: the positive root of the quadratic a Q^2 + c Q - (H0 - z_d) = 0.
    c = per_q
    q_quad = (-c + math.sqrt(c * c + 4.0 * pk["a"] * (pk["H0"] - pk["z_d"]))) / (2.0 * pk["a"])
    diffs.append(rel_diff(q_star, q_quad))
    pump_curve = dict(pk, skin=f(skin), Q_m3_s=f(q_star), H_well_m=f(-per_q * q_star))

    # The same aquifer and discharge with a pump curve given by points (an invented curve,
    # test input only), read as the rate for a lift by monotone cubic Hermite interpolation
    # (scipy.interpolate.PchipInterpolator on lift -> rate); the pump runs where
    # Q = Q_pchip(z_d + per_q Q).
    pts = [[0.0, 40.0], [0.004, 39.0], [0.008, 36.5], [0.012, 32.0], [0.016, 25.5],
           [0.020, 17.0]]
    lifts = [p[1] for p in reversed(pts)]
    rates = [p[0] for p in reversed(pts)]
    pchip = scipy.interpolate.PchipInterpolator(lifts, rates)

    def table_mismatch(q):
        return float(pchip(pk["z_d"] + per_q * q)) - q

    q_tab = scipy.optimize.brentq(table_mismatch, 0.0, pts[-1][0], xtol=1e-16, rtol=1e-15)
    q_tab_bisect = scipy.optimize.bisect(table_mismatch, 0.0, pts[-1][0], xtol=1e-16,
                                         rtol=1e-15)
    diffs.append(rel_diff(q_tab, q_tab_bisect))
    sample_lifts = [17.0, 18.3, 21.0, 25.5, 28.7, 33.3, 37.9, 39.5, 39.99]
    pump_table = {
        "points": pts,
        "Q_m3_s": f(q_tab),
        "H_well_m": f(-per_q * q_tab),
        "sample_lifts": sample_lifts,
        "sample_rates": [f(float(pchip(x))) for x in sample_lifts],
        "sample_slopes": [f(float(pchip.derivative()(x))) for x in sample_lifts],
    }

    # Jet: flow through n nozzles of diameter d at exit velocity v, and the stagnation
    # pressure of the share eta of the velocity head (Bernoulli, p = eta rho v^2/2).
    jet = {"n": 2, "d": 0.008, "v": 45.0, "eta": 0.5, "T_C": 16.0}
    rho_j = iapws.IAPWS95(T=jet["T_C"] + 273.15, P=0.101325).rho
    jet["Q_m3_s"] = f(jet["n"] * math.pi * jet["d"] ** 2 / 4.0 * jet["v"])
    jet["rho"] = f(rho_j)
    jet["p_stag_pa"] = f(jet["eta"] * rho_j * jet["v"] ** 2 / 2.0)

    return {
        "source": (
            "Collapse: elastic buckling of a long thin ring, Pc = 2E/(1 - nu^2)/(DR - 1)^3 "
            "(Timoshenko, S.P., Gere, J.M., 1961, 'Theory of Elastic Stability'); first yield "
            "of a thick ring (Lame), P_y = 2 sigma_y (DR - 1)/DR^2, the yield-strength "
            "collapse pressure of API Bulletin 5C3 (1994) / ISO/TR 10400 (from memory, "
            "verify). Material constants are handbook values from memory (verify). Vapour "
            "pressure: IAPWS-IF97 saturation equation (IAPWS 2007) as computed by the iapws "
            "package. No safety factor is included; manufacturer ratings and local well codes "
            "govern."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "elastic: 2 E/(1 - nu^2)/(DR - 1)^3 (plain float arithmetic)",
                "yield: scipy.optimize.brentq on the Lame hoop stress at the bore, "
                "cross-checked against 2 sigma_y (DR - 1)/DR^2",
                "p_sat: iapws.iapws97._PSat_T(T); also iapws.IAPWS95(T, x=0).P",
                "rho: iapws.IAPWS95(T, P=0.101325).rho",
                "parted time: math.asin for the parting, scipy.optimize.brentq on the gap "
                "volume for the closing, scipy.integrate.quad as cross-check",
                "pump curve by points: scipy.interpolate.PchipInterpolator(lift, rate) and "
                "its derivative(); operating point by scipy.optimize.brentq, cross-checked "
                "by scipy.optimize.bisect",
            ],
        },
        "conventions": "SI units; pressures in Pa; heads in m relative to the static level",
        "collapse": rows,
        "vapour_pressure": vapour,
        "vapour_bound": {"T_C": t_c, "depth_m": depth, "p_atm_pa": p_atm, "rho": f(rho),
                         "p_v_pa": f(p_v), "h_min_m": f(h_min)},
        "parted_time": {"casing_radius": rc, "block_radius": rb, "cd": cd, "stroke": stroke,
                        "frequency": freq, "h_min_m": f(h_min), "leak_m3_s": f(q_l),
                        "t_part_s": f(t1), "t_close_s": f(t2),
                        "parted_per_cycle_s": f(t2 - t1)},
        "pump_curve": pump_curve,
        "pump_table": pump_table,
        "jet": jet,
        "cross_check": ("closed-form first-yield pressure vs brentq on the Lame stress; gap "
                        "volume at closure by quadrature (relative to the stroke volume); pump "
                        "operating point by brentq vs the quadratic formula; tabulated pump "
                        "curve's operating point by brentq vs bisect"),
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# main
# ---------------------------------------------------------------------------------------

# ---------------------------------------------------------------------------------------
# 13. sudden change of an interface conductance under a constant well head
# ---------------------------------------------------------------------------------------

CJ = {"rs": 0.1, "rb": 0.15, "R": 10.0, "K": 1e-4, "Ss": 1e-4, "b": 10.0,
      "cake_thickness": 5e-3, "cake_K": 1e-7, "H0": 1.0}


def conductance_jump_fbar(p):
    """Laplace transform of the outward well flow Q(t) after the cake is removed at t = 0.

    Homogeneous annulus rs <= r <= R (K, Ss, thickness b), head H0 held at rs, 0 at R, a
    cake of resistance R1 = delta/(2 pi rb b Kc) at rb in steady state before t = 0 (the
    piecewise-logarithmic Thiem profile h0, with the same slope a on both sides and a drop
    Q0 R1 across the cake), removed at t = 0. h0 is harmonic in each region, so
    u = h0/s + A I0(q r) + B K0(q r) per region, q = sqrt(s Ss/K); the four constants make
    u vanish-corrected at rs and R, continuous in value and flux at rb (derived here).
    """
    c = {k: mp.mpf(v) for k, v in CJ.items()}
    r1 = c["cake_thickness"] / (2 * mp.pi * c["rb"] * c["b"] * c["cake_K"])
    a = c["H0"] / (mp.log(c["R"] / c["rs"]) + 2 * mp.pi * c["K"] * c["b"] * r1)
    q0 = 2 * mp.pi * c["K"] * c["b"] * a
    jump = q0 * r1
    q = mp.sqrt(p * c["Ss"] / c["K"])
    rs, rb, big_r = c["rs"], c["rb"], c["R"]
    memo = {}

    def bessel(kind, order, r):
        key = (kind, order, r)
        if key not in memo:
            fn = mp.besseli if kind == "i" else mp.besselk
            memo[key] = fn(order, q * r)
        return memo[key]

    i0, k0 = (lambda r: bessel("i", 0, r)), (lambda r: bessel("k", 0, r))
    i1, k1 = (lambda r: bessel("i", 1, r)), (lambda r: bessel("k", 1, r))
    m = mp.matrix([
        [i0(rs), k0(rs), 0, 0],
        [0, 0, i0(big_r), k0(big_r)],
        [i0(rb), k0(rb), -i0(rb), -k0(rb)],
        [i1(rb), -k1(rb), -i1(rb), k1(rb)],
    ])
    rhs = mp.matrix([0, 0, -jump / p, 0])
    # Equilibrate (I0 and K0 differ by hundreds of orders of magnitude at large q r).
    col = [max(abs(m[i, j]) for i in range(4)) for j in range(4)]
    for i in range(4):
        for j in range(4):
            m[i, j] /= col[j]
    for i in range(4):
        row = max(abs(m[i, j]) for j in range(4))
        for j in range(4):
            m[i, j] /= row
        rhs[i] /= row
    x = mp.lu_solve(m, rhs)
    a1, b1 = x[0] / col[0], x[1] / col[1]
    # Q = -2 pi r b K dh/dr at rs, with h0'(rs) = -a/rs.
    return 2 * mp.pi * c["b"] * c["K"] * (a / p - rs * q * (a1 * i1(rs) - b1 * k1(rs)))


def conductance_jump():
    """Well flow after a sudden removal of a cake under a constant well head."""
    times = [1e-3, 1e-2, 0.1, 1.0, 3.0, 10.0, 30.0, 100.0]
    points, diffs = [], []
    with mp.workdps(MP_DPS):
        c = {k: mp.mpf(v) for k, v in CJ.items()}
        r1 = c["cake_thickness"] / (2 * mp.pi * c["rb"] * c["b"] * c["cake_K"])
        q_before = 2 * mp.pi * c["K"] * c["b"] * c["H0"] / (
            mp.log(c["R"] / c["rs"]) + 2 * mp.pi * c["K"] * c["b"] * r1)
        q_after = 2 * mp.pi * c["K"] * c["b"] * c["H0"] / mp.log(c["R"] / c["rs"])
    for t in times:
        val, d = inverted_pair(conductance_jump_fbar, t)
        diffs.append(d)
        points.append({"t": t, "Q": val})
    # Limits: Q(0+) is the flow before the change (the change is away from the well),
    # Q(inf) the Thiem flow without the cake.
    late = invert(conductance_jump_fbar, 1e4, "talbot")
    diffs.append(rel_diff(late, q_after))
    return {
        "source": (
            "Radial flow in a finite annulus with a constant head at the well and a fixed "
            "head at R, after an interface resistance at rb drops to zero: Laplace-domain "
            "solution with I0/K0 (Carslaw, H.S., Jaeger, J.C., 1959, Conduction of Heat in "
            "Solids, 2nd ed., Oxford, ch. 13, composite-region method; from memory - "
            "verify), derived here for this geometry; docs/time-stepping.md."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                f"mpmath.invertlaplace(F, t, method='talbot') with mp.mp.dps = {MP_DPS}; "
                "F from mpmath.besseli/besselk and mpmath.lu_solve of the 4x4 interface "
                "system (conductance_jump_fbar)",
                "cross-check: same F with method='stehfest'; Q(1e4 s) against the Thiem "
                "flow without the cake",
            ],
        },
        "conventions": "Q positive outward (into the formation), m3/s; t after the change, s",
        "params": {**CJ, "Q_before": f(q_before), "Q_after": f(q_after)},
        "points": points,
        "cross_check": "Talbot vs Stehfest; late time vs Thiem",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# slug test with an inertial water column
# ---------------------------------------------------------------------------------------

INERTIA_CASES = [
    # Underdamped: a long column over a highly transmissive screened layer (invented
    # numbers chosen to ring, not a field case).
    {"name": "underdamped", "rw": 0.1, "rc": 0.1, "b": 10.0, "k": 1e-2, "ss": 1e-5,
     "le": 30.0, "w0": 1.0,
     "times": [0.5, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 8.0, 10.0, 12.0, 15.0, 20.0]},
    # Overdamped: a short column over a moderately transmissive layer (invented numbers).
    {"name": "overdamped", "rw": 0.1, "rc": 0.1, "b": 5.0, "k": 2e-4, "ss": 1e-5,
     "le": 10.0, "w0": 1.0,
     "times": [0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0, 200.0]},
]


def inertia_fbar(c, le=None):
    """Laplace transform of w(t)/w0 for a slug test with an inertial water column.

    Written here from the equations of docs/physics.md section 24 (the form of Kipp 1985,
    Water Resour. Res. 21(9), 1397-1408, and of Butler & Zhan 2004, Water Resour. Res. 40,
    W12402; cited from memory - verify), with w the free-surface displacement, Q the column
    flow into the formation, H_s the head in the screen, A_c = pi rc^2, M = L_e/(g A_c):

        mass:      A_c w' = -Q
        momentum:  M Q'   = w - H_s
        formation: Qbar = Phi(p) Hbar_s,
                   Phi = 2 pi T rw q K1(q rw)/K0(q rw),  q = sqrt(p S/T)   (infinite layer)

    With w(0) = w0, Q(0) = 0: wbar/w0 = 1/(p + 1/(A_c (M p + 1/Phi))).
    """
    le = c["le"] if le is None else le
    t_ = c["k"] * c["b"]
    s_ = c["ss"] * c["b"]
    a_c = mp.pi * c["rc"] ** 2
    mass = le / (G * a_c)

    def fbar(p):
        q = mp.sqrt(p * s_ / t_)
        x = q * c["rw"]
        phi = 2 * mp.pi * t_ * x * mp.besselk(1, x) / mp.besselk(0, x)
        return 1 / (p + 1 / (a_c * (mass * p + 1 / phi)))

    return fbar


def inertia():
    """Slug test with an inertial water column (Kipp 1985; Butler & Zhan 2004)."""
    cases, diffs = [], []
    for c in INERTIA_CASES:
        vals = []
        for t in c["times"]:
            talbot = invert(inertia_fbar(c), t, "talbot")
            dehoog = invert(inertia_fbar(c), t, "dehoog")
            # The response crosses zero: the disagreement is measured against w0 (= 1).
            diffs.append(abs(f(talbot) - f(dehoog)))
            vals.append(f(talbot))
        # L_e = 0 must give the Cooper-Bredehoeft-Papadopulos response (slug_fbar).
        alpha = c["rw"] ** 2 * c["ss"] * c["b"] / c["rc"] ** 2
        for t in c["times"][:4]:
            beta = c["k"] * c["b"] * t / c["rc"] ** 2
            diffs.append(abs(f(invert(inertia_fbar(c, le=0.0), t, "talbot"))
                             - f(invert(slug_fbar(alpha), beta, "talbot"))))
        cases.append({**{k: v for k, v in c.items() if k != "times"},
                      "t": c["times"], "w_over_w0": vals})
    return {
        "source": (
            "Slug test with an inertial water column: Kipp, K.L., 1985, 'Type curve "
            "analysis of inertial effects in the response of a well to a slug test', Water "
            "Resour. Res. 21(9), 1397-1408; Butler, J.J., Jr., Zhan, X., 2004, 'Hydraulic "
            "tests in highly permeable aquifers', Water Resour. Res. 40, W12402 (both cited "
            "from memory - verify). Laplace-domain solution written from the equations "
            "(docs/physics.md section 24), infinite homogeneous layer, no skin."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                f"mpmath.invertlaplace(F, t, method='talbot') with mp.mp.dps = {MP_DPS}, "
                "F(p) = 1/(p + 1/(A_c (M p + 1/Phi))), Phi = 2 pi T x K1(x)/K0(x), "
                "x = rw sqrt(p S/T), mpmath.besselk",
                "cross-check: method='dehoog'; L_e = 0 against the Cooper-Bredehoeft-"
                "Papadopulos transform of slug_cbp.json",
            ],
        },
        "conventions": (
            "w is the free-surface displacement (head at the top of the column), w0 its "
            "initial value, Q(0) = 0; rw screen radius, rc casing radius, b screen length, "
            "k conductivity, ss specific storage, le effective column length L_e, m; "
            f"g = {G} m/s^2"
        ),
        "cases": cases,
        "cross_check": "Talbot vs de Hoog (absolute, in units of w0); L_e = 0 vs CBP",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 16. virtual pumping tests on a model (docs/physics.md section 25)
# ---------------------------------------------------------------------------------------


def virtual_tests():
    """Reference drawdowns and well-loss coefficients for the virtual tests of
    docs/physics.md section 25 (the `virtual_tests` verification group).

    Theis (1935) with skin (van Everdingen & Hurst 1949 with an infinitesimal skin,
    Agarwal et al. 1970), Cooper & Jacob (1946) where u is small, Papadopulos & Cooper
    (1967) with well-bore storage, and the steady nonlinear loss of a Forchheimer pack
    (docs/physics.md section 4.3) plus the screen orifice loss (section 3) for C of Jacob's
    (1947) s = B Q + C Q^2. Model parameters are invented for the check.
    """
    k, ss, b, rs, rb = 1e-4, 1e-5, 10.0, 0.1, 0.2
    t_f, s_f = k * b, ss * b
    q = 0.01
    diffs = []

    # (a) Theis with skin: an invaded ring r_b..r_d of K_i, no well-bore storage.
    r_d, k_i = 0.5, 2e-5
    skin = (k / k_i - 1.0) * math.log(r_d / rb)  # Hawkins 1956, docs/physics.md section 2.4
    times_a = [600.0, 3600.0, 86400.0]
    theis_skin, cj = [], []
    for t in times_a:
        td = t_f * t / (s_f * rs * rs)
        val, d = inverted_pair(storage_skin_fbar(0.0, skin), td)
        diffs.append(d)
        theis_skin.append(f(q / (2.0 * math.pi * t_f) * val))
        u = rs * rs * s_f / (4.0 * t_f * t)
        cj.append(f(q / (4.0 * math.pi * t_f) * (math.log(2.25 * t_f * t / (rs * rs * s_f))
                                                 + 2.0 * skin)))
        # cross-check the inversion against scipy's exponential integral plus skin
        # (Theis W(u) = E1(u); the infinitesimal skin adds Q Sk / (2 pi T) at late time)
        w = scipy.special.exp1(u)
        diffs.append(rel_diff(val, 0.5 * w + skin) if u < 1e-8 else 0.0)

    # (b) Papadopulos-Cooper: homogeneous, casing radius r_c = r_s, no skin.
    rc = 0.1
    c_d = rc * rc / (2.0 * s_f * rs * rs)
    times_b = [100.0, 1000.0, 10000.0, 86400.0]
    pc = []
    for t in times_b:
        td = t_f * t / (s_f * rs * rs)
        val, d = inverted_pair(storage_skin_fbar(c_d, 0.0), td)
        diffs.append(d)
        pc.append(f(q / (2.0 * math.pi * t_f) * val))

    # (c) nonlinear loss of a Forchheimer pack and a screen orifice: C in s = B Q + C Q^2.
    fc = {"K_pack": 1e-3, "beta_pack": 1e6, "K": 5e-4, "Ss": 1e-5, "b": 5.0, "rs": 0.1,
          "rb": 0.2, "open_area": 0.05, "Cd": 0.6, "Q_design": 0.004,
          "fractions": [0.5, 0.75, 1.0, 1.25], "step_s": 3600.0}
    pack_c = fc["beta_pack"] * (1.0 / fc["rs"] - 1.0 / fc["rb"]) / (2.0 * math.pi * fc["b"]) ** 2
    pack_c_q, _ = scipy.integrate.quad(
        lambda r: fc["beta_pack"] / (2.0 * math.pi * r * fc["b"]) ** 2, fc["rs"], fc["rb"],
        epsabs=0.0, epsrel=1e-13)
    diffs.append(rel_diff(pack_c, pack_c_q))
    area = 2.0 * math.pi * fc["rs"] * fc["b"] * fc["open_area"] * fc["Cd"]
    orifice_c = 1.0 / (2.0 * G * area * area)
    c_total = pack_c + orifice_c

    return {
        "source": (
            "Theis, C.V., 1935, Trans. AGU 16, 519-524, with an infinitesimal skin (van "
            "Everdingen, A.F., Hurst, W., 1949, Trans. AIME 186, 305-324; Agarwal, R.G., "
            "Al-Hussainy, R., Ramey, H.J., 1970, SPE J. 10(3), 279-290); Cooper, H.H., "
            "Jacob, C.E., 1946, Trans. AGU 27(4), 526-534; Papadopulos, I.S., Cooper, H.H., "
            "1967, Water Resour. Res. 3(1), 241-244; Hawkins, M.F., 1956, Trans. AIME 207, "
            "356-357 (skin of a ring); Jacob, C.E., 1947, Trans. ASCE 112, 1047-1070 "
            "(s = B Q + C Q^2); Forchheimer loss closed form docs/physics.md section 4.3; "
            "orifice loss section 3 (citations from memory - verify). Model parameters "
            "invented for the check."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                f"mpmath.invertlaplace(F, tD, method='talbot') with mp.mp.dps = {MP_DPS}, "
                "F(p) = [K0(x) + Sk x K1(x)] / (p {x K1(x) + C_D p [K0(x) + Sk x K1(x)]}), "
                "x = sqrt(p), mpmath.besselk",
                "cross-check: method='stehfest'; at u < 1e-8 Theis with skin 0.5 E1(u) + Sk "
                "with scipy.special.exp1",
                "C_pack = beta (1/rs - 1/rb)/(2 pi b)^2, cross-check scipy.integrate.quad of "
                "beta/(2 pi r b)^2 over [rs, rb]; C_screen = 1/(2 g (2 pi rs b A_o C_d)^2)",
            ],
        },
        "conventions": (
            "drawdown s = -h (m), positive for pumping at rate Q (m^3/s, withdrawal); "
            "T = K b, S = Ss b, tD = T t/(S rs^2), C_D = rc^2/(2 S rs^2)"
        ),
        "params": {"K": k, "Ss": ss, "b": b, "rs": rs, "rb": rb, "Q": q},
        "theis_skin": {"r_d": r_d, "K_invaded": k_i, "skin": f(skin), "t": times_a,
                       "drawdown": theis_skin, "cooper_jacob": cj},
        "storage": {"rc": rc, "C_D": f(c_d), "t": times_b, "drawdown": pc},
        "forchheimer": {**fc, "C_pack": f(pack_c), "C_screen": f(orifice_c),
                        "C": f(c_total)},
        "cross_check": "Talbot vs Stehfest; late-time E1 + skin; closed form vs quad",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# 17. damage removal: cake lift-off distribution, fines rate law at constant velocity
# ---------------------------------------------------------------------------------------


def damage():
    """Cake lift-off coverage and the fines rate law, docs/physics.md sections 13a and 13b.

    Lift-off: coverage c = c0 (1 - F(P)) with F the log-normal distribution function of the
    patch strengths (median P_m, spread s = standard deviation of ln P):
    scipy.stats.lognorm.cdf(P, s, scale=P_m); cross-check mpmath 0.5 erfc(-ln(P/P_m)/(s sqrt 2)).

    Fines: with no deposition (alpha_d = 0) and a constant flow Q the deposited fines of a
    ring obey d sigma/dt = -alpha_e (v - v_c)+ sigma, so sigma(t) = sigma0 exp(-alpha_e (v -
    v_c)+ t), v the ring's interstitial speed (mean of |Q|/(2 pi r b n) at its two faces).
    Cross-check: scipy.integrate.solve_ivp of the same rate law (Radau, rtol 1e-12).
    """
    import scipy.stats

    c0, median, spread = 0.85, 8000.0, 0.7
    pressures = [300.0, 2000.0, 5000.0, 8000.0, 12000.0, 30000.0, 1.0e5]
    coverage, diffs = [], []
    for p_ in pressures:
        cdf = scipy.stats.lognorm.cdf(p_, spread, scale=median)
        with mp.workdps(MP_DPS):
            cdf_mp = 0.5 * mp.erfc(-mp.log(mp.mpf(p_) / median) / (spread * mp.sqrt(2)))
        diffs.append(rel_diff(cdf, cdf_mp))
        coverage.append(c0 * (1.0 - cdf))

    q, b, n = -0.02, 4.0, 0.3
    sigma0, alpha_e, v_c, t_end = 0.02, 40.0, 2e-3, 3.0
    faces = [0.15 * 1.04**i for i in range(13)]
    sigma = []
    for r1, r2 in zip(faces[:-1], faces[1:]):
        v = abs(q) / (2 * math.pi * b * n) * 0.5 * (1 / r1 + 1 / r2)
        k = alpha_e * max(v - v_c, 0.0)
        exact = sigma0 * math.exp(-k * t_end)
        sol = scipy.integrate.solve_ivp(lambda t, y: -k * y, (0.0, t_end), [sigma0],
                                        method="Radau", rtol=1e-12, atol=1e-20)
        diffs.append(rel_diff(exact, sol.y[0, -1]))
        sigma.append(exact)

    return {
        "source": (
            "Lift-off: log-normal distribution function of patch strengths "
            "(scipy.stats.lognorm.cdf). Fines: first-order entrainment above a critical "
            "velocity, the rate law of Gruesbeck, C. & Collins, R.E., 1982, 'Entrainment and "
            "deposition of fine particles in porous media', SPE Journal 22(6), 847-856 (from "
            "memory - verify), integrated in closed form at constant velocity."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "scipy.stats.lognorm.cdf(P, spread, scale=median)",
                "cross-check: mpmath 0.5*erfc(-ln(P/median)/(spread*sqrt(2)))",
                "sigma0*exp(-alpha_e*max(v - v_c, 0)*t)",
                "cross-check: scipy.integrate.solve_ivp(Radau, rtol=1e-12)",
            ],
        },
        "lift_off": {"coverage0": c0, "median": median, "spread": spread,
                     "pressure": [f(x) for x in pressures],
                     "coverage": [f(x) for x in coverage]},
        "fines": {"flow": q, "length": b, "porosity": n, "deposit": sigma0,
                  "entrainment": alpha_e, "critical_velocity": v_c, "time": t_end,
                  "faces": [f(x) for x in faces], "sigma": [f(x) for x in sigma]},
        "cross_check": "scipy against mpmath (CDF); closed form against solve_ivp (fines)",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


PCG_MULT = 0x2360ED051FC65DA44385DF649FCCF645
"""The 128-bit LCG multiplier of PCG-XSL-RR 128/64 (O'Neill 2014, the PCG reference code)."""


def pcg_xsl_rr(state):
    """The 64-bit output of PCG-XSL-RR for a 128-bit state (O'Neill 2014, section 6.3.3)."""
    rot = state >> 122
    x = ((state >> 64) ^ state) & (2**64 - 1)
    return ((x >> rot) | (x << ((64 - rot) % 64))) & (2**64 - 1)


def pcg_sweep_draws(seed, stream, n):
    """The first n outputs of a generator constructed as the sweep constructs it.

    Construction (rand_pcg 0.9 Lcg128Xsl64::new): inc = 2*stream + 1, state = seed + inc,
    one LCG step; then each output is one LCG step followed by the XSL-RR output of the new
    state. Cross-checked with numpy.random.PCG64 set to the state after construction
    (numpy's PCG64 also steps, then outputs).
    """
    m = 2**128
    inc = (2 * stream + 1) % m
    state = ((seed + inc) * PCG_MULT + inc) % m
    prev = state
    out = []
    for _ in range(n):
        state = (state * PCG_MULT + inc) % m
        out.append(pcg_xsl_rr(state))
    bg = np.random.PCG64()
    bg.state = {"bit_generator": "PCG64", "state": {"state": prev, "inc": inc},
                "has_uint32": 0, "uinteger": 0}
    raw = [int(x) for x in bg.random_raw(n)]
    return out, raw


def sampling():
    """Sampling of sweep inputs: the standard normal quantile and CDF, the quantile
    functions and moments of the input distributions, the generator's first outputs, the
    percentile definition of the sweep report, and the Wilson score interval.

    Normal: scipy.stats.norm.ppf / .cdf, cross-checked with mpmath (sqrt(2) erfinv(2p-1),
    erfc). Distributions: scipy.stats (uniform, loguniform, norm, truncnorm, lognorm,
    triang) .ppf, .stats(moments='mvk'), .pdf; moments cross-checked by quadrature of
    the quantile function over (0, 1). Generator: PCG-XSL-RR 128/64 (O'Neill 2014) in
    exact integer arithmetic, cross-checked with numpy.random.PCG64. Percentiles:
    numpy.percentile (default method 'linear', Hyndman & Fan 1996 definition 7),
    cross-checked by the closed form. Wilson interval: Wilson, E.B., 1927, 'Probable
    inference, the law of succession, and statistical inference', JASA 22(158), 209-212,
    from scipy.stats.binomtest(k, n).proportion_ci(0.95, method='wilson'), cross-checked
    by the closed form.
    """
    import scipy.stats as st
    diffs = []
    ps = [1e-300, 1e-100, 1e-20, 1e-10, 1e-5, 0.001, 0.02425, 0.075, 0.3, 0.5, 0.7,
          0.925, 0.97575, 0.999, 1 - 1e-10]
    ppf = []
    with mp.workdps(MP_DPS):
        for p in ps:
            z = st.norm.ppf(p)
            ref = mp.sqrt(2) * mp.erfinv(2 * mp.mpf(p) - 1) if p > 1e-20 else None
            if ref is None:
                # erfinv loses the tail; solve Phi(z) = p with mpmath instead.
                ref = mp.findroot(lambda x: mp.ncdf(x) - mp.mpf(p), z)
            diffs.append(rel_diff(z, ref))
            ppf.append([f(p), f(z)])
        zs = [-37.0, -20.0, -8.0, -3.0, -1.0, -0.1, 0.0, 0.5, 2.0, 6.0]
        cdf = []
        for z in zs:
            v = st.norm.cdf(z)
            diffs.append(rel_diff(v, mp.ncdf(z)))
            cdf.append([f(z), f(v)])

    dists = [
        ("uniform(2, 6)", st.uniform(loc=2, scale=4)),
        ("loguniform(1e-6, 1e-2)", st.loguniform(1e-6, 1e-2)),
        ("normal(0.3, 0.05)", st.norm(loc=0.3, scale=0.05)),
        ("normal(0.3, 0.2, min=0.01, max=0.5)",
         st.truncnorm((0.01 - 0.3) / 0.2, (0.5 - 0.3) / 0.2, loc=0.3, scale=0.2)),
        ("normal(0, 1, min=5, max=6)", st.truncnorm(5, 6)),
        ("lognormal(1e-4, 1.2)", st.lognorm(1.2, scale=1e-4)),
        ("triangular(0, 1, 4)", st.triang(0.25, loc=0, scale=4)),
    ]
    us = [1e-10, 0.001, 0.1, 0.5, 0.9, 0.999, 1 - 1e-10]
    qp = [0.1, 0.5, 0.9]
    out = []
    for text, d in dists:
        m, v, k = (float(x) for x in d.stats(moments="mvk"))
        qm = scipy.integrate.quad(lambda u: d.ppf(u), 0, 1, limit=200, epsabs=0,
                                  epsrel=1e-11)[0]
        if text != "lognormal(1e-4, 1.2)":
            # The log-normal's quantile function is too heavy-tailed for quad at this
            # accuracy; its moments are closed forms in scipy (exp(s^2/2) etc.).
            diffs.append(rel_diff(m, qm))
        out.append({
            "distribution": text,
            "u": us, "quantile": [f(d.ppf(u)) for u in us],
            "mean": m, "variance": v, "excess_kurtosis": k,
            "p": qp, "quantile_p": [f(d.ppf(p)) for p in qp],
            "pdf_at_quantile_p": [f(d.pdf(d.ppf(p))) for p in qp],
        })
    # Truncated log-normal: the exponential of a truncated normal in ln X.
    a, b = (math.log(1e-6) - math.log(1e-4)) / 1.2, (math.log(1e-2) - math.log(1e-4)) / 1.2
    tn = st.truncnorm(a, b, loc=math.log(1e-4), scale=1.2)
    out.append({
        "distribution": "lognormal(1e-4, 1.2, min=1e-6, max=1e-2)",
        "u": us, "quantile": [f(math.exp(tn.ppf(u))) for u in us],
    })

    draws = []
    for seed, stream in [(1, 0), (20261204, 3)]:
        ours, raw = pcg_sweep_draws(seed, stream, 4)
        diffs.append(0.0 if ours == raw else 1.0)
        draws.append({"seed": seed, "stream": stream, "outputs": [str(x) for x in ours]})

    data = [3.1, -0.4, 7.25, 2.0, 2.0, 11.5, 0.01, 5.5, -2.25]
    qs = [0.0, 10.0, 25.0, 50.0, 62.5, 90.0, 100.0]
    pct = [f(x) for x in np.percentile(data, qs)]
    srt = sorted(data)
    for q, val in zip(qs, pct):
        h = (len(srt) - 1) * q / 100
        lo = math.floor(h)
        hi = min(lo + 1, len(srt) - 1)
        diffs.append(rel_diff(val, srt[lo] + (h - lo) * (srt[hi] - srt[lo])))

    wilson = []
    z = st.norm.ppf(0.975)
    for k, n in [(0, 20), (3, 20), (17, 40), (40, 40), (1, 1000)]:
        ci = st.binomtest(k, n).proportion_ci(0.95, method="wilson")
        ph = k / n
        c = (ph + z * z / (2 * n)) / (1 + z * z / n)
        hw = z / (1 + z * z / n) * math.sqrt(ph * (1 - ph) / n + z * z / (4 * n * n))
        diffs.append(max(rel_diff(ci.low, c - hw) if ci.low > 1e-12 else abs(ci.low - (c - hw)),
                         rel_diff(ci.high, c + hw)))
        wilson.append({"k": k, "n": n, "low": f(ci.low), "high": f(ci.high)})

    return {
        "source": (
            "scipy.stats distributions (reference library); Wichura 1988 AS 241 is what "
            "the sweep implements for the normal quantile; PCG-XSL-RR 128/64 (O'Neill 2014) "
            "for the generator; numpy.percentile linear (Hyndman, R.J. & Fan, Y., 1996, "
            "'Sample quantiles in statistical packages', The American Statistician 50(4), "
            "361-365, definition 7); Wilson 1927 score interval."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "scipy.stats.norm.ppf(p), scipy.stats.norm.cdf(z)",
                "cross-check: mpmath sqrt(2)*erfinv(2p-1) (findroot of ncdf in the far tail), mpmath.ncdf",
                "scipy.stats.<dist>.ppf(u), .stats(moments='mvk'), .pdf(ppf(p))",
                "cross-check: scipy.integrate.quad(ppf, 0, 1) for the mean",
                "PCG-XSL-RR in Python integers; cross-check numpy.random.PCG64.random_raw",
                "numpy.percentile(data, q) (method 'linear'); cross-check: closed form",
                "scipy.stats.binomtest(k, n).proportion_ci(0.95, method='wilson'); cross-check: closed form",
            ],
        },
        "norm_ppf": ppf,
        "norm_cdf": cdf,
        "distributions": out,
        "pcg_draws": draws,
        "percentile": {"data": data, "q": qs, "value": pct},
        "wilson95": wilson,
        "cross_check": "scipy against mpmath and quadrature; Python PCG against numpy; closed forms",
        "cross_check_max_rel_diff": f(max(diffs)),
    }


# ---------------------------------------------------------------------------------------
# periodic state of a scalar nonlinear ODE (docs/numerics.md, periodic state by shooting)
# ---------------------------------------------------------------------------------------

# c > b keeps x > 0 (x|x| = x^2, smooth), so fourth-order RK4 converges at its order in the
# Rust check; with zero crossings the jump of the second derivative made the observed order
# erratic (1.7 measured at 128-512 steps).
PERIODIC_ODE = {"a": 2.0, "b": 1.5, "c": 2.0, "omega": 1.3}


def periodic_ode():
    """The periodic solution of x' = -a x|x| + b cos(omega t) + c (a store drained through
    a quadratic loss under a periodic inflow): shooting with brentq on solve_ivp, cross-
    checked by plain integration over many periods."""
    p = PERIODIC_ODE
    a, b, c, w = p["a"], p["b"], p["c"], p["omega"]
    period = 2 * math.pi / w

    def rhs(t, x):
        return [-a * x[0] * abs(x[0]) + b * math.cos(w * t) + c]

    def flow(x0, t_end, t_eval=None, method="DOP853"):
        return scipy.integrate.solve_ivp(rhs, [0.0, t_end], [x0], method=method, rtol=1e-12,
                                         atol=1e-14, t_eval=t_eval)

    x0 = scipy.optimize.brentq(lambda x: flow(x, period).y[0, -1] - x, -5.0, 5.0,
                               xtol=1e-15, rtol=1e-15)
    phases = [k * period / 8 for k in range(8)]
    sol = flow(x0, period, t_eval=phases)
    values = [f(v) for v in sol.y[0]]
    # Cross-check: plain integration from x = 0 over 60 periods (the map contracts fast:
    # the linearization -2a|x| is strongly damping), then one period sampled, with Radau.
    assert min(sol.y[0]) > 0.0, "the parameters must keep x > 0"

    settle = flow(0.0, 60 * period, method="Radau").y[0, -1]
    again = flow(settle, period, t_eval=phases, method="Radau").y[0]
    diff = max(abs(u - v) for u, v in zip(again, sol.y[0]))
    return {
        "source": (
            "Periodic solution of the scalar ODE x' = -a x|x| + b cos(omega t) + c (derived "
            "here as a test problem; no closed form): shooting on x(0) = x(P)."
        ),
        "computed_with": {
            "versions": versions(),
            "calls": [
                "scipy.optimize.brentq(x0 -> x(P; x0) - x0, -5, 5, xtol=rtol=1e-15), x(P; x0) "
                "by scipy.integrate.solve_ivp(method='DOP853', rtol=1e-12, atol=1e-14)",
                "cross-check: solve_ivp(method='Radau', same tolerances) from x = 0 over 60 "
                "periods, then one period",
            ],
        },
        "conventions": "P = 2 pi / omega; values are x at t = k P / 8, k = 0..7",
        "params": p,
        "period": f(period),
        "t": [f(t) for t in phases],
        "x": values,
        "cross_check": "shooting (DOP853) vs plain integration (Radau), absolute",
        "cross_check_max_rel_diff": f(diff),
    }



GENERATORS = [
    ("thiem_composite.json", thiem_composite),
    ("theis.json", theis),
    ("periodic.json", periodic),
    ("slug_cbp.json", slug_cbp),
    ("papadopulos_cooper.json", papadopulos_cooper),
    ("flow_decline.json", flow_decline),
    ("forchheimer_steady.json", forchheimer_steady),
    ("grain_size.json", grain_size),
    ("screen_orifice.json", screen_orifice),
    ("collapse.json", collapse),
    ("energy_dissipation.json", energy_dissipation),
    ("step_drawdown.json", step_drawdown),
    ("devices.json", devices),
    ("conductance_jump.json", conductance_jump),
    ("inertia.json", inertia),
    ("virtual_tests.json", virtual_tests),
    ("damage.json", damage),
    ("sampling.json", sampling),
    ("periodic_ode.json", periodic_ode),
]


def main():
    """Compute every file, run all checks, and write only if all pass.

    File names given as arguments (e.g. devices.json) restrict the run to those files.
    """
    results = []
    failed = False
    wanted = set(sys.argv[1:])
    for name, func in GENERATORS:
        if wanted and name not in wanted:
            continue
        first_erratum = len(ERRATA)
        doc = func()
        if len(ERRATA) > first_erratum:
            doc["physics_md_errata"] = ERRATA[first_erratum:]
        cc = doc["cross_check_max_rel_diff"]
        ok = cc <= CROSS_CHECK_TOL
        failed |= not ok
        print(f"{name:28s} cross_check_max_rel_diff = {cc:.3e}  {'ok' if ok else 'FAIL'}",
              flush=True)
        results.append((name, doc))
    print(f"printed-table checks: {CHECK_COUNT[0] - len(CHECK_FAILURES)}/{CHECK_COUNT[0]} agree")
    for msg in ERRATA:
        print(f"  NOTE {msg}")
    for msg in CHECK_FAILURES:
        print(f"  MISMATCH {msg}")
    if failed or CHECK_FAILURES:
        print("checks failed; nothing written", file=sys.stderr)
        return 1
    DATA_DIR.mkdir(parents=True, exist_ok=True)
    for name, doc in results:
        text = json.dumps(doc, indent=2, allow_nan=False) + "\n"
        (DATA_DIR / name).write_text(text, encoding="ascii")
    print(f"wrote {len(results)} files to {DATA_DIR}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
