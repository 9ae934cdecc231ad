//! plateload command line: CLI definition and glue. The engine lives in the library; the editor
//! in `app/` (feature `viewer`). No command except `edit` and `snapshot` starts the editor's engine.

use std::fmt::Write as _;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::Context;
use clap::{Parser, Subcommand};
use plateload::format::num;
use plateload::{analyse, scene::io, Analysis, AnalysisError, Scene, CAUTION};

#[cfg(feature = "viewer")]
mod app;

/// Exit code when the scene cannot be read, is invalid or cannot be solved.
const EXIT_INVALID: u8 = 1;
/// Exit code of `--strict` when any base plate is over capacity or lifts.
const EXIT_STRICT_FAILED: u8 = 3;

#[derive(Parser)]
#[command(name = "plateload", version, about = "Base-plate loads of scaffolds and falsework: solve a scene, check every support, write the schedule.", after_help = CAUTION)]
struct Cli {
    #[command(subcommand)]
    command: Option<Command>,
}

#[derive(Subcommand)]
enum Command {
    /// Check a scene file and list every problem found, with element ids.
    Validate {
        /// Scene file (RON).
        file: PathBuf,
    },
    /// Solve a scene: per-base loads, utilisation, equilibrium proof, stability and warnings.
    Solve {
        /// Scene file (RON).
        file: PathBuf,
        /// Print the result as JSON (shape documented in the README).
        #[arg(long)]
        json: bool,
        /// Exit with code 3 if any base plate is over capacity, lifts or slides, or overturning or sliding fails.
        #[arg(long)]
        strict: bool,
    },
    /// Write the support-load schedule (CSV) for the ground-bearing check.
    Schedule {
        /// Scene file (RON).
        file: PathBuf,
        /// Output file; standard output if omitted. Written atomically.
        #[arg(short, long)]
        output: Option<PathBuf>,
        /// Exit with code 3 if any base plate is over capacity, lifts or slides, or overturning or sliding fails.
        #[arg(long)]
        strict: bool,
    },
    /// Write the printable load report: one self-contained HTML file (print it to A4 or A3).
    Report {
        /// Scene file (RON).
        file: PathBuf,
        /// Output file (HTML). Written atomically.
        #[arg(short, long)]
        output: PathBuf,
        /// Revision note for the title block.
        #[arg(long, default_value = "")]
        note: String,
        /// Date for the title block (default: today, UTC).
        #[arg(long)]
        date: Option<String>,
        /// A rendered picture of the scene (PNG) to include.
        #[arg(long)]
        picture: Option<PathBuf>,
        /// Paper size the print rules are set for.
        #[arg(long, value_enum, default_value_t = PaperArg::A4)]
        paper: PaperArg,
        /// Exit with code 3 if any base plate is over capacity, lifts or slides, or overturning or sliding fails.
        #[arg(long)]
        strict: bool,
    },
    /// Map the spare capacity of every deck: at each point of a grid, the largest extra imposed
    /// load that can be placed there before a base plate, the structure or the deck reaches a
    /// limit, and what limits it.
    Spare {
        /// Scene file (RON).
        file: PathBuf,
        /// What is placed: `point` (default) or a rectangle WIDTHxDEPTH in metres along x and y,
        /// e.g. 1.2x1.0 (turn it by giving 1.0x1.2).
        #[arg(long, default_value = "point", value_parser = parse_footprint)]
        footprint: plateload::solve::influence::Footprint,
        /// Grid spacing, m.
        #[arg(long, default_value_t = plateload::check::spare::DEFAULT_SPACING_M)]
        grid: f64,
        /// Only this deck (by id); may be given more than once.
        #[arg(long)]
        deck: Vec<String>,
        /// Only this combination (by name); may be given more than once. Default: every one that
        /// checks capacity or uplift.
        #[arg(long)]
        combination: Vec<String>,
        /// Factor on the placed load for landing it, e.g. 1.2 for loads set down by crane.
        #[arg(long, default_value_t = 1.0)]
        dynamic: f64,
        /// Write the map as CSV to this file (atomically) instead of printing the table.
        #[arg(long)]
        csv: Option<PathBuf>,
        /// Print the map as JSON.
        #[arg(long)]
        json: bool,
    },
    /// Show where one base plate's load comes from, share by share.
    Trace {
        /// Scene file (RON).
        file: PathBuf,
        /// Id of the base plate (its post's id).
        base: String,
    },
    /// List the component catalogue: the shipped entries and the user's (from the config
    /// directory and from beside the scene, if one is given), each value with its source.
    Catalogue {
        /// A scene file: its folder's catalogue.ron is read too.
        scene: Option<PathBuf>,
    },
    /// Write a scene file again in the current form: one element per line, every value
    /// written, the comment lines at its top kept. Prints it, or writes it with --output.
    Rewrite {
        /// Scene file (RON).
        file: PathBuf,
        /// Output file (may be the same file). Written atomically.
        #[arg(short, long)]
        output: Option<PathBuf>,
        /// Go ahead although comments below the top of the file will not be kept.
        #[arg(long)]
        drop_comments: bool,
    },
    /// Print a built-in demo scene as RON, or list them.
    Demo {
        /// Name of the demo (without .ron); omit to list them.
        name: Option<String>,
    },
    /// Open the 3D editor on a scene file (the built-in demo if omitted).
    Edit {
        /// Scene file (RON). If it does not exist, the editor starts with an empty scene and
        /// the first save creates the file.
        file: Option<PathBuf>,
        /// Write the number of frames drawn so far to this file after each one.
        #[arg(long, hide = true)]
        count_updates: Option<PathBuf>,
    },
    /// Render a picture of a scene to PNG (needs a display; a virtual one such as Xvfb will do).
    Snapshot {
        /// Scene file (RON).
        #[arg(required_unless_present = "generated")]
        file: Option<PathBuf>,
        /// PNG file to write.
        #[arg(short, long)]
        output: PathBuf,
        /// Picture size in pixels, WIDTHxHEIGHT.
        #[arg(long, default_value = "1600x1000", value_parser = parse_size)]
        size: (u32, u32),
        /// Direction of view.
        #[arg(long, value_enum, default_value_t = PictureView::Iso)]
        view: PictureView,
        /// Colour by this combination (by name) instead of each plate's governing one.
        #[arg(long)]
        combination: Option<String>,
        /// Frames to wait after the scene is drawn before the picture is taken.
        #[arg(long, default_value_t = 30)]
        settle_frames: u32,
        /// Time this many edits (a load put on a post and taken off) first and log the figures.
        #[arg(long, default_value_t = 0, hide = true)]
        timing_edits: u32,
        /// Then time this many frames turning the camera 2° each, as when orbiting with the mouse.
        #[arg(long, default_value_t = 0, hide = true)]
        timing_orbit: u32,
        /// Instead of a file, picture a generated birdcage of COLSxROWS posts (three lifts, a
        /// deck on the top one), e.g. 40x50 for 2,000 posts: for timing large scenes.
        #[arg(long, hide = true, value_parser = parse_grid, conflicts_with = "file")]
        generated: Option<(u32, u32)>,
        /// Leave parts of the view out, to time what each costs: on-top-camera, decks, ground,
        /// gizmos, overlay, cues (comma-separated).
        #[arg(long, hide = true, value_delimiter = ',')]
        timing_without: Vec<String>,
        /// Also write the camera and viewport used, as JSON (for tests that check pixels).
        #[arg(long, hide = true)]
        camera_json: Option<PathBuf>,
        /// Show the editor's panels instead of the picture layout.
        #[arg(long, hide = true)]
        with_panels: bool,
        /// Select this post first: its plate is labelled and outlined.
        #[arg(long)]
        select: Option<String>,
        /// Draw the spare-capacity map on the decks, for one extra load of this footprint:
        /// `point` or WIDTHxDEPTH in metres (grid 0.25 m).
        #[arg(long, value_parser = parse_footprint)]
        spare_overlay: Option<plateload::solve::influence::Footprint>,
    },
}

