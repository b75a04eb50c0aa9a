#!/usr/bin/env python3
"""Generate tests/vectors/numpy_convolve.rs: reference vectors for tests/numpy_vectors.rs.

Reference tool: numpy 2.4.6 (numpy.convolve / numpy.correlate, modes 'full', 'same', 'valid').
The script refuses to run under another numpy major.minor unless --allow-other-numpy is given,
and then says so loudly and records the version it actually used in the generated file.

Every input vector below is INVENTED for this test: small hand-picked edge values (full scale,
ties for the rounding modes) plus values from a fixed linear congruential generator written
here. None of it is measured or copied data.

What is generated, for each (signal, kernel) pair and each of convolve/correlate x full/same/valid:
  * float64: numpy's result on float64 inputs, and the same operation on |x| and |h| (the
    sum of |h||x| at each output, which scales the rounding-error bound the test allows);
  * Q15 and Q31: the exact integer sums of products of the raw two's-complement codes (numpy on
    Python-int object arrays, cross-checked against a plain Python double loop), then, for each
    rounding mode, the output after one rounding step (divide by 2^F, F = 15 or 31) and
    saturation to the sample range, plus the number of saturated outputs. The rounding is
    written here with Python's exact integer floor division, independently of tapline.
Also: which Q31 kernels keep every exact sum inside i64 for every full-range input, one Q31
kernel that does not (tapline must refuse it), and a 200-sample streaming case (Q15 and f64)
whose reference is numpy.convolve(x, h)[:200], the FIR output from zero initial history.

Usage: python3 tests/vectors/generate.py [--allow-other-numpy] [--out DIR]
"""

import os
import sys

import numpy as np

NUMPY_EXPECTED = "2.4.6"


def check_numpy_version():
    found = np.__version__
    same = found.split(".")[:2] == NUMPY_EXPECTED.split(".")[:2]
    if same:
        return found
    msg = (
        f"numpy {found} is not {NUMPY_EXPECTED} (major.minor differ). The vectors were made "
        f"with numpy {NUMPY_EXPECTED}; span conventions may differ in other releases."
    )
    if "--allow-other-numpy" not in sys.argv[1:]:
        sys.exit("refusing to run: " + msg + " Pass --allow-other-numpy to override.")
    banner = "!" * 78
    print(f"{banner}\nWARNING: {msg}\nThe generated file will record numpy {found}.\n{banner}",
          file=sys.stderr)
    return found


# ---------------------------------------------------------------------------------------------
# Invented inputs
# ---------------------------------------------------------------------------------------------

class Lcg:
    """64-bit LCG (multiplier/increment from Knuth's MMIX); the top bits are used."""

    def __init__(self, seed):
        self.state = seed & (2**64 - 1)

    def next_u32(self):
        self.state = (self.state * 6364136223846793005 + 1442695040888963407) % 2**64
        return self.state >> 32

    def int_in(self, lo, hi):
        """Roughly uniform integer in lo..=hi (the small modulo bias does not matter here)."""
        return lo + self.next_u32() % (hi - lo + 1)

    def decimal(self, scale):
        """A decimal with 6 significant places in [-scale, scale]: rarely exact in binary."""
        return round(self.int_in(-10**6, 10**6) / 10**6 * scale, 9)


Q15_MIN, Q15_MAX = -(2**15), 2**15 - 1
Q31_MIN, Q31_MAX = -(2**31), 2**31 - 1

rng = Lcg(0x7A91_1E5E_ED00_0001)


def with_edges(values, edges):
    """Overwrite given positions with edge values: {index: value}."""
    values = list(values)
    for i, v in edges.items():
        values[i] = v
    return values


def q15_signal(n, edges):
    return with_edges([rng.int_in(Q15_MIN, Q15_MAX) for _ in range(n)], edges)


def q31_signal(n, edges):
    return with_edges([rng.int_in(Q31_MIN, Q31_MAX) for _ in range(n)], edges)


def run(v, start, count):
    return {start + i: v for i in range(count)}


# Signals: lengths 1, 4 (even, shorter than a kernel), 5, 17, 40. Full-scale values and runs of
# them make outputs saturate; odd codes against power-of-two taps make exact rounding ties.
Q15_SIGNALS = {
    1: [Q15_MIN],
    4: [Q15_MAX, Q15_MIN, 12345, -1],
    5: [Q15_MAX, Q15_MIN, 1, -3, 16385],
    17: q15_signal(17, {0: Q15_MAX, 3: Q15_MIN, 8: 7, 9: -7, 16: Q15_MAX}),
    40: q15_signal(40, {**run(Q15_MAX, 6, 6), **run(Q15_MIN, 20, 6), 30: 1, 31: -1, 39: 3}),
}
Q31_SIGNALS = {
    1: [Q31_MIN],
    4: [Q31_MAX, Q31_MIN, 123456789, -1],
    5: [Q31_MAX, Q31_MIN, 1, -3, 2**30 + 1],
    17: q31_signal(17, {0: Q31_MAX, 3: Q31_MIN, 8: 7, 9: -7, 16: Q31_MAX}),
    40: q31_signal(40, {**run(Q31_MAX, 6, 6), **run(Q31_MIN, 20, 6), 30: 1, 31: -1, 39: 3}),
}
F64_SIGNALS = {
    n: [rng.decimal(1.0) for _ in range(n)] for n in (1, 4, 5, 17)
}
F64_SIGNALS[40] = [rng.decimal(1000.0 if i % 7 == 0 else 1.0) for i in range(40)]

