//! The n-alkane ladder under a temperature program, times from indices, starting oven programs.

use serde::Serialize;

use super::boiling_point::{alkane_boiling_point_k, gc_constants};
use super::{
    GcAnalyte, GcColumn, GcError, MAX_CARBON, OvenProgram, RetentionIndexPrediction,
    predict_retention_index,
};
use crate::phase::StationaryPhase;

/// Effective sorption-enthalpy constant H in ln k = ln(K_b / beta) + H (Tb / T - 1). Trouton's
/// rule gives 10.6 for vaporisation; 9.5 is calibrated by eye to typical n-alkane elution
/// temperatures under 40 C + 10 C/min on 30 m x 0.25 mm x 0.25 um at 35 cm/s (from memory: C10
/// near 105 C, C20 near 235 C, C30 near 300 C), consistent with a positive excess enthalpy of
/// solution. Rough.
const SORPTION_H: f64 = 9.5;
/// Partition coefficient of n-decane at its boiling point on squalane-like phases (same rough
/// calibration). Other alkanes scale as Tb / M (K = rho R T / (Omega M p) with the weight-fraction
/// activity coefficient Omega taken as constant).
const K_DECANE_AT_BOILING_POINT: f64 = 80.0;
const DECANE_TB_K: f64 = 447.3;
const DECANE_M_G_MOL: f64 = 142.28;
/// Alkanes are retained less on polar phases: ln K falls by this much per 1000 units of the
/// McReynolds sum (rough, from memory).
const POLARITY_PENALTY_PER_1000: f64 = 0.5;

/// One rung of the n-alkane ladder.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct LadderPoint {
    /// Carbon number.
    pub carbon_number: u32,
    /// Retention time.
    pub retention_time_min: f64,
    /// Oven temperature when it elutes.
    pub elution_temperature_c: f64,
}

/// The n-alkanes' retention times on one phase, column and program.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlkaneLadder {
    phase_id: String,
    holdup_time_min: f64,
    program: OvenProgram,
    points: Vec<LadderPoint>,
}

impl AlkaneLadder {
    /// Phase id.
    pub fn phase_id(&self) -> &str {
        &self.phase_id
    }
    /// Hold-up time.
    pub fn holdup_time_min(&self) -> f64 {
        self.holdup_time_min
    }
    /// The eluted alkanes in order (C1 first).
    pub fn points(&self) -> &[LadderPoint] {
        &self.points
    }

    fn bracket(&self, retention_index: f64) -> Result<(&LadderPoint, &LadderPoint, f64), GcError> {
        let outside = || GcError::OutsideLadder {
            retention_index,
            first_carbon: self.points.first().map_or(1, |p| p.carbon_number),
            last_carbon: self.points.last().map_or(0, |p| p.carbon_number),
        };
        if !retention_index.is_finite() {
            return Err(outside());
        }
        let n = retention_index / 100.0;
        for pair in self.points.windows(2) {
            let (low, high) = (&pair[0], &pair[1]);
            if n >= f64::from(low.carbon_number) && n <= f64::from(high.carbon_number) {
                return Ok((low, high, n - f64::from(low.carbon_number)));
            }
        }
        Err(outside())
    }

    /// Retention time for an index (van den Dool & Kratz interpolation between bracketing alkanes).
    ///
    /// # Errors
    /// [`GcError::OutsideLadder`] when the index lies outside the eluted alkanes.
    pub fn retention_time_min(&self, retention_index: f64) -> Result<f64, GcError> {
        let (low, high, fraction) = self.bracket(retention_index)?;
        Ok(low.retention_time_min + fraction * (high.retention_time_min - low.retention_time_min))
    }

    /// Index for a retention time (the van den Dool & Kratz definition
    /// I = 100 [n + (t - t_n) / (t_{n+1} - t_n)]).
    ///
    /// # Errors
    /// [`GcError::TimeOutsideLadder`] when the time lies outside the eluted alkanes.
    pub fn retention_index_at(&self, retention_time_min: f64) -> Result<f64, GcError> {
        for pair in self.points.windows(2) {
            let (low, high) = (&pair[0], &pair[1]);
            if retention_time_min >= low.retention_time_min
                && retention_time_min <= high.retention_time_min
            {
                let span = high.retention_time_min - low.retention_time_min;
                let fraction = if span > 0.0 {
                    (retention_time_min - low.retention_time_min) / span
                } else {
                    0.0
                };
                return Ok(100.0 * (f64::from(low.carbon_number) + fraction));
            }
        }
        Err(GcError::TimeOutsideLadder {
            retention_time_min,
            first_carbon: self.points.first().map_or(1, |p| p.carbon_number),
            last_carbon: self.points.last().map_or(0, |p| p.carbon_number),
        })
    }

    /// Oven temperature at a retention time.
    pub fn temperature_c_at(&self, retention_time_min: f64) -> f64 {
        self.program.temperature_c_at(retention_time_min)
    }
}

