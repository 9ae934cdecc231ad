//! Method passes: the ways a scene's members may share load (simple spans, continuous), one
//! whole solution per combination of behaviours the envelope needs.

use crate::scene::model::{BeamMethod, Scene};

/// How one member shares its load in one solution.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
pub enum Behaviour {
    /// Simply supported spans and balanced overhangs ([`crate::solve::beam::share_simple`]).
    SimpleSpans,
    /// Continuous over all its supports but its declared joints
    /// ([`crate::solve::continuous::JointedBeam`]).
    Continuous,
    /// Joints not known: every support taken on its own as the middle of a two-span piece (an
    /// end support as the end of a single span), the most any joint layout puts on it
    /// ([`crate::solve::continuous::TwoSpanLocal`]). An envelope support by support, not one
    /// state of the member. Members whose joints are declared are continuous as declared instead.
    TwoSpanEach,
}

impl Behaviour {
    /// Short name for outputs.
    pub fn label(self) -> &'static str {
        match self {
            Behaviour::SimpleSpans => BeamMethod::SimpleSpans.label(),
            Behaviour::Continuous => BeamMethod::Continuous.label(),
            Behaviour::TwoSpanEach => "two-span continuity at each support",
        }
    }

    /// How a member with its own setting `own` and joints `known` behaves in a scene whose
    /// method is `scene_method`, in a pass where the enveloped members of its level (decks or
    /// bearers) behave as `level`.
    fn of(own: Option<BeamMethod>, known: bool, scene_method: BeamMethod, level: Behaviour) -> Behaviour {
        match own.unwrap_or(scene_method) {
            BeamMethod::SimpleSpans => Behaviour::SimpleSpans,
            BeamMethod::Continuous => Behaviour::Continuous,
            BeamMethod::Envelope => match level {
                // Joints that are known need no guessing: continuous as declared.
                Behaviour::TwoSpanEach if known => Behaviour::Continuous,
                other => other,
            },
        }
    }

    /// Whether the solution is one state of the structure (every load item in equilibrium as a
    /// whole): not where members are taken support by support.
    pub fn is_one_state(self) -> bool {
        self != Behaviour::TwoSpanEach
    }
}

/// One way of solving the whole scene. Members that set a method of their own always follow it;
/// members that follow the envelope behave as their level says here.
#[derive(Debug, Clone, PartialEq, Eq, serde::Serialize)]
pub struct MethodPass {
    /// Behaviour of the enveloped decks.
    pub decks: Behaviour,
    /// Behaviour of the enveloped bearers, ledgers and transoms.
    pub bearers: Behaviour,
    /// What it is called in outputs, e.g. `continuous` or `decks simple spans, bearers continuous`.
    pub label: String,
}

impl MethodPass {
    /// Behaviour of bearer `b` of `scene` in this pass.
    pub fn bearer(&self, scene: &Scene, b: usize) -> Behaviour {
        let m = &scene.bearers[b];
        Behaviour::of(m.method, m.joints.is_some(), scene.analysis.method, self.bearers)
    }
    /// Behaviour of deck `d` of `scene` in this pass.
    pub fn deck(&self, scene: &Scene, d: usize) -> Behaviour {
        let m = &scene.decks[d];
        Behaviour::of(m.method, m.joints.is_some(), scene.analysis.method, self.decks)
    }
    /// Whether the solution of this pass is one state of the structure, every load item in
    /// equilibrium as a whole; not where members are taken support by support
    /// ([`Behaviour::TwoSpanEach`]), whose two-span models balance one by one instead.
    pub fn is_one_state(&self) -> bool {
        self.decks.is_one_state() && self.bearers.is_one_state()
    }
}

/// The solutions a scene needs, the first being the primary one (its case loads fill the
/// schedule's case columns): one if no member follows the envelope, else both behaviours for
/// each level that has enveloped members — all simple spans, all continuous, and the two
/// mixtures of decks and bearers. Where an enveloped member of three or more supports has joints
/// that are not known, also two-span continuity at each support: at both levels if both have such
/// members, else at that level over each behaviour of the other. Up to six passes.
pub fn method_passes(scene: &Scene) -> Vec<MethodPass> {
    let global = scene.analysis.method;
    let decks: Vec<BeamMethod> = scene.decks.iter().map(|d| d.method.unwrap_or(global)).collect();
    let bearers: Vec<BeamMethod> = scene.bearers.iter().map(|b| b.method.unwrap_or(global)).collect();
    let enveloped = |ms: &[BeamMethod]| ms.contains(&BeamMethod::Envelope);
    // A level without enveloped members is described by what its members are set to.
    let fixed = |ms: &[BeamMethod]| -> Option<&'static str> {
        let first = *ms.first()?;
        Some(if ms.iter().all(|&m| m == first) { first.label() } else { "as set per member" })
    };
    let (deck_env, bearer_env) = (enveloped(&decks), enveloped(&bearers));
    let deck_unknown = scene.decks.iter().zip(&decks).any(|(d, &m)| m == BeamMethod::Envelope && d.joints.is_none() && d.bearers.len() >= 3);
    let bearer_unknown = scene.bearers.iter().zip(&bearers).any(|(b, &m)| m == BeamMethod::Envelope && b.joints.is_none() && b.posts.len() >= 3);
    use Behaviour::{Continuous as C, SimpleSpans as S, TwoSpanEach as T};
    let mut combos = vec![(S, S), (C, C), (S, C), (C, S)];
    match (deck_unknown, bearer_unknown) {
        (true, true) => combos.push((T, T)),
        (true, false) => combos.extend([(T, S), (T, C)]),
        (false, true) => combos.extend([(S, T), (C, T)]),
        (false, false) => {}
    }
    let mut out = Vec::new();
    for (d, b) in combos {
        if (d != S && !deck_env) || (b != S && !bearer_env) {
            continue;
        }
        let deck_part = if deck_env { Some(d.label()) } else { fixed(&decks) };
        let bearer_part = if bearer_env { Some(b.label()) } else { fixed(&bearers) };
        let label = match (deck_part, bearer_part) {
            (None, None) => global.label().to_owned(),
            (Some(a), None) | (None, Some(a)) => a.to_owned(),
            (Some(a), Some(b)) if a == b => a.to_owned(),
            (Some(a), Some(b)) => format!("decks {a}, bearers {b}"),
        };
        out.push(MethodPass { decks: d, bearers: b, label });
    }
    out
}