/// Directions of view of a picture.
#[derive(Clone, Copy, Debug, PartialEq, Eq, clap::ValueEnum)]
enum PictureView {
    /// Isometric, seen from −x, −y and above.
    Iso,
    /// Plan, +y up.
    Plan,
    /// Elevation looking along +y, x to the right.
    Front,
    /// Elevation looking along −x, y to the right.
    Side,
}

fn parse_size(s: &str) -> Result<(u32, u32), String> {
    let (w, h) = s.split_once(['x', 'X']).ok_or_else(|| format!("size \"{s}\" is not WIDTHxHEIGHT, e.g. 1600x1000"))?;
    let n = |v: &str| v.trim().parse::<u32>().ok().filter(|&v| (64..=8192).contains(&v)).ok_or_else(|| format!("size \"{s}\": each side must be a whole number from 64 to 8192"));
    Ok((n(w)?, n(h)?))
}

fn parse_grid(s: &str) -> Result<(u32, u32), String> {
    let (c, r) = s.split_once(['x', 'X']).ok_or_else(|| format!("\"{s}\" is not COLSxROWS, e.g. 40x50"))?;
    let n = |v: &str| v.trim().parse::<u32>().ok().filter(|&v| (2..=200).contains(&v)).ok_or_else(|| format!("\"{s}\": each side must be a whole number of posts from 2 to 200"));
    Ok((n(c)?, n(r)?))
}

