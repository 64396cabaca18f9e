#!/usr/bin/python3
"""Whole-process benchmarks of rtline (docs/performance.md), with the numpy yardstick run in the same invocation.

  1  size, shunt-divider, E96 over 100 ohm..1 Mohm (148 225 pairs), 0..100 C at 0.25 C (401 points), --top 1
  2  the same for shunt-bridge with E192 (591 361 pairs)
  3  budget, 10^6 Monte Carlo trials x 101 temperatures (divider-low)
  4  a JSON Lines batch of 1000 size specs (divider-low, E24, varied R25, B and span)
  5  budget with every cause on, 10^6 trials x 101 temperatures: a cold-chain logger's remote probe
     (leads with tolerance and copper's coefficient over the cable's range, resistor and reference
     coefficients over the board's range, thermistor drift, converter offset, gain and INL, self-heating)
  6  design for one thermistor: every divider topology, E96 over 100 ohm..1 Mohm, -20..60 C at 1 C, the budget
     at 10^4 Monte Carlo trials (99.7 % confidence) with self-heating on a 3.3 V ratiometric drive, the
     firmware table sized (target 1 s)
  7  design over a catalogue of 50 candidate thermistors of our own (catalogue_csv below), otherwise as 6
     (target 10 s)
  8  budget of a bridge through an auto-ranged amplifier with every amplifier cause on (gain error, input
     offset and its drift over the board's range, bias and offset currents), 10^6 trials x 101 temperatures
     (target 1 s)

Each figure is the median wall time (and the median CPU time, all threads) of --runs whole runs of the built program (start-up, parsing, the
continuous optimum, the search and the output included). For 1 and 2 also with --threads 1 (on a machine whose
cores are busy with other work, one thread can be the faster). For 1 and 2 the numpy search (bench/numpy_size.py)
runs here too: both must give the same best pair, and the ratio numpy search time / rtline process time is
printed (numpy's interpreter start-up and imports are not counted, which favours numpy).

Usage: bench.py RTLINE [--runs N] [--only 1,2,4] [--no-numpy]
"""
import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import numpy_size  # noqa: E402

COMMON = ["size", "--r25", "10k", "--beta", "3950", "--span", "0:100", "--step", "0.25", "--range", "100:1M",
          "--top", "1"]
CASES = {
    "1": ("shunt-divider E96", COMMON + ["--circuit", "shunt-divider", "--series", "E96"], 0.100, ("shunt-divider", 96)),
    "2": ("shunt-bridge E192", COMMON + ["--circuit", "shunt-bridge", "--series", "E192"], 1.0, ("shunt-bridge", 192)),
}


