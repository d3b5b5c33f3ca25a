//! The optimiser's evaluation of one program for every analyte: retention, widths, the score
//! (smallest resolution, run time, first peak's k) and, for the reported conditions, the full
//! prediction. Linear in the number of analytes apart from one sort of the retention times; the
//! program is prepared once per evaluation ([`GradientRun`]) and, for large samples, the
//! analytes are shared between the machine's cores ([`map_in_order`]: the output does not depend
//! on the number of cores).

use super::{ParameterUncertainty, PredictedPair, PredictedPeak, Prediction};
use crate::measured::parallel::map_in_order;
use crate::measured::search::Score;
use crate::model::gradient::{
    ElutionPhase, GradientProgram, GradientRun, GradientSystem, LssParameters,
    gradient_peak_width_min,
};

/// One analyte's predicted elution: (index, tR min, base width min, % organic at elution, phase).
pub(super) type El = (usize, f64, f64, f64, ElutionPhase);

pub(super) struct Ctx<'a> {
    pub(super) analytes: Vec<(&'a str, LssParameters)>,
    pub(super) uncertainty: Vec<Option<ParameterUncertainty>>,
    pub(super) system: GradientSystem,
    pub(super) plates: f64,
    pub(super) pairs: Vec<(usize, usize)>,
    pub(super) max_run: f64,
    pub(super) target: f64,
    pub(super) min_k: f64,
    /// Each analyte's rank among the names in byte order: the tie-break of equal retention
    /// times (names are distinct, so the order of the peaks is total).
    pub(super) name_rank: Vec<u32>,
}

/// Ranks of `names` in byte order (distinct names give distinct ranks).
pub(super) fn name_ranks(names: &[&str]) -> Vec<u32> {
    let mut order: Vec<usize> = (0..names.len()).collect();
    order.sort_unstable_by(|&a, &b| names[a].cmp(names[b]).then(a.cmp(&b)));
    let mut rank = vec![0u32; names.len()];
    for (r, &i) in order.iter().enumerate() {
        rank[i] = u32::try_from(r).unwrap_or(u32::MAX);
    }
    rank
}

/// What the window diagram reads of one program.
pub(super) struct WindowEval {
    pub(super) min_resolution: f64,
    pub(super) critical_pair: [String; 2],
    pub(super) run_time_min: f64,
    pub(super) first_peak_retention_factor: f64,
}