/// A birdcage of `cols` × `rows` posts: three lifts and a deck on the top one (the editor's
/// benchmark scene when 40 × 50).
fn generated_birdcage(cols: u32, rows: u32) -> Scene {
    let spec = plateload::scene::layout::LayoutSpec { bays_x: cols as usize - 1, bays_y: rows as usize - 1, lifts: 3, deck_lifts: vec![3], ..Default::default() };
    plateload::scene::layout::generate(&format!("generated birdcage {cols} × {rows}"), 100.0, &spec)
}

/// A footprint: `point`, or WIDTHxDEPTH in metres.
fn parse_footprint(s: &str) -> Result<plateload::solve::influence::Footprint, String> {
    if s.trim().eq_ignore_ascii_case("point") {
        return Ok(plateload::solve::influence::Footprint::POINT);
    }
    let (w, d) = s.split_once(['x', 'X']).ok_or_else(|| format!("footprint \"{s}\" is not `point` or WIDTHxDEPTH in metres, e.g. 1.2x1.0"))?;
    let n = |v: &str| v.trim().parse::<f64>().ok().filter(|v| v.is_finite() && *v > 0.0 && *v <= 100.0).ok_or_else(|| format!("footprint \"{s}\": each side must be a number of metres above 0 (up to 100)"));
    Ok(plateload::solve::influence::Footprint { x_m: n(w)?, y_m: n(d)? })
}

/// Paper sizes for `report --paper`.
#[derive(Clone, Copy, clap::ValueEnum)]
enum PaperArg {
    A4,
    A3,
}

fn main() -> ExitCode {
    match run() {
        Ok(code) => code,
        Err(err) => {
            eprintln!("error: {err:#}");
            ExitCode::from(EXIT_INVALID)
        }
    }
}

