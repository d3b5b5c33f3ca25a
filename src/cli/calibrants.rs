//! `--calibrants FILE` (shared by `predict` and `advise`): reads the user's calibrant peak table,
//! predicts each calibrant under the same fixed conditions and projects the recommendation onto
//! the user's system (`advisor::calibrants`).

use std::path::Path;

use anyhow::{Result, bail};

use phasewise::advisor::calibrants::{Calibrant, project_onto_calibrants};
use phasewise::report::advice::Recommendation;

use super::Cli;
use super::advising::{AdviseOptions, Fixed, advice};
use super::input::{AnalyteInput, read_retention_peaks};

/// Predicts every calibrant of `file` under `fixed` (one at a time, so each keeps its own
/// name) and projects `rec` onto them; returns the notes that say so.
///
/// # Errors
/// The file cannot be read or parsed, the conditions are not LC, or fewer than 5 calibrants
/// are usable (the error names the count, the file and the calibrants not used).
pub fn project(
    cli: &Cli,
    opts: &AdviseOptions,
    fixed: &Fixed,
    file: &Path,
    rec: &mut Recommendation,
) -> Result<Vec<String>> {
    if fixed.lc.is_none() {
        bail!(
            "--calibrants {}: projection onto calibrants is for LC (rp, hilic) only",
            file.display()
        );
    }
    let table = read_retention_peaks(file)?;
    let mut usable = Vec::new();
    let mut unusable = Vec::new();
    for peak in table.peaks() {
        let one = AdviseOptions {
            input: AnalyteInput {
                analytes: vec![peak.name.clone()],
                input: None,
            },
            detector: opts.detector.clone(),
            column: opts.column.clone(),
            particle: opts.particle,
            flow: opts.flow,
            dwell: opts.dwell,
            modes: opts.modes.clone(),
            phases_available: None,
            alternatives: 1,
            risk: opts.risk,
            no_memory: opts.no_memory,
        };
        let predicted = advice(cli, &one, Some(fixed.clone())).map(|(report, _)| {
            report
                .recommendations
                .first()
                .and_then(|r| r.predictions.first())
                .map(|p| p.retention_time_min)
        });
        match predicted {
            Ok(Some(t)) => usable.push(Calibrant {
                name: peak.name.clone(),
                measured_min: peak.retention_time_min,
                predicted_min: t,
            }),
            Ok(None) => unusable.push(format!("`{}` (no prediction)", peak.name)),
            Err(e) => {
                // the advice error already names the calibrant and why it did not resolve
                let text = format!("{e:#}");
                unusable.push(match text.strip_prefix("none of the analytes resolved: ") {
                    Some(rest) => rest.to_owned(),
                    None => format!("`{}` ({text})", peak.name),
                });
            }
        }
    }
    Ok(project_onto_calibrants(
        rec,
        &usable,
        &unusable,
        &file.display().to_string(),
    )?)
}
