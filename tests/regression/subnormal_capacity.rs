//! Regression: capacities and plate sizes that are positive but absurdly small (down to
//! subnormal floats such as 1e-320) passed validation, and the analysis reported a utilisation of
//! `inf` (or numbers like 1e300 %) instead of refusing the input. Found by both fuzzers in
//! `tests/hardening.rs`: the text fuzzer turned the tannery demo's `swl_kn: 40.0` into `1e-320`
//! (saved as `tests/regression/subnormal-swl.ron`); the structured fuzzer set a plate dimension to
//! 5.56e-309. Fixed by a lower limit in validation (`validate::MIN_CAPACITY`, and `MIN_SPAN_M` for
//! plate sizes).

use plateload::{analyse, scene::io};

fn refused_with(scene: &plateload::Scene, needles: &[&str]) {
    let msg = match analyse(scene) {
        Ok(a) => panic!("accepted; worst utilisation {:?}", a.worst_plate().map(|w| a.plates[w].governing().utilisation)),
        Err(e) => e.to_string(),
    };
    for n in needles {
        assert!(msg.contains(n), "message lacks {n:?}:\n{msg}");
    }
}

#[test]
fn subnormal_safe_working_load_from_the_fuzzer_is_refused() {
    // common practice, no source: a capacity of 1e-320 kN is an input mistake
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/regression/subnormal-swl.ron");
    let scene = io::read_scene(&path).unwrap();
    assert_eq!(scene.support_types[0].swl_kn, 1e-320);
    refused_with(&scene, &["support type jack-40", "safe working load (kN) = 1e-320", "smallest plausible"]);
}

#[test]
fn subnormal_plate_and_ground_values_are_refused() {
    // common practice, no source
    let tiny = f64::MIN_POSITIVE / 4.0; // 5.56e-309, the structured fuzzer's value
    let base = plateload::scene::demo::demo_scene(1).unwrap();
    let id = base.support_types[0].id.clone();
    let mut s = base.clone();
    s.support_types[0].base_plate.length_m = tiny;
    refused_with(&s, &[&format!("support type {id}"), "base plate length"]);
    let mut s = base.clone();
    s.support_types[0].sole_plate = Some(plateload::scene::model::PlateSize { width_m: 0.25, length_m: tiny });
    refused_with(&s, &["sole plate length"]);
    let mut s = base;
    s.site.allowable_bearing_kpa = Some(tiny);
    refused_with(&s, &["allowable bearing pressure"]);
}
