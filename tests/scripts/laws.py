#!/usr/bin/python3
"""Laws as tests: metamorphic checks on seeded random design points.

usage: laws.py BIN SRC [--points N] [--mono M] [--seed S] [--jobs J]

Draws N random valid design points (a demo design with random trees, fan-in,
decoder rate, scratchpad, channels, clock, DMA depth and packing; a small
workload on wren-0.7b or meadowlark-3b cut to 1 or 2 layers), runs each once
(one process per simulation: SystemC elaborates once per process) and checks
on its run JSON:

 1. No op beats any ceiling: every layers[] entry and every phase has
    cycles >= bound_cycles, the cycles of its binding resource at peak
    (docs/engine.md "Every resource is a ceiling": the roofline, Williams et
    al. 2009, for DRAM bandwidth; Little's law, Little 1961, for request
    concurrency; each unit's own peak rate for the rest).
 2. Stalls sum: busy + dram_wait + sram_conflict + vector_wait + idle equals
    totals.cycles exactly (an accounting identity).
 3. Energy sums: the energy components (arithmetic, sram, dram, decoder,
    leakage) and the phases' joules each add up to totals.energy_joules
    within 1e-9 relative (accounting identity; the tolerance is float rounding).

For the first M of those points (a seeded subset: the points are independent
draws, so the first M are as random as any M) it also runs five variants and
checks law 4, monotonicity (common practice for metamorphic testing of
performance models: more of a resource never hurts): doubling DRAM channels,
trees, decoder bytes/cycle or scratchpad, or a 25% faster core clock, never
lowers tokens/s (the decode phase's, else the total) by more than 0.5%.

A draw the loader rejects (exit 2 or 3) or that does not fit (exit 4: a tile
larger than the scratchpad, or a workload larger than DRAM) is redrawn, not
counted. Known exceptions (a law that fails through a modelling artefact we
report rather than fix here) are marked in check_report and
check_point with the artefact named (CROSS_PHASE); they are printed but do not fail the test.
"""

import argparse
import concurrent.futures
import json
import os
import random
import shlex
import subprocess
import sys
import tempfile

# Demo designs and the DRAM channel counts that make sense for their preset.
DESIGNS = {
    "heron-edge-ddr4": (1, 4),
    "finch-phone-lpddr5": (2, 8),
    "osprey-card-hbm2e": (4, 16),
    "ideal-memory": None,  # the ideal preset has one fixed bandwidth: no channels
}
MODELS = ["wren-0.7b", "meadowlark-3b"]

# Monotonicity knobs: name -> function(base point) -> the --set override.
KNOBS = {
    "channels": lambda p: ("arch.dram.channels", p["channels"] * 2),
    "trees": lambda p: ("arch.array.trees", p["trees"] * 2),
    "decoder": lambda p: ("arch.packing.decoder_bytes_per_cycle", p["decoder"] * 2),
    "sram": lambda p: ("arch.sram.capacity_kib", p["sram"] * 2),
    "clock": lambda p: ("arch.clock.core_mhz", round(p["mhz"] * 1.25, 3)),
}
MONO_TOLERANCE = 0.005
ENERGY_TOLERANCE = 1e-9
STALLS = ["busy", "dram_wait", "sram_conflict", "vector_wait", "idle"]
ENERGY_PARTS = ["arithmetic", "sram", "dram", "decoder", "leakage"]

REDRAW_CODES = {2, 3, 4}
MAX_ATTEMPTS = 30


def draw(seed, index, attempt):
    """One random design point; a function of (seed, index, attempt) only."""
    rng = random.Random(f"laws-{seed}-{index}-{attempt}")
    design = rng.choice(sorted(DESIGNS))
    channels = DESIGNS[design]
    prefill = rng.choice([0, rng.randint(1, 64)])
    return {
        "design": design,
        "model": rng.choice(MODELS),
        "layers": rng.randint(1, 2),
        "trees": 2 ** rng.randint(4, 9),
        "fan_in": 2 ** rng.randint(5, 8),
        "decoder": rng.randint(16, 1024),
        "sram": 256 * rng.randint(1, 64),  # whole stripes of every demo design
        "channels": rng.randint(*channels) if channels else None,
        "mhz": round(rng.uniform(600, 1600), 1),
        "outstanding": rng.randint(16, 512),
        "packing": rng.choice(["base3", "two_bit"]),
        "prefill": prefill,
        "decode": rng.randint(1, 3),
        "context": rng.randint(0, 512),
        "batch": rng.randint(1, 8),
    }


def command(binary, point, extra=()):
    sets = [
        ("model.layers", point["layers"]),
        ("arch.array.trees", point["trees"]),
        ("arch.array.fan_in", point["fan_in"]),
        ("arch.packing.decoder_bytes_per_cycle", point["decoder"]),
        ("arch.packing.format", point["packing"]),
        ("arch.sram.capacity_kib", point["sram"]),
        ("arch.clock.core_mhz", point["mhz"]),
        ("arch.dma.max_outstanding", point["outstanding"]),
    ]
    if point["channels"] is not None:
        sets.append(("arch.dram.channels", point["channels"]))
    sets.extend(extra)  # a later --set of the same key wins
    cmd = [binary, "run", "--model", f"models/{point['model']}.yaml",
           "--arch", f"configs/{point['design']}.yaml"]
    for key, value in sets:
        cmd += ["--set", f"{key}={value}"]
    cmd += ["--prefill", str(point["prefill"]), "--decode", str(point["decode"]),
            "--context", str(point["context"]), "--batch", str(point["batch"])]
    return cmd