# Kernels: lengths 1, 3, 8, 31.
Q15_KERNELS = {
    1: [Q15_MIN],                                   # -1.0: (-1)(-1) saturates
    3: [16384, -8192, 24576],                       # 0.5, -0.25, 0.75: ties, sum|h| = 1.5
    8: with_edges([rng.int_in(-12000, 12000) for _ in range(8)], {2: 16384, 5: -16384}),
    31: [rng.int_in(-2500, 2500) for _ in range(31)],
}
Q31_KERNELS = {
    1: [Q31_MIN],
    3: [2**30, -(2**29), 3 * 2**29],                # 0.5, -0.25, 0.75
    8: with_edges([rng.int_in(-(2**28), 2**28) for _ in range(8)], {2: 2**30, 5: -(2**29)}),
    31: [rng.int_in(-(2**26), 2**26) for _ in range(31)],
}
F64_KERNELS = {
    1: [rng.decimal(1.0)],
    3: [rng.decimal(1.0) for _ in range(3)],
    8: [rng.decimal(1.0) for _ in range(8)],
    31: [rng.decimal(0.2) for _ in range(31)],
}

# (signal length, kernel length). Kernel longer than signal: (1, 8), (4, 8), (5, 31), (17, 31).
PAIRS = [(1, 1), (1, 8), (4, 8), (5, 3), (5, 31), (17, 1), (17, 8), (17, 31), (40, 3), (40, 31)]
OPS = ["convolve", "correlate"]
MODES = ["full", "same", "valid"]

# A Q31 kernel whose worst-case sum leaves i64 (sum|h| = 2.5): tapline must refuse it.
Q31_REJECTED = [Q31_MIN, Q31_MIN, 2**30]
# Two boundary kernels for the accumulator check (sum|h| just under / at 2).
Q31_BOUNDARY = [[Q31_MIN, Q31_MAX], [Q31_MIN, Q31_MIN]]

# Streaming: 13 invented taps, 200 invented samples.
STREAM_LEN = 200
STREAM_Q15_TAPS = [-900, 0, 2100, 5200, 8300, 10500, 11300, 10500, 8300, 5200, 2100, 0, -901]
STREAM_Q15_X = q15_signal(STREAM_LEN, {**run(Q15_MAX, 40, 20), **run(Q15_MIN, 90, 20),
                                       150: 1, 151: -1, 152: 3})
STREAM_F64_TAPS = [rng.decimal(0.3) for _ in range(13)]
STREAM_F64_X = [rng.decimal(2.0) for _ in range(STREAM_LEN)]


# ---------------------------------------------------------------------------------------------
# Exact integer arithmetic, written here
# ---------------------------------------------------------------------------------------------

ROUNDINGS = ["half_up", "truncate", "half_even"]


def round_shift(acc, frac, mode):
    """acc / 2^frac rounded, with Python's exact integers (// is floor division)."""
    d = 2**frac
    if mode == "truncate":           # floor
        return acc // d
    if mode == "half_up":            # floor(acc/d + 1/2)
        return (2 * acc + d) // (2 * d)
    if mode == "half_even":          # nearest, ties to the even quotient
        q, r = divmod(acc, d)        # 0 <= r < d
        if 2 * r > d or (2 * r == d and q % 2 == 1):
            q += 1
        return q
    raise ValueError(mode)


def saturate(v, lo, hi):
    return min(max(v, lo), hi)


def python_full_convolution(x, h):
    """full[n] = sum_k h[k] x[n-k], a plain double loop on Python ints."""
    out = [0] * (len(x) + len(h) - 1)
    for k, hk in enumerate(h):
        for i, xi in enumerate(x):
            out[i + k] += hk * xi
    return out