fn run() -> anyhow::Result<ExitCode> {
    let cli = Cli::parse();
    let Some(command) = cli.command else {
        return edit(None, None);
    };
    match command {
        Command::Validate { file } => validate(&file),
        Command::Solve { file, json, strict } => {
            let (_, analysis) = load_and_analyse(&file)?;
            if json {
                println!("{}", plateload::export::json::analysis_json(&analysis));
            } else {
                print!("{}", solve_text(&analysis));
            }
            Ok(strict_code(strict, &analysis))
        }
        Command::Schedule { file, output, strict } => {
            let (_, analysis) = load_and_analyse(&file)?;
            let csv = plateload::export::schedule::schedule_csv(&analysis);
            match output {
                Some(path) => {
                    io::write_atomic(&path, csv.as_bytes()).with_context(|| format!("writing {}", path.display()))?;
                    eprintln!("wrote the schedule of {} base plates to {}", analysis.plates.len(), path.display());
                    eprintln!("{CAUTION}");
                }
                None => print!("{csv}"),
            }
            Ok(strict_code(strict, &analysis))
        }
        Command::Report { file, output, note, date, picture, paper, strict } => {
            let (scene, analysis) = load_and_analyse(&file)?;
            let picture_png = match picture {
                None => None,
                Some(path) => {
                    let bytes = std::fs::read(&path).with_context(|| format!("reading {}", path.display()))?;
                    // source: PNG specification (ISO/IEC 15948) §5.2, the 8-byte signature
                    anyhow::ensure!(bytes.starts_with(b"\x89PNG\r\n\x1a\n"), "{} is not a PNG file", path.display());
                    Some(bytes)
                }
            };
            let opts = plateload::export::report::ReportOptions {
                revision_note: note,
                date: date.unwrap_or_else(plateload::export::report::today_utc),
                source: file.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default(),
                picture_png,
                paper: match paper {
                    PaperArg::A4 => plateload::export::report::Paper::A4,
                    PaperArg::A3 => plateload::export::report::Paper::A3,
                },
            };
            plateload::export::report::save_report(&output, &scene, &analysis, &opts).with_context(|| format!("writing {}", output.display()))?;
            eprintln!("wrote the report of {} base plates to {}", analysis.plates.len(), output.display());
            eprintln!("{CAUTION}");
            Ok(strict_code(strict, &analysis))
        }
        Command::Spare { file, footprint, grid, deck, combination, dynamic, csv, json } => {
            let (scene, analysis) = load_and_analyse(&file)?;
            let settings = plateload::check::spare::SpareSettings { spacing_m: grid, footprint, dynamic_factor: dynamic, combinations: combination, decks: deck };
            let map = match plateload::check::spare::spare_map(&scene, &analysis, &settings) {
                Ok(map) => map,
                Err(e) => {
                    eprintln!("{}: {e}", file.display());
                    return Ok(ExitCode::from(EXIT_INVALID));
                }
            };
            if let Some(out) = csv {
                io::write_atomic(&out, plateload::export::spare::spare_csv(&map).as_bytes()).with_context(|| format!("writing {}", out.display()))?;
                println!("{CAUTION}
wrote the spare-capacity map of {} deck(s) to {}", map.decks.len(), out.display());
            } else if json {
                println!("{}", plateload::export::spare::spare_json(&map));
            } else {
                print!("{}", plateload::export::spare::spare_text(&map));
            }
            Ok(ExitCode::SUCCESS)
        }
        Command::Trace { file, base } => {
            let (scene, analysis) = load_and_analyse(&file)?;
            if let Some(lift) = analysis.lifts.iter().position(|l| l.id == base) {
                println!("{CAUTION}\n");
                print!("{}", plateload::export::trace::lift_text(&analysis, lift));
                return Ok(ExitCode::SUCCESS);
            }
            let Some(plate) = analysis.plate_index(&base) else {
                let known: Vec<&str> = analysis.plates.iter().take(12).map(|p| p.id.as_str()).collect();
                anyhow::bail!("no base plate \"{base}\" in {} (some ids: {})", file.display(), known.join(", "));
            };
            println!("{CAUTION}\n");
            print!("{}", plateload::export::trace::trace_text(&scene, &analysis, plate));
            Ok(ExitCode::SUCCESS)
        }
        Command::Catalogue { scene } => {
            let loaded = plateload::scene::catalogue::load_for(scene.as_deref());
            println!("component catalogue: shipped with plateload{}", loaded.files.iter().map(|f| format!(" + {}", f.display())).collect::<String>());
            if let Some(config) = plateload::scene::catalogue::config_path().filter(|p| !p.exists()) {
                println!("(your own entries go in {}, or in catalogue.ron beside a scene)", config.display());
            }
            println!();
            print!("{}", plateload::scene::catalogue::list_text(&loaded.catalogue));
            for n in &loaded.notes {
                println!("note: {n}");
            }
            for p in &loaded.problems {
                eprintln!("problem: {p}");
            }
            Ok(if loaded.problems.is_empty() { ExitCode::SUCCESS } else { ExitCode::from(EXIT_INVALID) })
        }
        Command::Rewrite { file, output, drop_comments } => {
            let text = std::fs::read_to_string(&file).with_context(|| format!("reading {}", file.display()))?;
            let later = io::comments_after_header(&text);
            if !later.is_empty() && !drop_comments {
                let lines: Vec<String> = later.iter().map(|l| l.to_string()).collect();
                anyhow::bail!(
                    "{}: the comments on line(s) {} would not be kept (only those at the top of the file are); move them to the top, or pass --drop-comments",
                    file.display(),
                    lines.join(", ")
                );
            }
            let out = io::rewrite_scene(&text, &file.display().to_string())?;
            match output {
                Some(path) => {
                    io::write_atomic(&path, out.as_bytes()).with_context(|| format!("writing {}", path.display()))?;
                    eprintln!("wrote {}", path.display());
                }
                None => print!("{out}"),
            }
            Ok(ExitCode::SUCCESS)
        }
        Command::Demo { name } => {
            let demos = plateload::scene::demo::DEMO_SCENES;
            match name {
                None => {
                    for (file, _) in demos {
                        println!("{}", file.trim_end_matches(".ron"));
                    }
                }
                Some(name) => {
                    let Some((_, text)) = demos.iter().find(|(f, _)| f.trim_end_matches(".ron") == name) else {
                        anyhow::bail!("no demo called \"{name}\"; `plateload demo` lists them");
                    };
                    print!("{text}");
                }
            }
            Ok(ExitCode::SUCCESS)
        }
        Command::Edit { file, count_updates } => edit(file, count_updates),
        Command::Snapshot { file, output, size, view, combination, settle_frames, timing_edits, timing_orbit, generated, timing_without, camera_json, with_panels, select, spare_overlay } => {
            let (scene, file) = match (file, generated) {
                (_, Some((cols, rows))) => (generated_birdcage(cols, rows), PathBuf::from(format!("generated {cols}x{rows}"))),
                (Some(file), None) => (read(&file)?, file),
                (None, None) => anyhow::bail!("give a scene file"),
            };
            let combination = match combination {
                None => None,
                Some(name) => Some(scene.combinations.iter().position(|c| c.name == name).ok_or_else(|| {
                    let names: Vec<&str> = scene.combinations.iter().map(|c| c.name.as_str()).collect();
                    anyhow::anyhow!("no combination \"{name}\" in {} (it has: {})", file.display(), names.join(", "))
                })?),
            };
            if let Some(id) = &select
                && !scene.posts.iter().any(|p| p.id == *id)
            {
                anyhow::bail!("no post \"{id}\" in {}", file.display());
            }
            snapshot(scene, output, size, view, combination, (settle_frames, timing_edits, timing_orbit, timing_without), (camera_json, with_panels, select), spare_overlay)
        }
    }
}

fn strict_code(strict: bool, analysis: &Analysis) -> ExitCode {
    if strict && analysis.any_failure() {
        let bad = analysis.plates.iter().filter(|p| !p.status.is_ok()).count();
        let whole = [(analysis.stability.fails(), "overturning"), (analysis.sliding.fails(), "sliding")].iter().filter(|w| w.0).map(|w| w.1).collect::<Vec<_>>().join(" and ");
        let whole = if whole.is_empty() { String::new() } else { format!("; {whole} fails") };
        eprintln!("strict check failed: {bad} base plate(s) over capacity, lifting or sliding{whole}");
        ExitCode::from(EXIT_STRICT_FAILED)
    } else {
        ExitCode::SUCCESS
    }
}

fn read(file: &Path) -> anyhow::Result<Scene> {
    Ok(io::read_scene(file)?)
}

fn load_and_analyse(file: &Path) -> anyhow::Result<(Scene, Analysis)> {
    let scene = read(file)?;
    let analysis = analyse(&scene).map_err(|e| match e {
        AnalysisError::Invalid(v) => anyhow::anyhow!("{}: {v}", file.display()),
        other => anyhow::anyhow!("{}: {other}", file.display()),
    })?;
    Ok((scene, analysis))
}

fn validate(file: &Path) -> anyhow::Result<ExitCode> {
    let scene = read(file)?;
    match plateload::validate(&scene) {
        Err(v) => {
            eprintln!("{}: {v}", file.display());
            Ok(ExitCode::from(EXIT_INVALID))
        }
        Ok(model) => {
            println!(
                "{}: valid — {} posts, {} bearers, {} decks, {} braces, {} loads, {} combinations",
                file.display(),
                scene.posts.len(),
                scene.bearers.len(),
                scene.decks.len(),
                scene.braces.len(),
                scene.loads.len(),
                scene.combinations.len()
            );
            for w in &model.warnings {
                println!("warning: {w}");
            }
            Ok(ExitCode::SUCCESS)
        }
    }
}

/// The human-readable result of `solve`.
fn solve_text(a: &Analysis) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{}\n{CAUTION}\n", a.scene_name);
    let _ = writeln!(s, "findings at a glance:");
    for f in plateload::export::findings::findings(a) {
        let _ = writeln!(s, "  {:<11} {}: {}", f.verdict.label(), f.check, f.text);
    }
    let _ = writeln!(s);
    let _ = write!(s, "{:<10} {:>8} {:>8} {:>9} {:>9} {:>9}", "base", "x m", "y m", "G kN", "Q kN", "W kN");
    for c in &a.combinations {
        let _ = write!(s, " {:>21}", format!("{} max/min kN", c.name));
    }
    let _ = writeln!(s, " {:>7} {:>9} {:>12}  {:<11} method (for max)", "util %", "kPa", "governs", "status");
    for (i, p) in a.plates.iter().enumerate() {
        let _ = write!(s, "{:<10} {:>8.3} {:>8.3} {:>9.3} {:>9.3} {:>9.3}", p.id, num(p.x), num(p.y), num(p.case_kn[0]), num(p.case_kn[1]), num(p.case_kn[2]));
        for c in &p.combinations {
            let _ = write!(s, " {:>10.3}/{:<10.3}", num(c.max_kn), num(c.min_kn));
        }
        let g = p.governing();
        let _ = writeln!(s, " {:>7.1} {:>9.1} {:>12}  {:<11} {}", num(100.0 * g.utilisation), num(g.bearing_kpa), a.combinations[p.governing].name, p.status.label(), a.governing_method_label(i));
    }
    let on_structures: Vec<String> = a.plates.iter().filter_map(|p| p.on_structure.as_ref().map(|e| format!("{} on {e}", p.id))).collect();
    if !on_structures.is_empty() {
        let _ = writeln!(s, "plates on existing structures (loads for the permanent-works designer): {}", on_structures.join(", "));
    }
    if !a.lifts.is_empty() {
        let _ = writeln!(s, "\nposts standing on other members (load they pass on at their base; negative: pulls up):");
        let _ = write!(s, "{:<10} {:<28} {:>9} {:>9} {:>9}", "post", "stands on", "G kN", "Q kN", "W kN");
        for c in &a.combinations {
            let _ = write!(s, " {:>21}", format!("{} max/min kN", c.name));
        }
        let _ = writeln!(s, "  status");
        for l in &a.lifts {
            let _ = write!(s, "{:<10} {:<28} {:>9.3} {:>9.3} {:>9.3}", l.id, l.stands_on, num(l.case_kn[0]), num(l.case_kn[1]), num(l.case_kn[2]));
            for c in &l.combinations {
                let _ = write!(s, " {:>10.3}/{:<10.3}", num(c.max_kn), num(c.min_kn));
            }
            let status = if l.status.uplift && l.spliced {
                "TENSION in the splice: lock the joint (pinned or bolted spigot) for it"
            } else if l.status.uplift {
                "PULLS UP: tie it down or prop it"
            } else if l.status.over { "OVER its support's safe working load" } else { "OK" };
            let _ = writeln!(s, "  {status}");
        }
    }
    if let Some(w) = a.worst_plate() {
        let p = &a.plates[w];
        let g = p.governing();
        let _ = writeln!(s, "\nworst base: {} at {:.1}% ({}, {})", p.id, num(100.0 * g.utilisation), g.governed_by(), a.combinations[p.governing].name);
        for note in a.arrangements_at(w) {
            let _ = writeln!(s, "  arrangement at {}: {}", p.id, note.words());
        }
    }
    let over = a.plates.iter().filter(|p| p.status.over).count();
    let uplift = a.plates.iter().filter(|p| p.status.uplift).count();
    let slides = a.plates.iter().filter(|p| p.status.slides).count();
    let _ = writeln!(s, "over capacity: {over}   lifting: {uplift}   sliding: {slides}   of {} base plates", a.plates.len());
    let g = &a.ground;
    let _ = write!(s, "ground: ");
    match g.allowable_kpa {
        Some(q) => {
            let _ = write!(s, "allowable at formation {:.1} kPa ({})", num(q), g.basis.label());
        }
        None => {
            let _ = write!(s, "no allowable at formation entered: bearing NOT CHECKED (kPa column for information)");
        }
    }
    if let Some(l) = g.layer {
        let added = if g.layer_weight_added_kpa() > 0.0 { "added at formation" } else { "not added" };
        let _ = write!(s, "; granular layer {:.3} m at {:.1} kN/m³ = {:.2} kPa {added}", num(l.thickness_m), num(l.unit_weight_kn_m3), num(l.self_weight_kpa()));
        match l.allowable_kpa {
            Some(q) => {
                let _ = write!(s, "; allowable on the layer {:.1} kPa", num(q));
            }
            None => {
                let _ = write!(s, "; no allowable on the layer entered: layer top NOT CHECKED");
            }
        }
    }
    let _ = writeln!(s);
    let groups = g.formation_groups.iter().chain(&g.surface_groups).count();
    if groups > 0 {
        let _ = writeln!(s, "overlapping bearing areas: {groups} group(s), each plate checked on the larger of its own pressure and its group's total over the union");
    }
    let whole: Vec<&str> = a.whole_loads.iter().map(String::as_str).collect();
    let _ = writeln!(
        s,
        "imposed loads: each in its worst arrangement at every plate{}; {}",
        if whole.is_empty() { String::new() } else { format!(", except {} (applied whole, as set)", whole.join(", ")) },
        a.working_levels.label()
    );
    let methods: Vec<&str> = (0..a.method_count()).map(|m| a.method_label(m)).collect();
    if methods.len() > 1 {
        let _ = writeln!(s, "method: envelope of {} (each max and min is the worse; G/Q/W columns: {})", methods.join("; "), methods[0]);
    } else {
        let _ = writeln!(s, "method: {}", methods[0]);
    }
    let _ = writeln!(s, "\nequilibrium (applied loads against base reactions):");
    let tagged = a.equilibrium_by_method.iter().enumerate().flat_map(|(m, eq)| eq.iter().map(move |e| (m, e)));
    for (m, e) in tagged {
        let tag = if methods.len() > 1 { format!(" [{}]", methods[m]) } else { String::new() };
        if !e.one_state {
            let _ = writeln!(
                s,
                "  {}{tag}: support by support, each two-span model balances (relative {:.1e}); its reactions ({:.3} kN) exceed the applied {:.3} kN by design",
                e.case,
                e.relative,
                num(e.reactions.force[2]),
                num(e.applied.down())
            );
            continue;
        }
        let _ = writeln!(
            s,
            "  {}{tag}: applied {:>10.3} kN down, reactions {:>10.3} kN up, |ΣF| {:.1e} kN, |ΣM| {:.1e} kN·m, relative {:.1e}",
            e.case,
            num(e.applied.down()),
            num(e.reactions.force[2]),
            num(e.force_residual_kn),
            num(e.moment_residual_knm),
            num(e.relative)
        );
    }
    let horizontal = a.horizontal_base_shear();
    if !horizontal.is_empty() {
        let _ = writeln!(s, "base shear under each horizontal load (plates on the structure, kN):");
        for (id, case, [x, y]) in horizontal {
            let _ = writeln!(s, "  {id} ({case}): ({:.3}, {:.3}), {:.3} kN", num(x), num(y), num(x.hypot(y)));
        }
    }
    let h = &a.horizontal;
    let _ = writeln!(s, "\nhorizontal loads go down the braced bays:");
    if h.planes.is_empty() {
        let _ = writeln!(s, "  no braced plane");
    }
    for p in &h.planes {
        let to = p.braced_to_m.map_or("not counted".to_owned(), |z| format!("braced up to {:.3} m", num(z)));
        let cut = p.cut.as_ref().map_or(String::new(), |c| format!(" (bracing above not counted: {c})"));
        let _ = writeln!(s, "  {}: {to}, {} brace(s) in bays {}{cut}", p.name, p.diagonals, p.bays.join(", "));
    }
    for d in &h.diaphragms {
        let _ = writeln!(s, "  {d}");
    }
    if let Some(sharing) = h.sharing {
        let _ = writeln!(s, "  {sharing}");
    }
    let _ = writeln!(s, "  notional load: {}", h.notional);
    for c in &h.combinations {
        let _ = writeln!(s, "  combination {c}");
    }
    let braced: Vec<&plateload::PlateResult> = a.plates.iter().filter(|p| p.brace.max_kn > 5e-10 || p.brace.min_kn < -5e-10 || !p.brace.bays.is_empty()).collect();
    if !braced.is_empty() {
        let bay_names = a.bay_names();
        let _ = writeln!(s, "brace forces at the plates (vertical components, unfactored, worst direction; + down, − up):");
        for p in braced {
            let _ = writeln!(s, "  {:<10} {:>+9.3} / {:>+9.3} kN   bays {}", p.id, num(p.brace.max_kn), num(p.brace.min_kn), if p.brace.bays.is_empty() { "-".to_owned() } else { bay_names_of(&bay_names, &p.brace.bays) });
        }
    }
    let st = &a.stability;
    let _ = write!(s, "\nstability: permanent load {:.3} kN", num(st.permanent_kn));
    if let Some((x, y)) = st.centre_of_gravity {
        let _ = write!(s, ", centre of gravity ({:.3}, {:.3})", num(x), num(y));
    }
    let e = st.equilibrium;
    let _ = writeln!(s, ", target factor {:.2}; equilibrium γG {:.2}/{:.2}, γQ {:.2}, γW {:.2}", num(st.target_factor), num(e.g_unfavourable), num(e.g_favourable), num(e.q), num(e.w));
    if let Some(why) = &st.refused {
        let _ = writeln!(s, "  overturning NOT CHECKED: {why}");
    }
    let mut quiet = 0;
    for structure in &st.structures {
        if structure.axes.iter().all(|x| x.factor.is_none() && x.equ_utilisation.is_none()) {
            quiet += 1;
            continue;
        }
        let _ = writeln!(s, "  {} on plates {}:", structure.label, structure.hull.join(" – "));
        for ax in &structure.axes {
            let Some(f) = ax.factor else {
                let _ = writeln!(s, "    tipping {} about {}: nothing overturns", ax.towards, ax.about);
                continue;
            };
            let overturning = ax.permanent_destabilising_knm + ax.imposed_destabilising_knm + ax.horizontal_destabilising_knm;
            let equ = ax.equ_utilisation.map_or_else(|| "-".to_owned(), |u| format!("{:.2}", num(u)));
            let verdict = if ax.passes() {
                "meets both".to_owned()
            } else {
                match &ax.kentledge {
                    Some(k) => match (k.needed_kn, &k.cannot) {
                        (Some(w), _) => format!("FAILS: needs {:.2} kN kentledge over {} (lever {:.3} m), secured", num(w), k.plates.iter().take(6).cloned().collect::<Vec<_>>().join(", "), num(k.lever_m)),
                        (None, Some(c)) => format!("FAILS: {c}"),
                        (None, None) => "FAILS".to_owned(),
                    },
                    None => "FAILS".to_owned(),
                }
            };
            let _ = writeln!(
                s,
                "    tipping {} about {}: restoring {:.3} / overturning {:.3} kN·m (G {:.3}, Q {:.3}, W {:.3}) = {:.2}; E_dst/E_stb {:.3}/{:.3} = {equ}; {verdict}",
                ax.towards,
                ax.about,
                num(ax.permanent_stabilising_knm),
                num(overturning),
                num(ax.permanent_destabilising_knm),
                num(ax.imposed_destabilising_knm),
                num(ax.horizontal_destabilising_knm),
                num(f),
                num(ax.equ_destabilising_knm),
                num(ax.equ_stabilising_knm)
            );
        }
    }
    if quiet > 0 {
        let _ = writeln!(s, "  {quiet} structure(s): nothing overturns");
    }
    let sl = &a.sliding;
    if !sl.checks.is_empty() {
        let _ = writeln!(s, "sliding (target factor {:.2}):", num(sl.target_factor));
        for c in &sl.checks {
            match &c.not_checked {
                Some(why) => {
                    let _ = writeln!(s, "  {} {}: NOT CHECKED: {why}", c.structure, c.towards);
                }
                None => {
                    let _ = writeln!(
                        s,
                        "  {} {}: friction {:.3} / horizontal {:.3} kN = {:.2}; factored {:.3} against {:.3} kN; {}",
                        c.structure,
                        c.towards,
                        num(c.friction_kn),
                        num(c.horizontal_kn),
                        num(c.factor.unwrap_or(0.0)),
                        num(c.equ_horizontal_kn),
                        num(c.equ_friction_kn),
                        if c.meets_target && c.equ_ok { "meets both" } else { "FAILS" }
                    );
                }
            }
        }
    }
    let held: Vec<&plateload::PlateResult> = a.plates.iter().filter(|p| p.hold_down.is_some()).collect();
    if !held.is_empty() {
        let _ = writeln!(s, "hold-down of lifting plates:");
        for p in held {
            let h = p.hold_down.expect("filtered");
            let k = h.kentledge_kn.map_or_else(String::new, |k| format!(" or {:.3} kN secured kentledge", num(k)));
            let _ = writeln!(s, "  {}: anchor {:.3} kN{k} ({})", p.id, num(h.anchor_kn), a.combinations[h.combination].name);
        }
    }
    let restrained: Vec<&plateload::PlateResult> = a.plates.iter().filter(|p| p.status.slides).collect();
    if !restrained.is_empty() {
        let _ = writeln!(s, "plates to restrain against sliding:");
        for p in restrained {
            let sl = p.sliding.as_ref().expect("a sliding plate has its check");
            let _ = writeln!(
                s,
                "  {}: shear {:.3} kN, least vertical {:.3} kN, μ {:.2}: restraint {:.3} kN ({})",
                p.id,
                num(sl.shear_kn),
                num(sl.normal_kn),
                num(sl.mu.unwrap_or(0.0)),
                num(sl.restraint_kn),
                sl.towards
            );
        }
    }
    if !a.warnings.is_empty() {
        let _ = writeln!(s, "\nwarnings:");
        for w in &a.warnings {
            let _ = writeln!(s, "  - {w}");
        }
    }
    s
}

