//! The advisor: from analyte profiles to a ranked, justified recommendation of separation mode,
//! stationary phase and starting conditions, with predicted retention, co-elution risks, an
//! orthogonal back-up and safety cautions.
//!
//! Flow: score every mode for every analyte ([`modes`]); for each viable mode, set starting
//! conditions and predict every analyte on every candidate phase ([`lc`], [`gc`], [`ic`]);
//! score each phase from the predicted separation (critical resolution, co-elution
//! probabilities) and the chemistry rules; rank; pick the back-up that best separates the
//! first choice's risky pairs. Every score carries its reasons, each naming its rule
//! (`rule:...`, common practice unless a source is given) or model (`model:...`).

pub mod calibrants;
pub mod detection;
mod evidence;
pub mod gc;
pub mod gc_predict;
pub mod ic;
pub mod ionexcl;
pub mod lc;
pub mod modes;
pub mod ph;
pub mod profile;
mod separation;

use serde::{Deserialize, Serialize};

use crate::phase::{Catalogue, PhaseMode};
use crate::property::Unresolved;
use crate::report::SCHEMA_VERSION;
use crate::report::advice::{
    AdviceReport, AnalyteSummary, Backup, Caution, IonisationSummary, PairChange, Reason,
    Recommendation,
};
use profile::AnalyteProfile;
pub use separation::{
    apply_coverage, coelution, coverage, elutes_in_run, finish_predictions, pair_resolution,
    phase_ref, resolution, separation_score, separation_score_counting, unscored_recommendation,
};

/// Detectors the advisor knows.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum Detector {
    /// UV absorbance at a wavelength, nm.
    Uv(f64),
    /// Mass spectrometry (volatile buffers only).
    Ms,
    /// Fluorescence.
    Fluorescence,
    /// Evaporative light scattering (volatile buffers only).
    Elsd,
    /// Charged-aerosol detection (volatile buffers only).
    ChargedAerosol,
    /// Refractive index (isocratic runs only).
    RefractiveIndex,
    /// Pulsed amperometry (carbohydrates on anion exchange; electroactive analytes).
    PulsedAmperometry,
    /// GC flame ionisation.
    Fid,
    /// GC electron capture.
    Ecd,
    /// Conductivity (IC).
    Conductivity,
    /// No detector named: the advisor chooses one per mode from the analytes' structures
    /// ([`detection`]).
    FromStructure,
}

impl Detector {
    /// Parse `uv`, `uv:254`, `ms`, `fluorescence`, `elsd`, `cad`, `ri`, `pad`, `fid`, `ecd`,
    /// `conductivity`, or `auto` (choose from structure).
    ///
    /// # Errors
    /// A message naming the value.
    pub fn parse(s: &str) -> Result<Detector, String> {
        let l = s.trim().to_ascii_lowercase();
        if let Some(w) = l.strip_prefix("uv:").or_else(|| l.strip_prefix("uv")) {
            if w.is_empty() {
                return Ok(Detector::Uv(220.0));
            }
            return match w.trim_end_matches("nm").parse::<f64>() {
                Ok(nm) if (185.0..=800.0).contains(&nm) => Ok(Detector::Uv(nm)),
                _ => Err(format!(
                    "detector `{s}`: UV wavelength must be 185-800 nm, e.g. uv:254"
                )),
            };
        }
        Ok(match l.as_str() {
            "ms" => Detector::Ms,
            "fluorescence" | "fld" => Detector::Fluorescence,
            "elsd" => Detector::Elsd,
            "cad" | "charged-aerosol" => Detector::ChargedAerosol,
            "ri" | "refractive-index" => Detector::RefractiveIndex,
            "pad" | "amperometry" | "pulsed-amperometry" => Detector::PulsedAmperometry,
            "auto" => Detector::FromStructure,
            "fid" => Detector::Fid,
            "ecd" => Detector::Ecd,
            "conductivity" => Detector::Conductivity,
            _ => {
                return Err(format!(
                    "unknown detector `{s}`; use uv[:nm], ms, fluorescence, elsd, cad, ri, pad, fid, ecd, conductivity or auto"
                ));
            }
        })
    }

