//! LC temperature as a second variable: from scouting fits at two or more column temperatures
//! (each from two or more gradients, [`crate::measured::scout`]), describe each analyte's LSS
//! parameters as functions of temperature and search the temperature together with the
//! gradient ([`crate::measured::optimise`]).
//!
//! Model: at fixed composition log k is linear in 1/T (van 't Hoff), so log kw and S are each
//! taken linear in 1/T (T in K): log kw(T) = a + b/T, S(T) = c + d/T (the two-variable
//! temperature–gradient approach of Dolan, Snyder et al., J. Chromatogr. A 803 (1998) 1; from
//! memory, not checked against the paper). With two temperatures the lines pass through both
//! fits; with more, they are least-squares lines in 1/T. The dead time is taken as independent of
//! temperature (the mobile phase's density changes little; common practice, no source).
//! Interpolation between the scouted temperatures is the intended use; the search range is
//! limited to them unless the caller widens it, and the report says when it extrapolates.
//!
//! Search: the gradient optimiser at every temperature of a grid (default 5 °C steps), each
//! result ranked by the optimiser's own rule (target met first, then the shortest run, else the
//! largest smallest resolution), so the chosen condition is the best (temperature, gradient)
//! pair of the grid. Self-consistency tests only.

use serde::{Deserialize, Serialize};
use thiserror::Error;

use crate::measured::optimise::{
    NamedAnalyte, OptimiseError, OptimiseReport, OptimiseRequest, Range, Selection, optimise,
};
use crate::measured::scout::{CompositionBasis, ScoutFit};

const KELVIN: f64 = 273.15;

/// Errors of the temperature model and search.
#[derive(Debug, Clone, PartialEq, Error)]
pub enum TemperatureError {
    /// Fewer than two distinct temperatures.
    #[error(
        "temperature is not identifiable: the fits cover {count} distinct temperature(s) ({temperatures:?} °C); scout at two temperatures at least 10–20 °C apart"
    )]
    TooFewTemperatures {
        /// Distinct temperatures.
        count: usize,
        /// The temperatures, °C.
        temperatures: Vec<f64>,
    },
    /// The fits do not name the same analytes.
    #[error(
        "analyte `{name}` is fitted at {present_c} °C but not at {missing_c} °C; match the peak names across all runs"
    )]
    MissingAnalyte {
        /// Analyte.
        name: String,
        /// A temperature with it.
        present_c: f64,
        /// A temperature without it.
        missing_c: f64,
    },
    /// The fits are in different composition bases.
    #[error("the fits mix reversed-phase and HILIC compositions; fit all runs in one mode")]
    MixedBasis,
    /// A temperature or range is invalid.
    #[error("{name} = {value} °C is invalid ({reason})")]
    BadTemperature {
        /// Name.
        name: &'static str,
        /// Value, °C.
        value: f64,
        /// Why.
        reason: &'static str,
    },
    /// The gradient optimiser failed at every temperature.
    #[error(transparent)]
    Optimise(#[from] OptimiseError),
}

/// One analyte's LSS parameters as functions of temperature.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TemperatureAnalyte {
    /// Name.
    pub name: String,
    /// a in log kw = a + b/T.
    pub log_kw_intercept: f64,
    /// b in log kw = a + b/T, K.
    pub log_kw_slope_k: f64,
    /// c in S = c + d/T.
    pub s_intercept: f64,
    /// d in S = c + d/T, K.
    pub s_slope_k: f64,
    /// The fits it came from: (temperature °C, log kw, S).
    pub fitted: Vec<(f64, f64, f64)>,
    /// Some fit it came from was flagged as poorly determined.
    pub from_flagged_fit: bool,
}

impl TemperatureAnalyte {
    /// log kw and S at `temperature_c`.
    pub fn at(&self, temperature_c: f64) -> (f64, f64) {
        let inv = 1.0 / (temperature_c + KELVIN);
        (
            self.log_kw_intercept + self.log_kw_slope_k * inv,
            self.s_intercept + self.s_slope_k * inv,
        )
    }
}