def run(cmd, src, out):
    """Runs one simulation; returns (exit code, report or None, stderr)."""
    fd, path = tempfile.mkstemp(suffix=".json", dir=out)
    os.close(fd)
    proc = subprocess.run(cmd + ["--json", path, "-q"], cwd=src,
                          capture_output=True, text=True)
    report = None
    if proc.returncode == 0:
        with open(path) as f:
            report = json.load(f)
        os.remove(path)
    return proc.returncode, report, proc.stderr.strip()


def fits(cmd, src, out):
    """Asks `inspect` whether the run's workload can run on its design.

    Used under a sanitized binary only: there a run that throws inside a
    SystemC thread (a tile that cannot fit) gives a false ASan report
    (google/sanitizers#189, see scripts/sanitize-test) instead of exit 4.
    """
    fd, path = tempfile.mkstemp(suffix=".json", dir=out)
    os.close(fd)
    proc = subprocess.run([cmd[0], "inspect"] + cmd[2:] + ["--json", path],
                          cwd=src, capture_output=True, text=True)
    ok = False
    if proc.returncode == 0:
        with open(path) as f:
            ok = not json.load(f)["bounds"].get("unavailable")
    os.remove(path)
    return ok


def shown(cmd, src):
    return f"(cd {shlex.quote(src)} && {shlex.join(cmd)} --json OUT.json -q)"


def tokens_per_second(report):
    for phase in report["phases"]:
        if phase["name"] == "decode":
            return phase["tokens_per_second"]
    return report["totals"]["tokens_per_second"]


# Known exceptions: modelling artefacts reported, not fixed here. A failure is
# marked known only when the weaker law the artefact still allows holds. (A
# second one, the concurrency bound priced at the read latency so that
# write-heavy ops beat it, was fixed: the bound now uses the shortest request
# latency, a row-hit write.)
CROSS_PHASE = ("the DMA prefetches the decode phase's first tiles while the prefill phase "
               "still runs: the decode phase's bound counts those bytes, its cycles do not")


def whole_run_dram_bound_holds(report):
    """Law 1 for the run as one phase: total cycles >= all DRAM bytes at peak."""
    per_cycle = report["arch"]["dram_peak_bytes_per_second"] / (report["design"]["core_mhz"] * 1e6)
    dram_bytes = sum(layer["dram_bytes"] for layer in report["layers"])
    return report["totals"]["cycles"] >= dram_bytes / per_cycle * (1 - 1e-9)


def beaten(entry):
    return entry["cycles"] < entry["bound_cycles"] * (1 - 1e-12)


def check_report(report):
    """Laws 1-3 on one run JSON; returns a list of (law, message, artefact or None)."""
    bad = []
    names = [phase["name"] for phase in report["phases"]]
    entries = [(f"layers[{i}] {e['phase']}/{e['name']}", e, False)
               for i, e in enumerate(report["layers"])]
    entries += [(f"phase {e['name']}", e, True) for e in report["phases"]]
    for label, e, is_phase in entries:
        if not beaten(e):
            continue
        artefact = None
        if (is_phase and e["name"] == "decode" and "prefill" in names
              and e["bound_by"] in ("dram_bandwidth", "request_concurrency")
              and whole_run_dram_bound_holds(report)):
            artefact = CROSS_PHASE
        bad.append((1, f"{label}: cycles {e['cycles']} < bound_cycles {e['bound_cycles']} "
                       f"({e['bound_by']})", artefact))
    stalls = report["stalls"]
    total_cycles = report["totals"]["cycles"]
    if sum(stalls[k] for k in STALLS) != total_cycles:
        bad.append((2, f"stalls {[stalls[k] for k in STALLS]} sum to "
                       f"{sum(stalls[k] for k in STALLS)}, totals.cycles {total_cycles}", None))
    joules = report["totals"]["energy_joules"]
    parts = sum(report["energy"][k] for k in ENERGY_PARTS)
    if abs(parts - joules) > ENERGY_TOLERANCE * abs(joules):
        bad.append((3, f"energy components sum to {parts!r}, total {joules!r}", None))
    phases = sum(p["joules"] for p in report["phases"])
    if abs(phases - joules) > ENERGY_TOLERANCE * abs(joules):
        bad.append((3, f"phases' joules sum to {phases!r}, total {joules!r}", None))
    return bad


def record(result, bad, cmd, src):
    for law, message, artefact in bad:
        if artefact:
            result["known"].append(
                (law, f"{message}\n  {shown(cmd, src)}\n  known exception: {artefact}"))
        else:
            result["failures"].append((law, f"{message}\n  {shown(cmd, src)}"))


