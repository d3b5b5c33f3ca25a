//! Experimental pKa values from the knowledge base matched to the detected ionisable sites.
//!
//! Compilations often repeat one site's pKa (two sources give 2.78 and 2.88 for the carboxyl of
//! salicylic acid); a rule that hands each value to the nearest site not yet taken would give
//! the second copy to the phenol and make the molecule doubly charged at pH 5. So:
//!
//! 1. values within [`DUPLICATE_WINDOW_PKA`] of each other (chained, after sorting) are one
//!    site's duplicates and merged into their mean; an untyped value within that window of a
//!    value already placed is a duplicate and dropped;
//! 2. the merged values are matched to the sites **in order**: both sorted by pKa, a value may
//!    only go to a site whose estimate lies within [`match_window_pka`] of it, and the pairing
//!    keeps the order (the lowest value never goes to a higher-estimated site than a larger
//!    value). Among order-preserving pairings the one with most pairs, then the smallest total
//!    |value − estimate|, wins (dynamic programming, deterministic ties);
//! 3. a site without a value keeps its estimate; a value without a site is returned as
//!    unmatched.
//!
//! Typed values (acidic / basic) are matched to sites of their kind first, then untyped values
//! to all remaining acid and base sites (conjugate-acid pKa scale for bases).

use super::{
    AcidBase, EXPERIMENTAL_SPREAD_PKA, ExperimentalMerge, IonisableError, IonisableSite, PkaSource,
    SiteKind,
};

/// Experimental values closer than this (pKa units) are taken as duplicates of one site's
/// value: about the spread between independent compilations of the same constant (common
/// practice, no source).
pub const DUPLICATE_WINDOW_PKA: f64 = 0.3;

/// How far (pKa units) an experimental value may lie from a site's estimate and still be
/// matched to it: `max(2.5, 2 × the site's class spread)` (typical-value estimates are rarely
/// off by more; common practice, no source).
pub fn match_window_pka(site: &IonisableSite) -> f64 {
    (2.0 * site.spread_pka).max(2.5)
}

/// Sorted values with chains closer than [`DUPLICATE_WINDOW_PKA`] merged into their mean.
fn merge_duplicates(mut values: Vec<f64>) -> Vec<f64> {
    values.sort_by(f64::total_cmp);
    let mut out: Vec<f64> = Vec::new();
    let mut cluster: Vec<f64> = Vec::new();
    for v in values {
        if let Some(&last) = cluster.last()
            && v - last > DUPLICATE_WINDOW_PKA
        {
            out.push(cluster.iter().sum::<f64>() / cluster.len() as f64);
            cluster.clear();
        }
        cluster.push(v);
    }
    if !cluster.is_empty() {
        out.push(cluster.iter().sum::<f64>() / cluster.len() as f64);
    }
    out
}

/// Order-preserving assignment of sorted `values` to sorted `estimates` (each with its
/// window): most pairs, then least total distance. Returns `(value index, site index)` pairs.
fn order_preserving(values: &[f64], estimates: &[(f64, f64)]) -> Vec<(usize, usize)> {
    let (n, m) = (values.len(), estimates.len());
    // score: (pairs, -cost), larger is better
    let better = |a: (usize, f64), b: (usize, f64)| a.0 > b.0 || (a.0 == b.0 && a.1 < b.1 - 1e-12);
    let mut dp = vec![vec![(0usize, 0.0f64); m + 1]; n + 1];
    for i in 0..=n {
        for j in 0..=m {
            if i == 0 || j == 0 {
                continue;
            }
            let mut best = dp[i - 1][j];
            if better(dp[i][j - 1], best) {
                best = dp[i][j - 1];
            }
            let d = (values[i - 1] - estimates[j - 1].0).abs();
            if d <= estimates[j - 1].1 {
                let cand = (dp[i - 1][j - 1].0 + 1, dp[i - 1][j - 1].1 + d);
                if better(cand, best) {
                    best = cand;
                }
            }
            dp[i][j] = best;
        }
    }
    let mut pairs = Vec::new();
    let (mut i, mut j) = (n, m);
    while i > 0 && j > 0 {
        let d = (values[i - 1] - estimates[j - 1].0).abs();
        let prev = dp[i - 1][j - 1];
        if d <= estimates[j - 1].1
            && dp[i][j].0 == prev.0 + 1
            && (dp[i][j].1 - (prev.1 + d)).abs() < 1e-9
        {
            pairs.push((i - 1, j - 1));
            i -= 1;
            j -= 1;
        } else if dp[i][j] == dp[i - 1][j] {
            i -= 1;
        } else {
            j -= 1;
        }
    }
    pairs.reverse();
    pairs
}

