//! Opening the knowledge base for a command, resolving analytes in it, and reading the user's
//! stored scouting fits as the model wants them.

use std::io::IsTerminal;

use anyhow::{Context, Result, bail};
use indicatif::{ProgressBar, ProgressStyle};

use phasewise::kb::identifier::ListEntry;
use phasewise::kb::resolve::{Resolution, Unresolved};
use phasewise::kb::{Access, BuildPolicy, Kb, KbError, KbPaths};
use phasewise::property::{Analyte, Origin};

use super::Cli;
use super::output::note;

/// The knowledge base cannot be used where it is looked for (no home directory, a path that
/// cannot be read, created or written): exit code 3, naming the path and how to choose another.
#[derive(Debug)]
pub struct KbLocationError {
    /// Where the base was looked for (or why there is no default place).
    pub path: String,
    /// What went wrong there.
    pub detail: String,
}

impl std::fmt::Display for KbLocationError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "cannot use the knowledge base at {}: {}; choose a readable and writable file \
             with --kb PATH (and --user-kb PATH) or the PHASEWISE_KB (and PHASEWISE_USER_KB) \
             environment variable",
            self.path, self.detail
        )
    }
}

impl std::error::Error for KbLocationError {}

/// The shipped base and the user overlay: `--kb`/`--user-kb`, else the default location.
///
/// # Errors
/// No `--kb` and no home directory to hold the default location ([`KbLocationError`]).
pub fn paths(cli: &Cli) -> Result<KbPaths> {
    let d = KbPaths::default_location();
    let shipped = match &cli.kb {
        Some(p) => p.clone(),
        None => d
            .as_ref()
            .map_err(|e| KbLocationError {
                path: "the default location".into(),
                detail: e.to_string(),
            })?
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

/// Turns a file-system error while opening or building the base into a [`KbLocationError`]
/// (exit code 3); other errors pass unchanged.
pub fn located(e: KbError) -> anyhow::Error {
    match e {
        KbError::Io { path, source } => KbLocationError {
            path: path.display().to_string(),
            detail: source.to_string(),
        }
        .into(),
        KbError::Missing { path } => KbLocationError {
            path: path.display().to_string(),
            detail: "it does not exist and --no-build forbids building it; build it with \
                     `phasewise kb build`"
                .into(),
        }
        .into(),
        other => other.into(),
    }
}

/// Progress of a knowledge-base build on stderr: a bar on a terminal; otherwise (a log, a pipe,
/// a CI job) one plain line per tenth of the work and per new step, never carriage returns.
pub enum BuildProgress {
    /// A terminal: the bar.
    Bar(ProgressBar),
    /// Not a terminal: lines.
    Lines {
        /// Tenths of the work already reported.
        tenths: u64,
        /// The last step named.
        step: String,
    },
}

impl BuildProgress {
    /// The progress display for this process's stderr.
    pub fn new() -> Self {
        if std::io::stderr().is_terminal() {
            let pb = ProgressBar::new(1000);
            pb.set_style(
                ProgressStyle::with_template(
                    "building knowledge base {bar:40} {percent:>3}% {msg}",
                )
                .unwrap_or_else(|_| ProgressStyle::default_bar()),
            );
            BuildProgress::Bar(pb)
        } else {
            BuildProgress::Lines {
                tenths: 0,
                step: String::new(),
            }
        }
    }

    /// `fraction` (0–1) of the build done, now at `step`.
    pub fn update(&mut self, fraction: f64, step: &str) {
        match self {
            BuildProgress::Bar(pb) => {
                pb.set_position((fraction * 1000.0) as u64);
                pb.set_message(step.to_string());
            }
            BuildProgress::Lines { .. } => {
                if let Some(line) = self.next_line(fraction, step) {
                    note(&line);
                }
            }
        }
    }

    /// The line to print for this update when stderr is not a terminal: one per tenth of the
    /// work and per new step, None otherwise (and always None for the bar).
    fn next_line(&mut self, fraction: f64, step: &str) -> Option<String> {
        let BuildProgress::Lines { tenths, step: last } = self else {
            return None;
        };
        let now = (fraction.clamp(0.0, 1.0) * 10.0).floor() as u64;
        if now > *tenths || (step != last.as_str() && !step.is_empty()) {
            *tenths = (*tenths).max(now);
            *last = step.to_string();
            Some(build_progress_line(fraction, step))
        } else {
            None
        }
    }

    /// Clears the bar (lines stay).
    pub fn finish(&self) {
        if let BuildProgress::Bar(pb) = self {
            pb.finish_and_clear();
        }
    }
}

/// One line of build progress when stderr is not a terminal.
pub fn build_progress_line(fraction: f64, step: &str) -> String {
    let pct = (fraction.clamp(0.0, 1.0) * 100.0).round();
    if step.is_empty() {
        format!("building knowledge base: {pct:.0} %")
    } else {
        format!("building knowledge base: {pct:.0} % ({step})")
    }
}

/// Opens the knowledge base (building the shipped part when missing, unless `--no-build`), with
/// the user overlay opened for `access`: commands that only read pass [`Access::Read`] and never
/// write to the overlay; a reader that meets an older overlay says so on stderr.
pub fn open_kb(cli: &Cli, access: Access) -> Result<Kb> {
    let p = paths(cli)?;
    let mut progress = BuildProgress::new();
    let policy = if cli.no_build {
        BuildPolicy::Never
    } else {
        BuildPolicy::IfNeeded
    };
    let kb = Kb::open_with(&p, policy, access, &mut |f, msg| progress.update(f, msg))
        .map_err(located)?;
    progress.finish();
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
            // an explicit ion form (`ClO3-`) never resolves to an uncharged record that holds
            // it as a synonym (the chlorine trioxide radical): the ion table's ion is meant
            Resolution::Found(mut a) => {
                let uncharged = !a.formula.as_deref().is_some_and(|f| f.contains(['+', '-']));
                match (explicit_ion_form(&e.query) && uncharged)
                    .then(|| ion_table_entry(&e.query))
                    .flatten()
                {
                    Some(ion) => found.push(ion_analyte(ion, e.label.as_deref(), &e.query)),
                    None => {
                        if let Some(l) = &e.label {
                            a.query = l.clone();
                        }
                        found.push(*a);
                    }
                }
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
            Resolution::Unresolved(mut u) => match ion_table_entry(&u.query) {
                Some(ion) => found.push(ion_analyte(ion, e.label.as_deref(), &u.query)),
                None => {
                    if let Some(l) = &e.label {
                        u.query = format!("{l} ({})", u.query);
                    }
                    missing.push(u)
                }
            },
        }
    }
    Ok((found, missing))
}

/// The ion of the ion-chromatography table (`data/ic_ions.tsv`) a name the knowledge base does
/// not hold denotes (`chlorate`, `ClO3-`): chromatographers analyse these ions, so every one of
/// them resolves, as the ion (issue 13: oxyanions present as ions).
fn ion_table_entry(query: &str) -> Option<&'static phasewise::phase::IcIon> {
    phasewise::phase::Catalogue::builtin()
        .ok()?
        .ic_ion(query.trim())
        .ok()
}

