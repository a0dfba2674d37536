"""Independent re-computation of the [C] check values used in tests/it/physics_transfer.rs.

Plain Python (math only): each value is evaluated straight from the published formula named
beside it, so the Rust implementation is checked against a second, separately written one.
Run from the repository root: python3 tests/reference/gen_transfer.py
(it prints the check values and rewrites tests/data/fixtures/transfer_fresnel_pvlib.csv).
"""
import math

SIGMA = 5.670374419e-8
G = 9.80665


def p_malik(t_c):
    """Malik et al. (1982) saturation pressure [Pa], T in deg C (paired with Dunkle)."""
    return math.exp(25.317 - 5144.0 / (t_c + 273.0))


def dunkle(tw_c, tg_c):
    pw, pg = p_malik(tw_c), p_malik(tg_c)
    tw_k = tw_c + 273.15
    dtp = (tw_c - tg_c) + (pw - pg) * tw_k / (268.9e3 - pw)
    h = 0.884 * dtp ** (1 / 3)
    q_e = 16.273e-3 * h * (pw - pg)
    return dtp, h, q_e, q_e / (tw_c - tg_c)


print("# Dunkle (1961), T in K = t_c + 273.15, p from Malik et al. with +273")
for tw, tg in [(60, 50), (50, 40), (70, 60)]:
    dtp, h, q, he = dunkle(tw, tg)
    hr = 0.82 * SIGMA * ((tw + 273.15) ** 2 + (tg + 273.15) ** 2) * (tw + tg + 2 * 273.15)
    print(f"{tw}/{tg}: dT'={dtp:.5f} h_cw={h:.5f} q_ew={q:.4f} h_ew={he:.5f} h_rw={hr:.5f}")

# Kumar & Tiwari (1996) form with the test's air properties
k, nu, pr, L = 0.0281, 1.81e-5, 0.71, 0.3
tw, tg = 60.0, 50.0
dtp, *_ = dunkle(tw, tg)
tm = 0.5 * (tw + tg) + 273.15
gr = G * dtp * L ** 3 / (nu ** 2 * tm)
h_kt = k / L * 0.0322 * (gr * pr) ** 0.41
print(f"Kumar-Tiwari 60/50: Gr={gr:.6e} h_c={h_kt:.5f} q_e={16.273e-3*h_kt*(p_malik(tw)-p_malik(tg)):.4f}")


def hollands(ra, beta):
    s = ra * math.cos(beta)
    a = 1 - 1708 * math.sin(1.8 * beta) ** 1.6 / s
    b = max(0.0, 1 - 1708 / s)
    c = max(0.0, (s / 5830) ** (1 / 3) - 1)
    return 1 + 1.44 * a * b + c


print(f"Hollands Ra=1e4 beta=0: {hollands(1e4, 0.0):.6f}")
print(f"Hollands Ra=5e4 beta=45deg: {hollands(5e4, math.radians(45)):.6f}")

# Stefan diffusion across a gap
D, M, R = 2.6e-5, 0.018015268, 8.314462618
P, delta = 101325.0, 0.005
te, tc = 60.0, 55.0
pe, pc = p_malik(te), p_malik(tc)
tbar = 0.5 * (te + tc) + 273.15
m = D * M * P / (R * tbar * delta) * math.log((P - pc) / (P - pe))
print(f"Stefan 60/55 C, 5 mm, D=2.6e-5: {m:.6e} kg/m2/s")

# log wind profile
print(f"log law 3 m/s at 10 m -> 1 m, z0=0.03: {3*math.log(1/0.03)/math.log(10/0.03):.6f}")
print(f"U base 50mm/0.035 + h 5.7: {1/(0.05/0.035 + 1/5.7):.6f}")

# ---- optics (Duffie & Beckman 2013 ch. 5 formulas) and sky


def fresnel(theta1, n):
    t2 = math.asin(math.sin(theta1) / n)
    if theta1 == 0:
        r = ((n - 1) / (n + 1)) ** 2
        return t2, r, r
    rs = math.sin(t2 - theta1) ** 2 / math.sin(t2 + theta1) ** 2
    rp = math.tan(t2 - theta1) ** 2 / math.tan(t2 + theta1) ** 2
    return t2, rs, rp


