#!/usr/bin/env python3
"""Counts the instructions an emulated Cortex-M core executes inside each measured region.

Reads a QEMU execution trace on stdin (`-singlestep -d exec,nochain`: one line per executed
instruction, the guest PC in the second field of the bracket) and the ELF symbol table (via
`readelf`). A region starts when the PC reaches the entry of a `cost_*` function and ends when
control is back in `bench_main`, so instructions of anything the function calls are included.

Usage: qemu-system-arm ... -singlestep -d exec,nochain 2>&1 >stdout.txt | count.py ELF BOARD [STDOUT [PROCESS]]
Prints a Markdown table: instructions per tap per output for block and per-sample calls, the
code size of every function the region ran, and the filter state size that the firmware printed
over semihosting (lines "state TYPE TAPS BYTES" in STDOUT); then the stack bytes of each
streaming call (lines "stack TYPE TAPS PUSH IN_PLACE_64 IN_PLACE_256" in STDOUT, and
"process-stack TYPE TAPS BYTES" in PROCESS, the output of the build with `process-stack`).

count.py --compare COMMITTED MEASURED: the regression guard behind `measure --check`.
"""

import bisect
import re
import subprocess
import sys


LABELS = {"i16": "Q15 (i16), i64 acc", "acc32": "Q15, proven i32 acc",
          "i32": "Q31 (i32)", "f32": "f32",
          "linphase": "Q15 linear-phase, i64 acc",
          "dec4": "Q15 decimator by 4 (polyphase), i64 acc",
          "i16upto": "Q15 (i16), i64 acc, run-time taps in a capacity of 128",
          "acc32upto": "Q15, run-time checked i32 acc, run-time taps in a capacity of 128",
          "i32upto": "Q31 (i32), run-time taps in a capacity of 128",
          "f32upto": "f32, run-time taps in a capacity of 128"}
# The instruction figures the regression guard compares (the columns of count.py's table).
INSTRUCTION_COLUMNS = ["block 64: instr/tap/output", "block 256", "per sample (call included)"]
INSTRUCTION_SLACK = 0.02
STACK_SLACK_BYTES = 16
# Must equal STACK_PAINT_BYTES in src/bin/cost.rs: a figure this large means the painted area
# was too small to see the call's real depth.
STACK_PAINT_BYTES = 2048


def symbols(elf):
    out = subprocess.run(["readelf", "-sW", elf], check=True, capture_output=True, text=True).stdout
    table = {}
    for line in out.splitlines():
        parts = line.split()
        if len(parts) >= 8 and parts[3] == "FUNC":
            addr = int(parts[1], 16) & ~1  # Thumb symbols carry bit 0
            table[parts[7]] = (addr, addr + int(parts[2]))
    return table


def sequence(elf, pattern):
    """Instructions of every call into a function whose name matches `pattern`, in call order
    (a region ends when control is back in `bench_main`)."""
    table = symbols(elf)
    entries = {addr for name, (addr, _) in table.items() if re.search(pattern, name)}
    caller = table["bench_main"]
    counts = []
    inside = False
    pc_field = re.compile(rb"\[[0-9a-f]+/([0-9a-f]+)/")
    for line in sys.stdin.buffer:
        m = pc_field.search(line)
        if not m:
            continue
        pc = int(m.group(1), 16)
        if not inside:
            if pc in entries:
                inside = True
                counts.append(1)
        elif caller[0] <= pc < caller[1]:
            inside = False
        else:
            counts[-1] += 1
    return counts


