//! validate + solve + schedule on generated falsework of n × n bays, 3 lifts.
//!
//! Target: 10,000 posts in under 20 ms with simple spans (one pass over the members). Run: `cargo bench --no-default-features --bench solve`.

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

criterion_group!(benches, validate_solve_schedule);
criterion_main!(benches);
