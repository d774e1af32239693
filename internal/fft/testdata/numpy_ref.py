#!/usr/bin/python3
"""Reference DFT values for package internal/fft, computed with numpy.fft
(Debian python3-numpy, pocketfft). Run:

    /usr/bin/python3 internal/fft/testdata/numpy_ref.py > internal/fft/testdata/numpy_ref.json

The input is exact in binary floating point and rebuilt by the Go test:
x_k = ((7919 k) mod 1009 - 504)/512 + i ((104729 k) mod 997 - 498)/256.
For each length the forward DFT X_k = sum x_j exp(-2 pi i j k/n) is stored
at 64 indices k_i = (2654435761 i) mod n (all indices when n <= 64).
"""
import json

import numpy as np

out = {"source": "numpy %s numpy.fft.fft" % np.__version__, "cases": []}
for n in [1, 2, 4, 8, 32, 64, 1 << 13, 1 << 16, 1 << 17]:
    k = np.arange(n, dtype=np.int64)
    x = ((7919 * k) % 1009 - 504) / 512.0 + 1j * (((104729 * k) % 997 - 498) / 256.0)
    X = np.fft.fft(x)
    idx = list(range(n)) if n <= 64 else [(2654435761 * i) % n for i in range(64)]
    out["cases"].append({"n": n, "k": idx,
                         "re": [float(X[i].real) for i in idx],
                         "im": [float(X[i].imag) for i in idx]})
json.dump(out, __import__("sys").stdout, indent=0)