def batch_specs(n=1000):
    """n divider-low specs of our own: R25 from 2k2 to 100k, B from 3380 to 4250 K, spans over -40..125 C."""
    r25s = ["2k2", "4k7", "10k", "22k", "47k", "100k"]
    betas = [3380, 3435, 3610, 3950, 3977, 4100, 4250]
    spans = ["-40:0", "-30:5", "-20:60", "0:45", "5:40", "0:100", "20:85", "25:125", "-10:70", "10:50", "30:110"]
    lines = []
    for i in range(n):
        lines.append(json.dumps({"r25": r25s[i % len(r25s)], "beta": betas[(i // 6) % len(betas)],
                                 "span": spans[(i // 42) % len(spans)], "circuit": "divider-low",
                                 "series": "E24", "top": 3}))
    return "\n".join(lines) + "\n"


def catalogue_csv(n=50):
    """n candidate parts of our own for `design --candidates`: R25 from 2k2 to 100k, B from 3380 to 4250 K,
    tolerances of 0.5 to 3 %, dissipation constants of 1 to 3 mW/K (round figures of the usual size, not any
    product's)."""
    r25s = ["2k2", "4k7", "10k", "22k", "47k", "100k"]
    betas = [3380, 3435, 3610, 3950, 3977, 4100, 4250]
    tols = [0.5, 1, 2, 3]
    dissipations = [1, 1.5, 2, 3]
    rows = ["label,r25_ohm,b_k,r25_tol_pct,b_tol_pct,dissipation_mw_per_k"]
    for i in range(n):
        rows.append(f"NTC{i + 1:02d},{r25s[i % len(r25s)]},{betas[(i // 6) % len(betas)]},{tols[i % 4]},"
                    f"{tols[(i // 4) % 4]},{dissipations[(i // 3) % 4]}")
    return "\n".join(rows) + "\n"


DESIGN = ["design", "--span", "-20:60", "--step", "1", "--max-error", "1", "--confidence", "99.7",
          "--adc-bits", "12", "--series", "E96", "--range", "100:1M", "--trials", "10000", "--excitation", "3.3",
          "--adc-ref", "excitation", "--format", "json"]


def run(cmd, stdin=None):
    """Wall time, CPU time (user + system, all threads) and stdout of one run."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    p = subprocess.run(cmd, input=stdin, capture_output=True, text=True)
    elapsed = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    if p.returncode not in (0, 1):
        sys.exit(f"{' '.join(cmd)} failed ({p.returncode}): {p.stderr}")
    return elapsed, cpu, p.stdout


def median_time(cmd, runs, stdin=None):
    """Median wall, min wall, median CPU and the last stdout over `runs` runs."""
    times = []
    cpus = []
    out = ""
    for _ in range(runs):
        t, c, out = run(cmd, stdin)
        times.append(t)
        cpus.append(c)
    return statistics.median(times), min(times), statistics.median(cpus), out


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("rtline")
    ap.add_argument("--runs", type=int, default=11)
    ap.add_argument("--only", default="1,2,3,4,5,6,7,8")
    ap.add_argument("--no-numpy", action="store_true")
    a = ap.parse_args()
    which = a.only.split(",")
    print(f"machine: {os.cpu_count()} cores, {cpu_model()}; load average {os.getloadavg()[0]:.1f}")
    ok = True
    for key in ("1", "2"):
        if key not in which:
            continue
        name, args, target, (circuit, n) = CASES[key]
        med, best, cpu, _ = median_time([a.rtline] + args, a.runs)
        med1, best1, cpu1, _ = median_time([a.rtline] + args + ["--threads", "1"], a.runs)
        _, _, out = run([a.rtline] + args + ["--format", "json"])
        cand = json.loads(out)["candidates"][0]["resistors_ohm"]
        pair = (cand["rp"], cand.get("rs", cand.get("r1")))
        line = (f"{key}  {name}: median {med * 1e3:.1f} ms (min {best * 1e3:.1f}, CPU {cpu * 1e3:.1f}) over {a.runs} runs,"
                f" target {target * 1e3:.0f} ms")
        if med > target:
            line += "  ABOVE TARGET"
        print(line + f"; best pair {pair[0]:g}, {pair[1]:g} ohm")
        print(f"   --threads 1: median {med1 * 1e3:.1f} ms (min {best1 * 1e3:.1f}, CPU {cpu1 * 1e3:.1f})")
        if not a.no_numpy:
            ref = numpy_size.search(circuit, n)
            same = abs(ref["outer_ohm"] - pair[0]) < 1e-6 * pair[0] and abs(ref["inner_ohm"] - pair[1]) < 1e-6 * pair[1]
            ok = ok and same
            print(f"   numpy search {ref['search_s'] * 1e3:.0f} ms, best pair {ref['outer_ohm']:g}, {ref['inner_ohm']:g} ohm"
                  f" ({'same' if same else 'DIFFERENT'}); numpy / rtline = {ref['search_s'] / med:.1f}x")
    if "3" in which:
        # rtline budget, 10^6 trials x 101 temperatures (0..100 C at 1 C), normal, model reading.
        cmd = [a.rtline, "budget", "--r25", "10k", "--beta", "3950", "--span", "0:100", "--circuit", "divider-low",
               "--rs", "10k", "--trials", "1000000", "--format", "json"]
        runs = max(3, a.runs // 2)
        med, best, cpu, out = median_time(cmd, runs)
        trials = json.loads(out)["assumptions"]["trials"] if "assumptions" in out else 1000000
        line = (f"3  budget, {trials} trials x 101 temperatures: median {med * 1e3:.0f} ms (min {best * 1e3:.0f},"
                f" CPU {cpu * 1e3:.0f}) over {runs} runs, target 1000 ms")
        if med > 1.0:
            line += "  ABOVE TARGET"
        print(line)
    if "5" in which:
        cmd = [a.rtline, "budget", "--r25", "10k", "--beta", "3950", "--span", "-40:60", "--circuit", "divider-low",
               "--rs", "10k", "--excitation", "3.3", "--adc-ref", "excitation", "--lead", "5", "--lead-tol", "5",
               "--cable-temp", "-40:30", "--ref-tol", "0.2", "--ref-tc", "50", "--resistor-tol", "0.1",
               "--resistor-tc", "25", "--board-temp", "0:50", "--drift", "0.2", "--adc-bits", "12", "--adc-gain",
               "0.1", "--adc-offset", "1", "--adc-inl", "1", "--dissipation", "1.5", "--trials", "1000000",
               "--format", "json"]
        runs = max(3, a.runs // 2)
        med, best, cpu, _ = median_time(cmd, runs)
        line = (f"5  budget, every cause on, 1000000 trials x 101 temperatures: median {med * 1e3:.0f} ms"
                f" (min {best * 1e3:.0f}, CPU {cpu * 1e3:.0f}) over {runs} runs, target 500 ms")
        if med > 0.5:
            line += "  ABOVE TARGET"
        print(line)
    if "8" in which:
        cmd = [a.rtline, "budget", "--r25", "10k", "--beta", "3950", "--span", "0:100", "--circuit", "bridge",
               "--r1", "10k", "--r2", "10k", "--r3", "10k", "--excitation", "3.3", "--adc-ref", "excitation",
               "--adc-bits", "12", "--auto-range", "--resistor-tol", "0.1", "--board-temp", "10:60",
               "--amp-gain-tol", "0.5", "--amp-offset", "2m", "--amp-offset-drift", "10u", "--amp-bias", "50n",
               "--amp-offset-current", "20n", "--trials", "1000000", "--format", "json"]
        runs = max(3, a.runs // 2)
        med, best, cpu, _ = median_time(cmd, runs)
        line = (f"8  budget, bridge through an amplifier, its causes on, 1000000 trials x 101 temperatures: median"
                f" {med * 1e3:.0f} ms (min {best * 1e3:.0f}, CPU {cpu * 1e3:.0f}) over {runs} runs, target 1000 ms")
        if med > 1.0:
            line += "  ABOVE TARGET"
        print(line)
    if "4" in which:
        specs = batch_specs()
        med, best, cpu, out = median_time([a.rtline, "size", "--jsonl"], a.runs, stdin=specs)
        results = [json.loads(x) for x in out.splitlines()]
        errors = sum(1 for r in results if "error" in r)
        line = (f"4  batch of {len(results)} size specs: median {med * 1e3:.0f} ms (min {best * 1e3:.0f}, CPU {cpu * 1e3:.0f})"
                f" over {a.runs} runs, target 2000 ms")
        if med > 2.0:
            line += "  ABOVE TARGET"
        print(line + f"; {errors} errors")
        ok = ok and len(results) == 1000 and errors == 0
    if "6" in which:
        cmd = [a.rtline] + DESIGN + ["--r25", "10k", "--beta", "3950", "--dissipation", "1.5"]
        med, best, cpu, out = median_time(cmd, a.runs)
        d = json.loads(out)
        line = (f"6  design, one thermistor, every divider, E96, 10^4 trials: median {med * 1e3:.0f} ms"
                f" (min {best * 1e3:.0f}, CPU {cpu * 1e3:.0f}) over {a.runs} runs, target 1000 ms")
        if med > 1.0:
            line += "  ABOVE TARGET"
        print(line + f"; chose {d['circuit']['topology']} {d['circuit']['resistors_ohm']}")
    if "7" in which:
        import tempfile
        with tempfile.NamedTemporaryFile("w", suffix=".csv", delete=False) as f:
            f.write(catalogue_csv())
            path = f.name
        try:
            runs = max(3, a.runs // 3)
            med, best, cpu, out = median_time([a.rtline] + DESIGN + ["--candidates", path], runs)
        finally:
            os.unlink(path)
        d = json.loads(out)
        line = (f"7  design over 50 candidate thermistors, otherwise as 6: median {med * 1e3:.0f} ms"
                f" (min {best * 1e3:.0f}, CPU {cpu * 1e3:.0f}) over {runs} runs, target 10000 ms")
        if med > 10.0:
            line += "  ABOVE TARGET"
        print(line + f"; chose {d['part']['label']} in {d['circuit']['topology']} {d['circuit']['resistors_ohm']}")
    return 0 if ok else 1


def cpu_model():
    try:
        with open("/proc/cpuinfo") as f:
            for line in f:
                if line.startswith("model name"):
                    return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return "unknown CPU"


if __name__ == "__main__":
    sys.exit(main())