    /// Whether the detector needs a volatile mobile phase.
    pub fn needs_volatile(self) -> bool {
        matches!(
            self,
            Detector::Ms | Detector::Elsd | Detector::ChargedAerosol
        )
    }

    /// A short description.
    pub fn describe(self) -> String {
        match self {
            Detector::Uv(nm) => format!("UV absorbance at {nm:.0} nm"),
            Detector::Ms => "mass spectrometry (electrospray; volatile buffer)".into(),
            Detector::Fluorescence => {
                "fluorescence (set excitation/emission for the analytes)".into()
            }
            Detector::Elsd => "evaporative light scattering (volatile buffer)".into(),
            Detector::ChargedAerosol => "charged-aerosol detection (volatile buffer)".into(),
            Detector::RefractiveIndex => "refractive index (isocratic run only)".into(),
            Detector::PulsedAmperometry => "pulsed amperometry".into(),
            Detector::Fid => "flame ionisation".into(),
            Detector::Ecd => "electron capture (halogenated analytes)".into(),
            Detector::Conductivity => "suppressed conductivity".into(),
            Detector::FromStructure => "chosen from the analytes' structures".into(),
        }
    }
}

/// What the user asked for.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AdviseRequest {
    /// Detector named by the user, or [`Detector::FromStructure`] to let the advisor choose
    /// one per mode from the analytes' structures. A named detector restricts the modes to
    /// those it works with ([`detection::compatible_modes`]).
    pub detector: Detector,
    /// LC column length and inner diameter, mm.
    pub column_mm: Option<(f64, f64)>,
    /// LC particle size, µm.
    pub particle_um: Option<f64>,
    /// LC flow, mL/min.
    pub flow_ml_min: Option<f64>,
    /// Dwell volume, mL.
    pub dwell_ml: f64,
    /// Modes to consider (all when empty).
    pub modes: Vec<PhaseMode>,
    /// Phases the lab has (all when empty).
    pub phases_available: Vec<String>,
    /// Number of recommendations listed (the first included).
    pub alternatives: usize,
    /// Co-elution probability above which a pair is listed.
    pub risk_threshold: f64,
    /// Fixed LC conditions (for `predict`): when set, they replace the advisor's choices.
    pub fixed: Option<FixedLc>,
    /// Fixed GC column and oven program (for `predict --mode gc`).
    pub fixed_gc: Option<FixedGc>,
    /// No back-up wanted (`predict`: one phase under given conditions).
    pub no_backup: bool,
    /// The user's stored scouting fits of the resolved analytes (`scout --store`): used
    /// directly on a matching system, else as retention-memory sources.
    pub stored_fits: Vec<crate::model::memory::StoredFit>,
    /// Structure-only LC retention (`--no-memory`): the descriptor path even for analytes with
    /// measured retention in the memory or the user's stored fits.
    pub no_memory: bool,
}

/// GC conditions given by the user instead of chosen by the advisor.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FixedGc {
    /// Column (length, inner diameter, film, carrier velocity); the advisor's choice if `None`.
    pub column: Option<crate::model::gc::GcColumn>,
    /// Oven program; the advisor's choice if `None`.
    pub oven: Option<crate::model::gc::OvenProgram>,
}

/// LC conditions given by the user instead of chosen by the advisor.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FixedLc {
    /// Gradient program as (time min, % organic) points, validated.
    pub gradient: Vec<(f64, f64)>,
    /// Aqueous pH, if given (else the advisor's choice).
    pub ph: Option<f64>,
    /// Modifier id (`acetonitrile` or `methanol`), if given.
    pub modifier: Option<String>,
    /// Dead time, min, if given (else from the column geometry and flow).
    pub t0_min: Option<f64>,
    /// Column temperature, °C.
    pub temperature_c: Option<f64>,
}

