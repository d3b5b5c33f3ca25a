//! The LC model's retention target and its conversion to and from retention time through the
//! linear-solvent-strength (LSS) gradient integral.
//!
//! Target. For every (analyte, system) the model predicts `psi_k1`, the strong-solvent fraction
//! at which the analyte's retention factor is 1 under the LSS model
//! `log10 k = S (psi_k1 − psi)`, i.e. `psi_k1 = log10(kw)/S` (Snyder & Dolan, "High-Performance
//! Gradient Elution", Wiley 2007, ch. 2; from memory). The strong solvent is the organic
//! modifier in RP and water in HILIC (`psi = 1 − organic fraction`), an approximation for HILIC
//! documented in docs/model.md. S comes from the size rule `S = 0.25·sqrt(M/(g/mol))` (same
//! source, from memory). `psi_k1` is obtained from a measured retention time by inverting the
//! fundamental gradient equation `∫_0^{tR−t0} dt / (t0·k(psi_inlet(t))) = 1` (Nikitas &
//! Pappa-Louisi, J. Chromatogr. A 1216 (2009) 1737, from memory), which has a closed form for
//! piecewise-linear programs; the same integral maps a predicted `psi_k1` back to minutes for
//! any user gradient, dead time and dwell time.

use super::system::{LcSystem, ModelError};

/// LSS S parameter from the size rule `S = 0.25·sqrt(M)` (Snyder & Dolan 2007, from memory),
/// bounded to 2-12 so tiny or huge molecules stay in the range the rule was set up for.
pub fn lss_s(mw_g_mol: f64) -> f64 {
    (0.25 * mw_g_mol.max(1.0).sqrt()).clamp(2.0, 12.0)
}

/// `∫ 10^{S·psi(t)} dt` over one linear segment from psi `a` with slope `m` (1/min) for `dt` min.
fn segment_integral(s: f64, a: f64, m: f64, dt: f64) -> f64 {
    let base = 10f64.powf(s * a);
    let x = s * m * dt * std::f64::consts::LN_10;
    if x.abs() < 1e-9 {
        base * dt
    } else {
        base * x.exp_m1() / (s * m * std::f64::consts::LN_10)
    }
}

/// `F(T) = ∫_0^T 10^{S psi_inlet(t)} dt` for a piecewise-linear inlet program.
fn lss_integral(program: &[(f64, f64)], s: f64, t_end: f64) -> f64 {
    let mut total = 0.0;
    for w in program.windows(2) {
        let (t_a, p_a) = w[0];
        let (t_b, p_b) = w[1];
        if t_end <= t_a {
            return total;
        }
        let dt_seg = t_b - t_a;
        if dt_seg <= 0.0 {
            continue;
        }
        let m = (p_b - p_a) / dt_seg;
        let dt = dt_seg.min(t_end - t_a);
        total += segment_integral(s, p_a, m, dt);
    }
    let (t_last, p_last) = program[program.len() - 1];
    if t_end > t_last {
        total += 10f64.powf(s * p_last) * (t_end - t_last);
    }
    total
}

/// Inverse of `lss_integral`: the time T at which `F(T) = target`.
fn lss_inverse(program: &[(f64, f64)], s: f64, target: f64) -> f64 {
    let mut remaining = target;
    for w in program.windows(2) {
        let (t_a, p_a) = w[0];
        let (t_b, p_b) = w[1];
        let dt_seg = t_b - t_a;
        if dt_seg <= 0.0 {
            continue;
        }
        let m = (p_b - p_a) / dt_seg;
        let seg = segment_integral(s, p_a, m, dt_seg);
        if seg >= remaining {
            let base = 10f64.powf(s * p_a);
            let x = s * m * std::f64::consts::LN_10;
            let dt = if (x * dt_seg).abs() < 1e-9 {
                remaining / base
            } else {
                (remaining * x / base).ln_1p() / x
            };
            return t_a + dt.clamp(0.0, dt_seg);
        }
        remaining -= seg;
    }
    let (t_last, p_last) = program[program.len() - 1];
    t_last + remaining / 10f64.powf(s * p_last)
}

/// `psi_k1` from a measured retention time on a system (LSS gradient integral, module docs).
///
/// # Errors
/// `ModelError::Unretained` if `rt_min <= t0`.
pub fn psi_from_rt(system: &LcSystem, s: f64, rt_min: f64) -> Result<f64, ModelError> {
    let t = rt_min - system.t0_min;
    if t.partial_cmp(&0.0) != Some(std::cmp::Ordering::Greater) {
        return Err(ModelError::Unretained {
            rt_min,
            t0_min: system.t0_min,
        });
    }
    let f = lss_integral(&system.inlet_program(), s, t);
    Ok((f / system.t0_min).log10() / s)
}

/// Retention time (min) of an analyte with `psi_k1` and slope `s` on a system.
pub fn rt_from_psi(system: &LcSystem, s: f64, psi_k1: f64) -> f64 {
    let target = system.t0_min * 10f64.powf(s * psi_k1.clamp(-3.0, 3.0));
    system.t0_min + lss_inverse(&system.inlet_program(), s, target)
}
