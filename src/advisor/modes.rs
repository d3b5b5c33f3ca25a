//! Mode scoring: how well each analyte, and the list as a whole, fits gas chromatography,
//! reversed-phase LC, HILIC and ion chromatography. Rules of thumb (common practice, no
//! source) expressed as smooth scores in 0–1.

use super::profile::AnalyteProfile;
use crate::phase::PhaseMode;
use crate::report::advice::{Excluded, ModeScore, Reason};
use crate::structure::ionisable::SiteKind;
use crate::structure::volatility::{GC_HIGH_TB_K, GC_MAX_TB_K, GcVerdict};

/// Analytes scoring below this in a mode are listed as not fitting it.
pub const FIT_THRESHOLD: f64 = 0.4;

fn logistic(x: f64) -> f64 {
    1.0 / (1.0 + (-x).exp())
}

/// A neutral, low-polarity analyte that GC handles as is: no H-bond donor, polar surface
/// area at most 40 Å² (or at most 80 Å² with logP at least 3, where the hydrocarbon part
/// dominates: pyrethroid pesticides; or at most 80 Å² for neutral organophosphorus esters,
/// whatever their logP), no group ionised between pH 2 and
/// 12, GC-suitable and boiling below
/// [`GC_MAX_TB_K`] (hydrocarbons, halogenated pesticides and PCBs, esters including fatty-acid
/// methyl esters, ethers, ketones). GC is the usual technique for these classes (rule
/// `rule:gc-volatile-neutral-class`; common practice, no source).
pub fn gc_neutral_class(p: &AnalyteProfile) -> bool {
    let Some(e) = p.estimate.as_ref() else {
        return false;
    };
    p.gc_verdict() == Some(GcVerdict::Suitable)
        && !p.inorganic_ion
        && e.descriptors.hbond_donors == 0
        && (e.descriptors.tpsa_a2 <= 40.0
            || (e.descriptors.tpsa_a2 <= 80.0
                && (p.log_p.is_some_and(|(l, _)| l >= 3.0) || organophosphorus_ester(p))))
        && p.tb_k.is_some_and(|(t, _)| t <= GC_MAX_TB_K)
        && !p.sites.iter().any(|s| {
            matches!(s.kind, SiteKind::PermanentAnion | SiteKind::PermanentCation)
                || s.pka.is_some_and(|k| (2.0..=12.0).contains(&k))
        })
}

/// A neutral organophosphorus ester (phosphate, phosphorothioate or phosphorodithioate
/// triester; no P–OH, which would be an ionisable site, and no H-bond donor, checked by the
/// caller): the organophosphorus pesticides, run by GC with a phosphorus-selective detector
/// whatever their logP (malathion 2.4, methyl parathion 2.9, dichlorvos 1.4; the standard
/// GC methods for organophosphorus pesticides, e.g. US EPA method 8141, from memory).
fn organophosphorus_ester(p: &AnalyteProfile) -> bool {
    p.estimate
        .as_ref()
        .is_some_and(|e| e.graph.atoms.iter().any(|a| a.atomic_number == 15))
}

/// Acids with a pKa below this are strong: fully ionised at the pH of an ion-exclusion eluent
/// (dilute sulfuric acid, about pH 2.3-2.5) and so excluded to the void there, and barely
/// retained by reversed phase at any usable pH (haloacetic acids, perfluorinated short-chain
/// acids, sulfonic acids). Common practice, no source.
pub const STRONG_ACID_MAX_PKA: f64 = 2.5;

/// Anion-exchange fit of a small hydrophilic acid of pKa `k`: the stronger the acid, the better
/// anion exchange suits it; 0.9 at pKa 2.5 and below, 0.6 at 4.5 and above
/// (rule `rule:strong-acids-to-anion-exchange`).
fn anion_exchange_fit_for_acid(k: f64) -> f64 {
    0.6 + 0.3 * ((4.5 - k) / 2.0).clamp(0.0, 1.0)
}

