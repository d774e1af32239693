#!/usr/bin/python3
"""Reference values for package orbits, computed with python3-erfa (liberfa,
the SOFA-equivalent C library) and python3-pyproj (PROJ). Run:

    /usr/bin/python3 orbits/testdata/erfa_ref.py > orbits/testdata/erfa_ref.json

The Go tests read the stored JSON; they do not need Python.
Epochs are given on GPS time as calendar fields; GPST = TAI - 19 s.
"""
import json
import math

import erfa
import pyproj

out = {"source": "python3-erfa %s, pyproj %s (PROJ %s)" % (erfa.__version__, pyproj.__version__, pyproj.proj_version_str)}

# WGS 84 geodetic -> geocentric: erfa.gd2gc(1=WGS84, elong, phi, h) and pyproj EPSG:4979 -> EPSG:4978.
tr = pyproj.Transformer.from_crs("EPSG:4979", "EPSG:4978", always_xy=True)
geo = []
for lat, lon, h in [(46.8771, 7.4651, 956.0), (0.0, 0.0, 0.0), (-33.9, 151.2, 40.0),
                    (89.9, -45.0, 2800.0), (-77.85, 166.67, -30.0), (64.1, -21.9, 20200e3),
                    (12.5, -179.9, 1e5), (-0.001, 90.0, -100.0)]:
    xyz_e = erfa.gd2gc(1, math.radians(lon), math.radians(lat), h)
    xyz_p = tr.transform(lon, lat, h)
    geo.append({"lat_deg": lat, "lon_deg": lon, "h_m": h,
                "erfa": [float(v) for v in xyz_e], "pyproj": [float(v) for v in xyz_p]})
out["geodetic"] = geo

def gps_to_scales(y, mo, d, h, mi, s, dut1):
    t1, t2 = erfa.dtf2d("TAI", y, mo, d, h, mi, s)  # the GPS calendar read as a TAI-like uniform scale
    t2 += 19.0 / 86400.0                             # TAI = GPST + 19 s
    u1, u2 = erfa.taiutc(t1, t2)
    b1, b2 = erfa.utcut1(u1, u2, dut1)
    tt1, tt2 = erfa.taitt(t1, t2)
    return (b1, b2), (tt1, tt2)

rot = []
for (y, mo, d, h, mi, s), dut1 in [((2000, 1, 1, 12, 0, 0.0), 0.0), ((2021, 4, 28, 18, 0, 0.0), 0.0),
                                   ((2021, 4, 28, 18, 0, 0.0), -0.18), ((2020, 6, 25, 12, 0, 0.0), 0.0),
                                   ((2026, 1, 1, 0, 0, 0.0), 0.0), ((1995, 7, 3, 5, 6, 7.5), 0.3),
                                   ((2030, 12, 31, 23, 59, 30.0), 0.0), ((2012, 6, 30, 23, 59, 59.0), 0.4)]:
    ut1, tt = gps_to_scales(y, mo, d, h, mi, s, dut1)
    rot.append({"gps": [y, mo, d, h, mi, s], "dut1": dut1,
                "era00": float(erfa.era00(*ut1)),
                "gmst06": float(erfa.gmst06(ut1[0], ut1[1], tt[0], tt[1])),
                "pmat06": erfa.pmat06(*tt).tolist(),
                "c2t06a": erfa.c2t06a(tt[0], tt[1], ut1[0], ut1[1], 0.0, 0.0).tolist()})
out["rotation"] = rot

gal = []
for l, b in [(0.0, 0.0), (0.0, 90.0), (123.4, -12.5), (280.0, 45.0), (45.0, -89.0)]:
    ra, dec = erfa.g2icrs(math.radians(l), math.radians(b))
    gal.append({"l_deg": l, "b_deg": b, "ra_rad": float(ra), "dec_rad": float(dec)})
out["galactic"] = gal

print(json.dumps(out, indent=1))
