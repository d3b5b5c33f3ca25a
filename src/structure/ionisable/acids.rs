//! Sites found from carbon, oxygen, sulfur and phosphorus: carboxylic and other oxo acids,
//! phenols, alcohols, thiols, sulfonic and phosphonic acids, with their α-substituent shifts.

use super::super::graph::BondOrder;
use super::classes::*;
use super::*;

impl Detector<'_, '_> {
    /// Carboxylic acids, amidines, guanidines (sites centred on carbon).
    pub(super) fn carbon(&mut self, c: usize) {
        let v = self.v;
        if v.aromatic(c) || v.charge(c) != 0 {
            return;
        }
        let nbrs: Vec<(usize, BondOrder)> = v.heavy(c).collect();
        // Carboxylic acid: C(=O)OH, C with exactly one =O and one -OH.
        let oxo: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| o == BondOrder::Double && v.z(j) == 8 && v.degree(j) == 1)
            .map(|&(j, _)| j)
            .collect();
        let hydroxy: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| {
                o == BondOrder::Single
                    && v.z(j) == 8
                    && v.degree(j) == 1
                    && v.h(j) == 1
                    && v.charge(j) == 0
            })
            .map(|&(j, _)| j)
            .collect();
        if oxo.len() == 1 && !hydroxy.is_empty() && nbrs.len() + usize::from(v.h(c)) == 3 {
            let other: Vec<usize> = nbrs
                .iter()
                .map(|&(j, _)| j)
                .filter(|&j| j != oxo[0] && j != hydroxy[0])
                .collect();
            // Carbonic/carbamic acid half-esters are treated as carboxylic acids too.
            let r = other.first().copied();
            let atoms = vec![c, oxo[0], hydroxy[0]];
            match r {
                Some(r) if v.aromatic(r) && v.z(r) == 6 => {
                    let (shift, path, extra) = self.hammett(r, RHO_BENZOIC, HammettKind::Benzoic);
                    self.push(
                        GroupClass::AromaticCarboxylicAcid,
                        atoms,
                        shift,
                        path,
                        extra,
                    );
                }
                Some(r)
                    if v.z(r) == 6
                        && (self.carbon_bears_basic_amine(r)
                            || v.heavy(r).any(|(k, _)| v.z(k) == 7 && v.charge(k) > 0)) =>
                {
                    self.push(
                        GroupClass::AminoAcidCarboxyl,
                        atoms,
                        0.0,
                        String::new(),
                        0.0,
                    );
                }
                Some(r) if v.z(r) == 6 => {
                    let (shift, path) = self.alpha_acid_shift(r);
                    let extra = if shift != 0.0 { 0.3 } else { 0.0 };
                    self.push(GroupClass::CarboxylicAcid, atoms, shift, path, extra);
                }
                _ => self.push(GroupClass::CarboxylicAcid, atoms, 0.0, String::new(), 0.3),
            }
            return;
        }
        if !oxo.is_empty() || v.double_to(c, 16) {
            return;
        }
        // Amidine / guanidine: non-aromatic C with one =N and one or two single-bonded N.
        let imino: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| o == BondOrder::Double && v.z(j) == 7 && !v.aromatic(j))
            .map(|&(j, _)| j)
            .collect();
        let amino: Vec<usize> = nbrs
            .iter()
            .filter(|&&(j, o)| o == BondOrder::Single && v.z(j) == 7 && !v.aromatic(j))
            .map(|&(j, _)| j)
            .collect();
        if imino.len() != 1 || amino.is_empty() {
            return;
        }
        let ns: Vec<usize> = imino.iter().chain(amino.iter()).copied().collect();
        // The imino N must not carry O (oximes, amidoximes are not strong bases).
        if v.heavy(imino[0]).any(|(j, _)| v.z(j) == 8 || v.z(j) == 16) {
            return;
        }
        let mut acylated = false;
        let mut strongly_deactivated = false;
        let mut aryl = false;
        for &n in &ns {
            for (j, o) in v.heavy(n) {
                if j == c {
                    continue;
                }
                let sulfonyl = v.z(j) == 16 && v.double_to(j, 8);
                let cyano = v.z(j) == 6
                    && v.heavy(j)
                        .any(|(k, ok)| ok == BondOrder::Triple && v.z(k) == 7);
                if sulfonyl || cyano {
                    strongly_deactivated = true;
                } else if v.is_acyl_like(j) {
                    acylated = true;
                } else if v.aromatic(j) {
                    aryl = true;
                } else if v.z(j) == 8 || o == BondOrder::Double {
                    strongly_deactivated = true;
                }
            }
        }
        if strongly_deactivated {
            return; // sulfonyl-, cyano-, hydroxy-amidines: not basic in the aqueous range
        }
        let mut atoms = vec![c];
        atoms.extend(&ns);
        if amino.len() >= 2 {
            if acylated || aryl {
                let path = if acylated { "acyl" } else { "aryl" };
                self.push(GroupClass::AcylGuanidine, atoms, 0.0, path.into(), 0.0);
            } else {
                self.push(GroupClass::Guanidine, atoms, 0.0, String::new(), 0.0);
            }
        } else if acylated {
            // Acylamidines: taken as acylguanidine-like (author's judgement).
            self.push(
                GroupClass::AcylGuanidine,
                atoms,
                0.0,
                "acylamidine".into(),
                0.5,
            );
        } else if aryl {
            // N-aryl amidine about 1.5 lower (from memory, N-phenylbenzamidine ~10.5).
            self.push(GroupClass::Amidine, atoms, -1.5, "N-aryl -1.5".into(), 0.3);
        } else {
            self.push(GroupClass::Amidine, atoms, 0.0, String::new(), 0.0);
        }
    }

    /// True when carbon `r` carries an sp3 amine N (α-amino acid pattern).
    pub(super) fn carbon_bears_basic_amine(&self, r: usize) -> bool {
        let v = self.v;
        v.heavy(r)
            .any(|(n, o)| o == BondOrder::Single && v.z(n) == 7 && self.amine_degree(n).is_some())
    }

    /// Shift for an aliphatic acid whose α-carbon carries electronegative groups (from memory:
    /// chloroacetic 2.87, methoxyacetic 3.57, phenoxyacetic 3.17, glycolic 3.83, pyruvic 2.5,
    /// hippuric (acylamino) 3.62, (methylthio)acetic 3.66, phenylacetic 4.31).
    pub(super) fn alpha_acid_shift(&self, r: usize) -> (f64, String) {
        let v = self.v;
        let mut shift: f64 = 0.0;
        let mut parts = Vec::new();
        for (j, o) in v.heavy(r) {
            if o != BondOrder::Single && o != BondOrder::Double {
                continue;
            }
            match v.z(j) {
                9 | 17 | 35 | 53 => {
                    shift -= 1.9;
                    parts.push("alpha-halogen -1.9");
                }
                7 if o == BondOrder::Single && !self.carbon_bears_basic_amine(r) => {
                    shift -= 1.2;
                    parts.push("alpha-N -1.2");
                }
                16 if o == BondOrder::Single => {
                    shift -= 1.1;
                    parts.push("alpha-S -1.1");
                }
                6 if v.aromatic(j) => {
                    shift -= 0.5;
                    parts.push("alpha-aryl -0.5");
                }
                8 if o == BondOrder::Single => {
                    shift -= 1.2;
                    parts.push("alpha-O -1.2");
                }
                8 => {
                    shift -= 2.3;
                    parts.push("alpha-oxo -2.3");
                }
                _ => {}
            }
        }
        shift = shift.max(-4.5);
        (shift, parts.join(", "))
    }

    /// Phenols, hydroxamic acids (sites centred on the OH oxygen).
    pub(super) fn oxygen(&mut self, o: usize) {
        let v = self.v;
        if v.charge(o) != 0 || v.h(o) != 1 || v.degree(o) != 1 {
            return;
        }
        let Some((r, order)) = v.heavy(o).next() else {
            return;
        };
        if order != BondOrder::Single {
            return;
        }
        if v.z(r) == 6 && v.aromatic(r) {
            // Hydroxy on a ring with a ring N next to it is a pyridone-type tautomer: skip.
            if v.heavy(r)
                .any(|(k, _)| v.z(k) == 7 && v.aromatic(k) && v.degree(k) == 2)
            {
                return;
            }
            let (shift, path, extra) = self.hammett(r, RHO_PHENOL, HammettKind::Phenol);
            self.push(GroupClass::Phenol, vec![o], shift, path, extra);
        } else if v.z(r) == 7
            && v.heavy(r)
                .any(|(c, oc)| oc == BondOrder::Single && v.z(c) == 6 && v.double_to(c, 8))
        {
            self.push(
                GroupClass::HydroxamicAcid,
                vec![o, r],
                0.0,
                String::new(),
                0.0,
            );
        } else if v.z(r) == 6 && !v.aromatic(r) {
            // Enol O-H on C=C whose far carbon carries a C=O: HO-C=C-C=O.
            let vinylogous = v.heavy(r).find_map(|(b, ob)| {
                (ob == BondOrder::Double && v.z(b) == 6)
                    .then(|| {
                        v.heavy(b).find(|&(c, oc)| {
                            oc == BondOrder::Single && c != r && v.z(c) == 6 && v.double_to(c, 8)
                        })
                    })
                    .flatten()
                    .map(|(c, _)| (b, c))
            });
            if let Some((b, c)) = vinylogous {
                self.push(
                    GroupClass::VinylogousAcid,
                    vec![o, r, b, c],
                    0.0,
                    String::new(),
                    0.0,
                );
            }
        }
    }

    /// Sulfonic acids (centred on S), thiols, sulfonium.
    pub(super) fn sulfur(&mut self, s: usize) {
        let v = self.v;
        if v.charge(s) > 0 && v.degree(s) == 3 && v.h(s) == 0 {
            self.push(GroupClass::Sulfonium, vec![s], 0.0, String::new(), 0.0);
            return;
        }
        if v.charge(s) != 0 {
            return;
        }
        let oxo = v.doubles_to(s, 8);
        let hydroxy: Vec<usize> = v
            .heavy(s)
            .filter(|&(j, o)| {
                o == BondOrder::Single && v.z(j) == 8 && v.h(j) == 1 && v.degree(j) == 1
            })
            .map(|(j, _)| j)
            .collect();
        if oxo.len() == 2 && !hydroxy.is_empty() {
            let mut atoms = vec![s, hydroxy[0]];
            atoms.extend(&oxo);
            self.push(GroupClass::SulfonicAcid, atoms, 0.0, String::new(), 0.0);
            return;
        }
        if v.h(s) == 1
            && v.degree(s) == 1
            && let Some((r, o)) = v.heavy(s).next()
            && o == BondOrder::Single
            && v.z(r) == 6
            && !v.is_acyl_like(r)
        {
            let class = if v.aromatic(r) {
                GroupClass::AromaticThiol
            } else {
                GroupClass::Thiol
            };
            self.push(class, vec![s], 0.0, String::new(), 0.0);
        }
    }

    /// Phosphonic, phosphoric, phosphinic acids; phosphonium.
    pub(super) fn phosphorus(&mut self, p: usize) {
        let v = self.v;
        if v.charge(p) > 0 && v.degree(p) == 4 && v.h(p) == 0 {
            self.push(GroupClass::Phosphonium, vec![p], 0.0, String::new(), 0.0);
            return;
        }
        if v.charge(p) != 0 || !v.double_to(p, 8) {
            return;
        }
        let mut hydroxy: Vec<usize> = v
            .heavy(p)
            .filter(|&(j, o)| {
                o == BondOrder::Single && v.z(j) == 8 && v.h(j) == 1 && v.degree(j) == 1
            })
            .map(|(j, _)| j)
            .collect();
        hydroxy.sort_unstable();
        if let Some(&first) = hydroxy.first() {
            self.push(
                GroupClass::PhosphorusAcidFirst,
                vec![p, first],
                0.0,
                String::new(),
                0.0,
            );
        }
        if let Some(&second) = hydroxy.get(1) {
            self.push(
                GroupClass::PhosphorusAcidSecond,
                vec![p, second],
                0.0,
                String::new(),
                0.0,
            );
        }
    }
}
