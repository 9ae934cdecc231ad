//! Undoable edits of a scene: the only way the editor changes one.
//!
//! An [`Edit`] is a command (add, replace, move, delete, duplicate, set the site or the
//! combinations, apply a generated layout). [`Edit::apply`] changes the scene and returns an
//! [`Undo`] that puts it back exactly, element order included; undoing returns the redo in turn.
//! Every edit is made of a few primitive changes (insert, remove or replace one element, set the
//! site, …) and an edit that fails part-way rolls back what it did, so a failed edit leaves the
//! scene as it was. [`History`] keeps the undo and redo stacks.
//!
//! Elements refer to each other by id (a bearer to its posts, a deck to its bearers, a load to
//! its deck…). [`dependants`] lists what refers to an element; deleting an element others
//! depend on is refused with that list, unless the caller asks to delete them too
//! ([`DeleteMode::Cascade`]) or to unhook the members that can stand without it
//! ([`DeleteMode::Detach`]). Renaming an element (replacing it with a different id) rewrites
//! every reference to it.
//!
//! The module also has the small placement helpers the editor's tools use ([`place`]): grid
//! snap, fresh ids, a post where the user clicked, a bearer along picked posts, a deck across
//! picked bearers. They only arrange what the user asked for; no engineering value comes from
//! them.

use std::collections::{HashMap, HashSet};
use std::fmt;

use crate::scene::combination::Combination;
use crate::scene::layout::{add_layout, LayoutSpec};
use crate::scene::loads::{KentledgePlace, Load, LoadKind};
use crate::scene::model::{AnalysisSettings, Bearer, Brace, Deck, ElementKind, ExistingStructure, Post, Scene, Site, StabilitySettings, SupportType};

/// One element of a scene named by kind and id.
#[derive(Debug, Clone, PartialEq, Eq, Hash)]
pub struct ElementRef {
    /// Kind of element.
    pub kind: ElementKind,
    /// Its id (empty for the site).
    pub id: String,
}

impl ElementRef {
    /// A reference to an element.
    pub fn new(kind: ElementKind, id: impl Into<String>) -> Self {
        ElementRef { kind, id: id.into() }
    }
    /// A post (and its base plate).
    pub fn post(id: impl Into<String>) -> Self {
        Self::new(ElementKind::Post, id)
    }
}

impl fmt::Display for ElementRef {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.id.is_empty() {
            write!(f, "{}", self.kind)
        } else {
            write!(f, "{} {}", self.kind, self.id)
        }
    }
}

/// A whole element of any kind that lives in one of the scene's lists.
#[derive(Debug, Clone, PartialEq)]
#[allow(missing_docs)]
pub enum Element {
    SupportType(SupportType),
    Post(Post),
    Bearer(Bearer),
    Deck(Deck),
    Brace(Brace),
    ExistingStructure(ExistingStructure),
    Load(Load),
}

impl Element {
    /// Its kind.
    pub fn kind(&self) -> ElementKind {
        match self {
            Element::SupportType(_) => ElementKind::SupportType,
            Element::Post(_) => ElementKind::Post,
            Element::Bearer(_) => ElementKind::Bearer,
            Element::Deck(_) => ElementKind::Deck,
            Element::Brace(_) => ElementKind::Brace,
            Element::ExistingStructure(_) => ElementKind::ExistingStructure,
            Element::Load(_) => ElementKind::Load,
        }
    }
    /// Its id.
    pub fn id(&self) -> &str {
        match self {
            Element::SupportType(e) => &e.id,
            Element::Post(e) => &e.id,
            Element::Bearer(e) => &e.id,
            Element::Deck(e) => &e.id,
            Element::Brace(e) => &e.id,
            Element::ExistingStructure(e) => &e.id,
            Element::Load(e) => &e.id,
        }
    }
    fn id_mut(&mut self) -> &mut String {
        match self {
            Element::SupportType(e) => &mut e.id,
            Element::Post(e) => &mut e.id,
            Element::Bearer(e) => &mut e.id,
            Element::Deck(e) => &mut e.id,
            Element::Brace(e) => &mut e.id,
            Element::ExistingStructure(e) => &mut e.id,
            Element::Load(e) => &mut e.id,
        }
    }
    /// A reference to it.
    pub fn to_ref(&self) -> ElementRef {
        ElementRef::new(self.kind(), self.id())
    }
}

/// Find an element by kind and id: its index in its list.
pub fn index_of(scene: &Scene, r: &ElementRef) -> Option<usize> {
    let id = r.id.as_str();
    match r.kind {
        ElementKind::SupportType => scene.support_types.iter().position(|e| e.id == id),
        ElementKind::Post => scene.posts.iter().position(|e| e.id == id),
        ElementKind::Bearer => scene.bearers.iter().position(|e| e.id == id),
        ElementKind::Deck => scene.decks.iter().position(|e| e.id == id),
        ElementKind::Brace => scene.braces.iter().position(|e| e.id == id),
        ElementKind::ExistingStructure => scene.existing_structures.iter().position(|e| e.id == id),
        ElementKind::Load => scene.loads.iter().position(|e| e.id == id),
        ElementKind::Combination | ElementKind::Site => None,
    }
}

/// A copy of the element at `index` of the list of `kind`.
fn element_at(scene: &Scene, kind: ElementKind, index: usize) -> Option<Element> {
    Some(match kind {
        ElementKind::SupportType => Element::SupportType(scene.support_types.get(index)?.clone()),
        ElementKind::Post => Element::Post(scene.posts.get(index)?.clone()),
        ElementKind::Bearer => Element::Bearer(scene.bearers.get(index)?.clone()),
        ElementKind::Deck => Element::Deck(scene.decks.get(index)?.clone()),
        ElementKind::Brace => Element::Brace(scene.braces.get(index)?.clone()),
        ElementKind::ExistingStructure => Element::ExistingStructure(scene.existing_structures.get(index)?.clone()),
        ElementKind::Load => Element::Load(scene.loads.get(index)?.clone()),
        ElementKind::Combination | ElementKind::Site => return None,
    })
}

/// A copy of an element by reference.
pub fn get(scene: &Scene, r: &ElementRef) -> Option<Element> {
    element_at(scene, r.kind, index_of(scene, r)?)
}

/// How to delete an element that others depend on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum DeleteMode {
    /// Refuse with [`EditError::HasDependants`], listing them.
    #[default]
    Refuse,
    /// Delete everything that depends on it too, all the way down (a post takes the bearers
    /// on it, their decks and the loads on those).
    Cascade,
    /// Take the deleted post out of the bearers resting on it and the deleted bearer out of the
    /// decks on it, as long as a bearer keeps two posts and a deck two bearers; delete what
    /// cannot stand without it (braces, loads, shorter members) as in [`DeleteMode::Cascade`].
    Detach,
}

/// A command that changes a scene.
#[derive(Debug, Clone, PartialEq)]
pub enum Edit {
    /// Add an element at the end of its list. Its id must be new.
    Add(Element),
    /// Replace the element `id` (of the same kind) with `with`: this is how fields are set.
    /// If `with` has another id the element is renamed and every reference to it follows.
    Replace {
        /// Id of the element to replace.
        id: String,
        /// The new value.
        with: Element,
    },
    /// Move elements by (dx, dy, dz), m. A post moves in plan and level; a deck moves its extent
    /// and level; a bearer and a brace change level only (their plan position is their posts');
    /// a load moves its point, patch, face or level where it has one.
    Move {
        /// What to move.
        targets: Vec<ElementRef>,
        /// Offset (x, y, z), m.
        by: [f64; 3],
    },
    /// Delete elements.
    Delete {
        /// What to delete.
        targets: Vec<ElementRef>,
        /// What to do with the elements that depend on them.
        mode: DeleteMode,
    },
    /// Copy elements under new ids, then move the copies by `by`. References between copied
    /// elements point to the copies; references to elements not copied stay.
    Duplicate {
        /// What to copy.
        targets: Vec<ElementRef>,
        /// Offset of the copies (x, y, z), m.
        by: [f64; 3],
    },
    /// Set the site and ground data.
    SetSite(Site),
    /// Set the load combinations.
    SetCombinations(Vec<Combination>),
    /// Set the stability check settings.
    SetStability(StabilitySettings),
    /// Set how members are analysed (simple spans, continuous or the envelope) and their stiffness.
    SetAnalysis(AnalysisSettings),
    /// Add a generated layout; with `replace`, every element of the scene is removed first
    /// (site, combinations and settings stay).
    ApplyLayout {
        /// What to generate.
        spec: LayoutSpec,
        /// Start from an empty scene.
        replace: bool,
    },
    /// Several edits as one undo step, applied in order; if one fails, none stays.
    Batch {
        /// Name of the step.
        label: String,
        /// The edits.
        edits: Vec<Edit>,
    },
}

