//! The project's own molecular graph: what the SMILES adapter produces and every descriptor reads.
//! No type of the SMILES crate ever appears outside `structure::adapter`.

use serde::Serialize;

/// Bond order as perceived after aromaticity assignment (RDKit default aromaticity model).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum BondOrder {
    /// Single bond.
    Single,
    /// Double bond.
    Double,
    /// Triple bond.
    Triple,
    /// Aromatic bond.
    Aromatic,
}

/// One heavy (or explicit hydrogen) atom.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Atom {
    /// Atomic number (1 = H, 6 = C, ...).
    pub atomic_number: u8,
    /// Aromatic after perception.
    pub aromatic: bool,
    /// Formal charge.
    pub formal_charge: i8,
    /// Hydrogens attached: implicit plus bracket H count (not counting H atoms present as graph nodes).
    pub hydrogens: u8,
    /// Isotope mass number if given in the SMILES.
    pub isotope: Option<u16>,
    /// Number of radical electrons (0 for normal closed-shell atoms).
    pub radical_electrons: u8,
    /// Member of at least one ring.
    pub in_ring: bool,
}

/// A bond between atoms `a` and `b` (indices into `MolGraph::atoms`).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Bond {
    /// First atom index.
    pub a: usize,
    /// Second atom index.
    pub b: usize,
    /// Order after aromaticity perception.
    pub order: BondOrder,
    /// Member of at least one ring.
    pub in_ring: bool,
}

/// A molecule (one connected fragment after fragment selection, or several if the caller asks for all).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct MolGraph {
    /// Atoms in SMILES order.
    pub atoms: Vec<Atom>,
    /// Bonds.
    pub bonds: Vec<Bond>,
    /// For each atom: (neighbour atom index, bond index).
    pub neighbours: Vec<Vec<(usize, usize)>>,
    /// Ring set as lists of atom indices (RDKit-compatible symmetrized SSSR where it matters for ring counts).
    pub rings: Vec<Vec<usize>>,
    /// Stereo marks as written in the input (tetrahedral `@`/`@@`, double-bond `/` `\\`), in
    /// terms of this graph's atoms. Whether a mark is a real stereo element is decided by
    /// [`crate::structure::canon`], which also drops marks on centres that are not stereogenic.
    #[serde(skip_serializing_if = "Vec::is_empty")]
    pub stereo: Vec<StereoMark>,
}

/// One stereo mark of the input, relative to named neighbours.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub enum StereoMark {
    /// A tetrahedral centre: looking from `neighbours[0]`, the other three run anticlockwise
    /// when `anticlockwise` (SMILES `@`), clockwise otherwise (`@@`). `None` is a hydrogen that
    /// is not a graph node (implicit or folded).
    Tetrahedral {
        /// The centre atom.
        centre: usize,
        /// Its four neighbours in the order the parity refers to.
        neighbours: [Option<usize>; 4],
        /// Anticlockwise seen from the first neighbour.
        anticlockwise: bool,
    },
    /// A double bond `a`=`b` with reference neighbours `ref_a` (of `a`) and `ref_b` (of `b`);
    /// `None` is a hydrogen that is not a graph node.
    DoubleBond {
        /// First end.
        a: usize,
        /// Second end.
        b: usize,
        /// Reference neighbour of `a`.
        ref_a: Option<usize>,
        /// Reference neighbour of `b`.
        ref_b: Option<usize>,
        /// The two references are on the same side (Z-like relative to them).
        same_side: bool,
    },
}

impl MolGraph {
    /// Heavy-atom degree (explicit neighbours in the graph).
    pub fn degree(&self, atom: usize) -> usize {
        self.neighbours[atom].len()
    }
}

impl MolGraph {
    /// Index of the bond between atoms `a` and `b`, if they are bonded.
    pub fn bond_between(&self, a: usize, b: usize) -> Option<usize> {
        self.neighbours
            .get(a)?
            .iter()
            .find(|&&(n, _)| n == b)
            .map(|&(_, bond)| bond)
    }

