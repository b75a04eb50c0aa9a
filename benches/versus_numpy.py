#!/usr/bin/env python3
"""f32 block throughput of tapline against numpy.convolve on float32 data of the same size,
measured in the same run (not part of CI: wall time on a shared machine is noise there).

For 64 and 256 taps and a 1024-sample block: numpy.convolve(x, h)[:1024] on float32 arrays
(the FIR output of one block, zero history) timed with timeit, and tapline's `Fir::process`
from the criterion bench `throughput` (group fir_f32_<N>taps, tapline_process). Prints both in
Msamples/s and the ratio tapline / numpy.

Usage: python3 benches/versus_numpy.py      (numpy 2.4.6 was used for the recorded figures)
"""

import re
import subprocess
import timeit

import numpy as np

BLOCK = 1024


def numpy_msps(taps):
    rng = np.random.default_rng(7)
    x = rng.uniform(-1, 1, BLOCK).astype(np.float32)
    h = (np.bartlett(taps + 2)[1:-1] / np.bartlett(taps + 2)[1:-1].sum()).astype(np.float32)
    loops = 2000
    best = min(timeit.repeat(lambda: np.convolve(x, h)[:BLOCK], number=loops, repeat=5))
    return BLOCK * loops / best / 1e6


def tapline_msps(taps):
    out = subprocess.run(
        ["cargo", "bench", "--bench", "throughput", "--",
         f"fir_f32_{taps}taps/tapline_process$"],
        check=True, capture_output=True, text=True).stdout
    m = re.search(r"thrpt:\s+\[\S+ \S+ (\S+) (\S)elem/s", out)
    if not m:
        raise SystemExit(f"no throughput line for {taps} taps in:\n{out}")
    value, unit = float(m.group(1)), m.group(2)
    return value * {"G": 1e3, "M": 1.0, "K": 1e-3}[unit]


def main():
    print(f"numpy {np.__version__}, block {BLOCK} samples, float32")
    for taps in (64, 256):
        n = numpy_msps(taps)
        t = tapline_msps(taps)
        print(f"{taps:4} taps: tapline {t:8.2f} Msamples/s, numpy.convolve {n:8.2f} Msamples/s, "
              f"ratio {t / n:.2f}")


if __name__ == "__main__":
    main()