impl Edit {
    /// Short description for the undo menu.
    pub fn label(&self) -> String {
        let many = |verb: &str, t: &[ElementRef]| match t {
            [one] => format!("{verb} {one}"),
            _ => format!("{verb} {} elements", t.len()),
        };
        match self {
            Edit::Add(e) => format!("add {}", e.to_ref()),
            Edit::Replace { id, with } if id != with.id() => format!("rename {} {id} to {}", with.kind(), with.id()),
            Edit::Replace { with, .. } => format!("edit {}", with.to_ref()),
            Edit::Move { targets, .. } => many("move", targets),
            Edit::Delete { targets, .. } => many("delete", targets),
            Edit::Duplicate { targets, .. } => many("duplicate", targets),
            Edit::SetSite(_) => "edit site".into(),
            Edit::SetCombinations(_) => "edit combinations".into(),
            Edit::SetStability(_) => "edit stability settings".into(),
            Edit::SetAnalysis(_) => "edit analysis method".into(),
            Edit::ApplyLayout { spec, replace } => {
                let what = format!("{} × {} bay layout", spec.bays_x, spec.bays_y);
                if *replace { format!("replace scene with {what}") } else { format!("add {what}") }
            }
            Edit::Batch { label, .. } => label.clone(),
        }
    }

    /// Apply the edit; on success the returned [`Undo`] restores the scene exactly.
    pub fn apply(&self, scene: &mut Scene) -> Result<Undo, EditError> {
        let mut tx = Tx { scene, done: Vec::new() };
        match tx.edit(self) {
            Ok(()) => Ok(Undo { changes: tx.done }),
            Err(e) => {
                tx.rollback();
                Err(e)
            }
        }
    }
}

/// Why an edit was refused. The scene is unchanged.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum EditError {
    /// No such element.
    NotFound(ElementRef),
    /// The id is already used by another element.
    IdTaken {
        /// The id.
        id: String,
        /// Kind of the element that has it.
        by: ElementKind,
    },
    /// The id is empty.
    EmptyId(ElementKind),
    /// A replacement of another kind than the element it replaces.
    KindMismatch {
        /// The element.
        element: ElementRef,
        /// Kind of the replacement.
        with: ElementKind,
    },
    /// Other elements depend on one being deleted.
    HasDependants {
        /// The element.
        element: ElementRef,
        /// What depends on it (directly).
        dependants: Vec<ElementRef>,
    },
    /// A placement helper could not make what was asked.
    Placement(String),
}

impl fmt::Display for EditError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            EditError::NotFound(r) => write!(f, "there is no {r} in the scene"),
            EditError::IdTaken { id, by } => write!(f, "the id \"{id}\" is already used by a {by}; ids must be unique in the scene"),
            EditError::EmptyId(kind) => write!(f, "a {kind} needs an id"),
            EditError::KindMismatch { element, with } => write!(f, "{element} cannot be replaced by a {with}"),
            EditError::HasDependants { element, dependants } => {
                let n = dependants.len();
                let shown: Vec<String> = dependants.iter().take(12).map(|d| d.to_string()).collect();
                let more = if n > shown.len() { format!(" and {} more", n - shown.len()) } else { String::new() };
                write!(
                    f,
                    "{element} cannot be deleted on its own: {n} element{} depend{} on it ({}{more}). Delete them too, or unhook the members from it.",
                    if n == 1 { "" } else { "s" },
                    if n == 1 { "s" } else { "" },
                    shown.join(", ")
                )
            }
            EditError::Placement(why) => f.write_str(why),
        }
    }
}

impl std::error::Error for EditError {}

/// Puts a scene back after an edit. Applying it returns the [`Undo`] that redoes the edit.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Undo {
    /// Inverse changes, in the order they were made (applied last first).
    changes: Vec<Change>,
}

impl Undo {
    /// Undo (or redo) on the scene the edit was applied to; returns the opposite step.
    pub fn apply(self, scene: &mut Scene) -> Undo {
        let changes = self.changes.into_iter().rev().map(|c| change(scene, c)).collect();
        Undo { changes }
    }
    /// Whether the edit changed nothing.
    pub fn is_empty(&self) -> bool {
        self.changes.is_empty()
    }
    /// One undo for `self` followed by `later`: undoes `later` first.
    fn then(self, later: Undo) -> Undo {
        let mut changes = self.changes;
        changes.extend(later.changes);
        Undo { changes }
    }
}

/// A primitive change; applying one returns its inverse.
#[derive(Debug, Clone, PartialEq)]
enum Change {
    Insert { index: usize, element: Element },
    Remove { kind: ElementKind, index: usize },
    Replace { index: usize, element: Element },
    Site(Site),
    Combinations(Vec<Combination>),
    Stability(StabilitySettings),
    Analysis(AnalysisSettings),
}

fn change(scene: &mut Scene, c: Change) -> Change {
    fn insert<T>(v: &mut Vec<T>, i: usize, e: T) {
        v.insert(i.min(v.len()), e);
    }
    fn swap<T>(v: &mut [T], i: usize, e: T) -> T {
        std::mem::replace(&mut v[i], e)
    }
    match c {
        Change::Insert { index, element } => {
            let kind = element.kind();
            match element {
                Element::SupportType(e) => insert(&mut scene.support_types, index, e),
                Element::Post(e) => insert(&mut scene.posts, index, e),
                Element::Bearer(e) => insert(&mut scene.bearers, index, e),
                Element::Deck(e) => insert(&mut scene.decks, index, e),
                Element::Brace(e) => insert(&mut scene.braces, index, e),
                Element::ExistingStructure(e) => insert(&mut scene.existing_structures, index, e),
                Element::Load(e) => insert(&mut scene.loads, index, e),
            }
            Change::Remove { kind, index }
        }
        Change::Remove { kind, index } => {
            let element = match kind {
                ElementKind::SupportType => Element::SupportType(scene.support_types.remove(index)),
                ElementKind::Post => Element::Post(scene.posts.remove(index)),
                ElementKind::Bearer => Element::Bearer(scene.bearers.remove(index)),
                ElementKind::Deck => Element::Deck(scene.decks.remove(index)),
                ElementKind::Brace => Element::Brace(scene.braces.remove(index)),
                ElementKind::ExistingStructure => Element::ExistingStructure(scene.existing_structures.remove(index)),
                ElementKind::Load => Element::Load(scene.loads.remove(index)),
                ElementKind::Combination | ElementKind::Site => unreachable!("not a list element"),
            };
            Change::Insert { index, element }
        }
        Change::Replace { index, element } => {
            let old = match element {
                Element::SupportType(e) => Element::SupportType(swap(&mut scene.support_types, index, e)),
                Element::Post(e) => Element::Post(swap(&mut scene.posts, index, e)),
                Element::Bearer(e) => Element::Bearer(swap(&mut scene.bearers, index, e)),
                Element::Deck(e) => Element::Deck(swap(&mut scene.decks, index, e)),
                Element::Brace(e) => Element::Brace(swap(&mut scene.braces, index, e)),
                Element::ExistingStructure(e) => Element::ExistingStructure(swap(&mut scene.existing_structures, index, e)),
                Element::Load(e) => Element::Load(swap(&mut scene.loads, index, e)),
            };
            Change::Replace { index, element: old }
        }
        Change::Site(s) => Change::Site(std::mem::replace(&mut scene.site, s)),
        Change::Combinations(c) => Change::Combinations(std::mem::replace(&mut scene.combinations, c)),
        Change::Stability(s) => Change::Stability(std::mem::replace(&mut scene.stability, s)),
        Change::Analysis(a) => Change::Analysis(std::mem::replace(&mut scene.analysis, a)),
    }
}