/// Highest reversed-phase fit of a small hydrophilic acid of pKa `k`: ionised at every pH
/// silica allows when strong; 0.6 at pKa 1.5 and below, 1 at 3.5 and above
/// (rule `rule:strong-acids-to-anion-exchange`).
fn rp_cap_for_acid(k: f64) -> f64 {
    0.6 + 0.4 * ((k - 1.5) / 2.0).clamp(0.0, 1.0)
}

/// The lowest acid pKa of a small hydrophilic acid: an acid site with a known pKa, no basic
/// group above pKa 8 (not a zwitterion), molar mass below 250 g/mol and logP below 2; `None`
/// otherwise. Anion exchange suits it the better the stronger it is, and reversed phase the
/// worse (rule `rule:strong-acids-to-anion-exchange`; common practice for haloacetic acids by
/// ion chromatography, from memory).
pub fn small_acid_pka(p: &AnalyteProfile) -> Option<f64> {
    let mw = p.molar_mass_g_mol.unwrap_or(f64::INFINITY);
    if p.inorganic_ion
        || p.strong_base(8.0)
        || mw >= 250.0
        || !p.log_p.is_some_and(|(l, _)| l < 2.0)
    {
        return None;
    }
    p.sites
        .iter()
        .filter(|s| s.kind == SiteKind::Acid)
        .filter_map(|s| s.pka)
        .min_by(f64::total_cmp)
}

/// A small organic acid that ion exclusion serves: a carboxylic acid (pKa below 6, and not a
/// strong acid, which the eluent's low pH leaves ionised and the resin excludes), no basic
/// group above pKa 8 (not an amino acid), molar mass below 250 g/mol and logP below 1.5
/// (rule `rule:ion-exclusion-organic-acids`; common practice, no source).
pub fn small_organic_acid(p: &AnalyteProfile) -> bool {
    let mw = p.molar_mass_g_mol.unwrap_or(f64::INFINITY);
    !p.inorganic_ion
        && p.sites
            .iter()
            .any(|s| s.kind == SiteKind::Acid && s.pka.is_some_and(|k| k < 6.0))
        && !p
            .sites
            .iter()
            .any(|s| s.kind == SiteKind::Acid && s.pka.is_some_and(|k| k < STRONG_ACID_MAX_PKA))
        && !p.strong_base(8.0)
        && mw < 250.0
        && p.log_p.is_some_and(|(l, _)| l < 1.5)
}

/// Measured retention overrides the logD rule of thumb for reversed phase (rule
/// `rule:rp-measured-retention`; common practice, no source: a measurement beats an estimate).
/// With k = 1 reached at 10 % strong solvent or more (median over the RP systems of the open
/// retention data that measured it), the analyte is retained by reversed phase whatever its
/// estimated logD (large zwitterions such as tetracyclines, whose logD from the neutral
/// fraction understates their retention): fit at least 0.4 + 2·ψ (at most 0.9). Below 3 %
/// it elutes near the dead time even at low organic: fit at most 0.3.
///
/// `gc_scale` is the factor the caller applied for analytes GC serves better
/// (rule:gc-volatile-neutral-class, 0.6; else 1): retention measured by reversed phase says the
/// analyte is retained there, not that reversed phase beats GC for it, so the floor carries
/// the same factor.
fn measured_rp_fit(p: &AnalyteProfile, f: f64, why: String, gc_scale: f64) -> (f64, String) {
    let Some((psi, n)) = p.measured_rp_psi_k1 else {
        return (f, why);
    };
    let pct = 100.0 * psi;
    if psi >= 0.10 {
        let floor = gc_scale * (0.4 + 2.0 * psi).min(0.9);
        if floor > f {
            return (
                floor,
                format!(
                    "{why}; but measured on {n} reversed-phase systems of the open retention data, k = 1 at about {pct:.0} % organic (median): retained (rule:rp-measured-retention)"
                ),
            );
        }
    } else if psi < 0.03 && f > 0.3 {
        return (
            0.3,
            format!(
                "{why}; but measured on {n} reversed-phase systems of the open retention data, k = 1 already at about {pct:.0} % organic (median): barely retained (rule:rp-measured-retention)"
            ),
        );
    }
    (f, why)
}

