//! Aromatic sites: azines (pyridines and their fused and substituted kin) and the Hammett σ·ρ
//! correction for substituents on benzene and pyridine rings, with the ring helpers both use.

use super::super::graph::BondOrder;
use super::classes::*;
use super::*;

impl Detector<'_, '_> {
    /// Basic aromatic ring nitrogens: one site per aromatic ring with pyridine-type N.
    pub(super) fn azines(&mut self) {
        let v = self.v;
        let g = v.graph();
        let mut used: Vec<bool> = vec![false; v.len()];
        let mut rings: Vec<&Vec<usize>> = g.rings.iter().collect();
        rings.sort_by_key(|r| (r.len() != 5 && r.len() != 6, r.iter().min().copied()));
        for ring in rings {
            if ring.iter().any(|&a| a >= v.len()) || !ring.iter().all(|&a| v.aromatic(a)) {
                continue;
            }
            // Pyridine-type N: aromatic, two ring neighbours, no H, neutral, not next to a ring
            // carbon carrying exocyclic =O/=S (pyridone, lactam-type).
            let basic: Vec<usize> = ring
                .iter()
                .copied()
                .filter(|&a| {
                    v.z(a) == 7
                        && v.charge(a) == 0
                        && v.h(a) == 0
                        && v.degree(a) == 2
                        && !used[a]
                        && !v.heavy(a).any(|(k, _)| exocyclic_oxo(v, k))
                })
                .collect();
            if basic.is_empty() {
                continue;
            }
            let all_n: Vec<usize> = ring.iter().copied().filter(|&a| v.z(a) == 7).collect();
            let pyrrole_n: Vec<usize> = all_n
                .iter()
                .copied()
                .filter(|&a| !basic.contains(&a) && v.degree(a) + usize::from(v.h(a)) == 3)
                .collect();
            let chalcogen = ring.iter().any(|&a| matches!(v.z(a), 8 | 16));
            let site_n = basic[0];
            let mut atoms = basic.clone();
            let (class, mut shift, mut path, mut extra);
            if ring.len() == 6 {
                if all_n.len() == 1 {
                    class = GroupClass::PyridineNitrogen;
                    let (s, p, e) = self.pyridine_substituents(ring, site_n);
                    shift = s;
                    path = p;
                    extra = e;
                } else {
                    class = GroupClass::DiazineNitrogen;
                    // The pyridine substituent rules applied from each basic N; the most basic
                    // N is the site (checks, from memory: 2-aminopyrimidine 3.5 -> 3.0,
                    // 4-aminopyrimidine 5.7 -> 5.4, 2,4-diaminopyrimidine 7.4 -> 6.9).
                    let mut best = (f64::NEG_INFINITY, String::new(), 0.0);
                    for &b in &basic {
                        let candidate = self.pyridine_substituents(ring, b);
                        if candidate.0 > best.0 {
                            best = candidate;
                        }
                    }
                    shift = best.0;
                    path = best.1;
                    extra = best.2 + 0.3;
                    if all_n.len() >= 3 {
                        // Triazines are far weaker than diazines (s-triazine barely basic,
                        // atrazine 1.7, melamine 5.0; from memory).
                        shift -= 2.5;
                        path = join_path("three ring N -2.5", &path);
                    }
                }
            } else if ring.len() == 5 {
                // Adjacent to a pyrrole-type N or to ring O/S (isoxazole-type): essentially not basic.
                if all_n.len() >= 4 {
                    continue; // tetrazoles: acidic, not basic
                }
                let adjacent_to_chalcogen = v
                    .heavy(site_n)
                    .any(|(k, _)| matches!(v.z(k), 8 | 16) && ring.contains(&k));
                if adjacent_to_chalcogen {
                    continue;
                }
                let adjacent_to_pyrrole = v.heavy(site_n).any(|(k, _)| pyrrole_n.contains(&k));
                if basic.len() == 1 && pyrrole_n.len() == 1 && !chalcogen && !adjacent_to_pyrrole {
                    // Rings fused to this one (sharing a bond).
                    let partners: Vec<&Vec<usize>> = g
                        .rings
                        .iter()
                        .filter(|r| {
                            r.as_slice() != ring.as_slice()
                                && r.iter().filter(|a| ring.contains(a)).count() >= 2
                        })
                        .collect();
                    // Fused to an electron-poor ring (purines, xanthines: caffeine 0.6,
                    // adenine 4.2, from memory) the imidazole N is only weakly basic.
                    let poor_partner = partners.iter().any(|r| {
                        r.iter()
                            .any(|&a| !ring.contains(&a) && (v.z(a) != 6 || exocyclic_oxo(v, a)))
                    });
                    class = if poor_partner {
                        GroupClass::WeakAzoleNitrogen
                    } else if !partners.is_empty() {
                        GroupClass::BenzimidazoleNitrogen
                    } else {
                        GroupClass::ImidazoleNitrogen
                    };
                    shift = 0.0;
                    path = String::new();
                    extra = 0.0;
                } else {
                    class = GroupClass::WeakAzoleNitrogen;
                    shift = 0.0;
                    path = String::new();
                    extra = 0.0;
                }
                // 2-Amino on the carbon between two ring heteroatoms (2-aminothiazole 5.4,
                // 2-aminoimidazole 8.5): +3.0 (from memory).
                let amino_c2 = ring.iter().any(|&c| {
                    v.z(c) == 6
                        && v.heavy(c)
                            .filter(|(k, _)| ring.contains(k) && v.z(*k) != 6)
                            .count()
                            == 2
                        && v.heavy(c).any(|(k, o)| {
                            !ring.contains(&k) && o == BondOrder::Single && self.amine_like_n(k)
                        })
                });
                if amino_c2 {
                    shift += 3.0;
                    path = "2-amino +3.0".into();
                    extra += 0.5;
                }
            } else {
                continue;
            }
            for &a in &atoms {
                used[a] = true;
            }
            atoms.extend(pyrrole_n);
            self.push(class, atoms, shift, path, extra);
        }
    }

