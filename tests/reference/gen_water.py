#!/usr/bin/env python3
"""Generate the reference fixtures for water, seawater and humid-air properties.

Run from the repository root:

    python3 tests/reference/gen_water.py

Writes tests/data/fixtures/{water,seawater,humid_air}_*.csv. Deterministic: fixed grids,
no randomness, floats written with the shortest repr that round-trips exactly. Library versions are
pinned in tests/reference/requirements.txt and checked below, so a fixture can always be
traced to the library that produced it.
"""

import csv
import math
import os
import sys

import CoolProp
import CoolProp.CoolProp as CP
import gsw
import iapws
import numpy as np
import pvlib
from iapws import iapws97, _iapws

EXPECTED = {"iapws": "1.5.5", "CoolProp": "8.0.0", "gsw": "3.6.23", "pvlib": "0.16.1"}
FOUND = {
    "iapws": iapws.__version__,
    "CoolProp": CoolProp.__version__,
    "gsw": gsw.__version__,
    "pvlib": pvlib.__version__,
}

OUT = os.path.normpath(os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "data", "fixtures"))
T0_K = 273.15
P_ATM_PA = 101325.0
# Specific gas constant of water vapour used to turn a chemical-potential difference into a
# water activity: R / M_w with CODATA 2018 R and the IAPWS-95 molar mass.
R_V_J_KG_K = 8.314462618 / 18.015268e-3


def fmt(x):
    # Shortest repr that round-trips the double exactly (deterministic across platforms).
    return repr(float(x))