/// An edit in progress: every primitive change made, so it can be rolled back.
struct Tx<'a> {
    scene: &'a mut Scene,
    done: Vec<Change>,
}

impl Tx<'_> {
    fn make(&mut self, c: Change) {
        let inverse = change(self.scene, c);
        self.done.push(inverse);
    }

    fn rollback(&mut self) {
        for c in std::mem::take(&mut self.done).into_iter().rev() {
            change(self.scene, c);
        }
    }

    fn edit(&mut self, edit: &Edit) -> Result<(), EditError> {
        match edit {
            Edit::Add(e) => self.add(e.clone()),
            Edit::Replace { id, with } => self.replace(id, with.clone()),
            Edit::Move { targets, by } => self.move_by(targets, *by),
            Edit::Delete { targets, mode } => self.delete(targets, *mode),
            Edit::Duplicate { targets, by } => self.duplicate(targets, *by),
            Edit::SetSite(s) => {
                self.make(Change::Site(s.clone()));
                Ok(())
            }
            Edit::SetCombinations(c) => {
                self.make(Change::Combinations(c.clone()));
                Ok(())
            }
            Edit::SetStability(s) => {
                self.make(Change::Stability(s.clone()));
                Ok(())
            }
            Edit::SetAnalysis(a) => {
                self.make(Change::Analysis(*a));
                Ok(())
            }
            Edit::ApplyLayout { spec, replace } => self.layout(spec, *replace),
            Edit::Batch { edits, .. } => edits.iter().try_for_each(|e| self.edit(e)),
        }
    }

    fn check_new_id(&self, id: &str, kind: ElementKind, except: Option<&ElementRef>) -> Result<(), EditError> {
        if id.trim().is_empty() {
            return Err(EditError::EmptyId(kind));
        }
        match self.scene.element_ids().find(|(k, i)| *i == id && except.is_none_or(|x| !(x.kind == *k && x.id == id))) {
            Some((by, _)) => Err(EditError::IdTaken { id: id.to_owned(), by }),
            None => Ok(()),
        }
    }

    fn add(&mut self, e: Element) -> Result<(), EditError> {
        self.check_new_id(e.id(), e.kind(), None)?;
        let index = list_len(self.scene, e.kind());
        self.make(Change::Insert { index, element: e });
        Ok(())
    }

    fn replace(&mut self, id: &str, with: Element) -> Result<(), EditError> {
        let kind = with.kind();
        let old = ElementRef::new(kind, id);
        let index = index_of(self.scene, &old).ok_or_else(|| EditError::NotFound(old.clone()))?;
        if with.id() != id {
            self.check_new_id(with.id(), kind, Some(&old))?;
            let new_id = with.id().to_owned();
            self.make(Change::Replace { index, element: with });
            self.rename_references(&old, &new_id);
        } else if element_at(self.scene, kind, index).as_ref() != Some(&with) {
            self.make(Change::Replace { index, element: with });
        }
        Ok(())
    }

    /// Point every reference to `old` at `new_id`.
    fn rename_references(&mut self, old: &ElementRef, new_id: &str) {
        for d in dependants(self.scene, old) {
            let Some(index) = index_of(self.scene, &d) else { continue };
            let Some(mut e) = element_at(self.scene, d.kind, index) else { continue };
            rewrite_refs(&mut e, &|kind, id: &mut String| {
                if kind == old.kind && *id == old.id {
                    *id = new_id.to_owned();
                }
            });
            self.make(Change::Replace { index, element: e });
        }
    }

    fn move_by(&mut self, targets: &[ElementRef], by: [f64; 3]) -> Result<(), EditError> {
        for t in targets {
            let index = index_of(self.scene, t).ok_or_else(|| EditError::NotFound(t.clone()))?;
            let mut e = element_at(self.scene, t.kind, index).expect("index just found");
            shift(&mut e, by);
            self.make(Change::Replace { index, element: e });
        }
        Ok(())
    }

    fn delete(&mut self, targets: &[ElementRef], mode: DeleteMode) -> Result<(), EditError> {
        for t in targets {
            if index_of(self.scene, t).is_none() {
                return Err(EditError::NotFound(t.clone()));
            }
        }
        let mut doomed: HashSet<ElementRef> = targets.iter().cloned().collect();
        // Members that lose a support but keep standing (Detach): new post / bearer lists.
        let mut unhooked: HashMap<ElementRef, Element> = HashMap::new();
        let mut queue: Vec<ElementRef> = targets.to_vec();
        while let Some(t) = queue.pop() {
            for d in dependants(self.scene, &t) {
                if doomed.contains(&d) {
                    continue;
                }
                match mode {
                    DeleteMode::Refuse => {
                        let all: Vec<ElementRef> = dependants(self.scene, &t).into_iter().filter(|d| !doomed.contains(d)).collect();
                        return Err(EditError::HasDependants { element: t.clone(), dependants: all });
                    }
                    DeleteMode::Detach if matches!(d.kind, ElementKind::Bearer | ElementKind::Deck) => {
                        let current = unhooked.get(&d).cloned().or_else(|| get(self.scene, &d)).expect("dependant exists");
                        match without_support(current, &t) {
                            Some(kept) => {
                                unhooked.insert(d, kept);
                            }
                            None => {
                                unhooked.remove(&d);
                                doomed.insert(d.clone());
                                queue.push(d);
                            }
                        }
                    }
                    _ => {
                        doomed.insert(d.clone());
                        queue.push(d);
                    }
                }
            }
        }
        for (r, e) in unhooked {
            if !doomed.contains(&r) {
                let index = index_of(self.scene, &r).expect("dependant exists");
                self.make(Change::Replace { index, element: e });
            }
        }
        // Remove from the back of each list so earlier indices stay valid.
        let mut order: Vec<(ElementKind, usize)> = doomed.iter().filter_map(|r| index_of(self.scene, r).map(|i| (r.kind, i))).collect();
        order.sort_by(|a, b| kind_rank(a.0).cmp(&kind_rank(b.0)).then(b.1.cmp(&a.1)));
        for (kind, index) in order {
            self.make(Change::Remove { kind, index });
        }
        Ok(())
    }

    fn duplicate(&mut self, targets: &[ElementRef], by: [f64; 3]) -> Result<(), EditError> {
        let mut used: HashSet<String> = self.scene.element_ids().map(|(_, id)| id.to_owned()).collect();
        let mut renamed: HashMap<ElementRef, String> = HashMap::new();
        let mut copies = Vec::with_capacity(targets.len());
        for t in targets {
            let e = get(self.scene, t).ok_or_else(|| EditError::NotFound(t.clone()))?;
            let id = place::fresh_copy_id(&t.id, &used);
            used.insert(id.clone());
            renamed.insert(t.clone(), id);
            copies.push(e);
        }
        for mut e in copies {
            let new_id = renamed[&e.to_ref()].clone();
            *e.id_mut() = new_id;
            rewrite_refs(&mut e, &|kind, id: &mut String| {
                if let Some(n) = renamed.get(&ElementRef::new(kind, id.as_str())) {
                    *id = n.clone();
                }
            });
            shift(&mut e, by);
            self.add(e)?;
        }
        Ok(())
    }

    fn layout(&mut self, spec: &LayoutSpec, replace: bool) -> Result<(), EditError> {
        if replace {
            let all: Vec<(ElementKind, usize)> = [
                (ElementKind::Load, self.scene.loads.len()),
                (ElementKind::Brace, self.scene.braces.len()),
                (ElementKind::Deck, self.scene.decks.len()),
                (ElementKind::Bearer, self.scene.bearers.len()),
                (ElementKind::Post, self.scene.posts.len()),
                (ElementKind::ExistingStructure, self.scene.existing_structures.len()),
                (ElementKind::SupportType, self.scene.support_types.len()),
            ]
            .into_iter()
            .flat_map(|(k, n)| (0..n).rev().map(move |i| (k, i)))
            .collect();
            for (kind, index) in all {
                self.make(Change::Remove { kind, index });
            }
        }
        let mut generated = Scene::empty("", 1.0);
        generated.support_types = self.scene.support_types.clone();
        let known_supports = generated.support_types.len();
        add_layout(&mut generated, spec);
        let Scene { support_types, posts, bearers, decks, braces, loads, .. } = generated;
        let new = support_types
            .into_iter()
            .skip(known_supports)
            .map(Element::SupportType)
            .chain(posts.into_iter().map(Element::Post))
            .chain(bearers.into_iter().map(Element::Bearer))
            .chain(decks.into_iter().map(Element::Deck))
            .chain(braces.into_iter().map(Element::Brace))
            .chain(loads.into_iter().map(Element::Load));
        let mut used: HashMap<String, ElementKind> = self.scene.element_ids().map(|(k, id)| (id.to_owned(), k)).collect();
        let mut clashes = Vec::new();
        let mut adds = Vec::new();
        for e in new {
            match used.insert(e.id().to_owned(), e.kind()) {
                Some(_) => clashes.push(e.id().to_owned()),
                None => adds.push(e),
            }
        }
        if !clashes.is_empty() {
            let shown = clashes.iter().take(8).cloned().collect::<Vec<_>>().join(", ");
            return Err(EditError::Placement(format!(
                "the layout's ids are already in the scene ({shown}{}); give the layout an id prefix or replace the scene",
                if clashes.len() > 8 { ", …" } else { "" }
            )));
        }
        for e in adds {
            let index = list_len(self.scene, e.kind());
            self.make(Change::Insert { index, element: e });
        }
        Ok(())
    }
}

