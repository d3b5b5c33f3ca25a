//! Nitrogen sites: aliphatic amines with their α/β decrements, amidines and guanidines,
//! N–H acids (sulfonamides, imides, azoles).

use super::super::graph::BondOrder;
use super::classes::*;
use super::*;

impl Detector<'_, '_> {
    /// Amine-type nitrogen sites, amide-type N-H acids, quaternary ammonium.
    pub(super) fn nitrogen(&mut self, n: usize) {
        let v = self.v;
        let q = v.charge(n);
        let deg = v.degree(n);
        let h = usize::from(v.h(n));
        if q > 0 {
            let bonded_to_anion = v.heavy(n).any(|(j, _)| v.input_charge(j) < 0);
            if !bonded_to_anion && h == 0 && (deg == 4 || (v.aromatic(n) && deg == 3)) {
                self.push(
                    GroupClass::QuaternaryAmmonium,
                    vec![n],
                    0.0,
                    String::new(),
                    0.0,
                );
            }
            return;
        }
        if q != 0 {
            return;
        }
        if h >= 1 {
            self.nh_acid(n);
        }
        if v.aromatic(n) {
            return;
        }
        if let Some(carbons) = self.amine_degree(n) {
            let aryl: Vec<usize> = v
                .heavy(n)
                .filter(|&(j, _)| v.aromatic(j))
                .map(|(j, _)| j)
                .collect();
            if aryl.is_empty() {
                self.aliphatic_amine(n, carbons);
            } else if aryl.len() == 1 {
                let r = aryl[0];
                // Amines on heteroaromatic rings (aminopyridines, aminothiazoles) are not the
                // basic centre: the ring N is, and is corrected in `azines`.
                if ring_has_heteroatom(v, r) {
                    return;
                }
                let alkyls = carbons - 1;
                let alkyl_shift = 0.25 * alkyls as f64; // N-methylaniline 4.85, N,N-dimethyl 5.1
                let (shift, path, extra) = self.hammett(r, RHO_ANILINIUM, HammettKind::Aniline);
                let mut path = path;
                if alkyls > 0 {
                    path = join_path(&format!("N-alkyl x{alkyls} +{alkyl_shift:.2}"), &path);
                }
                self.push(
                    GroupClass::Aniline,
                    vec![n],
                    shift + alkyl_shift,
                    path,
                    extra,
                );
            } else {
                self.push(GroupClass::Diarylamine, vec![n], 0.0, String::new(), 0.0);
            }
        }
    }

    /// If `n` is an amine N (sp3, neutral, only carbon neighbours that are not acyl, imidoyl,
    /// vinyl or nitrile carbons), the number of carbon neighbours.
    pub(super) fn amine_degree(&self, n: usize) -> Option<usize> {
        let v = self.v;
        if v.z(n) != 7 || v.aromatic(n) || v.charge(n) != 0 {
            return None;
        }
        if v.degree(n) + usize::from(v.h(n)) != 3 || v.degree(n) == 0 {
            return None;
        }
        for (j, o) in v.heavy(n) {
            if o != BondOrder::Single || v.z(j) != 6 {
                return None;
            }
            if v.aromatic(j) {
                continue;
            }
            let bad = v
                .heavy(j)
                .any(|(k, ok)| (ok == BondOrder::Double || ok == BondOrder::Triple) && k != n);
            if bad {
                return None; // amide, thioamide, amidine, enamine, cyanamide
            }
        }
        Some(v.degree(n))
    }

    pub(super) fn aliphatic_amine(&mut self, n: usize, carbons: usize) {
        let v = self.v;
        let class = match carbons {
            1 => GroupClass::PrimaryAmine,
            2 => GroupClass::SecondaryAmine,
            _ => GroupClass::TertiaryAmine,
        };
        let mut shift = 0.0;
        let mut parts: Vec<String> = Vec::new();
        let mut corrections = 0usize;
        for (a, _) in v.heavy(n) {
            for (b, _) in v.heavy(a) {
                if b == n {
                    continue;
                }
                let unsaturated_c = |order: BondOrder| {
                    v.z(b) == 6
                        && !v.aromatic(b)
                        && v.heavy(b).any(|(k, ok)| ok == order && v.z(k) == 6)
                };
                let (delta, label) = if v.aromatic(b) || unsaturated_c(BondOrder::Double) {
                    (AMINE_ALPHA_ARYL, "alpha-aryl/vinyl")
                } else if unsaturated_c(BondOrder::Triple) {
                    (AMINE_ALPHA_ALKYNYL, "alpha-alkynyl")
                } else if v.z(b) == 6 && v.double_to(b, 8) {
                    let is_acid = v
                        .heavy(b)
                        .any(|(k, ok)| ok == BondOrder::Single && v.z(k) == 8 && v.h(k) == 1);
                    if is_acid {
                        (AMINE_ALPHA_CARBOXYL, "alpha-carboxyl")
                    } else {
                        (AMINE_ALPHA_CARBONYL, "alpha-carbonyl")
                    }
                } else if v.z(b) == 6
                    && v.heavy(b)
                        .any(|(k, ok)| ok == BondOrder::Triple && v.z(k) == 7)
                {
                    (AMINE_ALPHA_NITRILE, "alpha-nitrile")
                } else if v.z(b) == 16 && v.double_to(b, 8) {
                    (AMINE_ALPHA_SULFONYL, "alpha-sulfonyl")
                } else if matches!(v.z(b), 7 | 8 | 16) {
                    (AMINE_ALPHA_HETEROATOM, "alpha-heteroatom")
                } else if v.z(b) == 6 && !v.aromatic(a) {
                    // Substituents on the beta carbon (N-C-C-X).
                    for (c, _) in v.heavy(b) {
                        if c == a {
                            continue;
                        }
                        let (delta, label) = match v.z(c) {
                            7 | 8 | 16 => (AMINE_BETA_HETEROATOM, "beta-heteroatom"),
                            9 | 17 => (AMINE_BETA_HALOGEN, "beta-halogen"),
                            6 if v
                                .heavy(c)
                                .any(|(k, ok)| ok == BondOrder::Triple && v.z(k) == 7) =>
                            {
                                (AMINE_BETA_NITRILE, "beta-nitrile")
                            }
                            6 if v.is_acyl_like(c) => (AMINE_BETA_CARBONYL, "beta-carbonyl"),
                            _ => continue,
                        };
                        shift += delta;
                        corrections += 1;
                        parts.push(format!("{label} {delta:+.1}"));
                    }
                    continue;
                } else {
                    continue;
                };
                shift += delta;
                corrections += 1;
                parts.push(format!("{label} {delta:+.1}"));
            }
        }
        let shift = f64::max(shift, AMINE_MAX_DECREMENT);
        let extra = SPREAD_PER_CORRECTION * corrections as f64;
        self.push(class, vec![n], shift, parts.join(", "), extra.min(1.0));
    }

