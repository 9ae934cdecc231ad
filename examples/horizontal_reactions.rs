//! Base reactions of every horizontal load of a scene given as JSON, for cross-checks against
//! other frame programs (tests/pynite_check.py).
//!
//! ```text
//! horizontal_reactions [FILE]   the scene (JSON, the same fields as a scene file) from FILE or stdin
//! ```
//!
//! Output: `{"items": [{"id": "F1", "sets": [{"sharing": "...", "vertical": {"A1": kN, ...},
//! "shear": {"A1": [x, y], ...}}]}]}` — one set per diaphragm assumption solved (the primary
//! first), reactions in kN, upward and along +x, +y positive, keyed by post id. A scene that is
//! refused prints `{"error": "..."}` and exits with status 1.

use std::collections::BTreeMap;
use std::io::Read;

fn main() -> anyhow::Result<()> {
    let text = match std::env::args().nth(1) {
        Some(path) => std::fs::read_to_string(path)?,
        None => {
            let mut s = String::new();
            std::io::stdin().read_to_string(&mut s)?;
            s
        }
    };
    let scene: plateload::Scene = serde_json::from_str(&text)?;
    let a = match plateload::analyse(&scene) {
        Ok(a) => a,
        Err(e) => {
            println!("{}", serde_json::json!({ "error": e.to_string() }));
            std::process::exit(1);
        }
    };
    let id = |p: u32| scene.posts[p as usize].id.clone();
    let items: Vec<serde_json::Value> = a
        .solution
        .items
        .iter()
        .filter(|i| i.direction.is_some())
        .map(|item| {
            let sets: Vec<serde_json::Value> = (0..item.variant_count())
                .map(|v| {
                    let r = item.variant(v);
                    let vertical: BTreeMap<String, f64> = r.vertical.iter().map(|&(p, kn)| (id(p), kn)).collect();
                    let shear: BTreeMap<String, [f64; 2]> = r.shear.iter().map(|&(p, s)| (id(p), s)).collect();
                    let sharing = match (&item.alternative, v) {
                        (Some(alt), 0) => alt.primary,
                        (Some(alt), _) => alt.label,
                        (None, _) => "one way",
                    };
                    serde_json::json!({ "sharing": sharing, "vertical": vertical, "shear": shear })
                })
                .collect();
            serde_json::json!({ "id": item.id, "sets": sets })
        })
        .collect();
    println!("{}", serde_json::json!({ "items": items }));
    Ok(())
}
