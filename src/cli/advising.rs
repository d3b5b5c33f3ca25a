//! The advice every advising command starts from (`advise`, `plan`, and `predict`, which fixes
//! the phase and conditions): the options they share and the one function that checks them,
//! resolves the analytes and asks the advisor.

use std::path::PathBuf;

use anyhow::{Context, Result, bail};
use clap::Args;

use phasewise::advisor::profile::AnalyteProfile;
use phasewise::advisor::{AdviseRequest, Detector, FixedGc, FixedLc, advise};
use phasewise::report::advice::AdviceReport;

use phasewise::kb::Access;

use super::Cli;
use super::input::{AnalyteInput, parse_column, read_analytes};
use super::knowledge::{open_kb, resolve_all, stored_fits};

/// Options shared by `advise` and `plan`.
#[derive(Debug, Args)]
pub struct AdviseOptions {
    /// Analytes.
    #[command(flatten)]
    pub input: AnalyteInput,
    /// Detector: auto (default: chosen per mode from the analytes' structures), uv[:nm], ms,
    /// fluorescence, elsd, cad, ri, pad, fid, ecd, conductivity. A named detector limits the
    /// modes to those it works with.
    #[arg(long, default_value = "auto")]
    pub detector: String,
    /// LC column as LENGTHxID in mm, e.g. 100x2.1 (default 150x4.6).
    #[arg(long, value_name = "LxID")]
    pub column: Option<String>,
    /// LC particle size, µm (default 3.5).
    #[arg(long, value_name = "UM")]
    pub particle: Option<f64>,
    /// LC flow, mL/min (default scaled from 1.0 mL/min at 4.6 mm).
    #[arg(long, value_name = "ML_MIN")]
    pub flow: Option<f64>,
    /// Dwell volume of the LC system, mL.
    #[arg(long, value_name = "ML", default_value_t = 0.0)]
    pub dwell: f64,
    /// Modes to consider, comma-separated: gc, rp, hilic, ic-anion, ic-cation, ion-exclusion.
    #[arg(long, value_delimiter = ',')]
    pub modes: Vec<String>,
    /// File listing the stationary-phase ids the lab has, one per line (see `docs/phases.md`).
    #[arg(long, value_name = "FILE")]
    pub phases_available: Option<PathBuf>,
    /// Number of recommendations to list.
    #[arg(long, default_value_t = 3)]
    pub alternatives: usize,
    /// List pairs whose co-elution probability is at least this (0-1).
    #[arg(long, default_value_t = 0.2)]
    pub risk: f64,
    /// LC retention from the analytes' structures only, even for analytes with measured
    /// retention (open data or stored scouting fits), to see what the model says without them.
    #[arg(long)]
    pub no_memory: bool,
}

/// What `predict` fixes: its one phase (no back-up is sought) and its LC or GC conditions.
#[derive(Clone)]
pub struct Fixed {
    /// The phase id.
    pub phase: String,
    /// LC gradient, pH, modifier, t0, temperature.
    pub lc: Option<FixedLc>,
    /// GC column and oven program.
    pub gc: Option<FixedGc>,
}

/// Checks the options (cheap checks before the knowledge base is opened), resolves the
/// analytes, reads the user's stored scouting fits and asks the advisor. Returns the report
/// and whether some analytes did not resolve.
pub fn advice(cli: &Cli, o: &AdviseOptions, fixed: Option<Fixed>) -> Result<(AdviceReport, bool)> {
    // cheap checks first, before the knowledge base is opened
    let detector = Detector::parse(&o.detector).map_err(|e| anyhow::anyhow!(e))?;
    let column_mm = o
        .column
        .as_deref()
        .map(parse_column)
        .transpose()?
        .map(|c| (c.length_mm, c.inner_diameter_mm));
    for (name, v) in [("--particle", o.particle), ("--flow", o.flow)] {
        if let Some(v) = v
            && !(v > 0.0 && v.is_finite())
        {
            bail!("{name} {v}: must be a positive number");
        }
    }
    if !(o.dwell >= 0.0 && o.dwell.is_finite()) {
        bail!("--dwell {}: must be zero or positive", o.dwell);
    }
    if !(0.0..=1.0).contains(&o.risk) {
        bail!("--risk {}: must be between 0 and 1", o.risk);
    }
    let mut modes = Vec::new();
    for m in &o.modes {
        modes.push(phasewise::phase::PhaseMode::parse(m.trim()).ok_or_else(|| {
            anyhow::anyhow!(
                "unknown mode `{m}`; use gc, rp, hilic, ic-anion, ic-cation or ion-exclusion"
            )
        })?);
    }
    let phases_available: Vec<String> = match &o.phases_available {
        Some(p) => {
            let ids: Vec<String> = std::fs::read_to_string(p)
                .with_context(|| format!("reading {}", p.display()))?
                .lines()
                .map(|l| l.split('#').next().unwrap_or("").trim().to_string())
                .filter(|l| !l.is_empty())
                .collect();
            // an empty list would otherwise mean "no restriction", the opposite of the intent
            if ids.is_empty() {
                bail!(
                    "--phases-available {}: the file lists no phase id (only blank or comment lines); put one id per line (`phasewise phases` lists them)",
                    p.display()
                );
            }
            ids
        }
        None => Vec::new(),
    };
    // `predict` names its one phase: it wants no back-up
    let predicting = fixed.is_some();
    let (phases_available, fixed_lc, fixed_gc) = match fixed {
        Some(f) => (vec![f.phase], f.lc, f.gc),
        None => (phases_available, None, None),
    };
    let queries = read_analytes(&o.input)?;
    let kb = open_kb(cli, Access::Read)?;
    let (found, missing) = resolve_all(&kb, &queries)?;
    // the same molecule under two labels is one analyte, said so in the warnings
    let (found, merged) = phasewise::property::panel::merge_same_compounds(found);
    let partial = !missing.is_empty();
    let stored_fits = stored_fits(&kb, &found)?;
    let profiles: Vec<AnalyteProfile> = found.into_iter().map(AnalyteProfile::new).collect();
    if profiles.is_empty() {
        bail!(
            "none of the analytes resolved: {}",
            missing
                .iter()
                .map(|u| format!("`{}` ({})", u.query, u.reason))
                .collect::<Vec<_>>()
                .join(", ")
        );
    }
    let req = AdviseRequest {
        detector,
        column_mm,
        particle_um: o.particle,
        flow_ml_min: o.flow,
        dwell_ml: o.dwell,
        modes,
        phases_available,
        alternatives: o.alternatives.max(1),
        risk_threshold: o.risk,
        no_backup: predicting,
        fixed: fixed_lc,
        fixed_gc,
        stored_fits,
        no_memory: o.no_memory,
    };
    let mut report = advise(&profiles, missing, &req)?;
    let notes = merged.iter().map(phasewise::property::panel::Merged::note);
    report.warnings.splice(0..0, notes);
    Ok((report, partial))
}
