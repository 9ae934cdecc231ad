//! The component catalogue: base jacks, sole plates, member sections, deck types and friction
//! coefficients, each value with its source.
//!
//! The catalogue shipped with the program is `assets/catalogue.ron`, built into the binary
//! ([`shipped`]). A user catalogue adds entries or replaces shipped ones by id: `catalogue.ron`
//! in the config directory (`$XDG_CONFIG_HOME/plateload/`, else `~/.config/plateload/`) and
//! `catalogue.ron` beside the scene file, read in that order, later files winning
//! ([`load_for`]). Files are read with the same `file:line:col` syntax errors as scenes
//! ([`crate::scene::io`]); [`Catalogue::problems`] lists bad values and duplicate ids by entry.
//!
//! A scene never depends on a catalogue: choosing an entry copies its values into the scene
//! element, with the entry's id and source ([`apply_jack`], [`apply_sole_plate`],
//! [`apply_member_to_post`], [`apply_member_to_bearer`], [`apply_deck`]), so a scene file stays
//! complete on its own.

use std::fmt;
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use crate::scene::io::{parse_ron, SceneFileError};
use crate::scene::model::{Bearer, Deck, PlateSize, Post, SupportType};

/// The catalogue shipped with the program, as text.
pub const SHIPPED_TEXT: &str = include_str!("../../assets/catalogue.ron");

/// Name of a user catalogue file, in the config directory or beside a scene.
pub const FILE_NAME: &str = "catalogue.ron";

/// The jack the layout generator and a new scene start from (an example entry).
pub const DEFAULT_JACK: &str = "example-jack-30";
/// The sole plate the layout generator starts from.
pub const DEFAULT_SOLE_PLATE: &str = "board-225x38x450";
/// The member section the layout generator starts from.
pub const DEFAULT_MEMBER: &str = "tube-steel-48.3x4.0";
/// The decking the layout generator starts from.
pub const DEFAULT_DECK: &str = "boards-38-wet";

/// Schema version of catalogue files.
pub const CATALOGUE_FORMAT: u32 = 1;

/// How sure a catalogue value is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize, Deserialize)]
pub enum Confidence {
    /// Read in the named source, or in a secondary that reproduces it.
    Confirmed,
    /// Worked out by hand from confirmed values; the working is in the source text.
    Derived,
    /// Remembered, not checked against the source.
    FromMemory,
    /// Usual site practice, no published source.
    CommonPractice,
    /// A placeholder to be replaced with the manufacturer's value.
    Example,
}

impl Confidence {
    /// Words for lists.
    pub fn label(self) -> &'static str {
        match self {
            Confidence::Confirmed => "confirmed",
            Confidence::Derived => "derived",
            Confidence::FromMemory => "from memory",
            Confidence::CommonPractice => "common practice",
            Confidence::Example => "example",
        }
    }
}

/// A base jack with its base plate.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct JackEntry {
    /// Catalogue id.
    pub id: String,
    /// What it is, in words.
    #[serde(default)]
    pub name: String,
    /// Steel base plate size.
    pub base_plate: PlateSize,
    /// Safe working load, kN, for extensions up to `max_extension_m`.
    pub swl_kn: f64,
    /// Largest extension of the jack the safe working load holds for, m.
    pub max_extension_m: f64,
    /// The values are an example to replace with the manufacturer's.
    #[serde(default)]
    pub example: bool,
    /// How sure the values are.
    pub confidence: Confidence,
    /// Where the values come from.
    pub source: String,
}

/// A timber sole plate or board under a base plate.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SolePlateEntry {
    /// Catalogue id.
    pub id: String,
    /// What it is, in words.
    #[serde(default)]
    pub name: String,
    /// Plan size.
    pub plate: PlateSize,
    /// Thickness, m (informative).
    #[serde(default)]
    pub thickness_m: Option<f64>,
    /// How sure the values are.
    pub confidence: Confidence,
    /// Where the values come from.
    pub source: String,
}

