//! Method passes: the ways a scene's members may share load (simple spans, continuous), one
//! whole solution per combination of behaviours the envelope needs.

use crate::scene::model::{BeamMethod, Scene};

/// How one member shares its load in one solution.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, serde::Serialize)]
pub enum Behaviour {
    /// Simply supported spans and balanced overhangs ([`crate::solve::beam::share_simple`]).
    SimpleSpans,
    /// Continuous over all its supports ([`crate::solve::continuous::ContinuousBeam`]).
    Continuous,
}

impl Behaviour {
    /// Short name for outputs.
    pub fn label(self) -> &'static str {
        match self {
            Behaviour::SimpleSpans => BeamMethod::SimpleSpans.label(),
            Behaviour::Continuous => BeamMethod::Continuous.label(),
        }
    }

    /// How a member with its own setting `own` behaves in a scene whose method is `scene_method`,
    /// in a pass where the enveloped members of its level (decks or bearers) behave as `level`.
    fn of(own: Option<BeamMethod>, scene_method: BeamMethod, level: Behaviour) -> Behaviour {
        match own.unwrap_or(scene_method) {
            BeamMethod::SimpleSpans => Behaviour::SimpleSpans,
            BeamMethod::Continuous => Behaviour::Continuous,
            BeamMethod::Envelope => level,
        }
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
        Behaviour::of(scene.bearers[b].method, scene.analysis.method, self.bearers)
    }
    /// Behaviour of deck `d` of `scene` in this pass.
    pub fn deck(&self, scene: &Scene, d: usize) -> Behaviour {
        Behaviour::of(scene.decks[d].method, scene.analysis.method, self.decks)
    }
}

/// The solutions a scene needs, the first being the primary one (its case loads fill the
/// schedule's case columns): one if no member follows the envelope, else both behaviours for
/// each level that has enveloped members — up to four: all simple spans, all continuous, and the
/// two mixtures of decks and bearers.
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
    use Behaviour::{Continuous as C, SimpleSpans as S};
    let mut out = Vec::new();
    for (d, b) in [(S, S), (C, C), (S, C), (C, S)] {
        if (d == C && !deck_env) || (b == C && !bearer_env) {
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
