//! validate + solve + schedule on generated falsework of n × n bays, 3 lifts.
//!
//! Target: 10,000 posts in under 20 ms with simple spans (one pass over the members). Run: `cargo bench --no-default-features --bench solve`.
//!
//! `braced every third bay`: the same falsework braced in every line of posts, in the first bay and
//! every third after it, every lift, under notional load in four directions (+x, −x, +y, −y) —
//! the horizontal load path through the braced bays, in the default analysis (envelope). The
//! scene is built the same way whatever the generator's defaults, so the figure can be compared
//! across versions.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use plateload::scene::layout::{generate, LayoutSpec};
use plateload::scene::model::BeamMethod;

fn falsework(posts_per_side: usize, method: BeamMethod) -> plateload::Scene {
    let spec = LayoutSpec { bays_x: posts_per_side - 1, bays_y: posts_per_side - 1, bay_x_m: 1.5, bay_y_m: 1.2, lifts: 3, lift_m: 1.8, deck_lifts: vec![3], ..LayoutSpec::default() };
    let mut scene = generate("bench", 150.0, &spec);
    scene.analysis.method = method;
    scene
}

fn validate_solve_schedule(c: &mut Criterion) {
    // Simple spans: one pass over the members. Envelope (the default): simple and continuous
    // behaviour of decks and bearers, four passes.
    for (name, method) in [("simple spans", BeamMethod::SimpleSpans), ("envelope", BeamMethod::Envelope)] {
        bench_method(c, name, method);
    }
}

fn bench_method(c: &mut Criterion, name: &str, method: BeamMethod) {
    let mut group = c.benchmark_group(format!("validate+solve+schedule, {name}"));
    group.sample_size(20);
    for side in [10, 32, 100] {
        let scene = falsework(side, method);
        let posts = scene.posts.len();
        group.bench_with_input(BenchmarkId::from_parameter(format!("{posts} posts")), &scene, |b, scene| {
            b.iter(|| {
                let analysis = plateload::analyse(scene).expect("generated scenes are valid");
                let csv = plateload::export::schedule::schedule_csv(&analysis);
                std::hint::black_box(csv.len())
            })
        });
    }
    group.finish();
}

/// The falsework of `falsework` (envelope), braced every third bay in every line and lift, with
/// explicit notional loads of 2.5 % in four directions.
fn braced_falsework(side: usize) -> plateload::Scene {
    use plateload::scene::layout::column_name;
    use plateload::scene::loads::{Case, Load, LoadKind, PlanDirection};
    use plateload::scene::model::{Brace, PostNode};
    let mut s = falsework(side, BeamMethod::Envelope);
    let id = |i: usize, j: usize| format!("{}{}", column_name(i), j + 1);
    s.braces.clear();
    for lift in 0..3 {
        let (lo, hi) = (lift as f64 * 1.8, (lift + 1) as f64 * 1.8);
        let mut brace = |k: String, a: String, b: String| s.braces.push(Brace { id: k, from: PostNode { post: a, level: lo }, to: PostNode { post: b, level: hi } });
        for j in 0..side {
            for i in (0..side - 1).step_by(3) {
                brace(format!("X{lift}-{i}-{j}"), id(i, j), id(i + 1, j));
                brace(format!("Y{lift}-{j}-{i}"), id(j, i), id(j, i + 1));
            }
        }
    }
    s.loads.retain(|l| !matches!(l.kind, LoadKind::Notional { .. }));
    for (k, direction) in [PlanDirection::PlusX, PlanDirection::MinusX, PlanDirection::PlusY, PlanDirection::MinusY].into_iter().enumerate() {
        s.loads.push(Load::new(format!("notional-{k}"), Case::W, LoadKind::Notional { percent: 2.5, direction, basis: vec![Case::G, Case::Q] }));
    }
    s
}

fn braced_every_third_bay(c: &mut Criterion) {
    let mut group = c.benchmark_group("validate+solve+schedule, envelope, braced every third bay, notional 4 ways");
    group.sample_size(20);
    for side in [10, 100] {
        let scene = braced_falsework(side);
        let posts = scene.posts.len();
        group.bench_with_input(BenchmarkId::from_parameter(format!("{posts} posts")), &scene, |b, scene| {
            b.iter(|| {
                let analysis = plateload::analyse(scene).expect("braced falsework is valid");
                let csv = plateload::export::schedule::schedule_csv(&analysis);
                std::hint::black_box(csv.len())
            })
        });
    }
    group.finish();
}

criterion_group!(benches, validate_solve_schedule, braced_every_third_bay);
criterion_main!(benches);