/// The temperature model of all analytes.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TemperatureModel {
    /// Composition basis of the parameters.
    pub basis: CompositionBasis,
    /// Distinct temperatures scouted, °C, ascending.
    pub temperatures_c: Vec<f64>,
    /// Analytes in the first fit's order.
    pub analytes: Vec<TemperatureAnalyte>,
}

/// Least-squares line y = p + q x.
fn line(points: &[(f64, f64)]) -> (f64, f64) {
    let n = points.len() as f64;
    let mx = points.iter().map(|p| p.0).sum::<f64>() / n;
    let my = points.iter().map(|p| p.1).sum::<f64>() / n;
    let sxx: f64 = points.iter().map(|p| (p.0 - mx).powi(2)).sum();
    let sxy: f64 = points.iter().map(|p| (p.0 - mx) * (p.1 - my)).sum();
    let q = sxy / sxx;
    (my - q * mx, q)
}

/// Builds the temperature model from scouting fits, each with its column temperature (°C).
///
/// # Errors
/// Fewer than two distinct temperatures, an analyte missing at some temperature, mixed bases,
/// a temperature outside −10 to 200 °C.
pub fn temperature_model(fits: &[(f64, ScoutFit)]) -> Result<TemperatureModel, TemperatureError> {
    for (t, _) in fits {
        if !(t.is_finite() && (-10.0..=200.0).contains(t)) {
            return Err(TemperatureError::BadTemperature {
                name: "column temperature",
                value: *t,
                reason: "must lie between -10 and 200 °C",
            });
        }
    }
    let mut temps: Vec<f64> = fits.iter().map(|(t, _)| *t).collect();
    temps.sort_by(f64::total_cmp);
    temps.dedup_by(|a, b| (*a - *b).abs() < 1e-9);
    if temps.len() < 2 {
        return Err(TemperatureError::TooFewTemperatures {
            count: temps.len(),
            temperatures: temps,
        });
    }
    let Some((_, first)) = fits.first() else {
        return Err(TemperatureError::TooFewTemperatures {
            count: 0,
            temperatures: Vec::new(),
        });
    };
    if fits.iter().any(|(_, f)| f.basis != first.basis) {
        return Err(TemperatureError::MixedBasis);
    }
    // One name index per fit: matching the analytes across fits is linear in their number.
    let indexes: Vec<std::collections::HashMap<&str, usize>> = fits
        .iter()
        .map(|(_, f)| {
            f.analytes
                .iter()
                .enumerate()
                .map(|(i, b)| (b.name.as_str(), i))
                .collect()
        })
        .collect();
    let mut analytes = Vec::new();
    for a in &first.analytes {
        let mut fitted = Vec::new();
        let mut flagged = false;
        for ((t, f), index) in fits.iter().zip(&indexes) {
            let Some(b) = index.get(a.name.as_str()).map(|&i| &f.analytes[i]) else {
                return Err(TemperatureError::MissingAnalyte {
                    name: a.name.clone(),
                    present_c: fits[0].0,
                    missing_c: *t,
                });
            };
            flagged |= !b.flags.is_empty();
            fitted.push((*t, b.log_kw, b.s));
        }
        for (t, f) in fits {
            for b in &f.analytes {
                if !indexes[0].contains_key(b.name.as_str()) {
                    return Err(TemperatureError::MissingAnalyte {
                        name: b.name.clone(),
                        present_c: *t,
                        missing_c: fits[0].0,
                    });
                }
            }
        }
        let inv: Vec<f64> = fitted.iter().map(|p| 1.0 / (p.0 + KELVIN)).collect();
        let (ka, kb) = line(
            &inv.iter()
                .zip(&fitted)
                .map(|(x, p)| (*x, p.1))
                .collect::<Vec<_>>(),
        );
        let (sa, sb) = line(
            &inv.iter()
                .zip(&fitted)
                .map(|(x, p)| (*x, p.2))
                .collect::<Vec<_>>(),
        );
        analytes.push(TemperatureAnalyte {
            name: a.name.clone(),
            log_kw_intercept: ka,
            log_kw_slope_k: kb,
            s_intercept: sa,
            s_slope_k: sb,
            fitted,
            from_flagged_fit: flagged,
        });
    }
    Ok(TemperatureModel {
        basis: first.basis,
        temperatures_c: temps,
        analytes,
    })
}

