//! Small read-only queries on a [`MolGraph`] shared by the ionisable-group, Joback and volatility
//! code: validated neighbour access, hydrogen counts that include explicit H nodes, and a
//! neutralised view of pre-ionised SMILES (carboxylates, protonated amines).
//!
//! Every public function of the modules that use this one first calls [`GraphView::new`], which
//! checks the graph's indices, so later indexing cannot panic on a malformed graph.

use super::graph::{BondOrder, MolGraph};

/// Why a graph could not be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum GraphError {
    /// `neighbours` and `atoms` differ in length.
    #[error(
        "malformed molecular graph: {atoms} atoms but {neighbour_lists} neighbour lists; rebuild the graph with the SMILES adapter"
    )]
    NeighbourLength {
        /// Number of atoms.
        atoms: usize,
        /// Number of neighbour lists.
        neighbour_lists: usize,
    },
    /// A ring lists an atom index outside the graph.
    #[error(
        "malformed molecular graph: ring {ring} lists atom {atom}, outside the graph; rebuild the graph with the SMILES adapter"
    )]
    RingIndex {
        /// Ring index.
        ring: usize,
        /// Atom index given.
        atom: usize,
    },
    /// A neighbour or bond index points outside the graph.
    #[error(
        "malformed molecular graph: atom {atom} lists neighbour {neighbour} via bond {bond}, outside the graph; rebuild the graph with the SMILES adapter"
    )]
    IndexOutOfRange {
        /// Atom whose list is wrong.
        atom: usize,
        /// Neighbour index given.
        neighbour: usize,
        /// Bond index given.
        bond: usize,
    },
}

/// A validated, neutralised view of a molecule.
///
/// "Neutralised" means: a protonated amine or azine (N+ carrying H, not bonded to O-) is read as
/// the neutral base with one H fewer, and an anionic O, S or N (not bonded to a cationic N, as in
/// nitro groups or N-oxides) is read as the neutral acid with one H more. The original charge is
/// kept in [`GraphView::input_charge`] so callers can report "pre-ionised in the input".
#[derive(Debug, Clone)]
pub struct GraphView<'a> {
    graph: &'a MolGraph,
    hydrogens: Vec<u8>,
    charge: Vec<i8>,
}

impl<'a> GraphView<'a> {
    /// Validate `graph` and build the neutralised view.
    ///
    /// # Errors
    /// [`GraphError`] when the neighbour lists do not match the atoms and bonds.
    pub fn new(graph: &'a MolGraph) -> Result<Self, GraphError> {
        Self::build(graph, true)
    }

    /// Validate `graph` and read it exactly as written (no neutralisation), for group
    /// contribution methods that must see the input's charges and hydrogens.
    ///
    /// # Errors
    /// As [`GraphView::new`].
    pub fn new_as_written(graph: &'a MolGraph) -> Result<Self, GraphError> {
        Self::build(graph, false)
    }

    fn build(graph: &'a MolGraph, neutralise: bool) -> Result<Self, GraphError> {
        let n = graph.atoms.len();
        if graph.neighbours.len() != n {
            return Err(GraphError::NeighbourLength {
                atoms: n,
                neighbour_lists: graph.neighbours.len(),
            });
        }
        for (atom, list) in graph.neighbours.iter().enumerate() {
            for &(neighbour, bond) in list {
                let ok = neighbour < n
                    && bond < graph.bonds.len()
                    && ({
                        let b = &graph.bonds[bond];
                        (b.a == atom && b.b == neighbour) || (b.b == atom && b.a == neighbour)
                    });
                if !ok {
                    return Err(GraphError::IndexOutOfRange {
                        atom,
                        neighbour,
                        bond,
                    });
                }
            }
        }
        for (ring, members) in graph.rings.iter().enumerate() {
            if let Some(&atom) = members.iter().find(|&&a| a >= n) {
                return Err(GraphError::RingIndex { ring, atom });
            }
        }
        // Hydrogens: implicit/bracket count plus explicit H nodes bonded to the atom.
        let mut hydrogens: Vec<u8> = graph.atoms.iter().map(|a| a.hydrogens).collect();
        for (i, atom) in graph.atoms.iter().enumerate() {
            if atom.atomic_number == 1 {
                for &(j, _) in &graph.neighbours[i] {
                    if graph.atoms[j].atomic_number != 1 {
                        hydrogens[j] = hydrogens[j].saturating_add(1);
                    }
                }
            }
        }
        let mut charge: Vec<i8> = graph.atoms.iter().map(|a| a.formal_charge).collect();
        let mut view = GraphView {
            graph,
            hydrogens: hydrogens.clone(),
            charge: charge.clone(),
        };
        for i in 0..n {
            if !neutralise {
                break;
            }
            let z = graph.atoms[i].atomic_number;
            let q = graph.atoms[i].formal_charge;
            if z == 7 && q == 1 && hydrogens[i] > 0 && !view.bonded_to_anion(i) {
                hydrogens[i] -= 1;
                charge[i] = 0;
            } else if matches!(z, 7 | 8 | 16) && q == -1 && !view.bonded_to_cationic_n(i) {
                hydrogens[i] = hydrogens[i].saturating_add(1);
                charge[i] = 0;
            }
        }
        view.hydrogens = hydrogens;
        view.charge = charge;
        Ok(view)
    }

