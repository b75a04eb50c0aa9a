#!/usr/bin/env python3
"""Check that the committed generated vectors are still what their generators make, as numbers.

Regenerates every generated file into a temporary folder and compares it with the committed one
token by token:

  * every token that is not a number (names, types, punctuation, strings, comments) must be
    identical, so a renamed, added, dropped or resized vector fails, and so does a changed count
    (an array length `[i16; 17]` is an integer token);
  * integer literals must be identical (raw Q15/Q31 codes, exact sums, counts, ADC codes);
  * floating-point literals may differ by at most a stated number of ulps of the largest
    magnitude in their own vector (see TOLERANCE_ULPS for the reasons per file).

Why numbers and not text: numpy and scipy pick SIMD kernels at run time by CPU feature (numpy's
dispatch) and call a BLAS/LAPACK whose kernels depend on the CPU too (OpenBLAS' core type). The
same inputs then give results that differ in the last bits from one machine to another: sums of
products taken in another order, a least-squares solve through another blocking. Those
differences are real and harmless; a changed generator, input or version is not.

Usage: python3 tests/vectors/compare.py [--keep DIR] [--self-test]
  --keep DIR    regenerate into DIR (kept) instead of a temporary folder
  --self-test   also show that the check can fail: in a copy of each committed file, move the
                float with the widest tolerance by 1e-9, an integer (inside a vector where there is one) by 1, and
                rename one name; each planted copy must be refused
Exit status 0 when every file matches within its tolerance, 1 otherwise.
"""

import math
import os
import re
import subprocess
import sys
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))

# (generator script, file it writes, committed copy), paths from the repository root.
GENERATED = [
    ("tests/vectors/generate.py", "numpy_convolve.rs", "tests/vectors/numpy_convolve.rs"),
    ("tests/vectors/generate_scipy.py", "scipy_design.rs", "tests/vectors/scipy_design.rs"),
    ("examples/tool/make_capture.py", "silo_capture.csv", "examples/tool/silo_capture.csv"),
]

# Allowed difference of a float, in ulps of the largest |value| of the vector it belongs to.
#
# numpy_convolve.rs: each output is a sum of at most 31 products (the longest kernel). Summed in
#   another order, as another SIMD width does, the result moves by at most about one rounding
#   error per partial sum, each at most half an ulp of the largest partial sum; the partial sums
#   here stay within a small factor of max|y| (the |h||x| sums stored beside them are at most 6
#   times max|y|). 64 ulps covers that with room, and is still about 1e-14 relative: far finer
#   than any check the tests make with these vectors. Seen between two x86_64 machines: 3 ulps.
# scipy_design.rs: windows, firwin, freqz and the Kaiser formulas are a few rounded operations
#   per value, and remez's exchange converges to the same extremal set; 64 ulps as above (seen:
#   3 ulps). Savitzky-Golay rows are least-squares solves (LAPACK through OpenBLAS) and get a
#   tolerance of their own, see savgol_tolerance().
# silo_capture.csv: time stamps are n/1000 printed to three decimals and codes are integers,
#   the same on every machine; 0 ulps.
TOLERANCE_ULPS = {
    "numpy_convolve.rs": 64,
    "scipy_design.rs": 64,
    "silo_capture.csv": 0,
}


def savgol_tolerance(window, order, coefficients):
    """Allowed absolute difference for one row of scipy.signal.savgol_coeffs(window, order).

    scipy solves the (order+1) x window Vandermonde system A c = e_d by least squares. A
    backward-stable solve has a relative forward error of about kappa_2(A) * eps (Higham,
    Accuracy and Stability of Numerical Algorithms, 2nd ed., 2002, ch. 20, for a consistent
    system), and two LAPACK builds may each be that far from the exact answer and on opposite
    sides: 4 * kappa_2(A) * eps * ||c||_2. For 25 points, order 6, kappa is 2.3e6 and the
    tolerance about 5e-10 relative; seen between two x86_64 machines: 1e-11 absolute there.
    kappa of A is computed here with numpy.linalg.cond on the same matrix scipy builds.
    """
    import numpy as np  # only the scipy file needs it; the capture check runs without numpy

    half = window // 2
    x = np.arange(-half, window - half, dtype=np.float64)
    a = x ** np.arange(order + 1)[:, None]
    norm = math.sqrt(sum(c * c for c in coefficients))
    return 4.0 * float(np.linalg.cond(a)) * sys.float_info.epsilon * norm


