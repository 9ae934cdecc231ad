#!/usr/bin/env python3
"""Side-by-side timing of plateload's continuous-beam reactions and pycba (PyPI) on the same beams,
in one run: one 1,000-span beam and 1,000 five-span beams, spans 1.0-2.0 m, 5 kN/m over the whole
length.

    python3 benches/pycba_compare.py [--engine PATH]

Engine: the example `beam_reactions` in release mode, engine only (built here with
`cargo build --release --no-default-features --example beam_reactions` unless --engine is given);
its `time` mode sets up (factorises) and solves every beam from scratch, repeatedly, and reports
the best and median wall time of one pass over the set. pycba: `BeamAnalysis(...)` + `analyze()`
per beam, best of several passes; also with `analyze(npts=4)`, which evaluates the fewest points
along each member, to show that its cost is not the result sampling alone.
The reactions of both are compared on the same beams before timing.
"""
import argparse
import json
import os
import random
import subprocess
import sys
import tempfile
import time

EI = 28.9
W = 5.0


def beam(spans):
    s = [0.0]
    for length in spans:
        s.append(s[-1] + length)
    return {"supports": s, "ei": EI, "loads": [{"kind": "uniform", "from": 0.0, "to": s[-1], "w": W}]}


def make_sets():
    rng = random.Random(1)
    long = [beam([rng.uniform(1.0, 2.0) for _ in range(1000)])]
    short = [beam([rng.uniform(1.0, 2.0) for _ in range(5)]) for _ in range(1000)]
    return long, short


def pycba_solve(b, npts=None):
    import pycba

    s = b["supports"]
    lengths = [y - x for x, y in zip(s, s[1:])]
    lm = [[i + 1, 1, W] for i in range(len(lengths))]
    analysis = pycba.BeamAnalysis(lengths, EI, supports=["p"] * len(s), LM=lm)
    analysis.analyze(npts)
    return analysis.beam_results.R


def time_pycba(beams, repeat, npts=None):
    best = float("inf")
    for _ in range(repeat):
        t = time.perf_counter()
        for b in beams:
            pycba_solve(b, npts)
        best = min(best, time.perf_counter() - t)
    return best


def run_engine(engine, mode, path, *extra):
    out = subprocess.run([engine, mode, path, *map(str, extra)], capture_output=True, text=True, check=True)
    return json.loads(out.stdout)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--engine", help="path to a release build of the beam_reactions example")
    args = ap.parse_args()
    engine = args.engine
    if not engine:
        subprocess.run(["cargo", "build", "--quiet", "--release", "--no-default-features", "--example", "beam_reactions"], check=True)
        target = os.environ.get("CARGO_TARGET_DIR", "target")
        engine = os.path.join(target, "release", "examples", "beam_reactions")
    long, short = make_sets()
    with tempfile.TemporaryDirectory() as tmp:
        paths = {}
        for name, beams in (("long", long), ("short", short)):
            paths[name] = os.path.join(tmp, f"{name}.json")
            with open(paths[name], "w") as f:
                json.dump({"beams": beams}, f)
        # Same answers first: the timings compare like with like.
        worst = 0.0
        for name, beams in (("long", long), ("short", short[:50])):
            ours = run_engine(engine, "solve", paths[name])["reactions"] if name == "long" else None
            if ours is None:
                with open(os.path.join(tmp, "check.json"), "w") as f:
                    json.dump({"beams": beams}, f)
                ours = run_engine(engine, "solve", os.path.join(tmp, "check.json"))["reactions"]
            for b, r in zip(beams, ours):
                ref = pycba_solve(b)
                worst = max(worst, max(abs(x - y) for x, y in zip(r, ref)) / max(abs(y) for y in ref))
        print(f"reactions agree with pycba to {worst:.1e} relative on the timed beams")

        eng_long = run_engine(engine, "time", paths["long"], 2000)
        eng_short = run_engine(engine, "time", paths["short"], 200)
    py_long = time_pycba(long, 3)
    py_long4 = time_pycba(long, 3, npts=4)
    py_short = time_pycba(short, 3)
    py_short4 = time_pycba(short, 3, npts=4)

    def row(what, ours, theirs, theirs4):
        print(f"{what:<28} engine {ours * 1e6:10.2f} us   pycba {theirs * 1e3:9.3f} ms  (npts=4: {theirs4 * 1e3:9.3f} ms)"
              f"   ratio {theirs / ours:9.0f}x  (npts=4: {theirs4 / ours:9.0f}x)")

    print(f"python {sys.version.split()[0]}, pycba {__import__('pycba').__version__}, numpy {__import__('numpy').__version__}")
    row("one 1,000-span beam", eng_long["best_s"], py_long, py_long4)
    row("per five-span beam (of 1,000)", eng_short["best_s"] / 1000, py_short / 1000, py_short4 / 1000)
    print(f"engine medians: {eng_long['median_s'] * 1e6:.2f} us (1,000 spans), {eng_short['median_s'] / 1000 * 1e6:.3f} us per five-span beam")
    print("engine: best of 2,000 / 200 passes, set-up + solve; pycba: best of 3 passes, BeamAnalysis + analyze")


if __name__ == "__main__":
    sys.exit(main())
