//! Continuous-beam reactions: one 1,000-span beam and 1,000 five-span beams, each set up
//! (factorised) and solved from scratch, as in benches/pycba_compare.py, which times a
//! general-purpose library on the same shapes of beam in the same run.

use std::hint::black_box;

use criterion::{criterion_group, criterion_main, Criterion};
use plateload::solve::beam::BeamLoad;
use plateload::solve::continuous::ContinuousBeam;

/// Spans 1.0–2.0 m from a fixed sequence (no randomness crate needed), cumulative positions.
fn supports(spans: usize, seed: u64) -> Vec<f64> {
    let mut x = seed.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
    let mut s = vec![0.0];
    for _ in 0..spans {
        x = x.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        let u = (x >> 11) as f64 / (1u64 << 53) as f64;
        s.push(s[s.len() - 1] + 1.0 + u);
    }
    s
}

fn solve(s: &[f64], loads: &[BeamLoad], r: &mut Vec<f64>) -> f64 {
    let mut beam = ContinuousBeam::new(s, 28.9).expect("increasing supports");
    r.resize(s.len(), 0.0);
    beam.share(loads, r);
    r[0]
}

fn bench(c: &mut Criterion) {
    let long = supports(1000, 1);
    let long_load = [BeamLoad::Uniform { from: 0.0, to: long[1000], w: 5.0 }];
    let short: Vec<(Vec<f64>, [BeamLoad; 1])> = (0..1000)
        .map(|i| {
            let s = supports(5, 100 + i);
            let w = BeamLoad::Uniform { from: 0.0, to: s[5], w: 5.0 };
            (s, [w])
        })
        .collect();
    let mut r = Vec::new();
    c.bench_function("continuous: one 1,000-span beam, UDL", |b| b.iter(|| solve(black_box(&long), black_box(&long_load), &mut r)));
    c.bench_function("continuous: 1,000 five-span beams, UDL", |b| {
        b.iter(|| short.iter().map(|(s, l)| solve(black_box(s), black_box(l), &mut r)).sum::<f64>())
    });
}

criterion_group!(benches, bench);
criterion_main!(benches);
