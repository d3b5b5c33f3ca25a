//! `scout --store`: the system the runs were made on (checked before any work) and the
//! well-determined fits written to the user overlay.

use anyhow::{Context, Result, bail};

use phasewise::kb::Access;
use phasewise::kb::resolve::Resolution;
use phasewise::kb::retention::RetentionFitRecord;
use phasewise::measured::scout::{CompositionBasis, ScoutFit};
use phasewise::phase::{Catalogue, PhaseMode};
use phasewise::report::measured::scout::flag_text;

use super::{ScoutArgs, ScoutMode};
use crate::cli::Cli;
use crate::cli::knowledge::open_kb;
use crate::cli::output::note;

/// The system description `scout --store` records with the fits, checked before any work.
pub(super) struct StoreTarget {
    phase_id: String,
    mode: &'static str,
    chem_class: String,
    modifier: String,
    ph: f64,
    temperature_c: Option<f64>,
    source: String,
    buffer: Option<String>,
}

/// The `--store` target, or `None` without `--store`.
pub(super) fn store_target(a: &ScoutArgs) -> Result<Option<StoreTarget>> {
    if !a.store {
        return Ok(None);
    }
    let missing: Vec<&str> = [
        ("--phase", a.phase.is_none()),
        ("--modifier", a.modifier.is_none()),
        ("--ph", a.ph.is_none()),
        (
            "--source",
            a.source.as_deref().is_none_or(|s| s.trim().is_empty()),
        ),
    ]
    .iter()
    .filter(|(_, m)| *m)
    .map(|(n, _)| *n)
    .collect();
    if !missing.is_empty() {
        bail!(
            "--store needs the system the runs were made on: give {} (nothing stored)",
            missing.join(", ")
        );
    }
    let (Some(phase_id), Some(modifier), Some(ph), Some(source)) =
        (&a.phase, &a.modifier, a.ph, &a.source)
    else {
        bail!("--store needs --phase, --modifier, --ph and --source (nothing stored)");
    };
    let catalogue = Catalogue::builtin()?;
    let phase = catalogue
        .phase(phase_id)
        .with_context(|| format!("--phase `{phase_id}` (nothing stored)"))?;
    let mode = match (phase.mode(), a.mode) {
        (PhaseMode::Rp, ScoutMode::Rp) => "rp",
        (PhaseMode::Hilic, ScoutMode::Hilic) => "hilic",
        (PhaseMode::Hilic, _) => bail!(
            "--phase `{phase_id}` is a HILIC phase: add --mode hilic, so that log kw and S are fitted in the water fraction (nothing stored)"
        ),
        (PhaseMode::Rp, _) => bail!(
            "--phase `{phase_id}` is a reversed phase, but --mode hilic was given: leave --mode out or give a HILIC phase (nothing stored)"
        ),
        (other, _) => bail!(
            "--phase `{phase_id}` is a {} phase; scouting fits are stored for RP or HILIC phases only (nothing stored)",
            other.as_str()
        ),
    };
    if modifier != "acetonitrile" && modifier != "methanol" {
        bail!("--modifier `{modifier}`: use acetonitrile or methanol (nothing stored)");
    }
    let (lo, hi) = (
        phase.ph_min().unwrap_or(0.0),
        phase.ph_max().unwrap_or(14.0),
    );
    if !(ph.is_finite() && (lo..=hi).contains(&ph)) {
        bail!("--ph {ph} is outside the range {lo}-{hi} of phase `{phase_id}` (nothing stored)");
    }
    if let Some(t) = a.temperature
        && !(t.is_finite() && (-10.0..=phase.t_max_c()).contains(&t))
    {
        bail!(
            "--temperature {t} °C is outside -10 to {} °C, the limit of phase `{phase_id}` (nothing stored)",
            phase.t_max_c()
        );
    }
    Ok(Some(StoreTarget {
        phase_id: phase_id.clone(),
        mode,
        chem_class: phasewise::advisor::lc::model_class(phase)
            .name()
            .to_string(),
        modifier: modifier.clone(),
        ph,
        temperature_c: a.temperature,
        source: source.trim().to_string(),
        buffer: match a.buffer.as_deref().map(str::trim) {
            Some("") => bail!(
                "--buffer is empty: name the buffer or additive, or leave it out (nothing stored)"
            ),
            b => b.map(str::to_string),
        },
    }))
}