impl Ctx<'_> {
    /// Every analyte's elution in analyte order; None when one does not elute.
    fn elutions(&self, program: &GradientProgram) -> Option<Vec<El>> {
        let run = GradientRun::new(program, &self.system).ok()?;
        let t0 = self.system.dead_time_min;
        let one = |i: usize, p: &LssParameters| -> Option<El> {
            let e = run.elution(p).ok()?;
            let w =
                gradient_peak_width_min(t0, e.retention_factor_at_elution.max(0.0), self.plates)
                    .ok()?;
            Some((
                i,
                e.retention_time_min,
                w,
                e.organic_at_elution_pct,
                e.phase,
            ))
        };
        map_in_order(&self.analytes, |i, (_, p)| one(i, p))
    }

    /// The score of a program, and the elutions behind it.
    pub(super) fn evaluate(&self, program: &GradientProgram) -> Option<(Score, Vec<El>)> {
        let el = self.elutions(program)?;
        let score = self.score(&el, self.min_rs(&el));
        Some((score, el))
    }

    /// The score of a program only (the search's question).
    pub(super) fn score_of(&self, program: &GradientProgram) -> Option<Score> {
        let el = self.elutions(program)?;
        let min_rs = if self.pairs.is_empty() {
            // The smallest resolution of neighbours does not depend on the order of peaks at
            // the same time (their resolution is 0), so no tie-break is needed here.
            let mut tw: Vec<(f64, f64)> = el.iter().map(|x| (x.1, x.2)).collect();
            tw.sort_unstable_by(|a, b| a.0.total_cmp(&b.0));
            tw.windows(2)
                .map(|w| 2.0 * (w[1].0 - w[0].0).abs() / (w[0].1 + w[1].1))
                .fold(f64::INFINITY, f64::min)
        } else {
            self.min_rs(&el)
        };
        Some(self.score(&el, min_rs))
    }

    fn score(&self, el: &[El], min_rs: f64) -> Score {
        let run = el.iter().map(|x| x.1).fold(0.0, f64::max);
        let first_k = self.first_k(el);
        Score {
            feasible: run <= self.max_run && min_rs.is_finite(),
            retained: first_k >= self.min_k - 1e-12,
            meets: min_rs >= self.target,
            min_rs,
            run,
        }
    }

    /// k = (tR − t0)/t0 of the first peak.
    fn first_k(&self, el: &[El]) -> f64 {
        let t0 = self.system.dead_time_min;
        let first = el.iter().map(|x| x.1).fold(f64::INFINITY, f64::min);
        (first - t0) / t0
    }

    fn rs(a: &El, b: &El) -> f64 {
        2.0 * (b.1 - a.1).abs() / (a.2 + b.2)
    }

    /// The elutions in order of retention time, equal times in name order.
    fn sorted(&self, el: &[El]) -> Vec<El> {
        let mut s = el.to_vec();
        s.sort_unstable_by(|x, y| {
            x.1.total_cmp(&y.1)
                .then_with(|| self.name_rank[x.0].cmp(&self.name_rank[y.0]))
        });
        s
    }

    fn pair_list(&self, el: &[El]) -> Vec<(usize, usize, f64)> {
        if self.pairs.is_empty() {
            let s = self.sorted(el);
            s.windows(2)
                .map(|w| (w[0].0, w[1].0, Self::rs(&w[0], &w[1])))
                .collect()
        } else {
            self.pairs
                .iter()
                .map(|&(i, j)| {
                    let (a, b) = if el[i].1 <= el[j].1 { (i, j) } else { (j, i) };
                    (a, b, Self::rs(&el[a], &el[b]))
                })
                .collect()
        }
    }

    fn min_rs(&self, el: &[El]) -> f64 {
        self.pair_list(el)
            .iter()
            .map(|p| p.2)
            .fold(f64::INFINITY, f64::min)
    }

    /// The critical pair's names: the first pair (in the pair list's order) with the smallest
    /// resolution.
    fn critical_pair(&self, pairs: &[(usize, usize, f64)]) -> [String; 2] {
        pairs
            .iter()
            .min_by(|a, b| a.2.total_cmp(&b.2))
            .map(|p| {
                [
                    self.analytes[p.0].0.to_string(),
                    self.analytes[p.1].0.to_string(),
                ]
            })
            .unwrap_or_default()
    }

    /// What the window diagram needs of `program` (no per-peak uncertainty).
    pub(super) fn window_eval(&self, program: &GradientProgram) -> Option<WindowEval> {
        let (score, el) = self.evaluate(program)?;
        Some(WindowEval {
            min_resolution: score.min_rs,
            critical_pair: self.critical_pair(&self.pair_list(&el)),
            run_time_min: score.run,
            first_peak_retention_factor: self.first_k(&el),
        })
    }

    /// σ(tR)² = J_l² σ_l² + J_s² σ_s² + 2 ρ J_l J_s σ_l σ_s, J by central differences.
    fn propagate(
        &self,
        p: LssParameters,
        u: ParameterUncertainty,
        run: &GradientRun<'_>,
    ) -> Option<f64> {
        let tr = |lk: f64, s: f64| {
            run.elution(&LssParameters { log_kw: lk, s })
                .ok()
                .map(|e| e.retention_time_min)
        };
        let (hl, hs) = (1e-5, 1e-5 * p.s.abs().max(1.0));
        let jl = (tr(p.log_kw + hl, p.s)? - tr(p.log_kw - hl, p.s)?) / (2.0 * hl);
        let js = (tr(p.log_kw, p.s + hs)? - tr(p.log_kw, p.s - hs)?) / (2.0 * hs);
        let var = jl * jl * u.log_kw * u.log_kw
            + js * js * u.s * u.s
            + 2.0 * u.correlation * jl * js * u.log_kw * u.s;
        (var.is_finite() && var >= 0.0).then(|| var.sqrt())
    }

    pub(super) fn prediction(&self, program: &GradientProgram) -> Option<Prediction> {
        let (score, el) = self.evaluate(program)?;
        let run = GradientRun::new(program, &self.system).ok()?;
        let pairs = self.pair_list(&el);
        let crit = self.critical_pair(&pairs);
        let peaks = self
            .sorted(&el)
            .into_iter()
            .map(|x| PredictedPeak {
                name: self.analytes[x.0].0.to_string(),
                retention_time_min: x.1,
                width_base_min: x.2,
                organic_at_elution_pct: x.3,
                phase: x.4,
                retention_time_uncertainty_min: self.uncertainty[x.0]
                    .and_then(|u| self.propagate(self.analytes[x.0].1, u, &run)),
            })
            .collect();
        Some(Prediction {
            program: program.clone(),
            peaks,
            pairs: pairs
                .iter()
                .map(|p| PredictedPair {
                    first: self.analytes[p.0].0.to_string(),
                    second: self.analytes[p.1].0.to_string(),
                    resolution: p.2,
                })
                .collect(),
            min_resolution: score.min_rs,
            critical_pair: crit,
            run_time_min: score.run,
            first_peak_retention_factor: self.first_k(&el),
        })
    }
}