def exact_sums(op, mode, x, h):
    """numpy on object (Python int) arrays, so nothing can overflow."""
    xo = np.array(x, dtype=object)
    ho = np.array(h, dtype=object)
    fn = np.convolve if op == "convolve" else np.correlate
    sums = [int(v) for v in fn(xo, ho, mode=mode)]
    # Cross-check numpy's full results against the plain loop (correlation = convolution with
    # the kernel reversed).
    full = [int(v) for v in fn(xo, ho, mode="full")]
    hh = h if op == "convolve" else h[::-1]
    assert full == python_full_convolution(x, hh), (op, len(x), len(h))
    # Every numpy span is a contiguous run of the full result.
    assert any(full[i:i + len(sums)] == sums for i in range(len(full) - len(sums) + 1))
    return sums


def fits_i64(h, x_min, x_max):
    """Whether every input sequence in [x_min, x_max] keeps sum h[k] x[n-k] inside i64."""
    hi = sum(max(t * x_min, t * x_max) for t in h)
    lo = sum(min(t * x_min, t * x_max) for t in h)
    return -(2**63) <= lo and hi <= 2**63 - 1


def rounded(sums, frac, lo, hi):
    res = {}
    for mode in ROUNDINGS:
        q = [round_shift(s, frac, mode) for s in sums]
        out = [saturate(v, lo, hi) for v in q]
        res[mode] = (out, sum(1 for a, b in zip(q, out) if a != b))
    return res


# ---------------------------------------------------------------------------------------------
# Rust output
# ---------------------------------------------------------------------------------------------

def fmt_f64(v):
    s = repr(float(v))               # shortest string that round-trips; Rust parses it exactly
    assert "inf" not in s and "nan" not in s
    return s


def rs_list(values, fmt=str, per_line=8, indent="        "):
    items = [fmt(v) for v in values]
    if len(items) <= per_line:
        return "[" + ", ".join(items) + "]"
    lines = [indent + ", ".join(items[i:i + per_line]) + "," for i in range(0, len(items), per_line)]
    return "[\n" + "\n".join(lines) + "\n" + indent[:-4] + "]"


def span_rs(mode):
    return {"full": "Span::Full", "same": "Span::Same", "valid": "Span::Valid"}[mode]


def op_rs(op):
    return {"convolve": "Op::Convolve", "correlate": "Op::Correlate"}[op]