def main():
    if len(sys.argv) == 4 and sys.argv[1] == "--compare":
        sys.exit(compare(sys.argv[2], sys.argv[3]))
    if len(sys.argv) > 2 and sys.argv[2] == "--sequence":
        print(" ".join(str(c) for c in sequence(sys.argv[1], sys.argv[3])))
        return
    elf, board = sys.argv[1], sys.argv[2]
    states_file = sys.argv[3] if len(sys.argv) > 3 else None
    table = symbols(elf)
    regions = {addr: name for name, (addr, _) in table.items() if name.startswith("cost_")}
    caller = table["bench_main"]
    starts = sorted((a, e, n) for n, (a, e) in table.items() if e > a)
    first = [a for a, _, _ in starts]
    counts = {name: 0 for name in regions.values()}
    calls = {name: 0 for name in regions.values()}
    visited = {name: set() for name in regions.values()}
    current = None
    last_fn = None
    pc_field = re.compile(rb"\[[0-9a-f]+/([0-9a-f]+)/")
    for line in sys.stdin.buffer:
        m = pc_field.search(line)
        if not m:
            continue
        pc = int(m.group(1), 16)
        if current is None:
            name = regions.get(pc)
            if name is None:
                continue
            current = name
            calls[name] += 1
        elif caller[0] <= pc < caller[1]:
            current = None
            continue
        counts[current] += 1
        # Which function this instruction belongs to, for the code-size column.
        if last_fn is None or not (last_fn[0] <= pc < last_fn[1]):
            i = bisect.bisect_right(first, pc) - 1
            last_fn = starts[i] if i >= 0 and pc < starts[i][1] else None
        if last_fn is not None:
            visited[current].add(last_fn)

    states = {}
    stacks = {}
    processes = {}
    if states_file:
        for line in open(states_file, encoding="utf-8"):
            parts = line.split()
            if len(parts) == 4 and parts[0] == "state":
                states[(parts[1], parts[2])] = parts[3]
            if len(parts) == 6 and parts[0] == "stack":
                stacks[(parts[1], int(parts[2]))] = [int(p) for p in parts[3:]]
    # `process` figures come from a second run of the firmware built with `process-stack`.
    if len(sys.argv) > 4:
        for line in open(sys.argv[4], encoding="utf-8"):
            parts = line.split()
            if len(parts) == 4 and parts[0] == "process-stack":
                processes[(parts[1], int(parts[2]))] = int(parts[3])

    print(f"### {board}\n")
    print("| samples | taps | block 64: instr/tap/output | block 256 | per sample (call included) "
          "| per-sample ÷ block 64 | .text bytes run | filter RAM bytes |")
    print("|---|---|---|---|---|---|---|---|")
    rows = {}
    for name in regions.values():
        _, ty, taps, mode = name.split("_")
        rows.setdefault((ty, int(taps)), {})[mode] = name
    order = ["i16", "i16upto", "acc32", "acc32upto", "i32", "i32upto", "f32", "f32upto",
             "linphase", "dec4"]
    keys = sorted(rows, key=lambda k: (order.index(k[0]), k[1]))
    for (ty, taps) in keys:
        modes = rows[(ty, taps)]
        per = {}
        # A decimator by 4 gives one output per 4 inputs (per-sample calls: a quarter each).
        factor = 4 if ty == "dec4" else 1
        for mode, outputs in (("block64", 64), ("block256", 256), ("sample", 1)):
            name = modes[mode]
            per[mode] = counts[name] * factor / (calls[name] * outputs * taps)
        text = sum(e - a for (a, e, _) in set().union(*(visited[m] for m in modes.values())))
        label = LABELS[ty]
        print(f"| {label} | {taps} | {per['block64']:.2f} | {per['block256']:.2f} | "
              f"{per['sample']:.2f} | {per['sample'] / per['block64']:.2f} | {text} | "
              f"{states.get((ty, str(taps)), '?')} |")
    print()
    print(f"### Stack bytes, {board}\n")
    print("| samples | taps | push | process (64) | process_in_place 64 | process_in_place 256 |")
    print("|---|---|---|---|---|---|")
    for (ty, taps) in keys:
        figures = stacks.get((ty, taps))
        process = processes.get((ty, taps))
        if figures is None or process is None:
            sys.exit(f"count.py: the firmware printed no stack figures for {ty} {taps}")
        figures.insert(1, process)
        if max(figures) >= STACK_PAINT_BYTES:
            sys.exit(f"count.py: {ty} {taps} reached the bottom of the painted stack area")
        print(f"| {LABELS[ty]} | {taps} | " + " | ".join(str(f) for f in figures) + " |")
    print()


def tables(path):
    """The figures of every table row in a COSTS.md: {(section, label, taps): {column: value}}."""
    rows = {}
    section = None
    header = None
    for line in open(path, encoding="utf-8"):
        line = line.strip()
        if line.startswith("### "):
            section, header = line[4:], None
        elif line.startswith("|") and section is not None:
            cells = [c.strip() for c in line.strip("|").split("|")]
            if header is None:
                header = cells
            elif not cells[0].startswith("---"):
                rows[(section, cells[0], cells[1])] = dict(zip(header[2:], cells[2:]))
    return rows


def compare(committed, measured):
    """Exit status 1 if a committed row is gone, an instruction figure grew by more than 2 % or
    a stack figure by more than 16 bytes; improvements pass with a note to regenerate."""
    old, new = tables(committed), tables(measured)
    failures, better = [], []
    for key, columns in old.items():
        section, label, taps = key
        name = f"{section}: {label}, {taps} taps"
        if key not in new:
            failures.append(f"{name}: row disappeared")
            continue
        stack = section.startswith("Stack bytes")
        for column in INSTRUCTION_COLUMNS if not stack else columns:
            if column not in columns:
                continue
            if column not in new[key]:
                failures.append(f"{name}, {column}: column disappeared")
                continue
            was, now = float(columns[column]), float(new[key][column])
            change = f"{columns[column]} → {new[key][column]}"
            if stack:
                change += f" bytes ({now - was:+.0f})"
                worse = now > was + STACK_SLACK_BYTES
            else:
                change += f" instr/tap ({(now - was) / was * 100:+.1f} %)"
                worse = now > was * (1 + INSTRUCTION_SLACK)
            if worse:
                failures.append(f"{name}, {column}: {change}")
            elif now < was:
                better.append(f"{name}, {column}: {change}")
    added = [k for k in new if k not in old]
    for line in better:
        print(f"better: {line}")
    for section, label, taps in added:
        print(f"new row: {section}: {label}, {taps} taps")
    for line in failures:
        print(f"WORSE: {line}")
    if failures:
        print(f"{len(failures)} figure(s) worse than {committed} allows "
              f"(instructions +{INSTRUCTION_SLACK * 100:.0f} %, stack +{STACK_SLACK_BYTES} bytes)")
        return 1
    if better or added:
        print(f"no figure worse; regenerate {committed} with examples/qemu/measure "
              "to record the changes above")
    else:
        print(f"every figure within the allowance of {committed}")
    return 0


if __name__ == "__main__":
    main()