/// Removal order: loads first, support types last (indices within a kind from the back).
fn kind_rank(k: ElementKind) -> u8 {
    match k {
        ElementKind::Load => 0,
        ElementKind::Brace => 1,
        ElementKind::Deck => 2,
        ElementKind::Bearer => 3,
        ElementKind::Post => 4,
        ElementKind::ExistingStructure => 5,
        ElementKind::SupportType => 6,
        ElementKind::Combination | ElementKind::Site => 7,
    }
}

fn list_len(scene: &Scene, kind: ElementKind) -> usize {
    match kind {
        ElementKind::SupportType => scene.support_types.len(),
        ElementKind::Post => scene.posts.len(),
        ElementKind::Bearer => scene.bearers.len(),
        ElementKind::Deck => scene.decks.len(),
        ElementKind::Brace => scene.braces.len(),
        ElementKind::ExistingStructure => scene.existing_structures.len(),
        ElementKind::Load => scene.loads.len(),
        ElementKind::Combination | ElementKind::Site => 0,
    }
}

/// A bearer without the deleted post, or a deck without the deleted bearer, if it still has
/// two supports; `None` if it cannot stand.
fn without_support(e: Element, gone: &ElementRef) -> Option<Element> {
    match e {
        Element::Bearer(mut b) if gone.kind == ElementKind::Post => {
            b.posts.retain(|p| *p != gone.id);
            (b.posts.len() >= 2).then_some(Element::Bearer(b))
        }
        Element::Deck(mut d) if gone.kind == ElementKind::Bearer => {
            d.bearers.retain(|p| *p != gone.id);
            (d.bearers.len() >= 2).then_some(Element::Deck(d))
        }
        _ => None,
    }
}

/// Call `f` on every reference an element holds, with the kind it refers to.
fn rewrite_refs(e: &mut Element, f: &dyn Fn(ElementKind, &mut String)) {
    match e {
        Element::SupportType(_) | Element::ExistingStructure(_) => {}
        Element::Post(p) => {
            if let Some(s) = &mut p.support {
                f(ElementKind::SupportType, s);
            }
        }
        Element::Bearer(b) => b.posts.iter_mut().for_each(|p| f(ElementKind::Post, p)),
        Element::Deck(d) => d.bearers.iter_mut().for_each(|b| f(ElementKind::Bearer, b)),
        Element::Brace(b) => {
            f(ElementKind::Post, &mut b.from.post);
            f(ElementKind::Post, &mut b.to.post);
        }
        Element::Load(l) => match &mut l.kind {
            LoadKind::DeckArea { deck, .. } | LoadKind::DeckPatch { deck, .. } | LoadKind::DeckPoint { deck, .. } => f(ElementKind::Deck, deck),
            LoadKind::BearerPoint { bearer, .. } | LoadKind::BearerLine { bearer, .. } => f(ElementKind::Bearer, bearer),
            LoadKind::PostTop { post, .. } => f(ElementKind::Post, post),
            LoadKind::Kentledge { on: KentledgePlace::Plates(posts), .. } => posts.iter_mut().for_each(|p| f(ElementKind::Post, p)),
            LoadKind::Kentledge { on: KentledgePlace::Deck { deck, .. }, .. } => f(ElementKind::Deck, deck),
            LoadKind::Horizontal { .. } | LoadKind::Wind { .. } | LoadKind::Notional { .. } => {}
        },
    }
}

/// The references an element holds: (kind, id) of each element it needs.
pub fn references(e: &Element) -> Vec<ElementRef> {
    let out = std::cell::RefCell::new(Vec::new());
    let mut copy = e.clone();
    rewrite_refs(&mut copy, &|kind, id: &mut String| out.borrow_mut().push(ElementRef::new(kind, id.as_str())));
    out.into_inner()
}

/// Elements that refer to `r` directly, in scene order. A plan brace (a level brace) stands on
/// the bearers that frame its bay: a bearer at its level through one of its ends.
pub fn dependants(scene: &Scene, r: &ElementRef) -> Vec<ElementRef> {
    let id = r.id.as_str();
    let mut out = Vec::new();
    match r.kind {
        ElementKind::SupportType => {
            out.extend(scene.posts.iter().filter(|p| p.support.as_deref() == Some(id)).map(|p| ElementRef::post(&p.id)));
        }
        ElementKind::Post => {
            out.extend(scene.bearers.iter().filter(|b| b.posts.iter().any(|p| p == id)).map(|b| ElementRef::new(ElementKind::Bearer, &b.id)));
            out.extend(scene.braces.iter().filter(|b| b.from.post == id || b.to.post == id).map(|b| ElementRef::new(ElementKind::Brace, &b.id)));
            out.extend(
                scene
                    .loads
                    .iter()
                    .filter(|l| match &l.kind {
                        LoadKind::PostTop { post, .. } => post == id,
                        LoadKind::Kentledge { on: KentledgePlace::Plates(posts), .. } => posts.iter().any(|p| p == id),
                        _ => false,
                    })
                    .map(|l| ElementRef::new(ElementKind::Load, &l.id)),
            );
        }
        ElementKind::Bearer => {
            out.extend(scene.decks.iter().filter(|d| d.bearers.iter().any(|b| b == id)).map(|d| ElementRef::new(ElementKind::Deck, &d.id)));
            if let Some(bearer) = scene.bearers.iter().find(|b| b.id == id) {
                let tol = crate::scene::validate::GEOMETRY_TOLERANCE_M;
                let frames = |b: &crate::scene::model::Brace| {
                    (b.from.level - b.to.level).abs() <= tol
                        && (b.from.level - bearer.level).abs() <= tol
                        && bearer.posts.iter().any(|p| *p == b.from.post || *p == b.to.post)
                };
                out.extend(scene.braces.iter().filter(|b| frames(b)).map(|b| ElementRef::new(ElementKind::Brace, &b.id)));
            }
            out.extend(
                scene
                    .loads
                    .iter()
                    .filter(|l| matches!(&l.kind, LoadKind::BearerPoint { bearer, .. } | LoadKind::BearerLine { bearer, .. } if bearer == id))
                    .map(|l| ElementRef::new(ElementKind::Load, &l.id)),
            );
        }
        ElementKind::Deck => {
            out.extend(
                scene
                    .loads
                    .iter()
                    .filter(|l| {
                        matches!(&l.kind, LoadKind::DeckArea { deck, .. } | LoadKind::DeckPatch { deck, .. } | LoadKind::DeckPoint { deck, .. } | LoadKind::Kentledge { on: KentledgePlace::Deck { deck, .. }, .. } if deck == id)
                    })
                    .map(|l| ElementRef::new(ElementKind::Load, &l.id)),
            );
        }
        ElementKind::Brace | ElementKind::ExistingStructure | ElementKind::Load | ElementKind::Combination | ElementKind::Site => {}
    }
    out
}