/// The fit of one analyte to one mode, with the reason. Missing evidence is never favourable:
/// an analyte whose structure, boiling point or logP is unknown scores low in the modes that
/// need it, and the reason says "unknown".
pub fn fit(p: &AnalyteProfile, mode: PhaseMode) -> (f64, String) {
    let mw = p.molar_mass_g_mol.unwrap_or(200.0);
    match mode {
        PhaseMode::Gc => {
            if let Some(ion) = &p.ion {
                return (
                    0.0,
                    format!("{}; an ion in solution is not volatile", ion.how),
                );
            }
            if p.permanently_charged() {
                return (0.0, "an ion is not volatile".into());
            }
            match p.gc_verdict() {
                Some(GcVerdict::Suitable) => match p.tb_k {
                    None => (
                        0.0,
                        "unknown: no boiling point, so volatility is unknown".into(),
                    ),
                    Some((tb, _)) if gc_neutral_class(p) => (
                        if tb > GC_HIGH_TB_K { 0.9 } else { 1.0 },
                        format!(
                            "neutral, low-polarity and boiling at about {tb:.0} K: GC is the usual technique for this class (rule:gc-volatile-neutral-class)"
                        ),
                    ),
                    // high-boiling analytes need high oven temperatures and thin films
                    Some((tb, _)) if tb > GC_HIGH_TB_K => (
                        0.45,
                        format!(
                            "boiling point about {tb:.0} K: elutes only at high oven temperature"
                        ),
                    ),
                    Some((tb, _)) if tb > 520.0 => (0.75, format!("boiling point about {tb:.0} K")),
                    _ => (1.0, "volatile and thermally stable enough for GC".into()),
                },
                Some(GcVerdict::SuitableAfterDerivatisation) => {
                    let how: Vec<&str> = p
                        .gc
                        .iter()
                        .flat_map(|g| g.flags.iter())
                        .filter_map(|f| f.derivatisation.map(|d| d.describe()))
                        .take(1)
                        .collect();
                    (
                        0.45,
                        format!(
                            "needs derivatisation before GC (polar or labile groups): {}",
                            how.first().copied().unwrap_or("derivatise")
                        ),
                    )
                }
                Some(GcVerdict::Unsuitable) => (0.05, "not volatile or thermally labile".into()),
                Some(GcVerdict::Unknown) => (
                    0.0,
                    "unknown: no boiling point could be estimated, so volatility is unknown (counted against GC, never for it)".into(),
                ),
                None => (
                    0.0,
                    "unknown: no structure to assess volatility and thermal stability (counted against GC, never for it)".into(),
                ),
            }
        }
        PhaseMode::Rp => {
            if p.inorganic_ion {
                return (0.05, "a small ion is not retained by reversed phase".into());
            }
            // small volatile neutrals (solvents, BTEX) and the neutral low-polarity classes GC
            // serves are usually run by GC (common practice)
            let volatile = p.tb_k.is_some_and(|(t, _)| t < 450.0)
                && p.gc_verdict() == Some(GcVerdict::Suitable);
            let gc_class = gc_neutral_class(p);
            // pH 2-11: bases are neutral and retained at high pH on a high-pH-stable phase
            let (f, why) = match p.max_log_d(2.0, 11.0) {
                Some(d) if volatile || gc_class => (
                    0.6 * logistic(2.0 * (d + 1.5)),
                    format!(
                        "highest logD over pH 2-11 is {d:.1}, but {} (rule:gc-volatile-neutral-class)",
                        if volatile {
                            "volatile enough for GC"
                        } else {
                            "a neutral, low-polarity analyte that GC serves"
                        }
                    ),
                ),
                Some(d) => (
                    logistic(2.0 * (d + 1.5)),
                    format!(
                        "highest logD over pH 2-11 is {d:.1} (pH above 8 only on a high-pH-stable phase)"
                    ),
                ),
                None => (0.3, "unknown: no logP known".into()),
            };
            let (f, why) = match small_acid_pka(p) {
                Some(k) if k < 3.5 => {
                    let cap = rp_cap_for_acid(k);
                    if f > cap {
                        (
                            cap,
                            format!(
                                "{why}; but a small hydrophilic acid of pKa {k:.1} stays largely ionised at every pH silica allows (pH 2 and above), so reversed phase retains it weakly unless ion-paired: fit at most {cap:.2} (rule:strong-acids-to-anion-exchange)"
                            ),
                        )
                    } else {
                        (f, why)
                    }
                }
                _ => (f, why),
            };
            measured_rp_fit(p, f, why, if volatile || gc_class { 0.6 } else { 1.0 })
        }
        PhaseMode::Hilic => match p.log_d(3.0) {
            _ if p.inorganic_ion => (
                0.3,
                "small ions are retained in HILIC but IC is the usual choice".into(),
            ),
            Some(d) => (
                logistic(2.0 * (-0.5 - d)),
                format!("logD at pH 3 is {d:.1}"),
            ),
            None => (0.3, "unknown: no logP known".into()),
        },
        PhaseMode::IcAnion => {
            if p.inorganic_ion && p.formal_charge < 0 {
                (
                    1.0,
                    p.ion
                        .as_ref()
                        .map_or("inorganic or small anion".into(), |i| {
                            format!("{} (rule:ions-to-ic)", i.how)
                        }),
                )
            } else if let Some(k) = small_acid_pka(p).filter(|k| *k < 6.0) {
                // the stronger the acid, the more anion exchange suits it (and the less
                // reversed phase): 0.9 at pKa 2.5 and below, 0.6 at 4.5 and above
                let f = anion_exchange_fit_for_acid(k);
                (
                    f,
                    if k < STRONG_ACID_MAX_PKA {
                        format!(
                            "strong acid (pKa {k:.1}): an anion at every eluent pH, retained and separated by anion exchange, while reversed phase barely retains it and ion exclusion excludes it (rule:strong-acids-to-anion-exchange)"
                        )
                    } else {
                        format!(
                            "small hydrophilic acid (pKa {k:.1}): anionic at the eluent pH (rule:strong-acids-to-anion-exchange)"
                        )
                    },
                )
            } else if p.has_acid() && mw < 200.0 && p.log_p.is_some_and(|(l, _)| l < 1.0) {
                (
                    0.6,
                    "small hydrophilic acid: anionic at the eluent pH".into(),
                )
            } else {
                (0.0, "not an anion".into())
            }
        }
        PhaseMode::IcCation => {
            if p.inorganic_ion && p.formal_charge > 0 {
                (
                    1.0,
                    p.ion
                        .as_ref()
                        .map_or("inorganic or small cation".into(), |i| {
                            format!("{} (rule:ions-to-ic)", i.how)
                        }),
                )
            } else if p.strong_base(8.0) && mw < 150.0 && p.log_p.is_some_and(|(l, _)| l < 1.0) {
                (
                    0.6,
                    "small hydrophilic amine: cationic at the eluent pH".into(),
                )
            } else {
                (0.0, "not a cation".into())
            }
        }
        PhaseMode::IonExclusion => {
            if small_organic_acid(p) {
                (
                    1.0,
                    "small organic acid: separated by its pKa and size on an ion-exclusion resin with a dilute acid eluent (rule:ion-exclusion-organic-acids)".into(),
                )
            } else {
                (0.0, "not a small organic acid".into())
            }
        }
    }
}