def slab(theta1, n, K, L):
    t2, rs, rp = fresnel(theta1, n)
    ta = math.exp(-K * L / math.cos(t2))
    out = []
    for r in (rs, rp):
        tau = ta * (1 - r) ** 2 / (1 - (r * ta) ** 2)
        rho = r + (1 - r) ** 2 * ta ** 2 * r / (1 - (r * ta) ** 2)
        alpha = (1 - ta) * (1 - r) / (1 - r * ta)
        out.append((tau, alpha, rho))
    tau_r = 0.5 * ((1 - rs) / (1 + rs) + (1 - rp) / (1 + rp))
    return t2, ta, tau_r, [0.5 * (a + b) for a, b in zip(*out)]


t2, ta, tau_r, (tau, alpha, rho) = slab(math.radians(60), 1.526, 32.0, 0.0023)
print(f"glass 60deg: theta2={math.degrees(t2):.4f} tau_r={tau_r:.5f} tau_a={ta:.5f} tau={tau:.5f} alpha={alpha:.5f} rho={rho:.5f}")
_, rs, _ = fresnel(0.0, 1.526)
print(f"glass normal r={rs:.6f}; water normal r={((1.333-1)/(1.333+1))**2:.6f}")
_, rs, rp = fresnel(math.radians(60), 1.333)
print(f"water 60deg r={(rs+rp)/2:.6f}")
mu = [0.237, 0.193, 0.167, 0.179]
eta = [0.032, 0.45, 3.0, 35.0]
for d in (0.01, 0.05, 0.10):
    tau = sum(m * math.exp(-e * d) for m, e in zip(mu, eta))
    print(f"Rabl-Nielsen absorbed in {d} m: {1-tau:.5f}")
for b in (0, 45, 60):
    print(f"BB80 beta={b}: sky {59.7-0.1388*b+0.001497*b*b:.4f} ground {90-0.5788*b+0.002693*b*b:.4f}")
for t in (300.0, 283.15):
    print(f"Swinbank {t}: {0.0552*t**1.5:.4f}")
for tdp in (0.0, 20.0, -10.0):
    x = tdp / 100
    e = 0.711 + 0.56 * x + 0.73 * x * x
    print(f"Berdahl-Martin Tdp={tdp}: eps={e:.6f}, T_sky(Ta=298.15)={e**0.25*298.15:.4f}")


# ---- fixture: tests/data/fixtures/transfer_fresnel_pvlib.csv
# Unpolarised Fresnel reflectance of one air-to-medium interface from pvlib (a general-purpose
# PV library). pvlib.iam.physical with K = 0 and no coating models a single interface:
# IAM = (1 - r(theta)) / (1 - r(0)), so r(theta) = 1 - IAM * (1 - r(0)), r(0) = ((n-1)/(n+1))^2.
# Generated with pvlib 0.16.1 (versions are written into the CSV header). Run from the repo root.

import numpy as np  # noqa: E402
import pvlib  # noqa: E402
from pvlib import iam  # noqa: E402

rows = []
for n in (1.526, 1.333):
    r0 = ((n - 1) / (n + 1)) ** 2
    for aoi in (0.0, 10.0, 30.0, 45.0, 60.0, 70.0, 80.0, 85.0, 89.0):
        m = float(iam.physical(np.array([aoi]), n=n, K=0.0, L=0.002)[0])
        rows.append((n, aoi, 1.0 - m * (1.0 - r0)))

with open("tests/data/fixtures/transfer_fresnel_pvlib.csv", "w") as f:
    f.write(f"# pvlib {pvlib.__version__}, numpy {np.__version__}: iam.physical(K=0), r = 1 - IAM (1 - r0)\n")
    f.write("refractive_index,incidence_deg,reflectance\n")
    for n, aoi, r in rows:
        f.write(f"{n},{aoi},{r:.12e}\n")