impl Default for AdviseRequest {
    fn default() -> Self {
        AdviseRequest {
            detector: Detector::Uv(220.0),
            column_mm: None,
            particle_um: None,
            flow_ml_min: None,
            dwell_ml: 0.0,
            modes: Vec::new(),
            phases_available: Vec::new(),
            alternatives: 3,
            risk_threshold: 0.2,
            fixed: None,
            fixed_gc: None,
            no_backup: false,
            stored_fits: Vec::new(),
            no_memory: false,
        }
    }
}

/// Advisor errors.
#[derive(Debug, thiserror::Error)]
pub enum AdviseError {
    /// Nothing to advise on.
    #[error("no resolved analytes to advise on")]
    NoAnalytes,
    /// The phase catalogue failed to load or a restriction was invalid.
    #[error(transparent)]
    Phase(#[from] crate::phase::PhaseError),
    /// A bad request value.
    #[error("{0}")]
    BadRequest(String),
}

/// One candidate (mode, phase) with its predictions, before ranking.
#[derive(Debug, Clone)]
pub struct Candidate {
    /// The recommendation (rank filled in later).
    pub rec: Recommendation,
    /// Score of the mode for the list.
    pub mode_score: f64,
}

/// Give advice for a list of analyte profiles.
///
/// # Errors
/// [`AdviseError`] when there are no analytes, the catalogue is broken or the lab's phase list
/// names unknown phases.
pub fn advise(
    profiles: &[AnalyteProfile],
    unresolved: Vec<Unresolved>,
    req: &AdviseRequest,
) -> Result<AdviceReport, AdviseError> {
    if profiles.is_empty() {
        return Err(AdviseError::NoAnalytes);
    }
    let builtin = Catalogue::builtin()?;
    let restricted;
    let catalogue: &Catalogue = if req.phases_available.is_empty() {
        builtin
    } else {
        restricted = builtin.restrict(&req.phases_available)?;
        &restricted
    };
    let mut warnings: Vec<String> = Vec::new();
    for p in profiles {
        for n in &p.notes {
            warnings.push(format!("{}: {n}", p.name()));
        }
        if p.analyte.smiles.is_none() {
            warnings.push(format!(
                "{}: no structure known; structure-based estimates and retention predictions are missing",
                p.name()
            ));
        }
    }
    // a named detector works with some modes only: restrict to them, and refuse a mode the
    // user asked for that the detector cannot serve (rule:detector-mode-pair)
    let allowed: Vec<PhaseMode> = match detection::compatible_modes(req.detector) {
        None => req.modes.clone(),
        Some(ok) if req.modes.is_empty() => ok.to_vec(),
        Some(ok) => {
            let both: Vec<PhaseMode> = req
                .modes
                .iter()
                .copied()
                .filter(|m| ok.contains(m))
                .collect();
            if both.is_empty() {
                let asked = req.modes[0];
                return Err(AdviseError::BadRequest(
                    detection::check_pair(req.detector, asked)
                        .err()
                        .unwrap_or_default(),
                ));
            }
            both
        }
    };
    // measured reversed-phase retention is evidence for the mode fit (rule:rp-measured-retention)
    let with_evidence;
    let profiles = if req.no_memory {
        profiles
    } else {
        with_evidence = evidence::with_measured_rp(profiles);
        &with_evidence[..]
    };
    let mode_scores = modes::score_modes(profiles, &allowed);
    if detection::compatible_modes(req.detector).is_some()
        && mode_scores.iter().all(|m| m.fitting == 0)
    {
        let best = modes::score_modes(profiles, &req.modes)
            .into_iter()
            .next()
            .and_then(|m| PhaseMode::parse(&m.mode));
        return Err(AdviseError::BadRequest(format!(
            "detector {} works with {} only, and none of the analytes fits {}{}; name a detector for the mode the analytes fit, or none to have one chosen from structure",
            req.detector.describe(),
            allowed
                .iter()
                .map(|m| detection::mode_words(*m))
                .collect::<Vec<_>>()
                .join(", "),
            if allowed.len() == 1 {
                "it"
            } else {
                "any of them"
            },
            best.map_or(String::new(), |m| format!(
                " (they fit {})",
                detection::mode_words(m)
            ))
        )));
    }
    let mut candidates: Vec<Candidate> = Vec::new();
    for ms in &mode_scores {
        if ms.score < 0.3 && !candidates.is_empty() {
            continue;
        }
        let Some(mode) = PhaseMode::parse(&ms.mode) else {
            continue;
        };
        let phases: Vec<_> = catalogue.phases_by_mode(mode).collect();
        for phase in phases {
            let made = match mode {
                PhaseMode::Rp | PhaseMode::Hilic => {
                    lc::candidate(profiles, phase, mode, req, catalogue)
                }
                PhaseMode::Gc => gc::candidate(profiles, phase, req, catalogue),
                PhaseMode::IcAnion | PhaseMode::IcCation => {
                    ic::candidate(profiles, phase, mode, catalogue, req.detector)
                }
                PhaseMode::IonExclusion => ionexcl::candidate(profiles, phase, req.detector),
            };
            match made {
                Ok(mut rec) => {
                    rec.excluded = modes::excluded(profiles, &ms.mode, &mode_scores);
                    apply_coverage(&mut rec, profiles.len());
                    candidates.push(Candidate {
                        rec,
                        mode_score: ms.score,
                    });
                }
                Err(why) => {
                    if mode_scores.first().is_some_and(|m| m.mode == ms.mode)
                        && !phase.id().starts_with("gc-plot")
                    {
                        let short: String = why.chars().take(240).collect();
                        warnings.push(format!("{} not evaluated: {short}", phase.id()));
                    }
                }
            }
        }
    }
    // the best-fitting mode could not be evaluated at all (no retention data for these
    // analytes there): say so plainly, so that the ranked methods of another mode are not read
    // as the best fit (unknown is unknown)
    if let Some(best) = mode_scores.first()
        && !candidates.is_empty()
        && !candidates.iter().any(|c| c.rec.mode == best.mode)
        && let Some(m) = PhaseMode::parse(&best.mode)
    {
        warnings.push(format!(
            "the analytes fit {} best (mode score {:.2}), but no phase of that mode could be evaluated (see above): its retention cannot be predicted for them, so the methods below come from the next modes; consider {} with scouting runs",
            detection::mode_words(m),
            best.score,
            detection::mode_words(m)
        ));
    }
    if candidates.is_empty() {
        let why: Vec<&str> = warnings
            .iter()
            .filter(|w| w.contains(" not evaluated: "))
            .map(String::as_str)
            .collect();
        return Err(AdviseError::BadRequest(format!(
            "no stationary phase could be evaluated for these analytes (check --modes and --phases-available){}",
            if why.is_empty() {
                String::new()
            } else {
                format!(": {}", why.join("; "))
            }
        )));
    }
    // Rank: the mode's fit for the whole list first (every analyte counted, unknowns against
    // it), then the phase's own score, already scaled by the share of analytes the candidate
    // predicts (rule:coverage): a method covering fewer analytes never outranks one that covers
    // all with comparable separation in a mode that fits as well.
    candidates.sort_by(|a, b| {
        let sa = 0.6 * a.mode_score + 0.4 * a.rec.score;
        let sb = 0.6 * b.mode_score + 0.4 * b.rec.score;
        // ties keep the catalogue order (common chemistries first; the sort is stable)
        sb.total_cmp(&sa)
    });
    for (i, c) in candidates.iter_mut().enumerate() {
        c.rec.rank = i as u32 + 1;
    }
    let mut backup = if req.no_backup {
        None
    } else {
        choose_backup(
            &candidates,
            req.risk_threshold,
            &mode_scores,
            profiles.len(),
        )
    };
    if let Some(b) = &mut backup {
        // the back-up lists its risky pairs by the same threshold as the recommendations
        b.recommendation
            .coelutions
            .retain(|c| c.probability >= req.risk_threshold);
    }
    if backup.is_none() && !req.no_backup {
        warnings.push(no_backup_reason(&candidates[0].rec, &candidates));
    }
    // analytes the first choice is predicted to keep on the column: say so, with what to try
    let first = &candidates[0].rec;
    let late: Vec<&str> = first
        .predictions
        .iter()
        .filter(|p| !elutes_in_run(first, p))
        .map(|p| p.analyte.as_str())
        .collect();
    if !late.is_empty() {
        warnings.push(format!(
            "{} of {} analytes are predicted not to elute before the first choice's run ends ({}): extend the program or raise the final eluent strength{}, or consider another mode; a scouting run decides (the prediction may lie beyond the model's range)",
            late.len(),
            first.total_analytes.max(first.predictions.len()),
            late.join(", "),
            if first.mode == "hilic" {
                " (in HILIC: more water at the end, or a stronger buffer for charged analytes)"
            } else {
                ""
            }
        ));
    }
    let first_mode = candidates[0].rec.mode.clone();
    let first_ph = candidates[0].rec.conditions.ph;
    let mut recommendations: Vec<Recommendation> = candidates
        .iter()
        .take(req.alternatives.max(1))
        .map(|c| c.rec.clone())
        .collect();
    for r in &mut recommendations {
        r.coelutions.retain(|c| c.probability >= req.risk_threshold);
    }
    let cautions = cautions(&recommendations[0], backup.as_ref(), catalogue);
    let analytes = profiles
        .iter()
        .map(|p| summary(p, first_ph, &first_mode))
        .collect();
    Ok(AdviceReport {
        schema_version: SCHEMA_VERSION,
        phasewise_version: env!("CARGO_PKG_VERSION").to_string(),
        analytes,
        unresolved,
        recommendations,
        backup,
        mode_scores,
        warnings,
        cautions,
    })
}

fn summary(p: &AnalyteProfile, ph: Option<f64>, mode: &str) -> AnalyteSummary {
    let mut properties = p.analyte.properties.clone();
    let mut ionisation = None;
    if let (Some(ph), true) = (ph, mode == "rp" || mode == "hilic") {
        if let Some(d) = p.log_d(ph) {
            properties.push(crate::property::Property {
                property: format!("logd_ph{ph:.1}"),
                value: d,
                unit: String::new(),
                kind: crate::property::PropertyKind::Estimated,
                source: "logD from every microspecies: neutral at logP, zwitterion at logP - 2.5, ion pairs at logP - 2 per charge; independent sites (Henderson-Hasselbalch); property::ionisation::log_d_microspecies".into(),
                licence: crate::property::estimate::LICENCE_COMPUTED.into(),
                detail: String::new(),
                origin: crate::property::Origin::Structure,
            });
        }
        if let Ok(prof) = crate::property::ionisation::profile(&p.sites, ph) {
            ionisation = Some(IonisationSummary {
                ph,
                net_charge_e: prof.mean_net_charge,
                fraction_neutral: prof.fraction_neutral,
                charge_state: crate::plain::words(&prof.charge_state),
                log_d: p.log_d(ph),
                near_pka: p.pkas().iter().any(|(k, _)| (k - ph).abs() < 1.5),
            });
        }
    }
    let (gc_suitability, gc_reasons) = match &p.gc {
        Some(g) => (
            g.verdict.label().to_string(),
            g.flags
                .iter()
                .map(|f| match f.derivatisation {
                    Some(d) if f.severity != crate::structure::volatility::Severity::Caution => {
                        format!("{}; derivatisation option: {}", f.reason, d.describe())
                    }
                    _ => f.reason.clone(),
                })
                .collect(),
        ),
        None => (
            "unknown".to_string(),
            vec!["no structure to assess".to_string()],
        ),
    };
    AnalyteSummary {
        query: p.analyte.query.clone(),
        label: p.analyte.label().map(str::to_string),
        name: p.analyte.name.clone(),
        inchikey: p.analyte.inchikey.clone(),
        smiles: p.analyte.smiles.clone(),
        properties,
        ionisation,
        gc_suitability,
        gc_reasons,
    }
}

/// Selectivity family of a phase id: phases of one family are not orthogonal to each other
/// (common practice, no source). GC ids are tested first, so that `gc-5-phenyl` is a
/// low-polarity polysiloxane, not an "aromatic" LC phase: 100 % dimethyl, 5 % phenyl and 6 %
/// cyanopropylphenyl polysiloxanes are all low-polarity polysiloxanes, and the two
/// polyethylene glycols are one family.
pub fn family(id: &str) -> &str {
    if let Some(gc) = id.strip_prefix("gc-") {
        return match gc {
            "dimethyl" | "5-phenyl" | "6-cyanopropylphenyl" => "gc-low-polarity-polysiloxane",
            "wax" | "wax-acid" => "gc-polyethylene-glycol",
            _ => id,
        };
    }
    if id.contains("phenyl") || id.contains("pfp") {
        "aromatic"
    } else if id.contains("c18")
        || id.contains("c8")
        || id.contains("c4")
        || id.contains("polar-embedded")
    {
        "alkyl"
    } else {
        id
    }
}

/// A back-up in another mode must have a mode score at most this far below the first
/// choice's (common practice, no source).
const OTHER_MODE_MARGIN: f64 = 0.2;

/// Why no back-up was chosen, when none was.
fn no_backup_reason(first: &Recommendation, cands: &[Candidate]) -> String {
    if let (Some((a, b)), Some(r1)) = (&first.critical_pair, first.critical_resolution)
        && cands.len() > 1
    {
        return format!(
            "no back-up: no other evaluated phase predicts a better resolution than {r1:.2} for the first choice's critical pair {a} / {b} (rule:backup-for-critical-pair)"
        );
    }
    format!(
        "no orthogonal back-up: no other evaluated phase in a mode that at least half of the analytes fit (and that scores within 0.2 of the first choice's mode), and of another selectivity family than {} ({})",
        first.phase.id,
        family(&first.phase.id)
    )
}

/// Pick the back-up: a candidate in a mode that at least half of the analytes fit (a back-up
/// in a mode the analytes do not fit is no back-up) and whose mode score is within
/// [`OTHER_MODE_MARGIN`] of the first choice's, of another selectivity family than the first
/// choice when the mode is the same (common practice, no source), that best separates the
/// first choice's risky pairs.
fn choose_backup(
    cands: &[Candidate],
    risk: f64,
    mode_scores: &[crate::report::advice::ModeScore],
    n_analytes: usize,
) -> Option<Backup> {
    let first = &cands.first()?.rec;
    let first_mode_score = cands.first()?.mode_score;
    let fits = |mode: &str| {
        mode_scores
            .iter()
            .find(|m| m.mode == mode)
            .is_some_and(|m| 2 * m.fitting >= n_analytes.max(1))
    };
    let mut risky: Vec<(String, String)> = Vec::new();
    // the critical pair is usually also a risky pair: each pair once, in either order
    for (a, b) in first
        .coelutions
        .iter()
        .filter(|c| c.probability >= risk)
        .map(|c| (c.a.clone(), c.b.clone()))
        .chain(first.critical_pair.clone())
    {
        if !risky
            .iter()
            .any(|(x, y)| (x == &a && y == &b) || (x == &b && y == &a))
        {
            risky.push((a, b));
        }
    }
    let mut best: Option<(f64, &Candidate)> = None;
    for c in cands.iter().skip(1) {
        if c.rec.phase.id == first.phase.id || !fits(&c.rec.mode) {
            continue;
        }
        // a back-up must cover the analytes the first choice covers, and predict a better
        // resolution for its critical pair (rule:backup-for-critical-pair; common practice,
        // no source: a back-up that leaves the critical pair as it is does not help)
        if c.rec.predicted_analytes < first.predicted_analytes {
            continue;
        }
        if let (Some((a, b)), Some(r1)) = (&first.critical_pair, first.critical_resolution) {
            match pair_resolution(&c.rec, a, b) {
                Some(r2) if r2 > r1 + 0.05 => {}
                _ => continue,
            }
        }
        // another mode only when the list fits it nearly as well as the first choice's mode;
        // otherwise the back-up is a phase of another family in the same mode (for volatile
        // analytes a second GC column of another polarity, not an LC method; common practice,
        // no source)
        if c.rec.mode != first.mode && c.mode_score < first_mode_score - OTHER_MODE_MARGIN {
            continue;
        }
        // orthogonality: a different mode, or a different chemistry family within the mode
        if c.rec.mode == first.mode && family(&c.rec.phase.id) == family(&first.phase.id) {
            continue;
        }
        let gain: f64 = risky
            .iter()
            .filter_map(|(a, b)| {
                let r1 = pair_resolution(first, a, b)?;
                let r2 = pair_resolution(&c.rec, a, b)?;
                Some(r2.min(3.0) - r1.min(3.0))
            })
            .sum();
        let value = gain + 0.5 * c.rec.score + 0.3 * c.mode_score;
        if best.is_none_or(|b| value > b.0) {
            best = Some((value, c));
        }
    }
    let (_, c) = best?;
    let changes = risky
        .iter()
        .filter_map(|(a, b)| {
            Some(PairChange {
                a: a.clone(),
                b: b.clone(),
                resolution_first: pair_resolution(first, a, b)?,
                resolution_backup: pair_resolution(&c.rec, a, b)?,
            })
        })
        .collect();
    let mut rec = c.rec.clone();
    rec.rank = 0;
    let mut why = if rec.mode != first.mode {
        format!(
            "a different separation mode ({} instead of {}) changes the retention mechanism",
            rec.mode, first.mode
        )
    } else {
        format!(
            "a different stationary-phase chemistry ({}) changes selectivity while keeping the mode",
            rec.phase.name
        )
    };
    if let (Some((a, b)), Some(r1)) = (&first.critical_pair, first.critical_resolution)
        && let Some(r2) = pair_resolution(&rec, a, b)
    {
        why.push_str(&format!(
            "; it predicts resolution {r2:.2} for the first choice's critical pair {a} / {b} (first choice {r1:.2}; rule:backup-for-critical-pair)"
        ));
    }
    Some(Backup {
        recommendation: rec,
        changes,
        why,
    })
}

fn cautions(
    first: &Recommendation,
    backup: Option<&Backup>,
    catalogue: &Catalogue,
) -> Vec<Caution> {
    let mut out = Vec::new();
    let mut add = |topic: &str, text: String| {
        if !out.iter().any(|c: &Caution| c.text == text) {
            out.push(Caution {
                topic: topic.to_string(),
                text,
            });
        }
    };
    for (rec, is_backup) in
        std::iter::once((first, false)).chain(backup.map(|b| (&b.recommendation, true)))
    {
        let c = &rec.conditions;
        if let Some(m) = &c.modifier
            && let Ok(s) = catalogue.solvent(m)
        {
            // a solvent only the back-up uses is said to be the back-up's (rule:solvent-hazards)
            let whose = if is_backup && first.conditions.modifier.as_deref() != Some(m.as_str()) {
                format!(
                    " (the back-up's modifier, on {} [{}])",
                    rec.phase.name, rec.phase.id
                )
            } else {
                String::new()
            };
            add("solvent", format!("{}{whose}: {}", s.name(), s.hazards()));
        }
        if let Some(ph) = c.ph {
            if ph > 8.0 && !rec.phase.id.contains("hybrid") && !rec.phase.id.contains("pgc") {
                add(
                    "ph",
                    format!("pH {ph:.1} dissolves ordinary silica: use only phases rated for it"),
                );
            }
            add(
                "ph",
                "keep the mobile-phase pH inside the column's stated range; silica-based phases dissolve above about pH 8 and lose bonded phase below about pH 2".into(),
            );
        }
        if let Some(g) = &c.carrier_gas {
            if g.contains("hydrogen") {
                add("gas", "hydrogen carrier gas is flammable: use a leak-checked system with hydrogen sensor or shut-off, and follow the lab's gas-safety procedure".into());
            }
            add("gas", "secure gas cylinders, use proper regulators and check for leaks after every column change".into());
        }
        if rec.mode == "ion-exclusion" {
            add(
                "solvent",
                "dilute sulfuric acid eluent is corrosive: wear eye protection and add acid to water, never water to acid".into(),
            );
        }
        if rec.mode.starts_with("ic") {
            let eluent = c.mobile_phase_a.as_deref().unwrap_or("");
            let hazard = if eluent.contains("hydroxide") {
                "hydroxide eluents are corrosive"
            } else if eluent.contains("acid") {
                "acid eluents are corrosive"
            } else {
                "carbonate eluents are alkaline irritants"
            };
            add(
                "solvent",
                format!("{hazard}: wear eye protection; follow the suppressor's instructions"),
            );
        }
    }
    // one pressure caution, for the highest estimated pressure of the first choice and back-up
    // (400 bar: a common limit of conventional LC instruments; common practice, no source)
    let highest = std::iter::once((first, "first choice"))
        .chain(backup.map(|b| (&b.recommendation, "back-up")))
        .filter_map(|(r, role)| r.conditions.pressure_bar.map(|p| (p, role, r)))
        .fold(None, |m: Option<(f64, &str, &Recommendation)>, x| match m {
            Some(m) if m.0 >= x.0 => Some(m),
            _ => Some(x),
        });
    if let Some((p, role, r)) = highest {
        // say whose pressure it is: the back-up's conditions may be the harder ones
        let whose = format!("highest: the {role} on {} [{}]", r.phase.name, r.phase.id);
        add(
            "pressure",
            if p > 400.0 {
                format!(
                    "estimated back pressure {p:.0} bar ({whose}) exceeds 400 bar: use an instrument and column rated for it, or lower the flow"
                )
            } else {
                format!(
                    "estimated back pressure up to {p:.0} bar ({whose}): check it against the column's and the instrument's pressure limits before the first run"
                )
            },
        );
    }
    add(
        "general",
        "these are starting points to verify by experiment; the lab's SOPs, local regulations and licensed practice take precedence".into(),
    );
    out
}

/// Common practice, no source: a peak whose apparent retention factor is between 1 and 10
/// (isocratic) or that elutes inside the gradient is well placed.
pub fn retention_window_reason(rec: &Recommendation) -> Reason {
    let n = rec.predictions.len().max(1);
    let t0 = rec.conditions.dead_time_min;
    let early = rec
        .predictions
        .iter()
        .filter(|p| p.retention_time_min < 2.0 * t0)
        .count();
    let late = rec
        .predictions
        .iter()
        .filter(|p| p.retention_time_min > rec.conditions.run_time_min)
        .count();
    let frac_ok = (n - early - late) as f64 / n as f64;
    Reason {
        source: "rule:retention-window".into(),
        text: format!(
            "{early} analyte(s) predicted to elute within twice the dead time and {late} after the run; the rest are well retained (common practice, no source)"
        ),
        weight: Some(frac_ok),
    }
}

#[cfg(test)]
mod tests;
