//! Opening the knowledge base for a command, resolving analytes in it, and reading the user's
//! stored scouting fits as the model wants them.

use std::io::IsTerminal;

use anyhow::{Context, Result, bail};
use indicatif::{ProgressBar, ProgressStyle};

use phasewise::kb::identifier::ListEntry;
use phasewise::kb::resolve::{Resolution, Unresolved};
use phasewise::kb::{Access, BuildPolicy, Kb, KbPaths};
use phasewise::property::{Analyte, Origin};

use super::Cli;
use super::output::note;

/// The shipped base and the user overlay: `--kb`/`--user-kb`, else the default location.
pub fn paths(cli: &Cli) -> Result<KbPaths> {
    let d = KbPaths::default_location();
    let shipped = match &cli.kb {
        Some(p) => p.clone(),
        None => d
            .as_ref()
            .map_err(|e| anyhow::anyhow!("{e}"))?
            .shipped
            .clone(),
    };
    let user = match &cli.user_kb {
        Some(p) => p.clone(),
        None => match &d {
            Ok(d) => d.user.clone(),
            // no home directory: keep the overlay beside the shipped base
            Err(_) => shipped.with_file_name("user.sqlite"),
        },
    };
    Ok(KbPaths { shipped, user })
}

/// The progress bar of a knowledge-base build (hidden unless stderr is a terminal).
pub fn progress_bar() -> ProgressBar {
    let pb = if std::io::stderr().is_terminal() {
        ProgressBar::new(1000)
    } else {
        ProgressBar::hidden()
    };
    pb.set_style(
        ProgressStyle::with_template("building knowledge base {bar:40} {percent:>3}% {msg}")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    pb
}

/// Opens the knowledge base (building the shipped part when missing, unless `--no-build`), with
/// the user overlay opened for `access`: commands that only read pass [`Access::Read`] and never
/// write to the overlay; a reader that meets an older overlay says so on stderr.
pub fn open_kb(cli: &Cli, access: Access) -> Result<Kb> {
    let p = paths(cli)?;
    let pb = progress_bar();
    let policy = if cli.no_build {
        BuildPolicy::Never
    } else {
        BuildPolicy::IfNeeded
    };
    let kb = Kb::open_with(&p, policy, access, &mut |f, msg| {
        pb.set_position((f * 1000.0) as u64);
        pb.set_message(msg.to_string());
    })?;
    pb.finish_and_clear();
    if let Some(n) = kb.user_overlay_note() {
        note(&n);
    }
    Ok(kb)
}

/// Resolve every entry as one panel ([`Kb::resolve_panel`]: element names in a panel of ions
/// are the ions); structure-only SMILES become analytes with no stored properties (named by
/// the list's `name` cell when it has one). A table's `name` cell is kept as the analyte's
/// label (`query`).
pub fn resolve_all(kb: &Kb, entries: &[ListEntry]) -> Result<(Vec<Analyte>, Vec<Unresolved>)> {
    let mut found = Vec::new();
    let mut missing = Vec::new();
    let queries: Vec<&str> = entries.iter().map(|e| e.query.as_str()).collect();
    let resolved = kb.resolve_panel(&queries)?;
    for (e, r) in entries.iter().zip(resolved) {
        match r {
            Resolution::Found(mut a) => {
                if let Some(l) = &e.label {
                    a.query = l.clone();
                }
                found.push(*a);
            }
            Resolution::StructureOnly { query, smiles } => found.push(Analyte {
                query: e.label.clone().unwrap_or_else(|| query.trim().to_string()),
                name: e.label.clone().unwrap_or_else(|| smiles.clone()),
                inchikey: None,
                smiles: Some(smiles),
                formula: None,
                molar_mass_g_mol: None,
                cid: None,
                cas: None,
                origin: Origin::Structure,
                matched_by: "smiles (not in knowledge base)".into(),
                properties: Vec::new(),
            }),
            Resolution::Unresolved(mut u) => {
                if let Some(l) = &e.label {
                    u.query = format!("{l} ({})", u.query);
                }
                missing.push(u)
            }
        }
    }
    Ok((found, missing))
}

/// The user's stored scouting fits (`scout --store`) of the resolved analytes, as the model
/// reads them.
pub fn stored_fits(
    kb: &Kb,
    analytes: &[Analyte],
) -> Result<Vec<phasewise::model::memory::StoredFit>> {
    let mut keys: Vec<&str> = analytes
        .iter()
        .filter_map(|a| a.inchikey.as_deref())
        .collect();
    keys.sort_unstable();
    keys.dedup();
    let mut out = Vec::new();
    for key in keys {
        for r in kb.retention_fits(key)? {
            out.push(stored_fit_from(&r).with_context(|| {
                format!(
                    "stored retention fit of `{}` in {} is unreadable",
                    r.analyte,
                    kb.user_path().display()
                )
            })?);
        }
    }
    Ok(out)
}

/// A stored row as the model reads it (see `StoredFit` for the fields not recorded).
pub fn stored_fit_from(
    r: &phasewise::kb::retention::RetentionFitRecord,
) -> Result<phasewise::model::memory::StoredFit> {
    use phasewise::model::regression::{
        Additive, ChemClass, GradientPoint, LcSystem, Mode, Modifier,
    };
    let mode = match r.mode.as_str() {
        "rp" => Mode::ReversedPhase,
        "hilic" => Mode::Hilic,
        m => bail!("mode `{m}` is neither rp nor hilic"),
    };
    let chem_class = ChemClass::parse(&r.chem_class)
        .ok_or_else(|| anyhow::anyhow!("unknown chemistry class `{}`", r.chem_class))?;
    let modifier = match r.modifier.as_str() {
        "acetonitrile" => Modifier::Acetonitrile,
        "methanol" => Modifier::Methanol,
        m => bail!("modifier `{m}` is neither acetonitrile nor methanol"),
    };
    let first = r
        .gradients
        .first()
        .ok_or_else(|| anyhow::anyhow!("no gradient program recorded"))?;
    let program = phasewise::model::gradient::GradientProgram::parse(first)
        .with_context(|| format!("gradient program `{first}`"))?;
    let (lss, log_kw_uncertainty, s_uncertainty, correlation) = strong_solvent_parameters(r)?;
    Ok(phasewise::model::memory::StoredFit {
        inchikey: r.inchikey.clone(),
        phase_id: r.phase_id.clone(),
        system: LcSystem {
            mode,
            chem_class,
            modifier,
            ph: Some(r.ph),
            additive: r
                .buffer
                .as_deref()
                .map_or(Additive::Other, Additive::from_buffer_text),
            gradient: program
                .points()
                .iter()
                .map(|p| GradientPoint {
                    time_min: p.time_min,
                    organic_pct: p.organic_pct,
                })
                .collect(),
            t0_min: r.t0_min,
            dwell_min: r.dwell_min,
            flow_ml_min: r.flow_ml_min.unwrap_or(1.0),
            temperature_c: r.temperature_c,
        },
        lss,
        log_kw_uncertainty,
        s_uncertainty,
        correlation,
        rms_residual_min: r.rms_residual_min,
        source: r.source.clone(),
        buffer: r.buffer.clone(),
    })
}

/// A stored row's log kw and S (with 1σ and correlation) in the strong-solvent fraction of its
/// mode, as `StoredFit` holds them. HILIC rows stored before the overlay's migration 3 were
/// fitted in the organic fraction φ (basis `organic`): log k = a − s φ with φ = 1 − ψ is
/// log k = (a − s) − (−s) ψ, so log kw = a − s and S = −s in the water fraction ψ, with
/// Var(log kw) = Var a + Var s − 2 Cov(a, s) and Cov(log kw, S) = Var s − Cov(a, s).
fn strong_solvent_parameters(
    r: &phasewise::kb::retention::RetentionFitRecord,
) -> Result<(phasewise::model::gradient::LssParameters, f64, f64, f64)> {
    let lss = |log_kw, s| phasewise::model::gradient::LssParameters { log_kw, s };
    match (r.mode.as_str(), r.basis.as_str()) {
        ("rp", "organic") | ("hilic", "water") => Ok((
            lss(r.log_kw, r.s),
            r.log_kw_uncertainty,
            r.s_uncertainty,
            r.correlation,
        )),
        ("hilic", "organic") => {
            let (sa, ss) = (r.log_kw_uncertainty, r.s_uncertainty);
            let cov = r.correlation * sa * ss;
            let sd_kw = (sa * sa + ss * ss - 2.0 * cov).max(0.0).sqrt();
            let cov_new = ss * ss - cov;
            let rho = if sd_kw > 0.0 && ss > 0.0 {
                (cov_new / (sd_kw * ss)).clamp(-1.0, 1.0)
            } else {
                0.0
            };
            Ok((lss(r.log_kw - r.s, -r.s), sd_kw, ss, rho))
        }
        (m, b) => bail!("mode `{m}` with composition basis `{b}` is not a known combination"),
    }
}