/// A member section: tube or timber.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MemberEntry {
    /// Catalogue id.
    pub id: String,
    /// What it is, in words.
    #[serde(default)]
    pub name: String,
    /// Self-weight, kN/m.
    pub self_weight_kn_per_m: f64,
    /// Bending stiffness EI, kN·m², where known.
    #[serde(default)]
    pub ei_knm2: Option<f64>,
    /// How sure the values are.
    pub confidence: Confidence,
    /// Where the values come from.
    pub source: String,
}

/// A kind of decking.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct DeckEntry {
    /// Catalogue id.
    pub id: String,
    /// What it is, in words.
    #[serde(default)]
    pub name: String,
    /// Self-weight, kPa.
    pub self_weight_kpa: f64,
    /// Bending stiffness EI per metre of width, kN·m²/m, where known.
    #[serde(default)]
    pub ei_knm2_per_m: Option<f64>,
    /// How sure the values are.
    pub confidence: Confidence,
    /// Where the values come from.
    pub source: String,
}

/// A coefficient of friction between two materials.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct FrictionEntry {
    /// Catalogue id.
    pub id: String,
    /// The two surfaces, in words.
    pub interface: String,
    /// Coefficient of friction μ.
    pub mu: f64,
    /// How sure the value is.
    pub confidence: Confidence,
    /// Where the value comes from.
    pub source: String,
}

/// A component catalogue: what one file holds, or several merged.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Catalogue {
    /// Schema version; see [`CATALOGUE_FORMAT`].
    #[serde(default = "catalogue_format")]
    pub format: u32,
    /// Base jacks with their base plates.
    #[serde(default)]
    pub jacks: Vec<JackEntry>,
    /// Sole plates and boards.
    #[serde(default)]
    pub sole_plates: Vec<SolePlateEntry>,
    /// Member sections.
    #[serde(default)]
    pub members: Vec<MemberEntry>,
    /// Deck types.
    #[serde(default)]
    pub decks: Vec<DeckEntry>,
    /// Friction coefficients.
    #[serde(default)]
    pub friction: Vec<FrictionEntry>,
}

fn catalogue_format() -> u32 {
    CATALOGUE_FORMAT
}

impl Default for Catalogue {
    fn default() -> Self {
        Catalogue { format: CATALOGUE_FORMAT, jacks: Vec::new(), sole_plates: Vec::new(), members: Vec::new(), decks: Vec::new(), friction: Vec::new() }
    }
}

/// The lists of a catalogue.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub enum EntryKind {
    /// [`JackEntry`].
    Jack,
    /// [`SolePlateEntry`].
    SolePlate,
    /// [`MemberEntry`].
    Member,
    /// [`DeckEntry`].
    Deck,
    /// [`FrictionEntry`].
    Friction,
    /// The file as a whole.
    File,
}

impl fmt::Display for EntryKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            EntryKind::Jack => "jack",
            EntryKind::SolePlate => "sole plate",
            EntryKind::Member => "member",
            EntryKind::Deck => "deck",
            EntryKind::Friction => "friction",
            EntryKind::File => "catalogue",
        })
    }
}

/// A bad value or a duplicate id in a catalogue.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct CatalogueProblem {
    /// The file (or `<shipped>`).
    pub origin: String,
    /// The list the entry is in.
    pub kind: EntryKind,
    /// The entry's id.
    pub id: String,
    /// What is wrong.
    pub message: String,
}

impl fmt::Display for CatalogueProblem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.id.is_empty() {
            write!(f, "{}: {}: {}", self.origin, self.kind, self.message)
        } else {
            write!(f, "{}: {} {}: {}", self.origin, self.kind, self.id, self.message)
        }
    }
}

/// Largest length accepted, m.
const LIMIT_M: f64 = 100.0;
/// Largest force or stiffness accepted.
const LIMIT: f64 = 1.0e9;

/// Collects the problems of one file.
struct Checker<'a> {
    origin: &'a str,
    out: Vec<CatalogueProblem>,
}

