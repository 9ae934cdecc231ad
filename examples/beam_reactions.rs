//! Continuous-beam reactions for beams given as JSON, for cross-checks and side-by-side timing
//! against other beam programs (tests/pycba_check.py, benches/pycba_compare.py).
//!
//! ```text
//! beam_reactions solve [FILE]        reactions of every beam (stdin if no FILE), JSON on stdout
//! beam_reactions time FILE [REPEAT]  set up and solve all beams REPEAT times; best and median
//! beam_reactions arranged [FILE]     worst arrangement of each beam's uniform loads, JSON on stdout
//! ```
//!
//! Input: `{"beams": [{"supports": [0.0, 2.0, 4.0], "ei": 28.9, "loads": [
//!   {"kind": "uniform", "from": -0.5, "to": 4.0, "w": 5.0}, {"kind": "point", "at": 1.0, "p": 3.0}]}]}`
//! — positions in m along the beam (beyond the end supports: cantilever overhangs), loads in kN
//! and kN/m downward. Output of `solve`: `{"reactions": [[R0, R1, ...], ...]}`, kN upward.
//!
//! `arranged` builds a whole scene per beam — posts at the supports, one continuous bearer, each
//! uniform load an arranged imposed line load (point loads are not arranged and must be absent) —
//! and prints, per support, the sum of the cells that push it down and of those that lift it:
//! `{"max": [[...], ...], "min": [[...], ...]}`, kN upward.

use std::io::Read;
use std::time::Instant;

use plateload::solve::beam::BeamLoad;
use plateload::solve::continuous::ContinuousBeam;

#[derive(serde::Deserialize)]
struct Input {
    beams: Vec<Beam>,
}

#[derive(serde::Deserialize)]
struct Beam {
    supports: Vec<f64>,
    ei: f64,
    loads: Vec<Load>,
}

#[derive(serde::Deserialize)]
#[serde(tag = "kind", rename_all = "lowercase")]
enum Load {
    Point { at: f64, p: f64 },
    Uniform { from: f64, to: f64, w: f64 },
}

impl Load {
    fn beam_load(&self) -> BeamLoad {
        match *self {
            Load::Point { at, p } => BeamLoad::Point { at, p },
            Load::Uniform { from, to, w } => BeamLoad::Uniform { from, to, w },
        }
    }
}

fn main() -> anyhow::Result<()> {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let mode = args.first().map(String::as_str).unwrap_or("solve");
    let text = match args.get(1) {
        Some(path) => std::fs::read_to_string(path)?,
        None => {
            let mut s = String::new();
            std::io::stdin().read_to_string(&mut s)?;
            s
        }
    };
    let input: Input = serde_json::from_str(&text)?;
    let beams: Vec<(Vec<f64>, f64, Vec<BeamLoad>)> =
        input.beams.into_iter().map(|b| (b.supports, b.ei, b.loads.iter().map(Load::beam_load).collect())).collect();
    match mode {
        "solve" => {
            let mut out = Vec::with_capacity(beams.len());
            for (i, (s, ei, loads)) in beams.iter().enumerate() {
                let mut beam = ContinuousBeam::new(s, *ei).map_err(|e| anyhow::anyhow!("beam {i}: {e}"))?;
                let mut r = vec![0.0; s.len()];
                beam.share(loads, &mut r);
                out.push(r);
            }
            println!("{}", serde_json::json!({ "reactions": out }));
        }
        "time" => {
            let repeat: usize = args.get(2).map(|r| r.parse()).transpose()?.unwrap_or(100);
            let mut times = Vec::with_capacity(repeat);
            let mut check = 0.0;
            let mut r = Vec::new();
            for _ in 0..repeat.max(1) {
                let t = Instant::now();
                for (s, ei, loads) in &beams {
                    // Set-up (factorisation) and solve both count, as a fresh analysis would.
                    let mut beam = ContinuousBeam::new(std::hint::black_box(s), *ei).map_err(|e| anyhow::anyhow!("{e}"))?;
                    r.resize(s.len(), 0.0);
                    beam.share(std::hint::black_box(loads), &mut r);
                    check += std::hint::black_box(r[0]);
                }
                times.push(t.elapsed().as_secs_f64());
            }
            times.sort_by(f64::total_cmp);
            let spans: usize = beams.iter().map(|b| b.0.len().saturating_sub(1)).sum();
            println!(
                "{}",
                serde_json::json!({
                    "beams": beams.len(), "spans": spans, "repeat": times.len(),
                    "best_s": times[0], "median_s": times[times.len() / 2], "checksum": check,
                })
            );
        }
        "arranged" => {
            let (mut max, mut min) = (Vec::new(), Vec::new());
            for (i, (s, ei, loads)) in beams.iter().enumerate() {
                let (hi, lo) = arranged(s, *ei, loads).map_err(|e| anyhow::anyhow!("beam {i}: {e}"))?;
                max.push(hi);
                min.push(lo);
            }
            println!("{}", serde_json::json!({ "max": max, "min": min }));
        }
        other => anyhow::bail!("unknown mode {other:?}: use `solve [FILE]`, `time FILE [REPEAT]` or `arranged [FILE]`"),
    }
    Ok(())
}