/// All modes in the order used to break ties (common first choices first).
pub const MODES: [PhaseMode; 6] = [
    PhaseMode::Rp,
    PhaseMode::Gc,
    PhaseMode::Hilic,
    PhaseMode::IcAnion,
    PhaseMode::IcCation,
    PhaseMode::IonExclusion,
];

/// Score every mode for the list (mean fit), best first.
pub fn score_modes(profiles: &[AnalyteProfile], allowed: &[PhaseMode]) -> Vec<ModeScore> {
    let mut out: Vec<ModeScore> = MODES
        .iter()
        .filter(|m| allowed.is_empty() || allowed.contains(m))
        .map(|&m| {
            let fits: Vec<(f64, String)> = profiles.iter().map(|p| fit(p, m)).collect();
            let score = fits.iter().map(|f| f.0).sum::<f64>() / fits.len().max(1) as f64;
            let not_fitting = profiles
                .iter()
                .zip(&fits)
                .filter(|(_, f)| f.0 < FIT_THRESHOLD)
                .map(|(p, f)| Excluded {
                    analyte: p.name().to_string(),
                    reason: f.1.clone(),
                    better_mode: best_mode(p, allowed).map(|m| m.as_str().to_string()),
                })
                .collect();
            let preference = preference(m);
            ModeScore {
                mode: m.as_str().to_string(),
                score: (score + preference.as_ref().and_then(|p| p.weight).unwrap_or(0.0)).min(1.0),
                fit: score,
                preference,
                fitting: fits.iter().filter(|f| f.0 >= FIT_THRESHOLD).count(),
                not_fitting,
            }
        })
        .collect();
    // the score already holds the preference; a stable sort keeps MODES order on ties
    out.sort_by(|a, b| b.score.total_cmp(&a.score));
    out
}