impl Checker<'_> {
    fn bad(&mut self, kind: EntryKind, id: &str, message: String) {
        self.out.push(CatalogueProblem { origin: self.origin.to_owned(), kind, id: id.to_owned(), message });
    }
    /// A finite number above zero (from zero with `zero_ok`) and at most `limit`.
    fn positive(&mut self, kind: EntryKind, id: &str, what: &str, v: f64, limit: f64, zero_ok: bool) {
        if !v.is_finite() {
            self.bad(kind, id, format!("{what} is not a number ({v})"));
        } else if v < 0.0 || (v == 0.0 && !zero_ok) {
            self.bad(kind, id, format!("{what} must be {} (it is {v})", if zero_ok { "zero or more" } else { "more than zero" }));
        } else if v > limit {
            self.bad(kind, id, format!("{what} = {v} is outside the plausible range (up to {limit})"));
        }
    }
    fn plate(&mut self, kind: EntryKind, id: &str, what: &str, p: PlateSize) {
        self.positive(kind, id, &format!("{what} width (m)"), p.width_m, LIMIT_M, false);
        self.positive(kind, id, &format!("{what} length (m)"), p.length_m, LIMIT_M, false);
    }
}

impl Catalogue {
    /// Every bad value and duplicate id, with the entry's id; `origin` names the file.
    pub fn problems(&self, origin: &str) -> Vec<CatalogueProblem> {
        use EntryKind as K;
        let mut c = Checker { origin, out: Vec::new() };
        if self.format != CATALOGUE_FORMAT {
            c.bad(K::File, "", format!("catalogue format {} is not supported (this build reads format {CATALOGUE_FORMAT})", self.format));
        }
        let entries = self
            .jacks
            .iter()
            .map(|e| (K::Jack, e.id.as_str(), e.source.as_str()))
            .chain(self.sole_plates.iter().map(|e| (K::SolePlate, e.id.as_str(), e.source.as_str())))
            .chain(self.members.iter().map(|e| (K::Member, e.id.as_str(), e.source.as_str())))
            .chain(self.decks.iter().map(|e| (K::Deck, e.id.as_str(), e.source.as_str())))
            .chain(self.friction.iter().map(|e| (K::Friction, e.id.as_str(), e.source.as_str())));
        let mut seen = std::collections::HashSet::new();
        for (kind, id, source) in entries {
            if id.trim().is_empty() {
                c.bad(kind, id, "has an empty id".into());
            } else if !seen.insert((kind, id)) {
                c.bad(kind, id, format!("id is used by more than one {kind} entry in this file"));
            }
            if source.trim().is_empty() {
                c.bad(kind, id, "has no source: say where its values come from, or \"from memory\" / \"common practice\"".into());
            }
        }
        for j in &self.jacks {
            c.plate(K::Jack, &j.id, "base plate", j.base_plate);
            c.positive(K::Jack, &j.id, "safe working load (kN)", j.swl_kn, LIMIT, false);
            c.positive(K::Jack, &j.id, "maximum extension (m)", j.max_extension_m, LIMIT_M, true);
            match (j.example, j.confidence) {
                (true, Confidence::Example) | (false, Confidence::Confirmed) => {}
                (true, _) => c.bad(K::Jack, &j.id, "is marked as an example, so its confidence must be Example".into()),
                (false, _) => c.bad(
                    K::Jack,
                    &j.id,
                    "a safe working load needs a manufacturer's or standard's source (confidence Confirmed); otherwise mark the entry `example: true, confidence: Example`".into(),
                ),
            }
        }
        for s in &self.sole_plates {
            c.plate(K::SolePlate, &s.id, "sole plate", s.plate);
            if let Some(t) = s.thickness_m {
                c.positive(K::SolePlate, &s.id, "thickness (m)", t, LIMIT_M, false);
            }
        }
        for m in &self.members {
            c.positive(K::Member, &m.id, "self-weight (kN/m)", m.self_weight_kn_per_m, LIMIT, true);
            if let Some(ei) = m.ei_knm2 {
                c.positive(K::Member, &m.id, "stiffness EI (kN·m²)", ei, LIMIT, false);
            }
        }
        for d in &self.decks {
            c.positive(K::Deck, &d.id, "self-weight (kPa)", d.self_weight_kpa, LIMIT, true);
            if let Some(ei) = d.ei_knm2_per_m {
                c.positive(K::Deck, &d.id, "stiffness EI (kN·m²/m)", ei, LIMIT, false);
            }
        }
        for f in &self.friction {
            c.positive(K::Friction, &f.id, "coefficient of friction", f.mu, 10.0, false);
        }
        c.out
    }