/// The worst arrangement at each support of a continuous beam under arranged uniform loads, by
/// the engine's scene analysis: (max, min) per support, kN upward.
fn arranged(supports: &[f64], ei: f64, loads: &[BeamLoad]) -> anyhow::Result<(Vec<f64>, Vec<f64>)> {
    use plateload::scene::loads::{Case, Load, LoadKind};
    use plateload::scene::model::{BeamMethod, BeamRole, Bearer, PlateSize, Post, SupportType};
    let mut scene = plateload::Scene::empty("beam", 1.0e6);
    scene.support_types.push(SupportType::new("S", PlateSize { width_m: 0.15, length_m: 0.15 }, 1.0e6, None));
    for (k, &x) in supports.iter().enumerate() {
        scene.posts.push(Post { id: format!("P{k}"), x, y: 0.0, base_level: 0.0, top_level: 2.0, support: Some("S".into()), self_weight_kn_per_m: 0.0, section: None });
    }
    let (mut start, mut end) = (supports[0], supports[supports.len() - 1]);
    for l in loads {
        if let BeamLoad::Uniform { from, to, .. } = *l {
            start = start.min(from);
            end = end.max(to);
        } else {
            anyhow::bail!("point loads are not arranged");
        }
    }
    scene.bearers.push(Bearer {
        id: "B".into(),
        role: BeamRole::Bearer,
        level: 2.0,
        posts: (0..supports.len()).map(|k| format!("P{k}")).collect(),
        overhang_start_m: supports[0] - start,
        overhang_end_m: end - supports[supports.len() - 1],
        self_weight_kn_per_m: 0.0,
        method: Some(BeamMethod::Continuous),
        joints: None,
        section: None,
    });
    scene.analysis.stiffness.bearer_knm2 = ei;
    // Vertical load only: an unbraced single line of posts has no horizontal load path, so no
    // notional load is generated.
    scene.horizontal.notional = plateload::scene::model::NotionalRule::Off;
    for (i, l) in loads.iter().enumerate() {
        if let BeamLoad::Uniform { from, to, w } = *l {
            let kind = LoadKind::BearerLine { bearer: "B".into(), from_m: from - supports[0], to_m: to - supports[0], kn_per_m: w };
            scene.loads.push(Load::new(format!("q{i}"), Case::Q, kind));
        }
    }
    let a = plateload::analyse(&scene).map_err(|e| anyhow::anyhow!("{e}"))?;
    // The service combination (factor 1 on Q, no permanent load): max and min per support.
    let service = a.combinations.iter().position(|c| c.name == "service").ok_or_else(|| anyhow::anyhow!("no service combination"))?;
    Ok(a.plates.iter().map(|p| (p.combinations[service].max_kn, p.combinations[service].min_kn)).unzip())
}