TOKEN = re.compile(
    r"""(?P<string>"(?:[^"\\]|\\.)*")
      | (?P<comment>//[^\n]*)
      | (?P<word>[A-Za-z_][A-Za-z0-9_]*)
      | (?P<number>-?[0-9]+(?:\.[0-9]*)?(?:[eE][+-]?[0-9]+)?)
      | (?P<space>\s+)
      | (?P<other>.)""",
    re.VERBOSE | re.DOTALL,
)


class Token:
    __slots__ = ("kind", "text", "line", "group")

    def __init__(self, kind, text, line, group):
        self.kind, self.text, self.line, self.group = kind, text, line, group


def tokens(text):
    """Tokens with their line and, for numbers, the vector they belong to.

    A number's vector is the innermost [...] around it (with the column, when it sits in a tuple
    inside that list, so a table of (frequency, gain) pairs scales each column by itself). A
    number in a struct field or at the top level is a vector of its own.
    """
    out = []
    stack = []  # (bracket, id, comma count)
    line = 1
    next_id = 0
    for m in TOKEN.finditer(text):
        kind = m.lastgroup
        s = m.group()
        if kind == "space":
            line += s.count("\n")
            continue
        group = None
        if kind == "number":
            group = ("alone", next_id)
            column = None
            for bracket, ident, commas in reversed(stack):
                if bracket == "(" and column is None:
                    column = commas
                    continue
                if bracket == "[":
                    group = (ident, column)
                break
        if kind == "other":
            if s in "[({":
                next_id += 1
                stack.append([s, next_id, 0])
            elif s in "])}" and stack:
                stack.pop()
            elif s == "," and stack:
                stack[-1][2] += 1
        next_id += 1
        out.append(Token(kind, s, line, group))
    return out


def is_integer(text):
    return not any(c in text for c in ".eE")


def tolerances(name, committed):
    """Allowed absolute difference per vector, from the committed tokens."""
    scale = {}
    for t in committed:
        if t.kind == "number" and not is_integer(t.text):
            scale[t.group] = max(scale.get(t.group, 0.0), abs(float(t.text)))
    tol = {g: TOLERANCE_ULPS[name] * math.ulp(m) for g, m in scale.items()}
    # Savitzky-Golay rows: `SavgolCase { len: L, order: P, slope: .., taps: &[ ... ] }`, and
    # `SavgolDerivativeCase { len: L, order: P, derivative: d, spacing: D, taps: &[ ... ] }`:
    # the same least-squares solve; scipy then multiplies by d!/D**d, one more rounding relative
    # to the row, which the tolerance follows because it scales with ||c||_2.
    fields, pending = {}, None
    for i, t in enumerate(committed):
        if t.kind == "word" and t.text in ("SavgolCase", "SavgolDerivativeCase"):
            fields, pending = {}, True
        elif pending and t.kind == "word" and t.text in ("len", "order"):
            fields[t.text] = int(committed[i + 2].text)
        elif pending and t.kind == "number" and t.group[0] != "alone" and len(fields) == 2:
            row = [float(u.text) for u in committed if u.kind == "number" and u.group == t.group]
            tol[t.group] = max(tol[t.group], savgol_tolerance(fields["len"], fields["order"], row))
            pending = None
    return tol