/// One temperature of the search.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TemperaturePoint {
    /// Column temperature, °C.
    pub temperature_c: f64,
    /// Smallest resolution of the best gradient at this temperature (–).
    pub min_resolution: f64,
    /// Its run time (last peak out), min.
    pub run_time_min: f64,
    /// It meets the target resolution.
    pub meets_target: bool,
    /// The program chosen at this temperature (`time:%`, in the optimiser's composition).
    pub program: String,
}

/// The result of the temperature search.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TemperatureSearch {
    /// Chosen column temperature, °C.
    pub temperature_c: f64,
    /// The gradient optimisation at that temperature.
    pub report: OptimiseReport,
    /// Every temperature searched, ascending.
    pub points: Vec<TemperaturePoint>,
    /// The chosen temperature lies outside the scouted temperatures (extrapolation).
    pub extrapolated: bool,
}

/// Ranks two optimiser reports by the optimiser's own rule (see the module docs).
fn better(a: &OptimiseReport, b: &OptimiseReport) -> bool {
    let key = |r: &OptimiseReport| (r.meets_min_retention, r.meets_target);
    if key(a) != key(b) {
        return key(a) > key(b);
    }
    if a.meets_target {
        let (ra, rb) = (a.optimum.run_time_min, b.optimum.run_time_min);
        if (ra - rb).abs() > 1e-9 {
            return ra < rb;
        }
        return a.optimum.min_resolution > b.optimum.min_resolution + 1e-9;
    }
    a.optimum.min_resolution > b.optimum.min_resolution + 1e-9
}

