//! The spare-capacity map of generated falsework: the full map at 0.25 m on 1,000 posts (target
//! under 50 ms), and the map worked out again after an edit of loads on 2,000 posts from the kept
//! influence coefficients (within an editor frame); each bare and carrying a slab. Run:
//! `cargo bench --no-default-features --bench spare`.

use criterion::{criterion_group, criterion_main, BenchmarkId, Criterion};
use plateload::check::spare::{spare_influences, spare_map, spare_map_from, SpareSettings};
use plateload::scene::layout::{generate, LayoutSpec};

fn falsework(posts_per_side: usize) -> plateload::Scene {
    let spec = LayoutSpec { bays_x: posts_per_side - 1, bays_y: posts_per_side - 1, bay_x_m: 1.5, bay_y_m: 1.2, lifts: 3, lift_m: 1.8, deck_lifts: vec![3], ..LayoutSpec::default() };
    generate("bench", 150.0, &spec)
}

/// The same falsework carrying a slab: 5 kPa of permanent load on the deck, every bay braced, a
/// 60 kN jack on ground taking 300 kPa, timber sole boards on concrete (friction known, so sliding
/// is checked). No plate lifts, so the map has to find each point's limit; on the bare falsework
/// every plate already lifts under the notional load and every point is at a limit at once.
fn falsework_with_slab(posts_per_side: usize) -> plateload::Scene {
    use plateload::scene::loads::Intensity;
    let spec = LayoutSpec { bays_x: posts_per_side - 1, bays_y: posts_per_side - 1, bay_x_m: 1.5, bay_y_m: 1.2, lifts: 3, lift_m: 1.8, deck_lifts: vec![3], brace_every: 1, ..LayoutSpec::default() };
    let mut scene = generate("bench", 300.0, &spec);
    for t in &mut scene.support_types {
        t.swl_kn = 60.0;
        t.friction = vec![plateload::scene::model::Interface::TimberOnConcrete];
    }
    for d in scene.decks.clone() {
        scene.loads.push(plateload::Load::new(&format!("slab-{}", d.id), plateload::Case::G, plateload::LoadKind::DeckArea { deck: d.id.clone(), intensity: Intensity::Kpa(5.0) }));
    }
    scene
}

fn full_map(c: &mut Criterion) {
    let mut group = c.benchmark_group("spare map, 0.25 m grid, point load");
    group.sample_size(10);
    for (what, scene) in [("", falsework(32)), (", carrying a slab", falsework_with_slab(32))] {
        let analysis = plateload::analyse(&scene).expect("generated scenes are valid");
        let posts = scene.posts.len();
        group.bench_with_input(BenchmarkId::from_parameter(format!("{posts} posts{what}")), &(scene, analysis), |b, (scene, analysis)| {
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
    for (what, mut scene) in [("", falsework(45)), (", carrying a slab", falsework_with_slab(45))] {
        let posts = scene.posts.len();
        let settings = SpareSettings::default();
        let analysis = plateload::analyse(&scene).expect("valid");
        let influences = spare_influences(&scene, &analysis, &settings).expect("coefficients");
        let post = scene.posts[scene.posts.len() / 2].id.clone();
        scene.loads.push(plateload::Load::new("edit", plateload::Case::Q, plateload::LoadKind::PostTop { post, kn: 3.0 }));
        let analysis = plateload::analyse(&scene).expect("valid");
        group.bench_function(BenchmarkId::from_parameter(format!("{posts} posts{what}")), |b| {
            b.iter(|| {
                let map = spare_map_from(&scene, &analysis, &settings, &influences).expect("a map");
                std::hint::black_box(map.decks.len())
            })
        });
    }
    group.finish();
}

criterion_group!(benches, full_map, after_an_edit);
criterion_main!(benches);