def write(name, header, rows):
    path = os.path.join(OUT, name)
    with open(path, "w", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(header)
        for r in rows:
            w.writerow([fmt(v) for v in r])
    print(f"wrote {os.path.relpath(path)} ({len(rows)} rows)")


def water_saturation():
    """IF97 region 4 (iapws) over its whole range, and IAPWS-95 (CoolProp) saturation
    enthalpies 0.01-200 degC."""
    rows = []
    temps = [273.16] + [T0_K + t for t in range(1, 101)] + [T0_K + t for t in range(110, 201, 10)]
    for t_k in temps:
        p_if97_pa = iapws97._PSat_T(t_k) * 1e6
        h_f = CP.PropsSI("H", "T", t_k, "Q", 0, "Water")
        h_g = CP.PropsSI("H", "T", t_k, "Q", 1, "Water")
        rows.append((t_k, p_if97_pa, h_f, h_g, h_g - h_f))
    write(
        "water_saturation.csv",
        ["t_k", "p_sat_if97_pa", "h_f_j_kg", "h_g_j_kg", "h_fg_j_kg"],
        rows,
    )
    # Upper part of the saturation line, IF97 only (the enthalpy correlations stop at 200 degC),
    # plus the backward equation T_sat(p) at round pressures.
    rows = []
    for t_c in range(210, 371, 10):
        t_k = T0_K + t_c
        rows.append((t_k, iapws97._PSat_T(t_k) * 1e6))
    for p_mpa in [0.001, 0.01, 0.1, 1.0, 5.0, 10.0, 20.0]:
        rows.append((iapws97._TSat_P(p_mpa), p_mpa * 1e6))
    write("water_saturation_high.csv", ["t_k", "p_sat_if97_pa"], rows)


def water_liquid():
    """Saturated-liquid properties from IAPWS-95 / IAPWS 2008 / IAPWS 2011 (CoolProp),
    0.01-100 degC every 1 K."""
    rows = []
    for t_c in [0.01] + list(range(1, 101)):
        t_k = T0_K + t_c
        rho = CP.PropsSI("D", "T", t_k, "Q", 0, "Water")
        cp = CP.PropsSI("C", "T", t_k, "Q", 0, "Water")
        k = CP.PropsSI("L", "T", t_k, "Q", 0, "Water")
        mu = CP.PropsSI("V", "T", t_k, "Q", 0, "Water")
        rows.append((t_k, rho, cp, k, mu))
    write(
        "water_liquid.csv",
        ["t_k", "density_kg_m3", "specific_heat_j_kg_k", "thermal_conductivity_w_m_k", "viscosity_pa_s"],
        rows,
    )


def seawater_properties():
    """TEOS-10 (gsw) density and isobaric specific heat at sea pressure 0 (one atmosphere).

    Only 0-40 degC: gsw's pure-water Gibbs function is a fit valid to 40 degC and drifts
    above it (its c_p of pure water is 1.5 % off IAPWS-95 at 80 degC)."""
    rows = []
    for s in [0, 10, 20, 35, 42, 60, 80, 100, 120]:
        for t_c in range(0, 41, 5):
            rho = float(gsw.rho_t_exact(s, t_c, 0.0))
            cp = float(gsw.cp_t_exact(s, t_c, 0.0))
            rows.append((s, T0_K + t_c, rho, cp))
    write("seawater_properties.csv", ["s_g_kg", "t_k", "density_kg_m3", "specific_heat_j_kg_k"], rows)


def seawater_vapour_pressure():
    """Water activity of seawater from TEOS-10: ln a_w = (mu_w(S) - mu_w(0)) / (R_v T), with
    mu_w the chemical potential of water in seawater (gsw returns J/g). Vapour-pressure ratio
    p_sw/p_w equals a_w up to vapour non-ideality and the Poynting factor (both < 1e-4)."""
    rows = []
    for t_c in [20, 40, 60, 80]:
        t_k = T0_K + t_c
        mu0 = float(gsw.chem_potential_water_t_exact(0.0, t_c, 0.0))
        for s in range(0, 121, 5):
            mu = float(gsw.chem_potential_water_t_exact(float(s), t_c, 0.0))
            a_w = math.exp((mu - mu0) * 1000.0 / (R_V_J_KG_K * t_k))
            rows.append((s, t_k, a_w))
    write("seawater_vapour_pressure.csv", ["s_g_kg", "t_k", "vapour_pressure_ratio"], rows)


def seawater_latent_heat():
    """TEOS-10 latent heat of evaporation of water from seawater, per kg of vapour
    (gsw.latentheat_evap_t, valid 0-42 g/kg, 0-40 degC)."""
    rows = []
    for s in range(0, 41, 5):
        for t_c in range(0, 41, 5):
            rows.append((s, T0_K + t_c, float(gsw.latentheat_evap_t(s, t_c))))
    write("seawater_latent_heat.csv", ["s_g_kg", "t_k", "latent_heat_per_kg_vapour_j_kg"], rows)


def humid_air_properties():
    """Humid air at one atmosphere from CoolProp HAPropsSI (Herrmann, Kretzschmar & Gatley
    2009 real-gas model). The partial pressure of vapour P_w is written so the Rust side
    compares its mixture rules at the same composition."""
    rows = []
    for t_c in range(20, 91, 10):
        t_k = T0_K + t_c
        for rh in [0.0, 0.25, 0.5, 0.75, 1.0]:
            args = ("T", t_k, "P", P_ATM_PA, "R", rh)
            p_w = CP.HAPropsSI("P_w", *args)
            w = CP.HAPropsSI("W", *args)
            v_ha = CP.HAPropsSI("Vha", *args)  # m3 per kg humid air
            k = CP.HAPropsSI("K", *args)
            mu = CP.HAPropsSI("M", *args)
            cp_ha = CP.HAPropsSI("cp_ha", *args)
            rows.append((t_k, P_ATM_PA, rh, p_w, w, 1.0 / v_ha, k, mu, cp_ha))
    write(
        "humid_air_properties.csv",
        [
            "t_k", "p_pa", "relative_humidity", "p_vapour_pa", "humidity_ratio",
            "density_kg_m3", "thermal_conductivity_w_m_k", "viscosity_pa_s", "specific_heat_j_kg_k",
        ],
        rows,
    )


def humid_air_components():
    """Pure components: dry air at one atmosphere (CoolProp, Lemmon et al. 2000/2004) and
    dilute water vapour (IAPWS 2008 viscosity and IAPWS 2011 conductivity, zero-density
    terms, as implemented in iapws)."""
    rows = []
    for t_c in range(0, 101, 10):
        t_k = T0_K + t_c
        mu_air = CP.PropsSI("V", "T", t_k, "P", P_ATM_PA, "Air")
        k_air = CP.PropsSI("L", "T", t_k, "P", P_ATM_PA, "Air")
        # rho = 0 selects the dilute-gas limit of the IAPWS transport equations.
        mu_v = _iapws._Viscosity(0.0, t_k)
        k_v = _iapws._ThCond(0.0, t_k)
        rows.append((t_k, mu_air, k_air, mu_v, k_v))
    write(
        "humid_air_components.csv",
        ["t_k", "air_viscosity_pa_s", "air_thermal_conductivity_w_m_k",
         "vapour_viscosity_pa_s", "vapour_thermal_conductivity_w_m_k"],
        rows,
    )


def humid_air_dew_point():
    """Dew point from CoolProp HAPropsSI (with enhancement factor) at one atmosphere."""
    rows = []
    for t_c in range(0, 51, 5):
        t_k = T0_K + t_c
        for rh in [0.1, 0.3, 0.5, 0.7, 0.9, 1.0]:
            rows.append((t_k, rh, CP.HAPropsSI("D", "T", t_k, "P", P_ATM_PA, "R", rh)))
    write("humid_air_dew_point.csv", ["t_k", "relative_humidity", "t_dew_k"], rows)


def humid_air_pressure_elevation():
    """Standard-atmosphere pressure by elevation from pvlib.atmosphere.alt2pres."""
    rows = []
    for z in [-400, 0, 250, 500, 1000, 1500, 2000, 2500, 3000, 4000, 5000]:
        rows.append((z, float(pvlib.atmosphere.alt2pres(z))))
    write("humid_air_pressure_elevation.csv", ["elevation_m", "pressure_pa"], rows)


def main():
    bad = {k: (v, FOUND[k]) for k, v in EXPECTED.items() if FOUND[k] != v}
    if bad:
        sys.exit(f"library versions differ from requirements.txt: {bad}")
    np.seterr(all="raise")
    os.makedirs(OUT, exist_ok=True)
    water_saturation()
    water_liquid()
    seawater_properties()
    seawater_vapour_pressure()
    seawater_latent_heat()
    humid_air_properties()
    humid_air_components()
    humid_air_dew_point()
    humid_air_pressure_elevation()


if __name__ == "__main__":
    main()