def check_point(args, index, with_mono, out):
    """Draws point `index` until valid, checks it; returns a result dict."""
    redraws = 0
    for attempt in range(MAX_ATTEMPTS):
        point = draw(args.seed, index, attempt)
        cmd = command(args.binary, point)
        if args.prefilter and not fits(cmd, args.src, out):
            redraws += 1
            continue
        code, report, err = run(cmd, args.src, out)
        if code in REDRAW_CODES:
            redraws += 1
            continue
        break
    else:
        return {"index": index, "fatal": f"no valid draw in {MAX_ATTEMPTS} attempts"}
    result = {"index": index, "redraws": redraws, "runs": 1, "failures": [],
              "known": [], "ratios": {}, "variant_rejected": []}
    if code != 0:
        result["failures"].append((0, f"run exited {code}: {err[-300:]}\n  {shown(cmd, args.src)}"))
        return result
    record(result, check_report(report), cmd, args.src)
    if not with_mono:
        return result
    base = tokens_per_second(report)
    for knob, change in KNOBS.items():
        if knob == "channels" and point["channels"] is None:
            continue
        vcmd = command(args.binary, point, [change(point)])
        if args.prefilter and not fits(vcmd, args.src, out):
            result["variant_rejected"].append(
                f"{knob}: inspect says the variant cannot run\n  {shown(vcmd, args.src)}")
            continue
        vcode, vreport, verr = run(vcmd, args.src, out)
        result["runs"] += 1
        if vcode != 0:
            result["variant_rejected"].append(
                f"{knob}: variant exited {vcode}: {verr[-200:]}\n  {shown(vcmd, args.src)}")
            continue
        record(result, check_report(vreport), vcmd, args.src)
        ratio = tokens_per_second(vreport) / base
        result["ratios"][knob] = ratio
        if ratio < 1 - MONO_TOLERANCE:
            entry = (4, f"{knob}: tokens/s {base:.6g} -> {tokens_per_second(vreport):.6g} "
                        f"(ratio {ratio:.4f})\n  base:    {shown(cmd, args.src)}\n"
                        f"  variant: {shown(vcmd, args.src)}")
            # Decode tokens/s shifts with the phase boundary (CROSS_PHASE): known
            # only when a prefill precedes and the whole run is not slower.
            artefact = None
            base_s = report["totals"]["cycles"] / report["design"]["core_mhz"]
            variant_s = vreport["totals"]["cycles"] / vreport["design"]["core_mhz"]
            if point["prefill"] > 0 and variant_s <= base_s * (1 + MONO_TOLERANCE):
                artefact = CROSS_PHASE
            if artefact:
                result["known"].append((4, entry[1] + f"\n  known exception: {artefact}"))
            else:
                result["failures"].append(entry)
    return result


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("binary")
    parser.add_argument("src")
    parser.add_argument("--points", type=int, default=200)
    parser.add_argument("--mono", type=int, default=40)
    parser.add_argument("--seed", type=int, default=20240611)
    parser.add_argument("--jobs", type=int, default=2)
    parser.add_argument("--prefilter", action="store_true",
                        help="redraw points `inspect` says cannot run (for sanitized binaries)")
    args = parser.parse_args()
    args.binary = os.path.abspath(args.binary)
    args.src = os.path.abspath(args.src)

    with tempfile.TemporaryDirectory() as out, \
            concurrent.futures.ThreadPoolExecutor(args.jobs) as pool:
        futures = [pool.submit(check_point, args, i, i < args.mono, out)
                   for i in range(args.points)]
        results = [f.result() for f in futures]

    failed = 0
    worst = {knob: None for knob in KNOBS}
    laws_failed = set()
    for r in results:
        if "fatal" in r:
            print(f"FAIL point {r['index']}: {r['fatal']}")
            failed += 1
            continue
        for law, message in r["failures"]:
            print(f"FAIL law {law}, point {r['index']}: {message}")
            laws_failed.add(law)
            failed += 1
        for law, message in r["known"]:
            print(f"KNOWN law {law}, point {r['index']}: {message}")
        for message in r["variant_rejected"]:
            print(f"NOTE point {r['index']}: {message}")
        for knob, ratio in r["ratios"].items():
            if worst[knob] is None or ratio < worst[knob]:
                worst[knob] = ratio
    ok = [r for r in results if "fatal" not in r]
    runs = sum(r["runs"] for r in ok)
    redraws = sum(r["redraws"] for r in ok)
    per_law = {}
    for r in ok:
        for law, _ in r["known"]:
            per_law[law] = per_law.get(law, 0) + 1
    known_counts = ", ".join(f"law {law} x{n}" for law, n in sorted(per_law.items()))
    held = ",".join(str(law) for law in (1, 2, 3, 4) if law not in laws_failed)
    ratios = " ".join(f"{k}={v:.4f}" if v is not None else f"{k}=n/a"
                      for k, v in worst.items())
    print(f"laws: {len(ok)} points checked (laws 1-3), {min(args.mono, len(ok))} for "
          f"monotonicity, {runs} runs, {redraws} redraws; laws held: {held or 'none'}; "
          f"worst tokens/s ratio per knob: {ratios}; "
          f"known exceptions: {known_counts or 'none'}")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