/// Experimental pKa values replace the estimates of the sites they belong to (module docs for
/// the rule). Replaced sites get [`PkaSource::Experimental`] and spread
/// [`EXPERIMENTAL_SPREAD_PKA`]; the site order is kept.
///
/// # Errors
/// [`IonisableError::ExperimentalOutOfRange`] for a non-finite value or one outside -5..=20.
pub fn apply_experimental(
    sites: &[IonisableSite],
    experimental: &[(f64, Option<AcidBase>)],
) -> Result<ExperimentalMerge, IonisableError> {
    for &(value, _) in experimental {
        if !value.is_finite() || !(-5.0..=20.0).contains(&value) {
            return Err(IonisableError::ExperimentalOutOfRange { value });
        }
    }
    let mut out: Vec<IonisableSite> = sites.to_vec();
    let mut replaced = vec![false; out.len()];
    let mut placed: Vec<f64> = Vec::new();
    let mut unmatched = Vec::new();
    for group in [Some(AcidBase::Acid), Some(AcidBase::Base), None] {
        let raw: Vec<f64> = experimental
            .iter()
            .filter(|(_, k)| *k == group)
            .map(|(v, _)| *v)
            .collect();
        let mut values = merge_duplicates(raw);
        if group.is_none() {
            values.retain(|v| placed.iter().all(|p| (p - v).abs() > DUPLICATE_WINDOW_PKA));
        }
        if values.is_empty() {
            continue;
        }
        let wanted = |k: SiteKind| match group {
            Some(AcidBase::Acid) => k == SiteKind::Acid,
            Some(AcidBase::Base) => k == SiteKind::Base,
            None => matches!(k, SiteKind::Acid | SiteKind::Base),
        };
        let mut idx: Vec<usize> = (0..out.len())
            .filter(|&i| !replaced[i] && wanted(out[i].kind) && out[i].pka.is_some())
            .collect();
        let key = |i: usize| out[i].pka.unwrap_or(f64::NAN);
        idx.sort_by(|&a, &b| key(a).total_cmp(&key(b)).then(a.cmp(&b)));
        let estimates: Vec<(f64, f64)> = idx
            .iter()
            .map(|&i| (key(i), match_window_pka(&out[i])))
            .collect();
        let pairs = order_preserving(&values, &estimates);
        let mut used = vec![false; values.len()];
        for (vi, si) in pairs {
            let site = &mut out[idx[si]];
            site.pka = Some(values[vi]);
            site.spread_pka = EXPERIMENTAL_SPREAD_PKA;
            site.pka_source = PkaSource::Experimental;
            replaced[idx[si]] = true;
            used[vi] = true;
            placed.push(values[vi]);
        }
        for (vi, v) in values.iter().enumerate() {
            if !used[vi] {
                unmatched.push((*v, group));
            }
        }
    }
    Ok(ExperimentalMerge {
        sites: out,
        unmatched,
    })
}

#[cfg(test)]
mod tests {
    use super::super::{AcidBase, IonisableSite, SiteKind, detect_sites};
    use super::*;
    use crate::structure::adapter::parse_smiles;

    fn merged(smiles: &str, values: &[(f64, Option<AcidBase>)]) -> ExperimentalMerge {
        let g = parse_smiles(smiles).expect("test SMILES parses").graph;
        let sites = detect_sites(&g).expect("valid graph");
        apply_experimental(&sites, values).expect("valid values")
    }