def compare(name, committed_text, fresh_text):
    """Returns (ok, report lines)."""
    a, b = tokens(committed_text), tokens(fresh_text)
    if len(a) != len(b):
        return False, [f"{name}: {len(a)} tokens committed, {len(b)} regenerated: "
                       "a vector, name or count changed"]
    tol = tolerances(name, a)
    floats = ints = 0
    worst = (0.0, 0.0, None)  # (difference / tolerance, difference, token)
    largest = (0.0, None)  # (difference, token)
    failures = []
    for ta, tb in zip(a, b):
        if ta.kind != tb.kind:
            failures.append(f"line {ta.line}: committed {ta.text!r}, regenerated {tb.text!r}")
            continue
        if ta.kind != "number":
            if ta.text != tb.text:
                failures.append(f"line {ta.line}: committed {ta.text!r}, regenerated {tb.text!r}")
            continue
        if is_integer(ta.text) or is_integer(tb.text):
            ints += 1
            if ta.text != tb.text:
                failures.append(f"line {ta.line}: integer {ta.text} committed, {tb.text} "
                                "regenerated (integers must match exactly)")
            continue
        floats += 1
        diff = abs(float(ta.text) - float(tb.text))
        allowed = tol[ta.group]
        share = diff / allowed if allowed > 0.0 else (math.inf if diff > 0.0 else 0.0)
        if share > worst[0] or worst[2] is None:
            worst = (share, diff, ta)
        if diff > largest[0] or largest[1] is None:
            largest = (diff, ta)
        if diff > allowed:
            failures.append(f"line {ta.line}: float {ta.text} committed, {tb.text} regenerated: "
                            f"{diff:.3g} apart, {allowed:.3g} allowed")
    def at(token):
        return f" (line {token.line})" if token is not None else ""

    report = [f"{name}: {floats} floats, {ints} integers: {'FAIL' if failures else 'ok'}",
              f"  largest float difference {largest[0]:.3g}{at(largest[1])}; closest to its "
              f"tolerance: {worst[1]:.3g}{at(worst[2])}, {worst[0]:.2g} of what it allows",
              f"  tolerance: {TOLERANCE_ULPS[name]} ulps of the vector's largest |value|"
              + ("; Savitzky-Golay rows 4 kappa_2(A) eps ||c||_2" if name == "scipy_design.rs"
                 else "")]
    report += ["  " + f for f in failures[:20]]
    if len(failures) > 20:
        report.append(f"  ... and {len(failures) - 20} more")
    return not failures, report


def planted(name, text):
    """Copies of `text` with one planted change each: (what was planted, changed text)."""
    toks = [(m.start(), m.end(), m.lastgroup) for m in TOKEN.finditer(text)]
    committed = tokens(text)
    numbers = [(span, t) for span, t in zip((x for x in toks if x[2] != "space"), committed)
               if t.kind == "number"]
    tol = tolerances(name, committed)
    out = []
    floats = [(tol[t.group], span, t) for span, t in numbers if not is_integer(t.text)]
    if floats:
        allowed, (lo, hi, _), t = max(floats, key=lambda f: f[0])
        moved = repr(float(t.text) + 1e-9)
        out.append((f"float {t.text} -> {moved} at line {t.line} (tolerance there {allowed:.3g})",
                    text[:lo] + moved + text[hi:]))
    integers = [(span, t) for span, t in numbers if is_integer(t.text)]
    inside = [(span, t) for span, t in integers if t.group[0] != "alone"] or integers
    if inside:
        (lo, hi, _), t = inside[len(inside) // 2]
        out.append((f"integer {t.text} -> {int(t.text) + 1} at line {t.line}",
                    text[:lo] + str(int(t.text) + 1) + text[hi:]))
    words = [(span, t) for span, t in zip((x for x in toks if x[2] != "space"), committed)
             if t.kind == "word"]
    if words:
        (lo, hi, _), t = words[len(words) // 2]
        out.append((f"name {t.text} -> {t.text}_RENAMED at line {t.line}",
                    text[:lo] + t.text + "_RENAMED" + text[hi:]))
    return out


def main():
    args = sys.argv[1:]
    if "--keep" in args:
        out_dir = args[args.index("--keep") + 1]
        os.makedirs(out_dir, exist_ok=True)
        holder = None
    else:
        holder = tempfile.TemporaryDirectory(prefix="tapline-vectors-")
        out_dir = holder.name
    all_ok = True
    for script, produced, committed in GENERATED:
        run = subprocess.run([sys.executable, os.path.join(ROOT, script), "--out", out_dir],
                             capture_output=True, text=True)
        if run.returncode != 0:
            print(f"{script} failed (exit {run.returncode}):\n{run.stdout}{run.stderr}")
            all_ok = False
            continue
        with open(os.path.join(ROOT, committed), encoding="utf-8") as fh:
            old = fh.read()
        with open(os.path.join(out_dir, produced), encoding="utf-8") as fh:
            new = fh.read()
        ok, report = compare(produced, old, new)
        print("\n".join(report))
        all_ok = all_ok and ok
        if "--self-test" in args:
            for what, changed in planted(produced, old):
                refused = not compare(produced, changed, new)[0]
                print(f"  self-test, planted {what}: {'refused' if refused else 'NOT REFUSED'}")
                all_ok = all_ok and refused
    if holder is not None:
        holder.cleanup()
    print("generated vectors: " + ("all match their generators" if all_ok else "MISMATCH"))
    return 0 if all_ok else 1


if __name__ == "__main__":
    sys.exit(main())