/// Store the well-determined fits; every analyte must resolve first, else nothing is stored.
/// Returns the fits left out (poorly determined) with their reasons.
pub(super) fn store_fits(
    cli: &Cli,
    a: &ScoutArgs,
    target: &StoreTarget,
    fitted: &ScoutFit,
    programs: &[String],
) -> Result<Vec<(String, String)>> {
    let mut kb = open_kb(cli, Access::Write)?;
    let mut keys = Vec::new();
    let mut problems = Vec::new();
    for f in &fitted.analytes {
        match kb.resolve(&f.name)? {
            Resolution::Found(an) => match &an.inchikey {
                Some(k) => keys.push(k.clone()),
                None => problems.push(format!(
                    "`{}` resolves to `{}`, which has no InChIKey (add one with `phasewise kb add --name '{}' --inchikey KEY --source ...`)",
                    f.name, an.name, an.name
                )),
            },
            Resolution::StructureOnly { .. } => problems.push(format!(
                "`{}` is a structure, not a compound of the knowledge base (add it with `phasewise kb add`)",
                f.name
            )),
            Resolution::Unresolved(u) => problems.push(format!(
                "`{}`: {}{}",
                f.name,
                u.reason,
                if u.suggestions.is_empty() {
                    String::new()
                } else {
                    format!(
                        " (did you mean {}?)",
                        u.suggestions
                            .iter()
                            .map(|s| format!("`{}`", s.name))
                            .collect::<Vec<_>>()
                            .join(", ")
                    )
                }
            )),
        }
    }
    if !problems.is_empty() {
        bail!(
            "--store: every analyte must resolve in the knowledge base, nothing stored: {}",
            problems.join("; ")
        );
    }
    let mut rows = Vec::new();
    let mut left_out = Vec::new();
    for (f, key) in fitted.analytes.iter().zip(keys) {
        if !f.flags.is_empty() {
            left_out.push((
                f.name.clone(),
                f.flags.iter().map(flag_text).collect::<Vec<_>>().join(", "),
            ));
            continue;
        }
        rows.push(RetentionFitRecord {
            analyte: f.name.clone(),
            inchikey: key,
            phase_id: target.phase_id.clone(),
            mode: target.mode.to_string(),
            chem_class: target.chem_class.clone(),
            modifier: target.modifier.clone(),
            ph: target.ph,
            temperature_c: target.temperature_c,
            log_kw: f.log_kw,
            s: f.s,
            log_kw_uncertainty: f.log_kw_uncertainty,
            s_uncertainty: f.s_uncertainty,
            correlation: f.correlation,
            rms_residual_min: f.rms_residual_min,
            gradients: programs.to_vec(),
            basis: match fitted.basis {
                CompositionBasis::Organic => "organic",
                CompositionBasis::Water => "water",
            }
            .into(),
            buffer: target.buffer.clone(),
            t0_min: fitted.dead_time_min,
            dwell_min: fitted.dwell_time_min,
            flow_ml_min: a.flow,
            source: target.source.clone(),
            stored_on: String::new(),
        });
    }
    let n = if rows.is_empty() {
        0
    } else {
        kb.store_retention_fits(&rows)?
    };
    note(&format!(
        "stored {n} retention fit{} in {} (phase {}, {}, pH {}{}{}; {}; source: {})",
        if n == 1 { "" } else { "s" },
        kb.user_path().display(),
        target.phase_id,
        target.modifier,
        target.ph,
        target
            .temperature_c
            .map_or_else(String::new, |t| format!(", {t} °C")),
        target
            .buffer
            .as_deref()
            .map_or_else(|| ", buffer not given".to_string(), |b| format!(", {b}")),
        if fitted.basis == CompositionBasis::Water {
            "log kw and S in the water fraction"
        } else {
            "log kw and S in the organic fraction"
        },
        target.source
    ));
    for (name, why) in &left_out {
        note(&format!(
            "not stored: {name}: poorly determined fit ({why})"
        ));
    }
    Ok(left_out)
}