/// Move one element by an offset (see [`Edit::Move`] for what moves).
fn shift(e: &mut Element, [dx, dy, dz]: [f64; 3]) {
    match e {
        Element::SupportType(_) => {}
        Element::Post(p) => {
            p.x += dx;
            p.y += dy;
            p.base_level += dz;
            p.top_level += dz;
        }
        Element::Bearer(b) => b.level += dz,
        Element::Deck(d) => {
            d.extent.x = (d.extent.x.0 + dx, d.extent.x.1 + dx);
            d.extent.y = (d.extent.y.0 + dy, d.extent.y.1 + dy);
            d.level += dz;
        }
        Element::Brace(b) => {
            b.from.level += dz;
            b.to.level += dz;
        }
        Element::ExistingStructure(e) => {
            e.extent.x = (e.extent.x.0 + dx, e.extent.x.1 + dx);
            e.extent.y = (e.extent.y.0 + dy, e.extent.y.1 + dy);
            e.level += dz;
        }
        Element::Load(l) => match &mut l.kind {
            LoadKind::DeckPoint { x, y, .. } => {
                *x += dx;
                *y += dy;
            }
            LoadKind::DeckPatch { area, .. } => {
                area.x = (area.x.0 + dx, area.x.1 + dx);
                area.y = (area.y.0 + dy, area.y.1 + dy);
            }
            LoadKind::Horizontal { x, y, level, .. } => {
                *x += dx;
                *y += dy;
                *level += dz;
            }
            LoadKind::Wind { face, .. } => {
                face.from = (face.from.0 + dx, face.from.1 + dy);
                face.to = (face.to.0 + dx, face.to.1 + dy);
                face.bottom += dz;
                face.top += dz;
            }
            LoadKind::Kentledge { on: KentledgePlace::Deck { x, y, .. }, .. } => {
                *x += dx;
                *y += dy;
            }
            LoadKind::DeckArea { .. } | LoadKind::BearerPoint { .. } | LoadKind::BearerLine { .. } | LoadKind::PostTop { .. } | LoadKind::Notional { .. } | LoadKind::Kentledge { .. } => {}
        },
    }
}

/// One step of the history.
#[derive(Debug, Clone)]
struct Entry {
    label: String,
    undo: Undo,
    merge_key: Option<String>,
    serial: u64,
}

/// Undo and redo stacks of applied edits.
#[derive(Debug, Clone)]
pub struct History {
    undo: Vec<Entry>,
    redo: Vec<Entry>,
    limit: usize,
    next_serial: u64,
    sealed: bool,
}

impl Default for History {
    fn default() -> Self {
        History::new(History::DEFAULT_LIMIT)
    }
}

impl History {
    /// Undo steps kept by default.
    pub const DEFAULT_LIMIT: usize = 500;

    /// An empty history keeping at most `limit` undo steps.
    pub fn new(limit: usize) -> Self {
        History { undo: Vec::new(), redo: Vec::new(), limit: limit.max(1), next_serial: 1, sealed: false }
    }

    /// Apply an edit and record it. An edit that changes nothing is not recorded.
    pub fn apply(&mut self, scene: &mut Scene, edit: &Edit) -> Result<(), EditError> {
        self.apply_merging(scene, edit, None)
    }

    /// Apply an edit; if `merge_key` equals the key of the last step (and nothing was undone
    /// or [`History::seal`]ed since), fold it into that step, so dragging a value or typing a
    /// number is one undo step, not one per frame.
    pub fn apply_merging(&mut self, scene: &mut Scene, edit: &Edit, merge_key: Option<&str>) -> Result<(), EditError> {
        let undo = edit.apply(scene)?;
        if undo.is_empty() {
            return Ok(());
        }
        self.redo.clear();
        let serial = self.next_serial;
        self.next_serial += 1;
        let mergeable = !self.sealed && merge_key.is_some() && self.undo.last().is_some_and(|e| e.merge_key.as_deref() == merge_key);
        self.sealed = false;
        if mergeable {
            let last = self.undo.last_mut().expect("checked");
            last.undo = std::mem::take(&mut last.undo).then(undo);
            last.serial = serial;
        } else {
            self.undo.push(Entry { label: edit.label(), undo, merge_key: merge_key.map(str::to_owned), serial });
            if self.undo.len() > self.limit {
                self.undo.remove(0);
            }
        }
        Ok(())
    }

    /// End the current merge: the next edit starts a new step even with the same key.
    pub fn seal(&mut self) {
        self.sealed = true;
    }

    /// Undo the last step; returns its label, or `None` if there is nothing to undo.
    pub fn undo(&mut self, scene: &mut Scene) -> Option<String> {
        let e = self.undo.pop()?;
        let redo = e.undo.apply(scene);
        let label = e.label.clone();
        self.redo.push(Entry { undo: redo, merge_key: None, ..e });
        self.sealed = true;
        Some(label)
    }

    /// Redo the last undone step; returns its label.
    pub fn redo(&mut self, scene: &mut Scene) -> Option<String> {
        let e = self.redo.pop()?;
        let undo = e.undo.apply(scene);
        let label = e.label.clone();
        self.undo.push(Entry { undo, merge_key: None, ..e });
        self.sealed = true;
        Some(label)
    }

    /// Label of the step [`History::undo`] would undo.
    pub fn undo_label(&self) -> Option<&str> {
        self.undo.last().map(|e| e.label.as_str())
    }
    /// Label of the step [`History::redo`] would redo.
    pub fn redo_label(&self) -> Option<&str> {
        self.redo.last().map(|e| e.label.as_str())
    }
    /// Number of undo steps.
    pub fn undo_len(&self) -> usize {
        self.undo.len()
    }
    /// Number of redo steps.
    pub fn redo_len(&self) -> usize {
        self.redo.len()
    }
    /// Identifies the scene state reached by the recorded steps: equal values mean the same
    /// state (used to tell whether the scene differs from the saved file). 0 = no step.
    pub fn state(&self) -> u64 {
        self.undo.last().map_or(0, |e| e.serial)
    }
    /// Forget every step.
    pub fn clear(&mut self) {
        self.undo.clear();
        self.redo.clear();
    }
}

/// Placement helpers for the editor's tools: grid snap, fresh ids and new elements built from
/// what the user picked.
pub mod place {
    use std::collections::HashSet;

    use super::EditError;
    use crate::scene::model::{BeamRole, Bearer, Brace, Deck, Post, PostNode, Rect, Scene, SupportType, STEEL_TUBE_KN_PER_M};
    use crate::scene::validate::GEOMETRY_TOLERANCE_M;

    /// Round a coordinate to the nearest multiple of `step` (no snap when `step` ≤ 0).
    pub fn snap(v: f64, step: f64) -> f64 {
        if step > 0.0 && step.is_finite() { (v / step).round() * step } else { v }
    }

    /// The first id `{prefix}{n}` (n = 1, 2, …) not used in the scene.
    pub fn fresh_id(scene: &Scene, prefix: &str) -> String {
        let used: HashSet<&str> = scene.element_ids().map(|(_, id)| id).collect();
        (1..).map(|n| format!("{prefix}{n}")).find(|id| !used.contains(id.as_str())).expect("an unused id exists")
    }

    /// An id for a copy of `id`: `{id}-copy`, `{id}-copy2`, … (a copy of a copy counts on).
    pub fn fresh_copy_id(id: &str, used: &HashSet<String>) -> String {
        let base = match id.rfind("-copy") {
            Some(i) if id[i + 5..].chars().all(|c| c.is_ascii_digit()) => &id[..i],
            _ => id,
        };
        std::iter::once(format!("{base}-copy"))
            .chain((2..).map(|n| format!("{base}-copy{n}")))
            .find(|c| !used.contains(c))
            .expect("an unused id exists")
    }

