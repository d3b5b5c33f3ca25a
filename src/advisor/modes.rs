//! Mode scoring: how well each analyte, and the list as a whole, fits gas chromatography,
//! reversed-phase LC, HILIC and ion chromatography. Rules of thumb (common practice, no
//! source) expressed as smooth scores in 0–1.

use super::profile::AnalyteProfile;
use crate::phase::PhaseMode;
use crate::report::advice::{Excluded, ModeScore, Reason};
use crate::structure::volatility::GcVerdict;

/// Analytes scoring below this in a mode are listed as not fitting it.
pub const FIT_THRESHOLD: f64 = 0.4;

fn logistic(x: f64) -> f64 {
    1.0 / (1.0 + (-x).exp())
}

/// The fit of one analyte to one mode, with the reason.
pub fn fit(p: &AnalyteProfile, mode: PhaseMode) -> (f64, String) {
    let mw = p.molar_mass_g_mol.unwrap_or(200.0);
    match mode {
        PhaseMode::Gc => {
            if p.permanently_charged() {
                return (0.0, "an ion is not volatile".into());
            }
            match p.gc_verdict() {
                Some(GcVerdict::Suitable) => match p.tb_k {
                    // high-boiling analytes need high oven temperatures and thin films
                    Some((tb, _)) if tb > 600.0 => (
                        0.45,
                        format!(
                            "boiling point about {tb:.0} K: elutes only at high oven temperature"
                        ),
                    ),
                    Some((tb, _)) if tb > 520.0 => (0.75, format!("boiling point about {tb:.0} K")),
                    _ => (1.0, "volatile and thermally stable enough for GC".into()),
                },
                Some(GcVerdict::SuitableAfterDerivatisation) => {
                    (0.45, "needs derivatisation before GC (polar groups)".into())
                }
                Some(GcVerdict::Unsuitable) => (0.05, "not volatile or thermally labile".into()),
                None => match p.tb_k {
                    Some((tb, _)) if tb < 550.0 => (0.6, format!("boiling point {tb:.0} K")),
                    _ => (0.1, "volatility unknown".into()),
                },
            }
        }
        PhaseMode::Rp => {
            if p.permanently_charged() && p.inorganic_ion {
                return (0.05, "a small ion is not retained by reversed phase".into());
            }
            // small volatile neutrals (solvents, BTEX) are usually run by GC (common practice)
            let volatile = p.tb_k.is_some_and(|(t, _)| t < 450.0)
                && p.gc_verdict() == Some(GcVerdict::Suitable);
            match p.max_log_d(2.0, 8.0) {
                Some(d) if volatile => (
                    0.6 * logistic(2.0 * (d + 1.5)),
                    format!("highest logD over pH 2-8 is {d:.1}, but volatile enough for GC"),
                ),
                Some(d) => (
                    logistic(2.0 * (d + 1.5)),
                    format!("highest logD over pH 2-8 is {d:.1}"),
                ),
                None => (0.5, "no logP known".into()),
            }
        }
        PhaseMode::Hilic => match p.log_d(3.0) {
            Some(d) if !p.inorganic_ion => (
                logistic(2.0 * (-0.5 - d)),
                format!("logD at pH 3 is {d:.1}"),
            ),
            Some(_) | None if p.inorganic_ion => (
                0.3,
                "small ions are retained in HILIC but IC is the usual choice".into(),
            ),
            _ => (0.4, "no logP known".into()),
        },
        PhaseMode::IcAnion => {
            if p.inorganic_ion && p.formal_charge < 0 {
                (1.0, "inorganic or small anion".into())
            } else if p.has_acid() && mw < 200.0 && p.log_p.is_some_and(|(l, _)| l < 1.0) {
                (
                    0.6,
                    "small hydrophilic acid: anionic at the eluent pH".into(),
                )
            } else {
                (0.0, "not an anion".into())
            }
        }
        PhaseMode::IcCation => {
            if p.inorganic_ion && p.formal_charge > 0 {
                (1.0, "inorganic or small cation".into())
            } else if p.strong_base(8.0) && mw < 150.0 && p.log_p.is_some_and(|(l, _)| l < 1.0) {
                (
                    0.6,
                    "small hydrophilic amine: cationic at the eluent pH".into(),
                )
            } else {
                (0.0, "not a cation".into())
            }
        }
        PhaseMode::IonExclusion => {
            if p.has_acid()
                && !p.inorganic_ion
                && mw < 250.0
                && p.log_p.is_some_and(|(l, _)| l < 1.0)
            {
                (0.7, "small organic acid".into())
            } else {
                (0.0, "not a small organic acid".into())
            }
        }
    }
}

