#!/usr/bin/env python3
"""Cross-check of plateload's continuous-beam reactions against pycba (PyPI), a general-purpose
continuous-beam library using the direct stiffness method.

A fixed, seeded set of beams (varied spans, full and part-span uniform loads, point loads,
cantilever overhangs at either end) goes to both; the reactions must agree to 1e-6 relative
(largest difference over the largest reaction of the beam).

    python3 tests/pycba_check.py [--engine PATH] [--beams N] [--seed S]

A second set checks patterned loading: uniform loads are cut into cells (each span and each
overhang), pycba solves every cell on its own, and the effects are superposed — per support, the sum
of the positive reactions (worst maximum) and of the negative ones (worst minimum). The engine gives
the same figures from its arranged imposed loads in a whole scene; they must agree to 1e-6 relative.

The engine is the example `beam_reactions` (built with --no-default-features); by default it is run
through cargo. Ends with the line "N passed, M failed"; exit status 1 on any failure.
"""
import argparse
import json
import random
import subprocess
import sys

TOLERANCE = 1e-6


def make_beams(n, seed):
    """Beams as plateload sees them: support positions, EI, loads at absolute positions."""
    rng = random.Random(seed)
    beams = []
    for _ in range(n):
        spans = [round(rng.uniform(0.4, 4.0), 3) for _ in range(rng.randint(1, 8))]
        supports = [0.0]
        for length in spans:
            supports.append(round(supports[-1] + length, 3))
        start = -round(rng.uniform(0.2, 1.2), 3) if rng.random() < 0.5 else 0.0
        end = supports[-1] + (round(rng.uniform(0.2, 1.2), 3) if rng.random() < 0.5 else 0.0)
        loads = []
        if rng.random() < 0.7:
            loads.append({"kind": "uniform", "from": start, "to": end, "w": round(rng.uniform(0.5, 10.0), 3)})
        for _ in range(rng.randint(0, 3)):
            a, b = sorted(round(rng.uniform(start, end), 3) for _ in range(2))
            if b - a > 1e-3:
                loads.append({"kind": "uniform", "from": a, "to": b, "w": round(rng.uniform(-2.0, 10.0), 3)})
        for _ in range(rng.randint(0 if loads else 1, 3)):
            loads.append({"kind": "point", "at": round(rng.uniform(start, end), 3), "p": round(rng.uniform(-5.0, 20.0), 3)})
        beams.append({"supports": supports, "ei": round(rng.uniform(5.0, 500.0), 2), "loads": loads,
                      "start": start, "end": end})
    return beams


def pycba_reactions(beam):
    """Reactions by pycba: members between consecutive nodes (tip, supports, tip); a tip node is
    free ("f"), a support pinned ("p": vertical held, rotation free) — the overhang is a free
    cantilever, as in plateload."""
    import pycba

    s = beam["supports"]
    nodes = ([beam["start"]] if beam["start"] < s[0] else []) + s + ([beam["end"]] if beam["end"] > s[-1] else [])
    kinds = (["f"] if beam["start"] < s[0] else []) + ["p"] * len(s) + (["f"] if beam["end"] > s[-1] else [])
    lengths = [b - a for a, b in zip(nodes, nodes[1:])]
    lm = []
    for load in beam["loads"]:
        if load["kind"] == "point":
            x = load["at"]
            m = max(i for i in range(len(lengths)) if nodes[i] <= x + 1e-12) if x < nodes[-1] else len(lengths) - 1
            lm.append([m + 1, 2, load["p"], x - nodes[m]])
        else:
            for m, length in enumerate(lengths):
                a, b = max(load["from"], nodes[m]), min(load["to"], nodes[m + 1])
                if b - a <= 0:
                    continue
                if a == nodes[m] and b == nodes[m + 1]:
                    lm.append([m + 1, 1, load["w"]])
                else:
                    lm.append([m + 1, 3, load["w"], a - nodes[m], b - a])
    analysis = pycba.BeamAnalysis(lengths, beam["ei"], supports=kinds, LM=lm)
    analysis.analyze()
    return [float(r) for r in analysis.beam_results.R]


