#!/usr/bin/env python3
"""Cross-check of plateload's horizontal load path against PyNiteFEA (PyPI), a general-purpose 3D
frame analysis library.

A fixed, seeded set of braced structures whose load path is statically determinate goes to both:
a row of one-bay-deep frames along x (bay widths and lift heights varied), every member pin-ended
(posts, ledgers, transoms, braces), the bases pinned, plan diagonals in every bay of every level
(the diaphragm), two frames braced across (along y) and one bay braced along x, in every lift.
Horizontal point forces act at post nodes in any plan direction. Each structure is checked once
with y-bracing in the two end frames, once in two other frames. The base reactions (vertical and
horizontal, every plate, every load) must agree to 1e-6 relative (largest difference over the
largest reaction of the load).

    python3 tests/pynite_check.py [--engine PATH] [--cases N] [--seed S]

The engine is the example `horizontal_reactions` (built with --no-default-features); by default it
is run through cargo. Ends with the line "N passed, M failed"; exit status 1 on any failure.
"""
import argparse
import json
import math
import random
import subprocess
import sys

TOLERANCE = 1e-6


def column(i):
    return "ABCDEFGHIJKLMNOPQRSTUVWXYZ"[i]


def make_case(rng, end_frames):
    """A structure as plateload sees it (scene dict) and the same as nodes and members."""
    nx = rng.randint(1, 4)
    xs = [0.0]
    for _ in range(nx):
        xs.append(round(xs[-1] + rng.uniform(1.0, 3.0), 3))
    depth = round(rng.uniform(0.9, 2.5), 3)
    lifts = rng.randint(1, 3)
    zs = [0.0]
    for _ in range(lifts):
        zs.append(round(zs[-1] + rng.uniform(1.5, 2.5), 3))
    top = zs[-1]
    posts = [(f"{column(i)}{j + 1}", x, y) for j, y in enumerate([0.0, depth]) for i, x in enumerate(xs)]
    # Frames braced along y: the two end frames, or two others.
    frames = [0, nx] if end_frames or nx < 2 else sorted(rng.sample(range(nx + 1), 2))
    x_bay = rng.randrange(nx)
    x_row = rng.randrange(2)
    scene = {
        "format": 1,
        "site": {"name": "cross-check", "allowable_bearing_kpa": 1.0e6},
        "support_types": [{"id": "S", "base_plate": {"width_m": 0.15, "length_m": 0.15}, "swl_kn": 1.0e6}],
        "posts": [{"id": p, "x": x, "y": y, "base_level": 0.0, "top_level": top, "support": "S", "self_weight_kn_per_m": 0.0} for p, x, y in posts],
        "bearers": [],
        "braces": [],
        "loads": [],
        "horizontal": {"notional": "Off"},
    }
    for k, z in enumerate(zs[1:], 1):
        for j in range(2):
            scene["bearers"].append({"id": f"L{k}-{j + 1}", "role": "Ledger", "level": z, "posts": [f"{column(i)}{j + 1}" for i in range(nx + 1)], "self_weight_kn_per_m": 0.0})
        for i in range(nx + 1):
            scene["bearers"].append({"id": f"T{k}-{column(i)}", "role": "Transom", "level": z, "posts": [f"{column(i)}1", f"{column(i)}2"], "self_weight_kn_per_m": 0.0})
        for i in range(nx):
            a, b = (f"{column(i)}1", f"{column(i + 1)}2") if rng.random() < 0.5 else (f"{column(i)}2", f"{column(i + 1)}1")
            scene["braces"].append({"id": f"P{k}-{column(i)}", "from": {"post": a, "level": z}, "to": {"post": b, "level": z}})
        lo = zs[k - 1]
        for i in frames:
            a, b = (f"{column(i)}1", f"{column(i)}2") if rng.random() < 0.5 else (f"{column(i)}2", f"{column(i)}1")
            scene["braces"].append({"id": f"Y{k}-{column(i)}", "from": {"post": a, "level": lo}, "to": {"post": b, "level": z}})
        a, b = (f"{column(x_bay)}{x_row + 1}", f"{column(x_bay + 1)}{x_row + 1}")
        if rng.random() < 0.5:
            a, b = b, a
        scene["braces"].append({"id": f"X{k}", "from": {"post": a, "level": lo}, "to": {"post": b, "level": z}})
    for n in range(rng.randint(1, 3)):
        p, x, y = rng.choice(posts)
        z = rng.choice(zs[1:])
        deg = round(rng.uniform(-180.0, 180.0), 2)
        kn = round(rng.uniform(0.5, 10.0), 3)
        scene["loads"].append({"id": f"F{n + 1}", "case": "W", "kind": {"Horizontal": {"x": x, "y": y, "level": z, "kn": kn, "direction": {"Degrees": deg}}}})
    return scene