    /// The underlying graph.
    pub fn graph(&self) -> &MolGraph {
        self.graph
    }

    /// Number of atoms (heavy atoms and any explicit H nodes).
    pub fn len(&self) -> usize {
        self.graph.atoms.len()
    }

    /// True when the graph has no atoms.
    pub fn is_empty(&self) -> bool {
        self.graph.atoms.is_empty()
    }

    /// Atomic number of atom `i`.
    pub fn z(&self, i: usize) -> u8 {
        self.graph.atoms[i].atomic_number
    }

    /// Aromatic flag of atom `i`.
    pub fn aromatic(&self, i: usize) -> bool {
        self.graph.atoms[i].aromatic
    }

    /// Ring membership of atom `i`.
    pub fn in_ring(&self, i: usize) -> bool {
        self.graph.atoms[i].in_ring
    }

    /// Hydrogens on atom `i` in the neutralised view (explicit H nodes included).
    pub fn h(&self, i: usize) -> u8 {
        self.hydrogens[i]
    }

    /// Formal charge of atom `i` in the neutralised view.
    pub fn charge(&self, i: usize) -> i8 {
        self.charge[i]
    }

    /// Formal charge of atom `i` as written in the input.
    pub fn input_charge(&self, i: usize) -> i8 {
        self.graph.atoms[i].formal_charge
    }

    /// Heavy (non-hydrogen) neighbours of `i` with the bond order.
    pub fn heavy(&self, i: usize) -> impl Iterator<Item = (usize, BondOrder)> + '_ {
        self.graph.neighbours[i]
            .iter()
            .filter(|(j, _)| self.graph.atoms[*j].atomic_number != 1)
            .map(|&(j, b)| (j, self.graph.bonds[b].order))
    }

    /// Heavy-atom degree of `i`.
    pub fn degree(&self, i: usize) -> usize {
        self.heavy(i).count()
    }

    /// Total connections (heavy neighbours plus hydrogens), SMARTS `X`.
    pub fn connections(&self, i: usize) -> usize {
        self.degree(i) + usize::from(self.h(i))
    }

    /// True when `i` has a double bond to an atom of element `z`.
    pub fn double_to(&self, i: usize, z: u8) -> bool {
        self.heavy(i)
            .any(|(j, o)| o == BondOrder::Double && self.z(j) == z)
    }

    /// Neighbours of `i` joined by a double bond to an atom of element `z`.
    pub fn doubles_to(&self, i: usize, z: u8) -> Vec<usize> {
        self.heavy(i)
            .filter(|&(j, o)| o == BondOrder::Double && self.z(j) == z)
            .map(|(j, _)| j)
            .collect()
    }

    /// True when `i` is a carbon (or S, P) carrying a double bond to O or S: an acyl/sulfonyl/phosphoryl centre.
    pub fn is_acyl_like(&self, i: usize) -> bool {
        match self.z(i) {
            6 => self.double_to(i, 8) || self.double_to(i, 16),
            15 | 16 => self.double_to(i, 8),
            _ => false,
        }
    }

    /// True when `i` is bonded to an O with formal charge -1 in the input.
    fn bonded_to_anion(&self, i: usize) -> bool {
        self.heavy(i)
            .any(|(j, _)| self.z(j) == 8 && self.graph.atoms[j].formal_charge < 0)
    }

    /// True when `i` is bonded to an N with formal charge +1 in the input (nitro, N-oxide).
    fn bonded_to_cationic_n(&self, i: usize) -> bool {
        self.heavy(i)
            .any(|(j, _)| self.z(j) == 7 && self.graph.atoms[j].formal_charge > 0)
    }

    /// Smallest ring (by atom count) that contains atom `i`, from the graph's ring set.
    pub fn smallest_ring(&self, i: usize) -> Option<&[usize]> {
        self.graph
            .rings
            .iter()
            .filter(|r| r.contains(&i))
            .min_by_key(|r| r.len())
            .map(Vec::as_slice)
    }

    /// Molar mass in g/mol, counting all hydrogens as written in the input, from the project's
    /// element table ([`super::elements`]); `None` when an element has no mass there.
    pub fn molar_mass_g_mol(&self) -> Option<f64> {
        let hydrogen = super::elements::element(1)?.average_mass_g_mol;
        let mut total = 0.0;
        for atom in &self.graph.atoms {
            total += super::elements::element(atom.atomic_number)?.average_mass_g_mol;
            // Implicit/bracket hydrogens only; explicit H nodes are counted as atoms above.
            total += f64::from(atom.hydrogens) * hydrogen;
        }
        Some(total)
    }
}