def main():
    version = check_numpy_version()
    here = os.path.dirname(os.path.abspath(__file__))
    # --out DIR: write elsewhere (tests/vectors/compare.py regenerates into a temporary folder).
    out_dir = sys.argv[sys.argv.index("--out") + 1] if "--out" in sys.argv else here
    out_path = os.path.join(out_dir, "numpy_convolve.rs")

    o = []
    w = o.append
    w("// @generated by tests/vectors/generate.py with numpy " + version + " — do not edit by hand;")
    w("// rerun `python3 tests/vectors/generate.py` instead.")
    w("//")
    w("// Every input vector here is INVENTED for this test (hand-picked edge values and a fixed")
    w("// LCG); every expected output is numpy " + version + " numpy.convolve / numpy.correlate on")
    w("// those inputs, or exact Python integer arithmetic on the raw Q15/Q31 codes (see the")
    w("// script for the rounding rules). Included by tests/numpy_vectors.rs.")
    w("")
    w(f'pub const NUMPY_VERSION: &str = "{version}";')
    w("")

    def const_array(name, ty, values, fmt=str):
        w(f"pub const {name}: [{ty}; {len(values)}] = {rs_list(values, fmt, indent='    ')};")

    for n, x in Q15_SIGNALS.items():
        const_array(f"Q15_X{n}", "i16", x)
    for k, h in Q15_KERNELS.items():
        const_array(f"Q15_H{k}", "i16", h)
    for n, x in Q31_SIGNALS.items():
        const_array(f"Q31_X{n}", "i32", x)
    for k, h in Q31_KERNELS.items():
        const_array(f"Q31_H{k}", "i32", h)
    for n, x in F64_SIGNALS.items():
        const_array(f"F64_X{n}", "f64", x, fmt_f64)
    for k, h in F64_KERNELS.items():
        const_array(f"F64_H{k}", "f64", h, fmt_f64)
    w("")

    # Float cases.
    w("pub const F64_CASES: &[FloatCase] = &[")
    for n, k in PAIRS:
        x, h = F64_SIGNALS[n], F64_KERNELS[k]
        for op in OPS:
            fn = np.convolve if op == "convolve" else np.correlate
            for mode in MODES:
                y = fn(np.array(x, dtype=np.float64), np.array(h, dtype=np.float64), mode=mode)
                # sum |h||x| at the same output positions, for the error bound in the test.
                y_abs = fn(np.abs(np.array(x)), np.abs(np.array(h)), mode=mode)
                assert y.dtype == np.float64 and y_abs.shape == y.shape
                w("    FloatCase {")
                w(f'        name: "f64 {op} {mode} L={n} K={k}",')
                w(f"        op: {op_rs(op)},")
                w(f"        span: {span_rs(mode)},")
                w(f"        x: &F64_X{n},")
                w(f"        h: &F64_H{k},")
                w(f"        y: &{rs_list(y, fmt_f64, 4, '            ')},")
                w(f"        y_abs: &{rs_list(y_abs, fmt_f64, 4, '            ')},")
                w("    },")
    w("];")
    w("")

    stats = {}

    def int_cases(label, ty, signals, kernels, frac, lo, hi):
        ties = sats = 0
        w(f"pub const {label}_CASES: &[IntCase<{ty}>] = &[")
        for n, k in PAIRS:
            x, h = signals[n], kernels[k]
            assert fits_i64(h, lo, hi), (label, k)
            for op in OPS:
                for mode in MODES:
                    sums = exact_sums(op, mode, x, h)
                    assert all(-(2**63) <= s < 2**63 for s in sums)
                    res = rounded(sums, frac, lo, hi)
                    ties += sum(1 for s in sums if s % 2**frac == 2**(frac - 1))
                    sats += res["half_up"][1]
                    w("    IntCase {")
                    w(f'        name: "{label} {op} {mode} L={n} K={k}",')
                    w(f"        op: {op_rs(op)},")
                    w(f"        span: {span_rs(mode)},")
                    w(f"        x: &{label}_X{n},")
                    w(f"        h: &{label}_H{k},")
                    w(f"        acc: &{rs_list(sums, str, 6, '            ')},")
                    for r in ROUNDINGS:
                        out, nsat = res[r]
                        w(f"        {r}: Rounded {{")
                        w(f"            out: &{rs_list(out, str, 8, '                ')},")
                        w(f"            saturated: {nsat},")
                        w("        },")
                    w("    },")
        w("];")
        w("")
        stats[label] = (ties, sats)
        # The vectors must exercise what they claim to.
        assert ties >= 10 and sats >= 10, (label, ties, sats)

    int_cases("Q15", "i16", Q15_SIGNALS, Q15_KERNELS, 15, Q15_MIN, Q15_MAX)
    int_cases("Q31", "i32", Q31_SIGNALS, Q31_KERNELS, 31, Q31_MIN, Q31_MAX)

    # Accumulator admission for Q31 kernels: (kernel, fits) decided above with exact integers.
    assert not fits_i64(Q31_REJECTED, Q31_MIN, Q31_MAX)
    w("/// Q31 kernels and whether every full-range input keeps the exact sum inside i64.")
    w("pub const Q31_ADMISSION: &[(&[i32], bool)] = &[")
    for h in [Q31_KERNELS[k] for k in sorted(Q31_KERNELS)] + Q31_BOUNDARY + [Q31_REJECTED]:
        w(f"    (&{rs_list(h, str, 8, '        ')}, {str(fits_i64(h, Q31_MIN, Q31_MAX)).lower()}),")
    w("];")
    w("")
    const_array("Q31_REJECTED", "i32", Q31_REJECTED)
    w("")

    # Streaming.
    const_array("STREAM_Q15_TAPS", "i16", STREAM_Q15_TAPS)
    const_array("STREAM_Q15_X", "i16", STREAM_Q15_X)
    full = [int(v) for v in np.convolve(np.array(STREAM_Q15_X, dtype=object),
                                        np.array(STREAM_Q15_TAPS, dtype=object), mode="full")]
    assert full == python_full_convolution(STREAM_Q15_X, STREAM_Q15_TAPS)
    res = rounded(full[:STREAM_LEN], 15, Q15_MIN, Q15_MAX)
    assert res["half_up"][1] > 0
    w("pub const STREAM_Q15_Y: [Rounded<i16>; 3] = [")
    for r in ROUNDINGS:
        out, nsat = res[r]
        w(f"    // {r}")
        w(f"    Rounded {{ out: &{rs_list(out, str, 10, '        ')}, saturated: {nsat} }},")
    w("];")
    const_array("STREAM_F64_TAPS", "f64", STREAM_F64_TAPS, fmt_f64)
    const_array("STREAM_F64_X", "f64", STREAM_F64_X, fmt_f64)
    y = np.convolve(np.array(STREAM_F64_X), np.array(STREAM_F64_TAPS), mode="full")[:STREAM_LEN]
    const_array("STREAM_F64_Y", "f64", list(y), fmt_f64)
    y_abs = np.convolve(np.abs(np.array(STREAM_F64_X)), np.abs(np.array(STREAM_F64_TAPS)),
                        mode="full")[:STREAM_LEN]
    const_array("STREAM_F64_Y_ABS", "f64", list(y_abs), fmt_f64)

    with open(out_path, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(o) + "\n")
    print(f"wrote {out_path} with numpy {version}: "
          f"Q15 ties/saturations (half-up) {stats['Q15']}, Q31 {stats['Q31']}")


if __name__ == "__main__":
    main()