    fn untyped(values: &[f64]) -> Vec<(f64, Option<AcidBase>)> {
        values.iter().map(|&v| (v, None)).collect()
    }

    fn pka_of(sites: &[IonisableSite], kind: SiteKind, pick_lowest: bool) -> f64 {
        let mut v: Vec<f64> = sites
            .iter()
            .filter(|s| s.kind == kind)
            .filter_map(|s| s.pka)
            .collect();
        v.sort_by(f64::total_cmp);
        if pick_lowest { v[0] } else { v[v.len() - 1] }
    }

    fn experimental_count(m: &ExperimentalMerge) -> usize {
        m.sites
            .iter()
            .filter(|s| s.pka_source == PkaSource::Experimental)
            .count()
    }

    #[test]
    fn duplicate_values_of_one_site_are_merged_salicylic_acid() {
        // data/kb/properties.tsv.gz rows for salicylic acid (YGSDEFSMJLZEOE-UHFFFAOYSA-N):
        // 2.78 and 2.88, two compilations of the carboxyl pKa. The phenol keeps its estimate.
        let m = merged("OC(=O)c1ccccc1O", &untyped(&[2.78, 2.88]));
        assert_eq!(experimental_count(&m), 1, "{:?}", m.sites);
        assert!(m.unmatched.is_empty());
        let acid = pka_of(&m.sites, SiteKind::Acid, true);
        assert!((acid - 2.83).abs() < 1e-9, "carboxyl {acid}");
        let phenol = pka_of(&m.sites, SiteKind::Acid, false);
        assert!(
            phenol > 8.0,
            "phenol keeps an estimate above 8, got {phenol}"
        );
        // the net charge at pH 4.8 is about -1, not -2
        let q: f64 = m
            .sites
            .iter()
            .filter(|s| s.kind == SiteKind::Acid)
            .filter_map(|s| s.pka)
            .map(|p| -1.0 / (1.0 + 10f64.powf(p - 4.8)))
            .sum();
        assert!((q + 1.0).abs() < 0.05, "net charge {q}");
    }

    #[test]
    fn one_site_duplicates_and_an_outlier_amitriptyline() {
        // data/kb rows for amitriptyline (KRMDCWKBEZIMAB-UHFFFAOYSA-N): 8.2, 9.4, 9.49 for its
        // one tertiary amine; 9.4 and 9.49 merge, 8.2 is left over.
        let m = merged(
            "CN(C)CCC=C1c2ccccc2CCc2ccccc21",
            &untyped(&[8.2, 9.4, 9.49]),
        );
        assert_eq!(experimental_count(&m), 1);
        assert!((pka_of(&m.sites, SiteKind::Base, false) - 9.445).abs() < 1e-9);
        assert_eq!(m.unmatched, vec![(8.2, None)]);
    }

    #[test]
    fn hydroxybenzoic_acids_carboxyl_then_phenol() {
        // 4-hydroxybenzoic acid 4.54 (COOH) and 9.3 (OH), from memory; listed in either order.
        for vals in [[4.54, 9.3], [9.3, 4.54]] {
            let m = merged("OC(=O)c1ccc(O)cc1", &untyped(&vals));
            assert_eq!(experimental_count(&m), 2);
            let carboxyl = m
                .sites
                .iter()
                .find(|s| s.class == super::super::GroupClass::AromaticCarboxylicAcid)
                .and_then(|s| s.pka);
            assert_eq!(carboxyl, Some(4.54));
        }
        // 2,6-dihydroxybenzoic acid: one carboxyl value 1.3 given twice (from memory); the two
        // phenols stay estimated
        let m = merged("OC(=O)c1c(O)cccc1O", &untyped(&[1.3, 1.3]));
        assert_eq!(experimental_count(&m), 1);
    }

