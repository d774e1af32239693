#!/usr/bin/python3
"""Writes rinex2_glonass.g: the R01 and R02 records of the 00:15 epoch of
../shared/extdata/set_B_2023-073_multi/BRDM00DLR_S_20230730000_01D_MN.rnx
(RINEX 3.04) re-expressed in the RINEX 2.11 GLONASS layout (I2,1X,5(I2,1X),F5.1,
3D19.12 then 3X,4D19.12; RINEX 2.11 §A11, from memory), so the version-2 reader
can be compared with the 3.04 reader on the same numbers.
Run from the repository root: /usr/bin/python3 orbits/testdata/make_rinex2_glonass.py
"""
import math, os

src = os.path.join(os.path.dirname(__file__), "..", "..", "..", "shared", "extdata",
                   "set_B_2023-073_multi", "BRDM00DLR_S_20230730000_01D_MN.rnx")

def d19(v):
    if v == 0:
        return " 0.000000000000D+00"
    e = math.floor(math.log10(abs(v))) + 1
    m = v / 10 ** e
    if round(abs(m), 12) >= 1:
        m /= 10
        e += 1
    return "%s0.%012dD%+03d" % ("-" if m < 0 else " ", round(abs(m) * 1e12), e)

lines = open(src).read().splitlines()
out = ["     2.11           G: GLONASS NAV DATA                     RINEX VERSION / TYPE",
       "make_rinex2_glonass wallcross                                PGM / RUN BY / DATE",
       "    18                                                      LEAP SECONDS",
       "                                                            END OF HEADER"]
for i, l in enumerate(lines):
    if l[:3] in ("R01", "R02") and l[4:23] == "2023 03 14 00 15 00":
        prn = int(l[1:3])
        vals = [float(l[23 + 19 * k:42 + 19 * k].replace("e", "E")) for k in range(3)]
        out.append("%2d %02d %2d %2d %2d %2d%5.1f" % (prn, 23, 3, 14, 0, 15, 0.0) + "".join(d19(v) for v in vals))
        for j in range(1, 4):
            o = lines[i + j]
            f = [float(o[4 + 19 * k:23 + 19 * k].replace("e", "E") or 0) for k in range(4)]
            out.append("   " + "".join(d19(v) for v in f))
open(os.path.join(os.path.dirname(__file__), "rinex2_glonass.g"), "w").write("\n".join(out) + "\n")