    /// Add `other`'s entries; an entry with the id of one already here replaces it. Returns a
    /// note for every replacement, naming `origin`.
    pub fn merge(&mut self, other: Catalogue, origin: &str) -> Vec<String> {
        let mut notes = Vec::new();
        fn add<T>(list: &mut Vec<T>, new: Vec<T>, id: impl Fn(&T) -> &str, kind: EntryKind, origin: &str, notes: &mut Vec<String>) {
            for e in new {
                match list.iter().position(|o| id(o) == id(&e)) {
                    Some(i) => {
                        notes.push(format!("{kind} {} from {origin} replaces the entry with the same id", id(&e)));
                        list[i] = e;
                    }
                    None => list.push(e),
                }
            }
        }
        add(&mut self.jacks, other.jacks, |e| &e.id, EntryKind::Jack, origin, &mut notes);
        add(&mut self.sole_plates, other.sole_plates, |e| &e.id, EntryKind::SolePlate, origin, &mut notes);
        add(&mut self.members, other.members, |e| &e.id, EntryKind::Member, origin, &mut notes);
        add(&mut self.decks, other.decks, |e| &e.id, EntryKind::Deck, origin, &mut notes);
        add(&mut self.friction, other.friction, |e| &e.id, EntryKind::Friction, origin, &mut notes);
        notes
    }

    /// The jack with this id.
    pub fn jack(&self, id: &str) -> Option<&JackEntry> {
        self.jacks.iter().find(|e| e.id == id)
    }
    /// The sole plate with this id.
    pub fn sole_plate(&self, id: &str) -> Option<&SolePlateEntry> {
        self.sole_plates.iter().find(|e| e.id == id)
    }
    /// The member section with this id.
    pub fn member(&self, id: &str) -> Option<&MemberEntry> {
        self.members.iter().find(|e| e.id == id)
    }
    /// The deck type with this id.
    pub fn deck(&self, id: &str) -> Option<&DeckEntry> {
        self.decks.iter().find(|e| e.id == id)
    }
    /// The friction coefficient with this id.
    pub fn friction(&self, id: &str) -> Option<&FrictionEntry> {
        self.friction.iter().find(|e| e.id == id)
    }
}

/// Parse catalogue text; `origin` names it in errors. Syntax errors are `file:line:col`.
pub fn parse_catalogue(text: &str, origin: &str) -> Result<Catalogue, SceneFileError> {
    parse_ron(text, origin)
}

/// Read a catalogue file.
pub fn read_catalogue(path: &Path) -> Result<Catalogue, SceneFileError> {
    let text = std::fs::read_to_string(path).map_err(|source| SceneFileError::Io { path: path.to_owned(), source })?;
    parse_catalogue(&text, &path.display().to_string())
}

/// The catalogue shipped with the program (read once).
pub fn shipped() -> &'static Catalogue {
    static SHIPPED: std::sync::OnceLock<Catalogue> = std::sync::OnceLock::new();
    // The tests check that the shipped file parses and has no problems; were it broken, the
    // program would still run, with an empty catalogue.
    SHIPPED.get_or_init(|| parse_catalogue(SHIPPED_TEXT, SHIPPED_ORIGIN).unwrap_or_default())
}

/// How the shipped catalogue is named in messages.
pub const SHIPPED_ORIGIN: &str = "<shipped catalogue>";