    /// A support type for scenes that have none yet: the shipped catalogue's example base jack,
    /// no sole plate. Its safe working load is marked as an example (validation says so) until
    /// the planner picks or enters the manufacturer's in the inspector.
    pub fn starter_support(id: &str) -> SupportType {
        use crate::scene::catalogue;
        let jack = catalogue::shipped().jack(catalogue::DEFAULT_JACK).expect("the shipped catalogue has its default jack (tested)");
        catalogue::support_type(id, jack, None)
    }

    /// A new post at (x, y). It takes its levels and support type from the nearest post, or
    /// `base_level` … `base_level + height_m` and the first support type when there is none.
    pub fn post_at(scene: &Scene, x: f64, y: f64, base_level: f64, height_m: f64) -> Post {
        let nearest = scene.posts.iter().min_by(|a, b| {
            let da = (a.x - x).hypot(a.y - y);
            let db = (b.x - x).hypot(b.y - y);
            da.partial_cmp(&db).unwrap_or(std::cmp::Ordering::Equal)
        });
        let (base, top, support) = match nearest {
            Some(p) => (p.base_level, p.top_level, p.support.clone()),
            None => (base_level, base_level + height_m, scene.support_types.first().map(|s| s.id.clone())),
        };
        Post { id: fresh_id(scene, "P"), x, y, base_level: base, top_level: top, support, self_weight_kn_per_m: STEEL_TUBE_KN_PER_M, section: None }
    }

    /// Whether a post stands at (x, y) already (within the geometry tolerance) at that level.
    pub fn post_near(scene: &Scene, x: f64, y: f64) -> Option<&Post> {
        scene.posts.iter().find(|p| (p.x - x).hypot(p.y - y) < GEOMETRY_TOLERANCE_M)
    }

    /// A bearer resting on the given posts at `level` (default: the lowest top of them),
    /// with the posts put in order along its line.
    pub fn bearer_on(scene: &Scene, posts: &[String], level: Option<f64>) -> Result<Bearer, EditError> {
        let found: Vec<&Post> = posts
            .iter()
            .map(|id| scene.posts.iter().find(|p| p.id == *id).ok_or_else(|| EditError::Placement(format!("there is no post {id}"))))
            .collect::<Result<_, _>>()?;
        if found.len() < 2 {
            return Err(EditError::Placement("pick at least two posts for a bearer".into()));
        }
        // Order along the line through the two posts farthest apart.
        let (mut a, mut b, mut far) = (found[0], found[1], -1.0);
        for (i, p) in found.iter().enumerate() {
            for q in &found[i + 1..] {
                let d = (p.x - q.x).hypot(p.y - q.y);
                if d > far {
                    (a, b, far) = (p, q, d);
                }
            }
        }
        if far < GEOMETRY_TOLERANCE_M {
            return Err(EditError::Placement("the picked posts stand in the same place".into()));
        }
        // Number the posts towards +x (or +y for a line along y), whichever end was found first.
        let mut dir = ((b.x - a.x) / far, (b.y - a.y) / far);
        if dir.0 < -1e-9 || (dir.0.abs() <= 1e-9 && dir.1 < 0.0) {
            dir = (-dir.0, -dir.1);
            a = b;
        }
        let mut ordered: Vec<&Post> = found.clone();
        ordered.sort_by(|p, q| {
            let sp = (p.x - a.x) * dir.0 + (p.y - a.y) * dir.1;
            let sq = (q.x - a.x) * dir.0 + (q.y - a.y) * dir.1;
            sp.partial_cmp(&sq).unwrap_or(std::cmp::Ordering::Equal)
        });
        let level = level.unwrap_or_else(|| ordered.iter().map(|p| p.top_level).fold(f64::INFINITY, f64::min));
        Ok(Bearer {
            id: fresh_id(scene, "B"),
            role: BeamRole::Bearer,
            level,
            posts: ordered.iter().map(|p| p.id.clone()).collect(),
            overhang_start_m: 0.0,
            overhang_end_m: 0.0,
            self_weight_kn_per_m: STEEL_TUBE_KN_PER_M,
            method: None,
            joints: None,
            section: None,
        })
    }

    /// A deck across the given bearers: its extent spans from the first to the last bearer and
    /// along their common length, at the highest bearer level; bearers in order across the span.
    pub fn deck_on(scene: &Scene, bearers: &[String], self_weight_kpa: f64) -> Result<Deck, EditError> {
        if bearers.len() < 2 {
            return Err(EditError::Placement("pick at least two parallel bearers for a deck".into()));
        }
        let mut lines = Vec::new();
        for id in bearers {
            let b = scene.bearers.iter().find(|b| b.id == *id).ok_or_else(|| EditError::Placement(format!("there is no bearer {id}")))?;
            let ends: Vec<&Post> = [b.posts.first(), b.posts.last()]
                .into_iter()
                .flatten()
                .map(|pid| scene.posts.iter().find(|p| p.id == *pid).ok_or_else(|| EditError::Placement(format!("bearer {id} rests on a missing post {pid}"))))
                .collect::<Result<_, _>>()?;
            let [p, q] = ends[..] else { return Err(EditError::Placement(format!("bearer {id} rests on no post"))) };
            lines.push((b, (p.x, p.y), (q.x, q.y)));
        }
        let along_x = lines.iter().all(|(_, p, q)| (p.1 - q.1).abs() < GEOMETRY_TOLERANCE_M && (p.0 - q.0).abs() > GEOMETRY_TOLERANCE_M);
        let along_y = lines.iter().all(|(_, p, q)| (p.0 - q.0).abs() < GEOMETRY_TOLERANCE_M && (p.1 - q.1).abs() > GEOMETRY_TOLERANCE_M);
        if !along_x && !along_y {
            return Err(EditError::Placement("a deck's bearers must all run along x or all along y".into()));
        }
        // (span coordinate, along range) of each bearer, overhangs included.
        let mut spans: Vec<(f64, (f64, f64), &Bearer)> = lines
            .iter()
            .map(|(b, p, q)| {
                let (s, a0, a1) = if along_x { (p.1, p.0, q.0) } else { (p.0, p.1, q.1) };
                let (lo, hi) = if a0 <= a1 { (a0 - b.overhang_start_m, a1 + b.overhang_end_m) } else { (a1 - b.overhang_end_m, a0 + b.overhang_start_m) };
                (s, (lo, hi), *b)
            })
            .collect();
        spans.sort_by(|a, b| a.0.partial_cmp(&b.0).unwrap_or(std::cmp::Ordering::Equal));
        let along = spans.iter().fold((f64::NEG_INFINITY, f64::INFINITY), |acc, s| (acc.0.max(s.1 .0), acc.1.min(s.1 .1)));
        if along.1 - along.0 < GEOMETRY_TOLERANCE_M {
            return Err(EditError::Placement("the picked bearers do not overlap along their length".into()));
        }
        let span = (spans[0].0, spans[spans.len() - 1].0);
        let extent = if along_x { Rect { x: along, y: span } } else { Rect { x: span, y: along } };
        let level = spans.iter().map(|s| s.2.level).fold(f64::NEG_INFINITY, f64::max);
        Ok(Deck { id: fresh_id(scene, "D"), level, extent, bearers: spans.iter().map(|s| s.2.id.clone()).collect(), self_weight_kpa, method: None, joints: None, decking: None, diaphragm: false })
    }

    /// A brace from post `from` at `from_level` to post `to` at `to_level` (defaults: the lower
    /// post's base and the lower of the two tops).
    pub fn brace_between(scene: &Scene, from: &str, to: &str, levels: Option<(f64, f64)>) -> Result<Brace, EditError> {
        let find = |id: &str| scene.posts.iter().find(|p| p.id == id).ok_or_else(|| EditError::Placement(format!("there is no post {id}")));
        let (a, b) = (find(from)?, find(to)?);
        if a.id == b.id {
            return Err(EditError::Placement("a brace joins two different posts".into()));
        }
        let (lo, hi) = levels.unwrap_or((a.base_level.max(b.base_level), a.top_level.min(b.top_level)));
        Ok(Brace { id: fresh_id(scene, "X"), from: PostNode { post: a.id.clone(), level: lo }, to: PostNode { post: b.id.clone(), level: hi } })
    }

