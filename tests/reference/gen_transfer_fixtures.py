"""Write tests/data/fixtures/transfer_fresnel_pvlib.csv: unpolarised Fresnel reflectance of one
air-to-medium interface from pvlib (a general-purpose PV library), for cross-checking
stillbench::physics::optics::fresnel_reflectance.

pvlib.iam.physical with K = 0 and no coating models a single interface:
IAM = (1 - r(theta)) / (1 - r(0)), so r(theta) = 1 - IAM * (1 - r(0)), r(0) = ((n-1)/(n+1))^2.

Generated with pvlib 0.16.1, numpy (see the header line of the CSV). Run from the repo root:
python3 tests/reference/gen_transfer_fixtures.py
"""
import numpy as np
import pvlib
from pvlib import iam

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