/// The user catalogue in the config directory: `$XDG_CONFIG_HOME/plateload/catalogue.ron`, else
/// `$HOME/.config/plateload/catalogue.ron` (`%APPDATA%\plateload\catalogue.ron` on Windows);
/// `None` if none of these variables is set.
pub fn config_path() -> Option<PathBuf> {
    let var = |k: &str| std::env::var_os(k).filter(|v| !v.is_empty()).map(PathBuf::from);
    let dir = var("XDG_CONFIG_HOME").or_else(|| var("HOME").map(|h| h.join(".config"))).or_else(|| var("APPDATA"))?;
    Some(dir.join("plateload").join(FILE_NAME))
}

/// The user catalogue beside a scene file.
pub fn beside_scene(scene_path: &Path) -> PathBuf {
    scene_path.parent().filter(|p| !p.as_os_str().is_empty()).unwrap_or(Path::new(".")).join(FILE_NAME)
}

/// A catalogue put together from the shipped one and the user's files.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct LoadedCatalogue {
    /// The merged entries.
    pub catalogue: Catalogue,
    /// The user files read, in order.
    pub files: Vec<PathBuf>,
    /// Entries of a user file that replace earlier ones.
    pub notes: Vec<String>,
    /// Files that could not be read (they are left out whole) and bad entries (left out).
    pub problems: Vec<String>,
}

/// The shipped catalogue merged with the user's: the one in `config` (see [`config_path`]) and
/// the one beside the scene file, in that order; a later entry with the same id wins. A file
/// that does not exist is skipped; one that cannot be read or parsed is left out and named in
/// [`LoadedCatalogue::problems`]; so is every bad entry (the rest of its file still counts).
pub fn load(config: Option<&Path>, scene_path: Option<&Path>) -> LoadedCatalogue {
    let mut out = LoadedCatalogue { catalogue: shipped().clone(), ..LoadedCatalogue::default() };
    let mut paths: Vec<PathBuf> = config.map(Path::to_owned).into_iter().collect();
    if let Some(scene) = scene_path {
        let beside = beside_scene(scene);
        if !paths.iter().any(|p| same_file(p, &beside)) {
            paths.push(beside);
        }
    }
    for path in paths {
        if !path.exists() {
            continue;
        }
        let origin = path.display().to_string();
        match read_catalogue(&path) {
            Err(e) => out.problems.push(format!("{e} (the file is left out)")),
            Ok(mut c) => {
                let problems = c.problems(&origin);
                for p in &problems {
                    out.problems.push(format!("{p} (the entry is left out)"));
                }
                drop_bad(&mut c, &problems);
                out.notes.extend(out.catalogue.merge(c, &origin));
                out.files.push(path);
            }
        }
    }
    out
}

/// [`load`] with the config directory's catalogue ([`config_path`]).
pub fn load_for(scene_path: Option<&Path>) -> LoadedCatalogue {
    load(config_path().as_deref(), scene_path)
}

fn same_file(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(a), Ok(b)) => a == b,
        _ => a == b,
    }
}

/// Remove the entries named in `problems` (all entries with that id in that list).
fn drop_bad(c: &mut Catalogue, problems: &[CatalogueProblem]) {
    let is_bad = |kind: EntryKind, id: &str| problems.iter().any(|p| p.kind == kind && p.id == id);
    c.jacks.retain(|e| !is_bad(EntryKind::Jack, &e.id));
    c.sole_plates.retain(|e| !is_bad(EntryKind::SolePlate, &e.id));
    c.members.retain(|e| !is_bad(EntryKind::Member, &e.id));
    c.decks.retain(|e| !is_bad(EntryKind::Deck, &e.id));
    c.friction.retain(|e| !is_bad(EntryKind::Friction, &e.id));
}

/// Copy a jack's values into a support type: base plate, safe working load, the extension it
/// holds for, the catalogue id, the source, and whether the values are an example.
pub fn apply_jack(s: &mut SupportType, jack: &JackEntry) {
    s.base_plate = jack.base_plate;
    s.swl_kn = jack.swl_kn;
    s.max_extension_m = Some(jack.max_extension_m);
    s.catalogue_id = Some(jack.id.clone());
    s.source = jack.source.clone();
    s.example = jack.example;
}