/// Computes the n-alkane ladder (C1 to the last alkane eluting within the program).
///
/// # Errors
/// [`GcError::NotGcPhase`], [`GcError::NoMcReynolds`] (porous-layer phases),
/// [`GcError::AbovePhaseLimit`] when the program exceeds the phase's maximum temperature.
pub fn alkane_ladder(
    phase: &StationaryPhase,
    column: &GcColumn,
    program: &OvenProgram,
) -> Result<AlkaneLadder, GcError> {
    alkane_ladder_with_steps(phase, column, program, LADDER_STEPS_PER_HOLDUP)
}

/// Integration steps per hold-up time for the ladder. The midpoint rule on the smooth
/// integrand 1/(t_M (1 + k(T(t)))) with linear interpolation of the crossing keeps the
/// elution times within 0.05 % of t_M of a 20-times finer integration (checked by the test
/// `ladder_step_is_converged`); 400 steps, used before, cost 4 times as much for no visible change.
pub(super) const LADDER_STEPS_PER_HOLDUP: f64 = 100.0;

pub(super) fn alkane_ladder_with_steps(
    phase: &StationaryPhase,
    column: &GcColumn,
    program: &OvenProgram,
    steps_per_holdup: f64,
) -> Result<AlkaneLadder, GcError> {
    let constants = gc_constants(phase)?;
    if program.final_c() > phase.t_max_c() {
        return Err(GcError::AbovePhaseLimit {
            phase_id: phase.id().to_string(),
            final_c: program.final_c(),
            t_max_c: phase.t_max_c(),
        });
    }
    let holdup = column.holdup_time_min();
    let ln_base = (K_DECANE_AT_BOILING_POINT / column.phase_ratio()).ln()
        - POLARITY_PENALTY_PER_1000 * constants.sum_ri() / 1000.0;
    let boiling: Vec<f64> = (1..=MAX_CARBON)
        .map(|n| alkane_boiling_point_k(f64::from(n)))
        .collect();
    let ln_k_at_tb: Vec<f64> = (1..=MAX_CARBON)
        .zip(&boiling)
        .map(|(n, tb)| {
            let molar_mass = 14.027 * f64::from(n) + 2.016;
            ln_base + ((tb / DECANE_TB_K) * (DECANE_M_G_MOL / molar_mass)).ln()
        })
        .collect();
    let mut position = vec![0.0_f64; boiling.len()];
    let mut points = Vec::new();
    let total = program.total_time_min();
    let dt = holdup / steps_per_holdup;
    let mut eluted = vec![false; boiling.len()];
    let mut first_pending = 0usize;
    let mut time = 0.0;
    while time < total && first_pending < boiling.len() {
        let temperature_k = program.temperature_c_at(time + 0.5 * dt) + 273.15;
        for index in first_pending..boiling.len() {
            let ln_k = ln_k_at_tb[index] + SORPTION_H * (boiling[index] / temperature_k - 1.0);
            // Heavier alkanes are retained more; past e^60 they do not move measurably.
            if ln_k > 60.0 {
                break;
            }
            let step = dt / (holdup * (1.0 + ln_k.exp()));
            let before = position[index];
            position[index] += step;
            if position[index] >= 1.0 && !eluted[index] {
                eluted[index] = true;
                let retention = time + dt * (1.0 - before) / step;
                points.push(LadderPoint {
                    carbon_number: u32::try_from(index + 1).unwrap_or(MAX_CARBON),
                    retention_time_min: retention,
                    elution_temperature_c: program.temperature_c_at(retention),
                });
            }
        }
        while first_pending < eluted.len() && eluted[first_pending] {
            first_pending += 1;
        }
        time += dt;
    }
    // Keep only the unbroken run C1, C2, ... so that interpolation never skips a rung.
    points.sort_by_key(|p| p.carbon_number);
    let unbroken = points
        .iter()
        .enumerate()
        .take_while(|(i, p)| u32::try_from(*i + 1).is_ok_and(|n| n == p.carbon_number))
        .count();
    points.truncate(unbroken);
    Ok(AlkaneLadder {
        phase_id: phase.id().to_string(),
        holdup_time_min: holdup,
        program: *program,
        points,
    })
}

/// A predicted retention time with its interval.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RetentionTimePrediction {
    /// The index prediction it is based on.
    pub index: RetentionIndexPrediction,
    /// Predicted retention time.
    pub retention_time_min: f64,
    /// Time at the low end of the 95 % index interval (clamped to the ladder).
    pub low_95_min: f64,
    /// Time at the high end of the 95 % index interval (clamped to the ladder).
    pub high_95_min: f64,
    /// Oven temperature at elution.
    pub elution_temperature_c: f64,
    /// How the value was obtained.
    pub path: String,
}

impl AlkaneLadder {
    fn clamped_time(&self, retention_index: f64) -> f64 {
        let first = self
            .points
            .first()
            .map_or(0.0, |p| 100.0 * f64::from(p.carbon_number));
        let last = self
            .points
            .last()
            .map_or(0.0, |p| 100.0 * f64::from(p.carbon_number));
        self.retention_time_min(retention_index.clamp(first, last))
            .unwrap_or(f64::NAN)
    }