/// The named bays of a plate, joined.
fn bay_names_of(names: &[String], bays: &[u32]) -> String {
    bays.iter().map(|&b| names.get(b as usize).map_or("?", String::as_str)).collect::<Vec<_>>().join(", ")
}

#[cfg(feature = "viewer")]
fn edit(file: Option<PathBuf>, count_updates: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    let doc = match file {
        Some(path) if path.exists() => app::SceneDoc::new(read(&path)?, Some(path)),
        // A new file starts empty and unsaved; the first save creates it.
        Some(path) => app::SceneDoc::new_file(path),
        None => app::SceneDoc::new(plateload::scene::demo::default_scene(), None),
    };
    app::run(doc, count_updates)?;
    Ok(ExitCode::SUCCESS)
}

#[cfg(feature = "viewer")]
fn snapshot(scene: Scene, out: PathBuf, (w, h): (u32, u32), view: PictureView, combination: Option<usize>, (settle_frames, timing_edits, timing_orbit, without): (u32, u32, u32, Vec<String>), (camera_out, editor_ui, select): (Option<PathBuf>, bool, Option<String>), spare: Option<plateload::solve::influence::Footprint>) -> anyhow::Result<ExitCode> {
    use plateload::edit::pick::ViewPreset;
    let parts = app::view::ViewPart::ALL;
    let without = without
        .iter()
        .map(|w| parts.iter().find(|(n, _)| n == w).map(|p| p.1).ok_or_else(|| anyhow::anyhow!("no part of the view called \"{w}\" (there are: {})", parts.map(|p| p.0).join(", "))))
        .collect::<anyhow::Result<Vec<_>>>()?;
    let view = match view {
        PictureView::Iso => ViewPreset::Iso,
        PictureView::Plan => ViewPreset::Plan,
        PictureView::Front => ViewPreset::Front,
        PictureView::Side => ViewPreset::Side,
    };
    app::snapshot(scene, app::snapshot::PictureSpec { out: out.clone(), size: [w, h], view, combination, settle_frames, timing_edits, timing_orbit, camera_out, editor_ui, select: select.map(plateload::edit::ElementRef::post), without, spare })?;
    eprintln!("wrote {}", out.display());
    eprintln!("{CAUTION}");
    Ok(ExitCode::SUCCESS)
}

#[cfg(not(feature = "viewer"))]
fn snapshot(_: Scene, _: PathBuf, _: (u32, u32), _: PictureView, _: Option<usize>, _: (u32, u32, u32, Vec<String>), _: (Option<PathBuf>, bool, Option<String>), _: Option<plateload::solve::influence::Footprint>) -> anyhow::Result<ExitCode> {
    anyhow::bail!("this build has no renderer (it was built without the `viewer` feature)")
}

#[cfg(not(feature = "viewer"))]
fn edit(_file: Option<PathBuf>, _count_updates: Option<PathBuf>) -> anyhow::Result<ExitCode> {
    use clap::CommandFactory;
    Cli::command().print_help()?;
    anyhow::bail!("this build has no editor (it was built without the `viewer` feature); the other commands all work")
}