/// Whether a query is written as an ion: a formula-like token ending in a charge sign
/// (`ClO3-`, `SO4 2-`, `Na+`).
fn explicit_ion_form(query: &str) -> bool {
    let q = query.trim();
    q.ends_with(['+', '-']) && q.len() > 1 && !q.contains(char::is_whitespace)
        || q.split_whitespace().count() == 2
            && q.split_whitespace().nth(1).is_some_and(|c| {
                c.ends_with(['+', '-']) && c[..c.len() - 1].chars().all(|d| d.is_ascii_digit())
            })
}

/// An analyte for an ion of the ion table, known by its structure only.
fn ion_analyte(ion: &phasewise::phase::IcIon, label: Option<&str>, query: &str) -> Analyte {
    Analyte {
        query: label.map_or_else(|| query.trim().to_string(), str::to_string),
        name: ion.name().to_string(),
        inchikey: None,
        smiles: Some(ion.smiles().to_string()),
        formula: Some(ion.formula().to_string()),
        molar_mass_g_mol: None,
        cid: None,
        cas: None,
        origin: Origin::Structure,
        matched_by: "ion of the ion-chromatography table (not in the knowledge base)".into(),
        properties: Vec::new(),
    }
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

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn off_a_terminal_progress_is_a_few_plain_lines() {
        let mut p = BuildProgress::Lines {
            tenths: 0,
            step: String::new(),
        };
        let mut lines = Vec::new();
        for i in 0..=1000 {
            let step = if i < 400 {
                "reading names"
            } else {
                "estimating properties"
            };
            lines.extend(p.next_line(f64::from(i) / 1000.0, step));
        }
        // ten tenths and two steps (the first step arrives with 0 %)
        assert!(lines.len() >= 10 && lines.len() <= 12, "{lines:?}");
        assert!(lines.iter().all(|l| !l.contains('\r') && !l.contains('\n')));
        assert_eq!(lines[0], "building knowledge base: 0 % (reading names)");
        assert!(
            lines
                .iter()
                .any(|l| l.contains("40 % (estimating properties)"))
        );
        assert_eq!(
            lines.last().map(String::as_str),
            Some("building knowledge base: 100 % (estimating properties)")
        );
    }

    #[test]
    fn location_errors_name_the_path_and_the_options() {
        let e = located(KbError::Missing {
            path: "/srv/kb.sqlite".into(),
        });
        let text = e.to_string();
        assert!(text.contains("/srv/kb.sqlite") && text.contains("--kb"));
        assert!(text.contains("PHASEWISE_KB"));
        assert!(e.downcast_ref::<KbLocationError>().is_some());
    }
}