    /// Converts an index prediction into a retention time on this ladder.
    ///
    /// # Errors
    /// [`GcError::OutsideLadder`] when the predicted index is outside the eluted alkanes.
    pub fn predict_time(
        &self,
        index: RetentionIndexPrediction,
    ) -> Result<RetentionTimePrediction, GcError> {
        let retention_time_min = self.retention_time_min(index.retention_index)?;
        Ok(RetentionTimePrediction {
            low_95_min: self.clamped_time(index.low_95_ri),
            high_95_min: self.clamped_time(index.high_95_ri),
            elution_temperature_c: self.temperature_c_at(retention_time_min),
            retention_time_min,
            path: format!(
                "{}; time by van den Dool-Kratz interpolation on a modelled n-alkane ladder",
                index.path
            ),
            index,
        })
    }
}

/// Predicts the retention time of `analyte` under `program` on `column` coated with `phase`.
/// For many analytes, build the ladder once with [`alkane_ladder`] and call
/// [`AlkaneLadder::predict_time`].
///
/// # Errors
/// Any error of [`predict_retention_index`] or [`alkane_ladder`], or [`GcError::OutsideLadder`].
pub fn predict_retention_time(
    analyte: &GcAnalyte,
    phase: &StationaryPhase,
    column: &GcColumn,
    program: &OvenProgram,
) -> Result<RetentionTimePrediction, GcError> {
    let index = predict_retention_index(analyte, phase)?;
    alkane_ladder(phase, column, program)?.predict_time(index)
}

/// A suggested starting oven program with the reasons behind it.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct OvenSuggestion {
    /// The program.
    pub program: OvenProgram,
    /// Why each value was chosen (common practice, no source), and cautions.
    pub reasons: Vec<String>,
}

fn round_down_5(value: f64) -> f64 {
    (value / 5.0).floor() * 5.0
}

fn round_up_5(value: f64) -> f64 {
    (value / 5.0).ceil() * 5.0
}

/// Suggests a starting oven program for analytes predicted between `ri_min` and `ri_max` on
/// `phase` (common practice, no source): start at 40 C (or about 45 C below the first analyte's
/// elution temperature in a 10 C/min scouting run when that is higher) with a 1 min hold, ramp
/// 10 C/min, end about 20 C above the last analyte's elution temperature (never above the phase
/// limit) and hold 3 min to clear the column. A starting point to verify, not a validated method.
///
/// # Errors
/// [`GcError::BadIndexRange`], and the errors of [`alkane_ladder`].
pub fn suggest_oven_program(
    ri_min: f64,
    ri_max: f64,
    phase: &StationaryPhase,
    column: &GcColumn,
) -> Result<OvenSuggestion, GcError> {
    if !(ri_min.is_finite()
        && ri_max.is_finite()
        && (100.0..=6000.0).contains(&ri_min)
        && ri_min <= ri_max
        && ri_max <= 6000.0)
    {
        return Err(GcError::BadIndexRange { ri_min, ri_max });
    }
    let t_max = phase.t_max_c();
    let start = 40.0_f64.min(t_max);
    let scouting = OvenProgram::new(start, 0.0, 10.0, t_max, 60.0)?;
    let ladder = alkane_ladder(phase, column, &scouting)?;
    let mut reasons = Vec::new();
    let first_temperature = ladder
        .retention_time_min(ri_min)
        .map(|t| ladder.temperature_c_at(t))
        .unwrap_or(start);
    let initial = if ri_min < 500.0 {
        reasons.push(format!(
            "the earliest analytes (index {ri_min:.0}) are very volatile: start at {start:.0} C; a thick film, a porous-layer phase or a sub-ambient start may be needed to retain them"
        ));
        start
    } else {
        let value = round_down_5(first_temperature - 45.0).clamp(start, t_max);
        reasons.push(format!(
            "initial {value:.0} C: about 45 C below where the first analyte (index {ri_min:.0}) elutes in a 10 C/min scouting run, and not below {start:.0} C"
        ));
        value
    };
    reasons.push("1 min initial hold to focus the injected band (lengthen it for splitless injection, starting 10-20 C below the solvent boiling point)".to_string());
    let (final_c, final_hold) = match ladder.retention_time_min(ri_max) {
        Ok(time) => {
            let elution = ladder.temperature_c_at(time);
            let value = round_up_5(elution + 20.0).clamp(initial, t_max);
            reasons.push(format!(
                "final {value:.0} C: about 20 C above the last analyte's elution temperature ({elution:.0} C), within the phase limit of {t_max:.0} C; 3 min hold to clear the column"
            ));
            (value, 3.0)
        }
        Err(_) => {
            reasons.push(format!(
                "the last analytes (index {ri_max:.0}) may not elute even at the phase limit of {t_max:.0} C: final {t_max:.0} C with a 15 min hold; consider a shorter column, a thinner film or a more thermally stable phase"
            ));
            (t_max, 15.0)
        }
    };
    let ramp = if final_c - initial < 30.0 { 5.0 } else { 10.0 };
    reasons.push(format!(
        "ramp {ramp:.0} C/min: a common scouting rate; optimise after a first run"
    ));
    let program = OvenProgram::new(initial, 1.0, ramp, final_c.max(initial), final_hold)?;
    Ok(OvenSuggestion { program, reasons })
}
