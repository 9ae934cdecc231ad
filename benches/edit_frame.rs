//! Edit → recoloured frame on a generated 2,000-post scene, without a renderer: the ECS update
//! of one frame in which one edit is applied, the scene re-solved, the view's entities moved and
//! recoloured. Run with `cargo test --bench edit_frame` (dev profile; never `cargo bench`, which
//! would build bevy in release). The GPU part of a frame is not included; the `snapshot`
//! command's `--timing-edits` logs whole frames under the real renderer.
#![allow(dead_code, unused)]

#[path = "../src/app/mod.rs"]
mod app;

use std::time::{Duration, Instant};

use bevy::prelude::*;
use plateload::edit::{Edit, ElementRef};
use plateload::scene::layout::{generate, LayoutSpec};

/// Target for one edit → recoloured ECS update.
const TARGET: Duration = Duration::from_millis(16);

fn median(v: &[Duration]) -> Duration {
    let mut v = v.to_vec();
    v.sort();
    v[v.len() / 2]
}

fn stats(name: &str, v: &mut [Duration]) {
    v.sort();
    let ms = |d: Duration| d.as_secs_f64() * 1e3;
    let q = |f: f64| v[((v.len() - 1) as f64 * f).round() as usize];
    println!("{name:<38} n {:>3}  median {:>7.2} ms  p95 {:>7.2} ms  max {:>7.2} ms", v.len(), ms(q(0.5)), ms(q(0.95)), ms(v[v.len() - 1]));
}

fn main() {
    // 40 × 50 posts (39 × 49 bays), three lifts, a deck on the top one: a 2,000-post birdcage.
    let spec = LayoutSpec { bays_x: 39, bays_y: 49, lifts: 3, deck_lifts: vec![3], ..LayoutSpec::default() };
    let scene = generate("timing", 100.0, &spec);
    assert_eq!(scene.posts.len(), 2000);
    {
        let an = plateload::analyse(&scene).ok();
        let mut v = Vec::new();
        for _ in 0..20 {
            let t = Instant::now();
            let opts = plateload::edit::pick::ShapeOptions::for_scene(&scene, an.as_ref());
            let sh = plateload::edit::pick::shapes(&scene, &opts, an.as_ref());
            std::hint::black_box(&sh);
            v.push(t.elapsed());
        }
        stats("engine drawing geometry (pick::shapes)", &mut v);
    }
    let mut a = App::new();
    a.add_plugins((MinimalPlugins, bevy::asset::AssetPlugin::default(), bevy::transform::TransformPlugin));
    a.init_asset::<Mesh>().init_asset::<app::view::flat::FlatMaterial>();
    a.insert_resource(app::Mode::Editor).insert_resource(app::SceneDoc::new(scene, None)).init_resource::<app::view::ViewState>();
    a.add_plugins((app::EditorPlugin, app::view::draw::DrawPlugin));
    let t = Instant::now();
    a.update();
    println!("first frame (spawn everything): {:.1} ms, {} entities", t.elapsed().as_secs_f64() * 1e3, a.world().resource::<app::view::draw::Drawn>().entities.len());
    let rounds = 40;
    let column: Vec<ElementRef> = (1..=50).map(|j| ElementRef::post(format!("T{j}"))).collect();
    let mut runs: Vec<(&str, Vec<Duration>, Vec<Duration>, Vec<Duration>, Vec<Duration>)> = Vec::new();
    for kind in ["load on a post top, added / removed", "line of 50 posts moved 0.25 m"] {
        let (mut frame, mut solve, mut sync, mut colour) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
        for i in 0..rounds {
            let edit = match (kind.starts_with("load"), i % 2) {
                (true, 0) => Edit::Add(plateload::edit::Element::Load(plateload::Load::new(
                    format!("bench-{i}"),
                    plateload::Case::Q,
                    plateload::LoadKind::PostTop { post: "T26".into(), kn: 25.0 },
                ))),
                (true, _) => Edit::Delete { targets: vec![ElementRef::new(plateload::scene::model::ElementKind::Load, format!("bench-{}", i - 1))], mode: Default::default() },
                // A whole line moves, so every member stays straight and the scene solves.
                (false, k) => Edit::Move { targets: column.clone(), by: [if k == 0 { 0.25 } else { -0.25 }, 0.0, 0.0] },
            };
            a.world_mut().write_message(app::Action::Edit { edit, merge: None, select: None });
            let t = Instant::now();
            a.update();
            frame.push(t.elapsed());
            let doc = a.world().resource::<app::SceneDoc>();
            assert!(doc.analysis().is_some(), "{:?}", doc.result.as_ref().err());
            solve.push(doc.solve_time);
            let drawn = a.world().resource::<app::view::draw::Drawn>();
            sync.push(drawn.last_times[0]);
            colour.push(drawn.last_times[1]);
        }
        runs.push((kind, frame, solve, sync, colour));
    }
    let mut over = false;
    for (kind, mut frame, mut solve, mut sync, mut colour) in runs {
        over |= median(&frame) > TARGET;
        println!("{kind}:");
        stats("  edit + solve + redraw + recolour (ECS)", &mut frame);
        stats("    of which solve", &mut solve);
        stats("    of which entities follow the scene", &mut sync);
        stats("    of which recolour", &mut colour);
    }
    if over {
        println!("FAILED: the median edit → recoloured update is over the {} ms target", TARGET.as_millis());
        std::process::exit(1);
    }
    println!("ok: the median edit → recoloured update is within the {} ms target", TARGET.as_millis());
}