def make_patterned(n, seed):
    """Beams with uniform loads only (those are what an arranged imposed load is made of)."""
    rng = random.Random(seed + 1)
    beams = []
    for beam in make_beams(n, seed + 1):
        loads = [l for l in beam["loads"] if l["kind"] == "uniform" and l["w"] != 0.0]
        if not loads:
            loads = [{"kind": "uniform", "from": beam["start"], "to": beam["end"], "w": round(rng.uniform(0.5, 10.0), 3)}]
        beam["loads"] = loads
        beams.append(beam)
    return beams


def pycba_patterned(beam):
    """Cell by cell, then superposed: per support (sum of positive, sum of negative) reactions."""
    s = beam["supports"]
    n = len(s)
    hi, lo = [0.0] * n, [0.0] * n
    for load in beam["loads"]:
        cuts = [x for x in s if load["from"] < x < load["to"]]
        edges = [load["from"]] + cuts + [load["to"]]
        for a, b in zip(edges, edges[1:]):
            if b - a <= 1e-9:
                continue
            cell = dict(beam, loads=[{"kind": "uniform", "from": a, "to": b, "w": load["w"]}])
            for k, r in enumerate(pycba_reactions(cell)):
                if r > 0:
                    hi[k] += r
                else:
                    lo[k] += r
    return hi, lo


def engine_reactions(beams, engine):
    payload = json.dumps({"beams": [{k: b[k] for k in ("supports", "ei", "loads")} for b in beams]})
    cmd = [engine, "solve"] if engine else ["cargo", "run", "--quiet", "--no-default-features", "--example", "beam_reactions", "--", "solve"]
    out = subprocess.run(cmd, input=payload, capture_output=True, text=True, check=True)
    return json.loads(out.stdout)["reactions"]


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--engine", help="path to a built beam_reactions example (default: cargo run)")
    ap.add_argument("--beams", type=int, default=300)
    ap.add_argument("--seed", type=int, default=20240611)
    args = ap.parse_args()
    beams = make_beams(args.beams, args.seed)
    ours = engine_reactions(beams, args.engine)
    passed = failed = 0
    worst = 0.0
    for i, (beam, r_engine) in enumerate(zip(beams, ours)):
        r_ref = pycba_reactions(beam)
        scale = max(abs(r) for r in r_ref) or 1.0
        rel = max(abs(a - b) for a, b in zip(r_engine, r_ref)) / scale if len(r_ref) == len(r_engine) else float("inf")
        worst = max(worst, rel)
        if rel <= TOLERANCE:
            passed += 1
        else:
            failed += 1
            print(f"beam {i}: relative difference {rel:.3e}\n  engine {r_engine}\n  pycba  {r_ref}\n  {beam}")
    patterned = make_patterned(max(args.beams // 3, 1), args.seed)
    payload = json.dumps({"beams": [{k: b[k] for k in ("supports", "ei", "loads")} for b in patterned]})
    cmd = [args.engine, "arranged"] if args.engine else ["cargo", "run", "--quiet", "--no-default-features", "--example", "beam_reactions", "--", "arranged"]
    out = json.loads(subprocess.run(cmd, input=payload, capture_output=True, text=True, check=True).stdout)
    worst_patterned = 0.0
    for i, (beam, e_max, e_min) in enumerate(zip(patterned, out["max"], out["min"])):
        r_max, r_min = pycba_patterned(beam)
        scale = max(max(abs(r) for r in r_max + r_min), 1e-12)
        rel = max(max(abs(a - b) for a, b in zip(e_max, r_max)), max(abs(a - b) for a, b in zip(e_min, r_min))) / scale
        worst_patterned = max(worst_patterned, rel)
        if rel <= TOLERANCE:
            passed += 1
        else:
            failed += 1
            print(f"patterned beam {i}: relative difference {rel:.3e}\n  engine max {e_max} min {e_min}\n  pycba  max {r_max} min {r_min}\n  {beam}")
    print(f"pycba patterned loading: {len(patterned)} beams, cells solved one by one and superposed; "
          f"largest relative difference {worst_patterned:.2e} (tolerance {TOLERANCE:.0e})")
    spans = sum(len(b["supports"]) - 1 for b in beams)
    overhangs = sum((b["start"] < 0) + (b["end"] > b["supports"][-1]) for b in beams)
    nloads = sum(len(b["loads"]) for b in beams)
    print(f"pycba cross-check: {len(beams)} beams, {spans} spans, {overhangs} overhangs, {nloads} loads; "
          f"largest relative difference {worst:.2e} (tolerance {TOLERANCE:.0e})")
    print(f"{passed} passed, {failed} failed")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