    /// All hydrogens on `atom`: its `hydrogens` count plus H atoms kept as graph nodes.
    pub fn total_hydrogens(&self, atom: usize) -> u32 {
        let nodes = self.neighbours[atom]
            .iter()
            .filter(|&&(n, _)| self.atoms[n].atomic_number == 1)
            .count();
        u32::from(self.atoms[atom].hydrogens) + nodes as u32
    }

    /// Neighbours that are not hydrogen.
    pub fn heavy_degree(&self, atom: usize) -> usize {
        self.neighbours[atom]
            .iter()
            .filter(|&&(n, _)| self.atoms[n].atomic_number != 1)
            .count()
    }

    /// Total valence as RDKit reports it (SMARTS `v`): bond orders plus all
    /// hydrogens, where aromatic bonds count 1.5 and an aromatic atom whose sum
    /// exceeds its default valence (adjusted for charge) is brought back to it,
    /// as RDKit's `calcExplicitValence` does (GraphMol/Atom.cpp). This equals
    /// the valence of the Kekulé structure for ordinary aromatic atoms
    /// (pyrrole N 3, pyridine N 3, ring-fusion C 4).
    pub fn total_valence(&self, atom: usize) -> u32 {
        let mut twice: u32 = 0;
        for &(_, b) in &self.neighbours[atom] {
            twice += match self.bonds[b].order {
                BondOrder::Single => 2,
                BondOrder::Double => 4,
                BondOrder::Triple => 6,
                BondOrder::Aromatic => 3,
            };
        }
        twice += 2 * u32::from(self.atoms[atom].hydrogens);
        let a = &self.atoms[atom];
        let valences: &[i32] = match a.atomic_number {
            5 => &[3],
            6 => &[4],
            7 => &[3],
            8 => &[2],
            15 | 33 => &[3, 5, 7],
            16 | 34 => &[2, 4, 6],
            _ => &[],
        };
        if a.aromatic && !valences.is_empty() && twice as i32 > 2 * valences[0] {
            // Boron is an "early atom" in RDKit: its charge correction is negated.
            let chr = i32::from(a.formal_charge) * if a.atomic_number == 5 { -1 } else { 1 };
            let accum = twice as i32;
            let mut pval = valences[0] + chr;
            for &v in valences {
                if 2 * (v + chr) > accum {
                    break;
                }
                pval = v + chr;
            }
            if accum - 2 * pval <= 3 && pval >= 0 {
                return pval as u32;
            }
        }
        // RDKit rounds accum + 0.1 to the nearest integer.
        twice.div_ceil(2)
    }
}

#[cfg(test)]
mod tests {
    use crate::structure::adapter::parse_smiles;

    #[test]
    fn rdkit_total_valence_of_aromatic_atoms() {
        // Kekulé valences (RDKit GetTotalValence): pyrrole N 3, pyridine N 3,
        // ring-fusion C of naphthalene 4, thiophene S 2, pyridinium N 4.
        let v = |s: &str, i: usize| parse_smiles(s).unwrap().graph.total_valence(i);
        assert_eq!(v("C1=CNC=C1", 2), 3);
        assert_eq!(v("C1=CC=NC=C1", 3), 3);
        assert_eq!(v("C1=CC=C2C=CC=CC2=C1", 3), 4);
        assert_eq!(v("C1=CSC=C1", 2), 2);
        assert_eq!(v("C1=CC=[NH+]C=C1", 3), 4);
        assert_eq!(v("CC(=O)O", 1), 4);
    }

    #[test]
    fn helpers() {
        let g = parse_smiles("[2H]OC").unwrap().graph;
        // The deuterium is kept as a node (isotope label), so O has one H in total.
        assert_eq!(g.atoms.len(), 3);
        assert_eq!(g.total_hydrogens(1), 1);
        assert_eq!(g.heavy_degree(1), 1);
        assert!(g.bond_between(1, 2).is_some());
        assert!(g.bond_between(0, 2).is_none());
    }
}