    /// An imposed load (case Q) of `kn` over `footprint` centred at (`x`, `y`) on deck `deck`, as
    /// the spare-capacity map places it: a point load for a point, else a patch of that size
    /// carrying `kn` in all. It must lie wholly on the deck.
    pub fn footprint_load(scene: &Scene, deck: &str, (x, y): (f64, f64), footprint: crate::solve::influence::Footprint, kn: f64) -> Result<crate::scene::loads::Load, EditError> {
        use crate::scene::loads::{Case, Intensity, Load, LoadKind};
        let d = scene.decks.iter().find(|d| d.id == deck).ok_or_else(|| EditError::Placement(format!("there is no deck {deck}")))?;
        if !(kn.is_finite() && kn > 0.0) {
            return Err(EditError::Placement(format!("the load to place must be above 0 kN (it is {kn} kN)")));
        }
        let (hx, hy) = (0.5 * footprint.x_m, 0.5 * footprint.y_m);
        let t = GEOMETRY_TOLERANCE_M;
        let on = x - hx >= d.extent.x.0 - t && x + hx <= d.extent.x.1 + t && y - hy >= d.extent.y.0 - t && y + hy <= d.extent.y.1 + t;
        if !on || !(x.is_finite() && y.is_finite()) {
            return Err(EditError::Placement(format!("a {} × {} m footprint at ({x:.3}, {y:.3}) does not lie wholly on deck {deck}", footprint.x_m, footprint.y_m)));
        }
        let kind = if footprint.is_point() {
            LoadKind::DeckPoint { deck: deck.to_owned(), x, y, kn }
        } else {
            LoadKind::DeckPatch { deck: deck.to_owned(), area: Rect { x: (x - hx, x + hx), y: (y - hy, y + hy) }, intensity: Intensity::Kpa(kn / footprint.area()) }
        };
        Ok(Load::new(fresh_id(scene, "Load-"), Case::Q, kind))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::scene::layout::generate;
    use crate::scene::loads::{Case, Intensity};

    #[test]
    fn a_footprint_load_carries_the_force_asked_for_and_stays_on_its_deck() {
        // common practice, no source: a patch of uniform pressure q over area A carries q·A
        let scene = crate::scene::demo::demo_scene(1).expect("demo");
        let d = &scene.decks[0];
        let (cx, cy) = (0.5 * (d.extent.x.0 + d.extent.x.1), 0.5 * (d.extent.y.0 + d.extent.y.1));
        let fp = crate::solve::influence::Footprint { x_m: 1.2, y_m: 0.8 };
        let l = place::footprint_load(&scene, &d.id, (cx, cy), fp, 4.8).expect("fits");
        assert_eq!(l.case, Case::Q);
        match &l.kind {
            LoadKind::DeckPatch { area, intensity: Intensity::Kpa(q), .. } => {
                assert!((q * area.area() - 4.8).abs() < 1e-12, "{q} kPa over {} m²", area.area());
                assert!((area.x.0 - (cx - 0.6)).abs() < 1e-12 && (area.y.1 - (cy + 0.4)).abs() < 1e-12);
            }
            k => panic!("{k:?}"),
        }
        let p = place::footprint_load(&scene, &d.id, (cx, cy), crate::solve::influence::Footprint::POINT, 2.0).expect("fits");
        assert!(matches!(p.kind, LoadKind::DeckPoint { kn, .. } if kn == 2.0));
        assert!(place::footprint_load(&scene, &d.id, (d.extent.x.1, cy), fp, 1.0).is_err(), "half off the deck");
        assert!(place::footprint_load(&scene, &d.id, (cx, cy), fp, 0.0).is_err());
        assert!(place::footprint_load(&scene, "nope", (cx, cy), fp, 1.0).is_err());
    }

    fn demo() -> Scene {
        crate::scene::demo::default_scene()
    }

    #[test]
    fn add_post_then_undo_restores_the_scene_exactly() {
        // common practice, no source: undo must restore the state before the edit
        let mut s = demo();
        let before = s.clone();
        let mut h = History::default();
        let p = place::post_at(&s, 7.5, 0.0, 0.0, 3.0);
        h.apply(&mut s, &Edit::Add(Element::Post(p.clone()))).unwrap();
        assert_eq!(s.posts.len(), before.posts.len() + 1);
        assert_eq!(s.posts.last(), Some(&p));
        assert_eq!(h.undo(&mut s).as_deref(), Some("add post P1"));
        assert_eq!(s, before);
        h.redo(&mut s);
        assert_eq!(s.posts.last(), Some(&p));
    }

    #[test]
    fn duplicate_ids_are_refused_and_leave_the_scene_alone() {
        // common practice, no source
        let mut s = demo();
        let before = s.clone();
        let mut p = s.posts[0].clone();
        p.x += 10.0;
        let err = Edit::Add(Element::Post(p)).apply(&mut s).unwrap_err();
        assert!(matches!(err, EditError::IdTaken { .. }), "{err}");
        assert_eq!(s, before);
        // An id used by another kind is taken too.
        let mut p = s.posts[0].clone();
        p.id = s.bearers[0].id.clone();
        assert!(matches!(Edit::Add(Element::Post(p)).apply(&mut s), Err(EditError::IdTaken { by: ElementKind::Bearer, .. })));
    }

    #[test]
    fn delete_with_dependants_is_refused_with_the_list() {
        // common practice, no source: deleting what others stand on must not leave dangling ids
        let mut s = demo();
        let before = s.clone();
        let edit = Edit::Delete { targets: vec![ElementRef::post("B2")], mode: DeleteMode::Refuse };
        let err = edit.apply(&mut s).unwrap_err();
        let EditError::HasDependants { element, dependants } = &err else { panic!("{err}") };
        assert_eq!(element, &ElementRef::post("B2"));
        let ids: Vec<&str> = dependants.iter().map(|d| d.id.as_str()).collect();
        assert_eq!(ids, ["L1-2", "T1-B", "L2-2", "T2-B", "PB2-A1", "PB2-A2", "PB2-B1"]);
        assert!(err.to_string().contains("bearer L1-2"), "{err}");
        assert_eq!(s, before);
    }

    #[test]
    fn cascade_delete_takes_everything_that_depends_and_undoes_exactly() {
        // common practice, no source
        let mut s = demo();
        let before = s.clone();
        let mut h = History::default();
        h.apply(&mut s, &Edit::Delete { targets: vec![ElementRef::post("B2")], mode: DeleteMode::Cascade }).unwrap();
        assert!(!s.posts.iter().any(|p| p.id == "B2"));
        // Deck-2 rests on L2-2, so it goes, and the loads on it with it.
        assert!(s.decks.is_empty());
        assert!(!s.loads.iter().any(|l| matches!(&l.kind, LoadKind::DeckArea { .. })));
        assert!(crate::validate(&s).is_ok(), "{:?}", crate::validate(&s).err());
        h.undo(&mut s);
        assert_eq!(s, before);
    }

    #[test]
    fn detach_delete_keeps_members_that_still_stand() {
        // common practice, no source
        let mut s = demo();
        let before = s.clone();
        let undo = Edit::Delete { targets: vec![ElementRef::post("B2")], mode: DeleteMode::Detach }.apply(&mut s).unwrap();
        let l12 = s.bearers.iter().find(|b| b.id == "L1-2").unwrap();
        assert_eq!(l12.posts, ["A2", "C2", "D2", "E2"]);
        assert_eq!(s.decks.len(), 1, "the deck keeps standing on its other bearers");
        undo.apply(&mut s);
        assert_eq!(s, before);
    }

    #[test]
    fn rename_rewrites_every_reference() {
        // common practice, no source
        let mut s = demo();
        let mut p = s.posts.iter().find(|p| p.id == "B2").unwrap().clone();
        p.id = "B2-new".into();
        let undo = Edit::Replace { id: "B2".into(), with: Element::Post(p) }.apply(&mut s).unwrap();
        assert!(s.bearers.iter().any(|b| b.posts.contains(&"B2-new".to_string())));
        assert!(!s.bearers.iter().any(|b| b.posts.contains(&"B2".to_string())));
        assert!(crate::validate(&s).is_ok());
        undo.apply(&mut s);
        assert_eq!(s, demo());
    }

    #[test]
    fn duplicate_remaps_references_inside_the_copied_set() {
        // common practice, no source
        let mut s = generate("t", 100.0, &LayoutSpec { bays_x: 1, bays_y: 1, lifts: 1, deck_lifts: vec![], braced: false, load_class: None, ..LayoutSpec::default() });
        let targets = vec![ElementRef::post("A1"), ElementRef::post("B1"), ElementRef::new(ElementKind::Bearer, "L1-1")];
        Edit::Duplicate { targets, by: [0.0, 5.0, 0.0] }.apply(&mut s).unwrap();
        let copy = s.bearers.last().unwrap();
        assert_eq!(copy.id, "L1-1-copy");
        assert_eq!(copy.posts, ["A1-copy", "B1-copy"]);
        let a = s.posts.iter().find(|p| p.id == "A1-copy").unwrap();
        assert_eq!((a.x, a.y), (0.0, 5.0));
    }

    #[test]
    fn move_shifts_posts_decks_and_loads() {
        // common practice, no source
        let mut s = demo();
        let targets = vec![ElementRef::post("A1"), ElementRef::new(ElementKind::Deck, "Deck-2")];
        Edit::Move { targets, by: [0.5, -0.25, 0.1] }.apply(&mut s).unwrap();
        let a = &s.posts[0];
        assert_eq!((a.x, a.y, a.base_level, a.top_level), (0.5, -0.25, 0.1, 3.7));
        assert_eq!(s.decks[0].extent.x, (0.5, 6.5));
        assert!((s.decks[0].level - 3.7).abs() < 1e-12);
    }

    #[test]
    fn failed_batch_rolls_back_the_edits_before_it() {
        // common practice, no source
        let mut s = demo();
        let before = s.clone();
        let ok = Edit::Move { targets: vec![ElementRef::post("A1")], by: [1.0, 0.0, 0.0] };
        let bad = Edit::Move { targets: vec![ElementRef::post("nope")], by: [1.0, 0.0, 0.0] };
        let err = Edit::Batch { label: "two".into(), edits: vec![ok, bad] }.apply(&mut s).unwrap_err();
        assert_eq!(err, EditError::NotFound(ElementRef::post("nope")));
        assert_eq!(s, before);
    }

    #[test]
    fn layout_adds_a_whole_scaffold_in_one_undoable_step() {
        // common practice, no source: (bx+1)(by+1) posts, (by+1)+(bx+1) members per lift
        let mut s = Scene::empty("t", 100.0);
        let mut h = History::default();
        let spec = LayoutSpec { bays_x: 4, bays_y: 2, lifts: 3, deck_lifts: vec![3], ..LayoutSpec::default() };
        h.apply(&mut s, &Edit::ApplyLayout { spec: spec.clone(), replace: false }).unwrap();
        assert_eq!(s.posts.len(), 15);
        assert_eq!(s.bearers.len(), 3 * (3 + 5));
        assert_eq!(s.decks.len(), 1);
        assert!(crate::validate(&s).is_ok());
        // The same layout again clashes on ids and is refused whole.
        let n = s.posts.len();
        assert!(matches!(h.apply(&mut s, &Edit::ApplyLayout { spec: spec.clone(), replace: false }), Err(EditError::Placement(_))));
        assert_eq!(s.posts.len(), n);
        // With a prefix it fits beside the first.
        let spec2 = LayoutSpec { id_prefix: "N-".into(), origin: (20.0, 0.0), ..spec };
        h.apply(&mut s, &Edit::ApplyLayout { spec: spec2, replace: false }).unwrap();
        assert_eq!(s.posts.len(), 30);
        assert_eq!(s.support_types.len(), 1, "the shared support type is not added twice");
        h.undo(&mut s);
        h.undo(&mut s);
        assert_eq!(s, Scene::empty("t", 100.0));
    }

    #[test]
    fn layout_can_replace_the_scene() {
        // common practice, no source
        let mut s = demo();
        let before = s.clone();
        let undo = Edit::ApplyLayout { spec: LayoutSpec::default(), replace: true }.apply(&mut s).unwrap();
        assert_eq!(s.posts.len(), 12);
        assert_eq!(s.site, before.site);
        undo.apply(&mut s);
        assert_eq!(s, before);
    }

    #[test]
    fn merged_steps_undo_together_and_state_tracks_saved_point() {
        // common practice, no source
        let mut s = demo();
        let before = s.clone();
        let mut h = History::default();
        assert_eq!(h.state(), 0);
        for x in [0.1, 0.2, 0.3] {
            let mut p = s.posts[0].clone();
            p.x = x;
            h.apply_merging(&mut s, &Edit::Replace { id: p.id.clone(), with: Element::Post(p) }, Some("A1.x")).unwrap();
        }
        assert_eq!(h.undo_len(), 1);
        let saved = h.state();
        h.undo(&mut s);
        assert_eq!(s, before);
        assert_ne!(h.state(), saved);
        h.redo(&mut s);
        assert_eq!(h.state(), saved);
        assert_eq!(s.posts[0].x, 0.3);
    }

    #[test]
    fn edits_that_change_nothing_are_not_recorded() {
        // common practice, no source
        let mut s = demo();
        let mut h = History::default();
        let p = s.posts[0].clone();
        h.apply(&mut s, &Edit::Replace { id: p.id.clone(), with: Element::Post(p) }).unwrap();
        assert_eq!(h.undo_len(), 0);
    }

    #[test]
    fn placement_orders_posts_and_bearers() {
        // common practice, no source
        let s = demo();
        let b = place::bearer_on(&s, &["C1".into(), "A1".into(), "B1".into()], None).unwrap();
        assert_eq!(b.posts, ["A1", "B1", "C1"]);
        assert_eq!(b.level, 3.6);
        let d = place::deck_on(&s, &["L2-3".into(), "L2-1".into(), "L2-2".into()], 0.25).unwrap();
        assert_eq!(d.bearers, ["L2-1", "L2-2", "L2-3"]);
        assert_eq!((d.extent.x, d.extent.y), ((0.0, 6.0), (0.0, 3.0)));
        let mut s2 = s.clone();
        Edit::Add(Element::Deck(d)).apply(&mut s2).unwrap();
        assert!(crate::validate(&s2).is_ok(), "{:?}", crate::validate(&s2).err());
        assert!(place::deck_on(&s, &["L2-1".into(), "T2-A".into()], 0.25).is_err());
        assert_eq!(place::snap(1.26, 0.25), 1.25);
        assert_eq!(place::fresh_id(&s, "P"), "P1");
        let used: HashSet<String> = ["A1-copy".to_string()].into();
        assert_eq!(place::fresh_copy_id("A1", &used), "A1-copy2");
        assert_eq!(place::fresh_copy_id("A1-copy", &used), "A1-copy2");
    }

    #[test]
    fn load_on_deck_follows_a_renamed_deck() {
        // common practice, no source
        let mut s = demo();
        Edit::Add(Element::Load(Load::new("pallet", Case::Q, LoadKind::DeckPatch { deck: "Deck-2".into(), area: crate::scene::model::Rect { x: (1.0, 2.0), y: (1.0, 2.0) }, intensity: Intensity::Kpa(5.0) })))
            .apply(&mut s)
            .unwrap();
        let mut d = s.decks[0].clone();
        d.id = "Top".into();
        Edit::Replace { id: "Deck-2".into(), with: Element::Deck(d) }.apply(&mut s).unwrap();
        assert!(s.loads.iter().all(|l| references(&Element::Load(l.clone())).iter().all(|r| r.kind != ElementKind::Deck || r.id == "Top")));
        assert!(crate::validate(&s).is_ok());
    }
}