/// The preference for the usual first modes (common practice, no source): reversed phase is
/// the usual first try for organic analytes that fit it, including neutral, moderately polar
/// drugs such as caffeine that HILIC also retains, then GC for volatile ones. It is part of
/// the mode score, shown in the mode table and stated as a reason.
pub fn preference(mode: PhaseMode) -> Option<Reason> {
    let (w, why) = match mode {
        PhaseMode::Rp => (
            0.08,
            "reversed phase is the usual first mode when it fits: robust, well understood and the lab's default (common practice, no source)",
        ),
        PhaseMode::Gc => (
            0.04,
            "GC is the usual choice for volatile, thermally stable analytes when it fits (common practice, no source)",
        ),
        _ => return None,
    };
    Some(Reason {
        source: "rule:usual-first-mode".into(),
        text: format!("{}: +{w:.2} to the mean fit; {why}", mode.as_str()),
        weight: Some(w),
    })
}

/// The mode an analyte fits best.
pub fn best_mode(p: &AnalyteProfile, allowed: &[PhaseMode]) -> Option<PhaseMode> {
    MODES
        .iter()
        .filter(|m| allowed.is_empty() || allowed.contains(m))
        .map(|&m| (fit(p, m).0, m))
        .fold(None, |best: Option<(f64, PhaseMode)>, x| match best {
            Some(b) if b.0 >= x.0 => Some(b),
            _ => Some(x),
        })
        .map(|b| b.1)
}