    /// Exocyclic N that donates like an amino group (NH2, NHR, NR2 on carbon, not acylated).
    pub(super) fn amine_like_n(&self, k: usize) -> bool {
        let v = self.v;
        v.z(k) == 7
            && !v.aromatic(k)
            && v.charge(k) == 0
            && v.degree(k) + usize::from(v.h(k)) == 3
            && v.heavy(k)
                .all(|(j, o)| o == BondOrder::Single && v.z(j) == 6 && !v.is_acyl_like(j))
    }

    pub(super) fn pyridine_substituents(&self, ring: &[usize], n: usize) -> (f64, String, f64) {
        let v = self.v;
        let mut shift = 0.0;
        let mut parts = Vec::new();
        let mut extra = 0.0;
        for (atom, sub, _) in ring_substituents(v, ring) {
            let Some(dist) = ring_distance(ring, n, atom) else {
                continue;
            };
            let (sm, sp, _) = sub.sigma();
            let delta = match dist {
                1 => {
                    extra += ORTHO_EXTRA_SPREAD;
                    sub.pyridine_ortho_shift()
                }
                2 => -RHO_PYRIDINIUM * sm,
                3 => -RHO_PYRIDINIUM * sp,
                _ => continue,
            };
            shift += delta;
            if delta != 0.0 {
                parts.push(format!("{}-{} {delta:+.2}", dist + 1, sub.words()));
            }
        }
        let shift = shift.clamp(-7.0, 5.0);
        (shift, parts.join(", "), extra)
    }

    /// Hammett correction for a reaction centre attached at ring atom `ipso`.
    pub(super) fn hammett(&self, ipso: usize, rho: f64, kind: HammettKind) -> (f64, String, f64) {
        let v = self.v;
        let Some(ring) = v
            .graph()
            .rings
            .iter()
            .filter(|r| {
                r.len() == 6 && r.contains(&ipso) && r.iter().all(|&a| a < v.len() && v.aromatic(a))
            })
            .min_by_key(|r| r.iter().min().copied())
        else {
            return (0.0, String::new(), 0.3);
        };
        let mut shift = 0.0;
        let mut extra = 0.0;
        let mut parts = Vec::new();
        let hetero = ring.iter().any(|&a| v.z(a) != 6);
        if hetero {
            // Heteroaromatic ring: Hammett constants for benzene do not apply; widen the spread.
            extra += 1.0;
        }
        for (atom, sub, centre) in ring_substituents(v, ring) {
            if centre == Some(ipso) {
                continue;
            }
            let Some(dist) = ring_distance(ring, ipso, atom) else {
                continue;
            };
            let (sm, sp, spm) = sub.sigma();
            let sigma_para = match kind {
                HammettKind::Benzoic => sp,
                HammettKind::Phenol | HammettKind::Aniline => spm,
            };
            let delta = match (dist, kind) {
                (0, _) => continue,
                (1, HammettKind::Benzoic) => {
                    extra += ORTHO_EXTRA_SPREAD;
                    sub.benzoic_ortho_shift()
                }
                // Ortho taken as para (common practice, no source) with a wider spread.
                (1, _) => {
                    extra += ORTHO_EXTRA_SPREAD;
                    -rho * sigma_para
                }
                (2, _) => -rho * sm,
                (3, _) => -rho * sigma_para,
                _ => continue,
            };
            shift += delta;
            let position = match dist {
                1 => "o",
                2 => "m",
                _ => "p",
            };
            if delta != 0.0 {
                parts.push(format!("{position}-{} {delta:+.2}", sub.words()));
            }
        }
        let shift = shift.clamp(-6.0, 4.0);
        (shift, parts.join(", "), extra)
    }
}