/// All modes in the order used to break ties (common first choices first).
pub const MODES: [PhaseMode; 6] = [
    PhaseMode::Rp,
    PhaseMode::Gc,
    PhaseMode::Hilic,
    PhaseMode::IcAnion,
    PhaseMode::IcCation,
    PhaseMode::IonExclusion,
];

/// Score every mode for the list (mean fit), best first.
pub fn score_modes(profiles: &[AnalyteProfile], allowed: &[PhaseMode]) -> Vec<ModeScore> {
    let mut out: Vec<ModeScore> = MODES
        .iter()
        .filter(|m| allowed.is_empty() || allowed.contains(m))
        .map(|&m| {
            let fits: Vec<(f64, String)> = profiles.iter().map(|p| fit(p, m)).collect();
            let score = fits.iter().map(|f| f.0).sum::<f64>() / fits.len().max(1) as f64;
            let not_fitting = profiles
                .iter()
                .zip(&fits)
                .filter(|(_, f)| f.0 < FIT_THRESHOLD)
                .map(|(p, f)| Excluded {
                    analyte: p.name().to_string(),
                    reason: f.1.clone(),
                    better_mode: best_mode(p, allowed).map(|m| m.as_str().to_string()),
                })
                .collect();
            let preference = preference(m);
            ModeScore {
                mode: m.as_str().to_string(),
                score: (score + preference.as_ref().and_then(|p| p.weight).unwrap_or(0.0)).min(1.0),
                fit: score,
                preference,
                fitting: fits.iter().filter(|f| f.0 >= FIT_THRESHOLD).count(),
                not_fitting,
            }
        })
        .collect();
    // the score already holds the preference; a stable sort keeps MODES order on ties
    out.sort_by(|a, b| b.score.total_cmp(&a.score));
    out
}

/// The preference for the usual first modes (common practice, no source): reversed phase is
/// the usual first try for organic analytes that fit it, including neutral, moderately polar
/// drugs such as caffeine that HILIC also retains, then GC for volatile ones. It is part of
/// the mode score, shown in the mode table and stated as a reason.
pub fn preference(mode: PhaseMode) -> Option<Reason> {
    let (w, why) = match mode {
        PhaseMode::Rp => (
            0.08,
            "reversed phase is the usual first mode when it fits: robust, well understood and the lab's default (common practice, no source)",
        ),
        PhaseMode::Gc => (
            0.04,
            "GC is the usual choice for volatile, thermally stable analytes when it fits (common practice, no source)",
        ),
        _ => return None,
    };
    Some(Reason {
        source: "rule:usual-first-mode".into(),
        text: format!("{}: +{w:.2} to the mean fit; {why}", mode.as_str()),
        weight: Some(w),
    })
}

/// The mode an analyte fits best.
pub fn best_mode(p: &AnalyteProfile, allowed: &[PhaseMode]) -> Option<PhaseMode> {
    MODES
        .iter()
        .filter(|m| allowed.is_empty() || allowed.contains(m))
        .map(|&m| (fit(p, m).0, m))
        .fold(None, |best: Option<(f64, PhaseMode)>, x| match best {
            Some(b) if b.0 >= x.0 => Some(b),
            _ => Some(x),
        })
        .map(|b| b.1)
}

/// Analytes that do not fit `mode`, from the precomputed scores.
pub fn excluded(_profiles: &[AnalyteProfile], mode: &str, scores: &[ModeScore]) -> Vec<Excluded> {
    scores
        .iter()
        .find(|s| s.mode == mode)
        .map(|s| s.not_fitting.clone())
        .unwrap_or_default()
}