/// Analytes that do not fit `mode`, from the precomputed scores.
pub fn excluded(_profiles: &[AnalyteProfile], mode: &str, scores: &[ModeScore]) -> Vec<Excluded> {
    scores
        .iter()
        .find(|s| s.mode == mode)
        .map(|s| s.not_fitting.clone())
        .unwrap_or_default()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::advisor::profile::{AnalyteProfile, test_profile};
    use crate::property::{Analyte, Origin};

    /// Directions of the acid-strength rule over the whole pKa range: a stronger acid never
    /// fits anion exchange worse nor reversed phase better; both stay inside 0-1 (common
    /// practice, no source).
    #[test]
    fn acid_strength_moves_anion_exchange_up_and_reversed_phase_down() {
        let mut last = (f64::INFINITY, f64::NEG_INFINITY);
        for i in 0..=140 {
            let k = -1.0 + 0.1 * f64::from(i);
            let (ic, rp) = (anion_exchange_fit_for_acid(k), rp_cap_for_acid(k));
            assert!(
                (0.0..=1.0).contains(&ic) && (0.0..=1.0).contains(&rp),
                "pKa {k}"
            );
            assert!(ic <= last.0 + 1e-12 && rp >= last.1 - 1e-12, "pKa {k}");
            last = (ic, rp);
        }
        assert!(anion_exchange_fit_for_acid(0.7) > anion_exchange_fit_for_acid(4.8));
        assert!(rp_cap_for_acid(0.7) < rp_cap_for_acid(4.8));
    }

    // Expectations: common practice, no source.
    #[test]
    fn missing_evidence_never_favours_gc() {
        // no structure at all: volatility unknown
        let p = AnalyteProfile::new(Analyte {
            query: "mystery".into(),
            name: "mystery".into(),
            inchikey: None,
            smiles: None,
            formula: None,
            molar_mass_g_mol: None,
            cid: None,
            cas: None,
            origin: Origin::Shipped,
            matched_by: "test".into(),
            properties: Vec::new(),
        });
        let (f, why) = fit(&p, PhaseMode::Gc);
        assert_eq!(f, 0.0);
        assert!(why.starts_with("unknown"), "{why}");
        // no boiling point: neither Joback nor the index route has groups for boron
        let (f, why) = fit(&test_profile("triethylborane", "CCB(CC)CC"), PhaseMode::Gc);
        assert_eq!(f, 0.0, "{why}");
        // Joback has no silicon group, but the retention-index route gives the elution of
        // tetramethylsilane (boiling point 26.6 °C, handbook value, from memory), so it is
        // volatile, not unknown (rule:gc-elution-by-index)
        let (f, why) = fit(&test_profile("tms", "C[Si](C)(C)C"), PhaseMode::Gc);
        assert!(f > 0.9, "{why}");
        // ions of the ion table, whatever the name: not GC, IC
        for (name, smi) in [
            ("sodium", "[Na]"),
            ("fluoride", "[F-]"),
            ("sodium nitrate", "[Na+].[O-][N+]([O-])=O"),
        ] {
            let p = test_profile(name, smi);
            assert_eq!(fit(&p, PhaseMode::Gc).0, 0.0, "{name}");
            let best = best_mode(&p, &[]).expect("a mode");
            assert!(
                matches!(best, PhaseMode::IcAnion | PhaseMode::IcCation),
                "{name}: {best:?}"
            );
        }
    }

    #[test]
    fn neutral_low_polarity_classes_favour_gc_over_reversed_phase() {
        for (name, smi) in [
            ("methyl palmitate", "CCCCCCCCCCCCCCCC(=O)OC"),
            ("hexachlorobenzene", "Clc1c(Cl)c(Cl)c(Cl)c(Cl)c1Cl"),
            ("PCB 52", "Clc1ccc(Cl)c(c1)-c1cc(Cl)ccc1Cl"),
            ("lindane", "ClC1C(Cl)C(Cl)C(Cl)C(Cl)C1Cl"),
        ] {
            let p = test_profile(name, smi);
            assert!(gc_neutral_class(&p), "{name}");
            assert!(
                fit(&p, PhaseMode::Gc).0 > fit(&p, PhaseMode::Rp).0 + 0.1,
                "{name}"
            );
        }
        // a basic drug and a sulfonamide are not in the class
        assert!(!gc_neutral_class(&test_profile(
            "amitriptyline",
            "CN(C)CCC=C1c2ccccc2CCc2ccccc12"
        )));
        assert!(!gc_neutral_class(&test_profile(
            "sulfamethoxazole",
            "Cc1cc(NS(=O)(=O)c2ccc(N)cc2)no1"
        )));
    }

    #[test]
    fn small_organic_acids_fit_ion_exclusion_and_amino_acids_do_not() {
        for smi in ["OC(=O)CC(O)C(=O)O", "CC(O)C(=O)O", "OC(=O)C(O)C(O)C(=O)O"] {
            assert_eq!(
                fit(&test_profile("acid", smi), PhaseMode::IonExclusion).0,
                1.0,
                "{smi}"
            );
        }
        assert_eq!(
            fit(
                &test_profile("alanine", "CC(N)C(=O)O"),
                PhaseMode::IonExclusion
            )
            .0,
            0.0
        );
        assert_eq!(
            fit(
                &test_profile("palmitic acid", "CCCCCCCCCCCCCCCC(=O)O"),
                PhaseMode::IonExclusion
            )
            .0,
            0.0
        );
    }
}
