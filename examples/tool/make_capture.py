#!/usr/bin/env python3
"""Writes silo_capture.csv: an INVENTED load-cell capture for `tapline replay` (no real scale,
no real measurement). 12-bit bipolar ADC codes, right-aligned, at 1 kHz for 2 s: the empty silo
reads about 800 codes, grain pours in from 0.8 s (a ramp to 1400 codes over 0.4 s), 50 Hz mains
hum of 300 codes rides on top, plus uniform noise of +-20 codes from a fixed-seed generator, so
the file is the same on every machine. Standard library only.

    python3 examples/tool/make_capture.py [--out DIR]
"""
import math
import sys
from pathlib import Path

RATE_HZ = 1000
SECONDS = 2.0

def main() -> None:
    state = 12345
    rows = ["time_s,adc_code"]
    for n in range(int(RATE_HZ * SECONDS)):
        t = n / RATE_HZ
        weight = 800 + 600 * min(max((t - 0.8) / 0.4, 0.0), 1.0)
        hum = 300 * math.sin(2 * math.pi * 50 * t)
        state = (1103515245 * state + 12345) % 2**31  # a plain LCG: reproducible, not random
        noise = (state / 2**31 - 0.5) * 40
        code = max(-2048, min(2047, round(weight + hum + noise)))
        rows.append(f"{t:.3f},{code}")
    # --out DIR: write elsewhere (tests/vectors/compare.py regenerates into a temporary folder).
    out_dir = Path(sys.argv[sys.argv.index("--out") + 1]) if "--out" in sys.argv else Path(__file__).parent
    out = out_dir / "silo_capture.csv"
    out.write_text("# invented capture: see make_capture.py\n" + "\n".join(rows) + "\n")

if __name__ == "__main__":
    main()