    #[test]
    fn aminophenol_and_aminobenzoic_acid_match_the_right_group() {
        // 4-aminophenol: anilinium 5.48, phenol 10.3 (from memory)
        let m = merged("Nc1ccc(O)cc1", &untyped(&[10.3, 5.48]));
        assert_eq!(experimental_count(&m), 2);
        assert_eq!(pka_of(&m.sites, SiteKind::Base, false), 5.48);
        assert_eq!(pka_of(&m.sites, SiteKind::Acid, false), 10.3);
        // 4-aminobenzoic acid 4.87 (data/kb row ALYNCZNDIQEVRV-UHFFFAOYSA-N): the carboxyl,
        // not the weakly basic aniline
        let m = merged("Nc1ccc(cc1)C(=O)O", &untyped(&[4.87]));
        assert_eq!(pka_of(&m.sites, SiteKind::Acid, true), 4.87);
        assert!(
            m.sites
                .iter()
                .any(|s| s.kind == SiteKind::Base && s.pka_source != PkaSource::Experimental)
        );
    }

    #[test]
    fn amino_acids_and_diprotic_acids_keep_order() {
        // glycine 9.8 (data/kb row DHMQDGOQFOQNFH-UHFFFAOYSA-N) is the amine
        let m = merged("NCC(=O)O", &untyped(&[9.8]));
        assert_eq!(pka_of(&m.sites, SiteKind::Base, false), 9.8);
        // 4-aminobutyric acid 10.6 (data/kb row BTCSSZJGUNDROE-UHFFFAOYSA-N) is the amine
        let m = merged("NCCCC(=O)O", &untyped(&[10.6]));
        assert_eq!(pka_of(&m.sites, SiteKind::Base, false), 10.6);
        // tyrosine 2.2 (COOH), 9.1 (amine), 10.1 (phenol), from memory: all three placed
        let m = merged("NC(Cc1ccc(O)cc1)C(=O)O", &untyped(&[2.2, 9.1, 10.1]));
        assert_eq!(experimental_count(&m), 3);
        assert_eq!(pka_of(&m.sites, SiteKind::Acid, true), 2.2);
        // phthalic acid 2.95 / 5.41 and succinic acid 4.2 / 5.6 (from memory): both carboxyls
        // replaced, the lower estimate gets the lower value
        for (smiles, vals) in [
            ("OC(=O)c1ccccc1C(=O)O", [5.41, 2.95]),
            ("OC(=O)CCC(=O)O", [5.6, 4.2]),
        ] {
            let m = merged(smiles, &untyped(&vals));
            assert_eq!(experimental_count(&m), 2, "{smiles}");
            assert!(m.unmatched.is_empty(), "{smiles}");
        }
    }

    #[test]
    fn a_value_far_from_every_estimate_is_unmatched() {
        // phenol (estimate 10.0) given 3.0: no site within the window, the estimate stays
        let m = merged("Oc1ccccc1", &untyped(&[3.0]));
        assert_eq!(experimental_count(&m), 0);
        assert_eq!(m.unmatched, vec![(3.0, None)]);
    }

    #[test]
    fn typed_duplicates_merge_and_untyped_copies_are_dropped() {
        let m = merged(
            "OC(=O)c1ccccc1O",
            &[
                (2.97, Some(AcidBase::Acid)),
                (3.0, None),
                (2.9, Some(AcidBase::Acid)),
            ],
        );
        assert_eq!(experimental_count(&m), 1);
        assert!(m.unmatched.is_empty());
    }

    proptest::proptest! {
        #[test]
        fn never_more_experimental_sites_than_distinct_values(
            vals in proptest::collection::vec(0.0f64..14.0, 0..6)
        ) {
            let m = merged("NC(Cc1ccc(O)cc1)C(=O)O", &untyped(&vals));
            let distinct = merge_duplicates(vals.clone()).len();
            proptest::prop_assert!(experimental_count(&m) <= distinct);
            proptest::prop_assert_eq!(experimental_count(&m) + m.unmatched.len(), distinct);
        }
    }
}