/// Searches column temperature over `range_c` (°C, `step_c` apart, both ends included) and the
/// gradient of `base` at each temperature; `base.analytes` is replaced by the model's
/// parameters at each temperature (without fit uncertainties, which are not carried through
/// the temperature lines).
///
/// # Errors
/// An invalid range or step; the optimiser's error when no temperature gives a feasible
/// gradient.
pub fn optimise_temperature(
    model: &TemperatureModel,
    base: &OptimiseRequest,
    range_c: Range,
    step_c: f64,
) -> Result<TemperatureSearch, TemperatureError> {
    let bad = |name, value, reason| TemperatureError::BadTemperature {
        name,
        value,
        reason,
    };
    if !(range_c.min.is_finite() && range_c.max.is_finite() && range_c.min <= range_c.max) {
        return Err(bad(
            "temperature range minimum",
            range_c.min,
            "the range must be finite with min <= max",
        ));
    }
    if !(-10.0..=200.0).contains(&range_c.min) || !(-10.0..=200.0).contains(&range_c.max) {
        return Err(bad(
            "temperature range end",
            if (-10.0..=200.0).contains(&range_c.min) {
                range_c.max
            } else {
                range_c.min
            },
            "must lie between -10 and 200 °C",
        ));
    }
    if !(step_c.is_finite() && (0.5..=50.0).contains(&step_c)) {
        return Err(bad("temperature step", step_c, "must be 0.5 to 50 °C"));
    }
    let mut grid = Vec::new();
    let mut t = range_c.min;
    while t < range_c.max - 1e-9 {
        grid.push((t * 10.0).round() / 10.0);
        t += step_c;
    }
    grid.push(range_c.max);
    let mut best: Option<(f64, OptimiseReport)> = None;
    let mut points = Vec::new();
    let mut last_err = None;
    for &t in &grid {
        let mut req = base.clone();
        req.analytes = model
            .analytes
            .iter()
            .map(|a| {
                let (log_kw, s) = a.at(t);
                NamedAnalyte {
                    name: a.name.clone(),
                    log_kw,
                    s,
                    uncertainty: None,
                }
            })
            .collect();
        match optimise(&req) {
            Ok(r) => {
                points.push(TemperaturePoint {
                    temperature_c: t,
                    min_resolution: r.optimum.min_resolution,
                    run_time_min: r.optimum.run_time_min,
                    meets_target: r.meets_target,
                    program: r.optimum.program.to_spec(),
                });
                if best.as_ref().is_none_or(|(_, b)| better(&r, b)) {
                    best = Some((t, r));
                }
            }
            Err(e) => last_err = Some(e),
        }
    }
    let Some((temperature_c, mut report)) = best else {
        return match last_err {
            Some(e) => Err(e.into()),
            None => Err(bad(
                "temperature range minimum",
                range_c.min,
                "no temperature to search",
            )),
        };
    };
    let (lo, hi) = (
        model
            .temperatures_c
            .first()
            .copied()
            .unwrap_or(temperature_c),
        model
            .temperatures_c
            .last()
            .copied()
            .unwrap_or(temperature_c),
    );
    let extrapolated = temperature_c < lo - 1e-9 || temperature_c > hi + 1e-9;
    report.notes.push(format!(
        "column temperature {temperature_c} °C chosen from {} temperatures between {} and {} °C (log kw and S linear in 1/T through fits at {})",
        grid.len(),
        range_c.min,
        range_c.max,
        model
            .temperatures_c
            .iter()
            .map(|t| format!("{t} °C"))
            .collect::<Vec<_>>()
            .join(", ")
    ));
    report.notes.push(
        "keep the column temperature within the phase's limit (`phasewise phases` lists it; silica-based phases age faster when hot, especially at pH extremes) and let the mobile phase pre-heat; the lab's SOPs take precedence".into(),
    );
    if extrapolated {
        report.notes.push(format!(
            "{temperature_c} °C lies outside the scouted {lo}–{hi} °C: an extrapolation; confirm by a run"
        ));
    }
    if report.selection == Selection::LargestMinResolution {
        report
            .notes
            .push("no temperature and gradient of the search meets the target resolution".into());
    }
    Ok(TemperatureSearch {
        temperature_c,
        report,
        points,
        extrapolated,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::measured::DeadTimeInput;
    use crate::measured::optimise::PlateSource;
    use crate::measured::peaks::{Peak, PeakTable};
    use crate::measured::scout::{ScoutRequest, ScoutRun, fit};
    use crate::model::gradient::{
        GradientProgram, GradientSystem, LssParameters, gradient_elution,
    };

    /// Invented analytes: (name, a, b K, c, d K) with log kw = a + b/T, S = c + d/T; chosen so
    /// that a pair's selectivity changes with temperature (not real compounds).
    const TRUTH: [(&str, f64, f64, f64, f64); 4] = [
        ("inv-t1", -1.0, 1000.0, 2.0, 400.0),
        ("inv-t2", -2.0, 1500.0, 2.5, 500.0),
        ("inv-t3", -0.2, 1050.0, 3.0, 500.0),
        ("inv-t4", -1.5, 1800.0, 3.0, 700.0),
    ];

    fn lss(row: &(&str, f64, f64, f64, f64), t_c: f64) -> LssParameters {
        let inv = 1.0 / (t_c + KELVIN);
        LssParameters {
            log_kw: row.1 + row.2 * inv,
            s: row.3 + row.4 * inv,
        }
    }

    fn scout_at(t_c: f64) -> ScoutFit {
        let sys = GradientSystem {
            dead_time_min: 1.0,
            dwell_time_min: 0.0,
        };
        let runs = [10.0, 30.0]
            .iter()
            .map(|tg| {
                let program = GradientProgram::linear(5.0, 95.0, *tg).unwrap();
                let peaks = TRUTH
                    .iter()
                    .map(|row| Peak {
                        width_half_min: Some(0.05),
                        ..Peak::at(
                            row.0,
                            gradient_elution(&lss(row, t_c), &program, &sys)
                                .unwrap()
                                .retention_time_min,
                        )
                    })
                    .collect();
                ScoutRun {
                    name: format!("{t_c}C-{tg}"),
                    program,
                    peaks: PeakTable::from_peaks(peaks).unwrap(),
                }
            })
            .collect();
        fit(&ScoutRequest {
            runs,
            dead_time: DeadTimeInput::Given { dead_time_min: 1.0 },
            dwell_volume_ml: 0.0,
            flow_ml_min: None,
        })
        .unwrap()
    }

    fn base() -> OptimiseRequest {
        OptimiseRequest {
            analytes: Vec::new(),
            dead_time_min: 1.0,
            dwell_time_min: 0.0,
            plates: PlateSource::Given { plates: 10_000.0 },
            gradient_time_min: Range {
                min: 5.0,
                max: 40.0,
            },
            initial_pct: Range {
                min: 5.0,
                max: 30.0,
            },
            final_pct: Range {
                min: 60.0,
                max: 95.0,
            },
            max_run_time_min: 45.0,
            critical_pairs: Vec::new(),
            two_segment: false,
            target_resolution: 1.5,
            min_retention_factor: 1.0,
            gradient_time_steps: 12,
            composition_step_pct: 5.0,
        }
    }

    #[test]
    fn two_temperatures_recover_the_lines_and_interpolate() {
        // Self-consistency: fits at 30 and 60 °C of runs simulated from the invented lines.
        let m = temperature_model(&[(30.0, scout_at(30.0)), (60.0, scout_at(60.0))]).unwrap();
        for (a, row) in m.analytes.iter().zip(&TRUTH) {
            assert!((a.log_kw_slope_k - row.2).abs() < 1e-2, "{a:?}");
            assert!((a.s_slope_k - row.4).abs() < 1e-2, "{a:?}");
            let (lk, s) = a.at(45.0);
            let want = lss(row, 45.0);
            assert!((lk - want.log_kw).abs() < 1e-6 && (s - want.s).abs() < 1e-6);
        }
    }

    #[test]
    fn the_search_finds_the_known_temperature_optimum() {
        let m = temperature_model(&[(30.0, scout_at(30.0)), (60.0, scout_at(60.0))]).unwrap();
        let range = Range {
            min: 30.0,
            max: 60.0,
        };
        // A target of Rs 2.3: with these invented analytes the critical pair's selectivity
        // peaks between the scouted temperatures, so the optimum is inside the range (at
        // 50 °C on the 5 °C grid), not at an end.
        let mut b = base();
        b.target_resolution = 2.3;
        let found = optimise_temperature(&m, &b, range, 5.0).unwrap();
        // The same search on the invented truth itself.
        let truth = TemperatureModel {
            basis: CompositionBasis::Organic,
            temperatures_c: vec![30.0, 60.0],
            analytes: TRUTH
                .iter()
                .map(|r| TemperatureAnalyte {
                    name: r.0.into(),
                    log_kw_intercept: r.1,
                    log_kw_slope_k: r.2,
                    s_intercept: r.3,
                    s_slope_k: r.4,
                    fitted: Vec::new(),
                    from_flagged_fit: false,
                })
                .collect(),
        };
        let known = optimise_temperature(&truth, &b, range, 5.0).unwrap();
        assert_eq!(found.temperature_c, known.temperature_c);
        assert_eq!(found.temperature_c, 50.0);
        assert!(found.report.meets_target);
        assert_eq!(found.report.optimum.program, known.report.optimum.program);
        assert_eq!(found.points.len(), 7);
        assert!(!found.extrapolated);
        // The chosen point is not beaten by any other temperature of the grid.
        for p in &found.points {
            if p.meets_target && found.report.meets_target {
                assert!(p.run_time_min >= found.report.optimum.run_time_min - 1e-9);
            }
        }
    }

    #[test]
    fn one_temperature_or_a_missing_analyte_is_an_error() {
        let f = scout_at(30.0);
        let e = temperature_model(&[(30.0, f.clone()), (30.0, f.clone())])
            .unwrap_err()
            .to_string();
        assert!(e.contains("not identifiable") && e.contains("30"), "{e}");
        let mut g = scout_at(50.0);
        g.analytes.pop();
        let e = temperature_model(&[(30.0, f), (50.0, g)])
            .unwrap_err()
            .to_string();
        assert!(e.contains("inv-t4") && e.contains("50"), "{e}");
        let m = temperature_model(&[(30.0, scout_at(30.0)), (60.0, scout_at(60.0))]).unwrap();
        let e = optimise_temperature(
            &m,
            &base(),
            Range {
                min: 30.0,
                max: 60.0,
            },
            0.0,
        )
        .unwrap_err()
        .to_string();
        assert!(e.contains("step"), "{e}");
    }
}