    /// N-H acids: tetrazole, acyl sulfonamide, sulfonamide, imide.
    pub(super) fn nh_acid(&mut self, n: usize) {
        let v = self.v;
        // Tetrazole: five-membered aromatic ring with four N.
        if v.aromatic(n)
            && let Some(ring) = v.smallest_ring(n)
            && ring.len() == 5
            && ring.iter().filter(|&&a| v.z(a) == 7).count() == 4
            && ring.iter().all(|&a| v.aromatic(a))
        {
            self.push(
                GroupClass::Tetrazole,
                ring.to_vec(),
                0.0,
                String::new(),
                0.0,
            );
            return;
        }
        let mut sulfonyl = None;
        let mut carbonyls = Vec::new();
        let mut aryl = false;
        let mut heteroaryl = false;
        for (j, o) in v.heavy(n) {
            if o != BondOrder::Single && o != BondOrder::Aromatic {
                continue;
            }
            if v.z(j) == 16 && v.doubles_to(j, 8).len() >= 2 {
                sulfonyl = Some(j);
            } else if v.z(j) == 6 && (v.double_to(j, 8) || v.double_to(j, 16)) {
                carbonyls.push(j);
            } else if v.aromatic(j) && !v.aromatic(n) {
                aryl = true;
                heteroaryl |= ring_has_heteroatom(v, j);
            }
        }
        if let Some(s) = sulfonyl {
            let mut atoms = vec![n, s];
            if let Some(&c) = carbonyls.first() {
                atoms.push(c);
                self.push(GroupClass::AcylSulfonamide, atoms, 0.0, String::new(), 0.0);
            } else if heteroaryl {
                // N-heteroaryl sulfonamides (sulfa drugs) about 1 lower than N-phenyl (from memory).
                self.push(
                    GroupClass::SulfonamideNAryl,
                    atoms,
                    -1.0,
                    "N-heteroaryl -1.0".into(),
                    0.0,
                );
            } else if aryl {
                self.push(
                    GroupClass::SulfonamideNAryl,
                    atoms,
                    0.8,
                    "N-phenyl +0.8".into(),
                    0.0,
                );
            } else {
                self.push(GroupClass::Sulfonamide, atoms, 0.0, String::new(), 0.0);
            }
            return;
        }
        if carbonyls.len() >= 2 {
            let mut atoms = vec![n];
            atoms.extend(&carbonyls);
            let (shift, path) = self.imide_shift(n);
            self.push(GroupClass::Imide, atoms, shift, path, 0.0);
            return;
        }
        // Lactam-type N-H of an aromatic ring next to a ring C=O and a ring C=N
        // (4(3H)-pyrimidinone 8.6, quinazolin-4(3H)-one 9.8, from memory).
        if v.aromatic(n)
            && carbonyls.len() == 1
            && v.heavy(n).any(|(k, _)| {
                k != carbonyls[0]
                    && v.z(k) == 6
                    && v.aromatic(k)
                    && v.heavy(k).any(|(m, _)| {
                        m != n && v.z(m) == 7 && v.aromatic(m) && v.h(m) == 0 && v.degree(m) == 2
                    })
            })
        {
            self.push(
                GroupClass::AromaticLactam,
                vec![n, carbonyls[0]],
                0.0,
                String::new(),
                0.0,
            );
        }
    }

    /// Ring-type shift of an imide N-H (from memory: succinimide 9.6, hydantoin 9.1,
    /// phthalimide 8.3, glutarimide 11.4, barbital 7.9, 2,4-thiazolidinedione 6.2, rhodanine 5.6).
    pub(super) fn imide_shift(&self, n: usize) -> (f64, String) {
        let v = self.v;
        let Some(ring) = v.smallest_ring(n) else {
            return (0.0, String::new());
        };
        let ring_carbonyls = ring.iter().filter(|&&a| exocyclic_oxo(v, a)).count();
        let ring_sulfur = ring.iter().any(|&a| v.z(a) == 16);
        match ring.len() {
            5 if ring_sulfur => (-3.2, "thiazolidinedione-type ring -3.2".into()),
            6 if ring_carbonyls >= 3 => (-1.2, "barbiturate-type ring -1.2".into()),
            6 if ring.iter().all(|&a| !v.aromatic(a)) => {
                (2.0, "saturated six-ring (glutarimide-type) +2.0".into())
            }
            _ => (0.0, String::new()),
        }
    }
}