/// Put a sole plate under a support type (its size and catalogue id), or take it away (`None`).
pub fn apply_sole_plate(s: &mut SupportType, sole: Option<&SolePlateEntry>) {
    s.sole_plate = sole.map(|e| e.plate);
    s.sole_plate_id = sole.map(|e| e.id.clone());
}

/// Copy a member section's self-weight and id into a post.
pub fn apply_member_to_post(p: &mut Post, m: &MemberEntry) {
    p.self_weight_kn_per_m = m.self_weight_kn_per_m;
    p.section = Some(m.id.clone());
}

/// Copy a member section's self-weight and id into a bearer.
pub fn apply_member_to_bearer(b: &mut Bearer, m: &MemberEntry) {
    b.self_weight_kn_per_m = m.self_weight_kn_per_m;
    b.section = Some(m.id.clone());
}

/// Copy a deck type's self-weight and id into a deck.
pub fn apply_deck(d: &mut Deck, e: &DeckEntry) {
    d.self_weight_kpa = e.self_weight_kpa;
    d.decking = Some(e.id.clone());
}

/// A support type made from a jack and an optional sole plate, under the given id.
pub fn support_type(id: &str, jack: &JackEntry, sole: Option<&SolePlateEntry>) -> SupportType {
    let mut s = SupportType::new(id, jack.base_plate, jack.swl_kn, None);
    apply_jack(&mut s, jack);
    apply_sole_plate(&mut s, sole);
    s
}

/// Whether a support type carries example values: marked so, or still holding the safe working
/// load of a shipped example jack it names.
pub fn uses_example_values(s: &SupportType) -> bool {
    s.example || s.catalogue_id.as_deref().and_then(|id| shipped_example_swl(id)).is_some_and(|swl| swl == s.swl_kn)
}

fn shipped_example_swl(id: &str) -> Option<f64> {
    shipped().jack(id).filter(|j| j.example).map(|j| j.swl_kn)
}

/// The catalogue as text for a terminal: one line per entry, with its values and source.
pub fn list_text(c: &Catalogue) -> String {
    use std::fmt::Write;
    let mut s = String::new();
    let mm = |p: PlateSize| format!("{:.0} × {:.0} mm", p.width_m * 1000.0, p.length_m * 1000.0);
    let _ = writeln!(s, "base jacks (safe working load up to the extension given):");
    for j in &c.jacks {
        let tag = if j.example { "  EXAMPLE — replace with the manufacturer's value" } else { "" };
        let _ = writeln!(s, "  {:<24} SWL {} kN up to {} m extension, plate {}{tag}", j.id, j.swl_kn, j.max_extension_m, mm(j.base_plate));
        let _ = writeln!(s, "  {:<24} {} [{}] source: {}", "", j.name, j.confidence.label(), j.source);
    }
    let _ = writeln!(s, "sole plates:");
    for e in &c.sole_plates {
        let _ = writeln!(s, "  {:<24} {}, {} [{}] source: {}", e.id, mm(e.plate), e.name, e.confidence.label(), e.source);
    }
    let _ = writeln!(s, "member sections:");
    for e in &c.members {
        let ei = e.ei_knm2.map_or(String::new(), |v| format!(", EI {v} kN·m²"));
        let _ = writeln!(s, "  {:<24} {} kN/m{ei} [{}] source: {}", e.id, e.self_weight_kn_per_m, e.confidence.label(), e.source);
    }
    let _ = writeln!(s, "deck types:");
    for e in &c.decks {
        let ei = e.ei_knm2_per_m.map_or(String::new(), |v| format!(", EI {v} kN·m²/m"));
        let _ = writeln!(s, "  {:<24} {} kPa{ei} [{}] source: {}", e.id, e.self_weight_kpa, e.confidence.label(), e.source);
    }
    let _ = writeln!(s, "friction coefficients:");
    for e in &c.friction {
        let _ = writeln!(s, "  {:<28} μ {} ({}) [{}] source: {}", e.id, e.mu, e.interface, e.confidence.label(), e.source);
    }
    s
}