def pynite_reactions(scene):
    """Base reactions of each load by PyNite: every member pin-ended (bending released at both
    ends, torsion at one), every node's rotations held (a pin-jointed truss has none to solve
    for), bases pinned."""
    from Pynite import FEModel3D

    posts = {p["id"]: (p["x"], p["y"]) for p in scene["posts"]}
    levels = sorted({0.0} | {b["level"] for b in scene["bearers"]})
    results = {}
    for load in scene["loads"]:
        m = FEModel3D()
        m.add_material("steel", 2.1e8, 8.1e7, 0.3, 78.5)
        m.add_section("tube", 5.57e-4, 1.38e-7, 1.38e-7, 2.76e-7)
        node = lambda p, z: f"{p}@{z}"
        for p, (x, y) in posts.items():
            for z in levels:
                m.add_node(node(p, z), x, y, z)
                m.def_support(node(p, z), z == 0.0, z == 0.0, z == 0.0, True, True, True)
        members = []
        for p in posts:
            for lo, hi in zip(levels, levels[1:]):
                members.append((node(p, lo), node(p, hi)))
        for b in scene["bearers"]:
            for a, z in zip(b["posts"], b["posts"][1:]):
                members.append((node(a, b["level"]), node(z, b["level"])))
        for b in scene["braces"]:
            members.append((node(b["from"]["post"], b["from"]["level"]), node(b["to"]["post"], b["to"]["level"])))
        for k, (i, j) in enumerate(members):
            name = f"M{k}"
            m.add_member(name, i, j, "steel", "tube")
            m.def_releases(name, Rxi=True, Ryi=True, Rzi=True, Ryj=True, Rzj=True)
        h = load["kind"]["Horizontal"]
        p = next(q for q, xy in posts.items() if abs(xy[0] - h["x"]) < 1e-9 and abs(xy[1] - h["y"]) < 1e-9)
        r = math.radians(h["direction"]["Degrees"])
        m.add_node_load(node(p, h["level"]), "FX", h["kn"] * math.cos(r))
        m.add_node_load(node(p, h["level"]), "FY", h["kn"] * math.sin(r))
        m.analyze_linear(check_stability=True)
        out = {}
        for q in posts:
            n = m.nodes[node(q, 0.0)]
            out[q] = (n.RxnFZ["Combo 1"], n.RxnFX["Combo 1"], n.RxnFY["Combo 1"])
        results[load["id"]] = out
    return results


def engine_reactions(engine, scene):
    run = subprocess.run(engine, input=json.dumps(scene), capture_output=True, text=True)
    if run.returncode != 0:
        raise RuntimeError(f"engine refused the scene: {run.stdout.strip()} {run.stderr.strip()}")
    out = {}
    for item in json.loads(run.stdout)["items"]:
        sets = []
        for s in item["sets"]:
            sets.append({p["id"]: (s["vertical"].get(p["id"], 0.0), *s["shear"].get(p["id"], [0.0, 0.0])) for p in scene["posts"]})
        out[item["id"]] = sets
    return out


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--engine", help="path of the built horizontal_reactions example")
    ap.add_argument("--cases", type=int, default=40)
    ap.add_argument("--seed", type=int, default=20261202)
    args = ap.parse_args()
    engine = [args.engine] if args.engine else ["cargo", "run", "--quiet", "--no-default-features", "--example", "horizontal_reactions"]
    rng = random.Random(args.seed)
    passed = failed = 0
    worst = 0.0
    for case in range(args.cases):
        scene = make_case(rng, end_frames=case % 2 == 0)
        try:
            ours = engine_reactions(engine, scene)
            theirs = pynite_reactions(scene)
        except Exception as e:  # a refusal or a solver failure is a failed case, with its reason
            failed += 1
            print(f"case {case}: {e}")
            continue
        ok = True
        for load, ref in theirs.items():
            scale = max(max(abs(c) for c in v) for v in ref.values())
            for k, sets in enumerate(ours[load]):
                diff = max(abs(a - b) for p in ref for a, b in zip(sets[p], ref[p]))
                rel = diff / scale
                worst = max(worst, rel)
                if rel > TOLERANCE:
                    ok = False
                    print(f"case {case} load {load} set {k}: largest difference {diff:.3e} kN of {scale:.3e} ({rel:.2e} relative)")
        if ok:
            passed += 1
        else:
            failed += 1
    print(f"worst relative difference {worst:.2e}")
    print(f"{passed} passed, {failed} failed")
    sys.exit(1 if failed else 0)


if __name__ == "__main__":
    main()
