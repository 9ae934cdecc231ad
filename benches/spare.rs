//! The spare-capacity map of generated falsework: the full map at 0.25 m on 1,000 posts (target
//! under 50 ms), and the map worked out again after an edit of loads on 2,000 posts from the kept
//! influence coefficients (within an editor frame). Run:
//! `cargo bench --no-default-features --bench spare`.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use plateload::check::spare::{spare_influences, spare_map, spare_map_from, SpareSettings};
use plateload::scene::layout::{generate, LayoutSpec};

fn falsework(posts_per_side: usize) -> plateload::Scene {
    let spec = LayoutSpec { bays_x: posts_per_side - 1, bays_y: posts_per_side - 1, bay_x_m: 1.5, bay_y_m: 1.2, lifts: 3, lift_m: 1.8, deck_lifts: vec![3], ..LayoutSpec::default() };
    generate("bench", 150.0, &spec)
}

fn full_map(c: &mut Criterion) {
    let mut group = c.benchmark_group("spare map, 0.25 m grid, point load");
    group.sample_size(10);
    for side in [32] {
        let scene = falsework(side);
        let analysis = plateload::analyse(&scene).expect("generated scenes are valid");
        let posts = scene.posts.len();
        group.bench_with_input(BenchmarkId::from_parameter(format!("{posts} posts")), &(scene, analysis), |b, (scene, analysis)| {
            b.iter(|| {
                let map = spare_map(scene, analysis, &SpareSettings::default()).expect("a map");
                std::hint::black_box(map.decks.len())
            })
        });
    }
    group.finish();
}

fn after_an_edit(c: &mut Criterion) {
    // After an edit of loads the structure is the same: the influence coefficients are kept, and
    // the map is worked out again from the new analysis (which the editor has made anyway).
    let mut group = c.benchmark_group("map again after a load edit (coefficients kept)");
    group.sample_size(10);
    let mut scene = falsework(45);
    let posts = scene.posts.len();
    let settings = SpareSettings::default();
    let analysis = plateload::analyse(&scene).expect("valid");
    let influences = spare_influences(&scene, &analysis, &settings).expect("coefficients");
    let post = scene.posts[scene.posts.len() / 2].id.clone();
    scene.loads.push(plateload::Load::new("edit", plateload::Case::Q, plateload::LoadKind::PostTop { post, kn: 3.0 }));
    let analysis = plateload::analyse(&scene).expect("valid");
    group.bench_function(BenchmarkId::from_parameter(format!("{posts} posts")), |b| {
        b.iter(|| {
            let map = spare_map_from(&scene, &analysis, &settings, &influences).expect("a map");
            std::hint::black_box(map.decks.len())
        })
    });
    group.finish();
}

criterion_group!(benches, full_map, after_an_edit);
criterion_main!(benches);
