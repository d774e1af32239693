#!/usr/bin/python3
"""Writes clocks.csv for the hand-made test dataset ds1: one day at 300 s,
clocks G01, G02, STA1, STA2; G01, G02 and STA1 have a gap over
40000 s <= t <= 46000 s (only STA2 has data there); G02 also misses
t = 60000 s. Bias values are arbitrary small numbers (s).
Run: /usr/bin/python3 gen_clocks.py > clocks.csv"""
print("t_s,G01,G02,STA1,STA2")
for k in range(288):
    t = 300 * k
    row = [f"{1e-9 * (k % 7):.3e}", f"{-2e-9 * (k % 5):.3e}", f"{3e-10 * (k % 3):.3e}", f"{1e-10 * k:.3e}"]
    if 40000 <= t <= 46000:
        row[0] = row[1] = row[2] = ""
    if t == 60000:
        row[1] = ""
    print(t, *row, sep=",")
