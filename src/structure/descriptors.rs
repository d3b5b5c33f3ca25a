//! The descriptor set: one serialisable record per molecule, computed from a
//! [`MolGraph`]. Each field's unit is in its name; each descriptor's method
//! and source is documented in its own module ([`super::crippen`],
//! [`super::tpsa`], [`super::lipinski`], [`super::formula`],
//! [`super::mcgowan`]) and here for the simple counts.

use serde::{Deserialize, Serialize};

use super::adapter::{StructureError, parse_smiles};
use super::graph::{BondOrder, MolGraph};
use super::smarts::AtomFacts;
use super::{crippen, formula, lipinski, mcgowan, tpsa};

/// Descriptors of one molecule (RDKit 2026.09.1-compatible where RDKit has the descriptor).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Descriptors {
    /// Hill-order formula with charge, as RDKit `CalcMolFormula`.
    pub molecular_formula: String,
    /// Average molar mass, g/mol (RDKit `MolWt`); `None` if an element has no tabulated mass.
    pub molar_mass_g_mol: Option<f64>,
    /// Monoisotopic mass, Da (RDKit `ExactMolWt`); `None` as above.
    pub monoisotopic_mass_da: Option<f64>,
    /// Wildman–Crippen logP (octanol/water, log10 units; RDKit `MolLogP`).
    pub crippen_logp: f64,
    /// Wildman–Crippen molar refractivity, cm³/mol (RDKit `MolMR`).
    pub crippen_molar_refractivity_cm3_mol: f64,
    /// Topological polar surface area, Å², N and O only (RDKit `CalcTPSA`).
    pub tpsa_a2: f64,
    /// H-bond donors, RDKit definition (`CalcNumHBD`).
    pub hbond_donors: u32,
    /// H-bond acceptors, RDKit definition (`CalcNumHBA`).
    pub hbond_acceptors: u32,
    /// Lipinski donors: H on N and O (`NHOHCount`).
    pub lipinski_nhoh_count: u32,
    /// Lipinski acceptors: N and O atoms (`NOCount`).
    pub lipinski_no_count: u32,
    /// Rotatable bonds, RDKit default Strict definition.
    pub rotatable_bonds: u32,
    /// Rings in RDKit's ring set (symmetrized SSSR; `CalcNumRings`).
    pub ring_count: u32,
    /// Size of the smallest set of smallest rings (bonds − atoms + 1).
    pub sssr_count: u32,
    /// Rings of the ring set whose bonds are all aromatic (`CalcNumAromaticRings`).
    pub aromatic_ring_count: u32,
    /// sp3 carbons / all carbons (`CalcFractionCSP3`); 0 without carbon.
    pub fraction_csp3: f64,
    /// Non-hydrogen atoms.
    pub heavy_atom_count: u32,
    /// Atoms other than C and H (`CalcNumHeteroatoms`).
    pub heteroatom_count: u32,
    /// Net formal charge, elementary charges.
    pub formal_charge: i32,
    /// Atoms flagged aromatic (RDKit default aromaticity model).
    pub aromatic_atom_count: u32,
    /// All hydrogens, implicit and explicit.
    pub hydrogen_count: u32,
    /// McGowan characteristic volume, cm³/mol; `None` if an element lacks an increment.
    pub mcgowan_volume_cm3_mol: Option<f64>,
    /// Abraham's Vx: McGowan volume in units of 100 cm³/mol.
    pub mcgowan_vx_100cm3_mol: Option<f64>,
}

/// A described structure: the input, its descriptors and what the parser dropped.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Description {
    /// The SMILES as given.
    pub input_smiles: String,
    /// Descriptors of the kept fragment.
    pub descriptors: Descriptors,
    /// SMILES text of dropped fragments (counter-ions, solvent).
    pub fragments_dropped: Vec<String>,
    /// Note on fragment selection, if any.
    pub note: Option<String>,
}

/// Parses `smiles` and computes every descriptor.
///
/// # Errors
/// Any [`StructureError`] from [`parse_smiles`], and
/// [`StructureError::UnknownMass`] when an element has no tabulated mass.
///
/// # Examples
/// ```
/// use phasewise::structure::describe;
/// let d = describe("CC(=O)Oc1ccccc1C(=O)O").unwrap(); // aspirin
/// assert_eq!(d.descriptors.molecular_formula, "C9H8O4");
/// assert_eq!(d.descriptors.hbond_donors, 1);
/// assert!((d.descriptors.molar_mass_g_mol.unwrap() - 180.159).abs() < 1e-3);
/// ```
pub fn describe(smiles: &str) -> Result<Description, StructureError> {
    let parsed = parse_smiles(smiles)?;
    let descriptors = describe_graph(&parsed.graph);
    if descriptors.molar_mass_g_mol.is_none() {
        let z = parsed
            .graph
            .atoms
            .iter()
            .map(|a| a.atomic_number)
            .find(|&z| super::elements::element(z).is_none())
            .unwrap_or(0);
        return Err(StructureError::UnknownMass { atomic_number: z });
    }
    Ok(Description {
        input_smiles: smiles.to_string(),
        descriptors,
        fragments_dropped: parsed.fragments_dropped,
        note: parsed.note,
    })
}

/// Computes every descriptor of a graph.
///
/// # Panics
/// Only on an inconsistent hand-built graph (a bond or neighbour index out of
/// range); graphs from [`parse_smiles`] are always consistent.
pub fn describe_graph(g: &MolGraph) -> Descriptors {
    // hydrogen counts and valences for every SMARTS-typed descriptor, computed once
    let facts = AtomFacts::new(g);
    let (logp, mr) = crippen::crippen_logp_mr_with(&facts);
    let mcgowan = mcgowan::mcgowan_volume_cm3_mol(g);
    Descriptors {
        molecular_formula: formula::molecular_formula(g),
        molar_mass_g_mol: formula::molar_mass_g_mol(g).ok(),
        monoisotopic_mass_da: formula::monoisotopic_mass_da(g).ok(),
        crippen_logp: logp,
        crippen_molar_refractivity_cm3_mol: mr,
        tpsa_a2: tpsa::tpsa_a2(g),
        hbond_donors: lipinski::hbond_donors_with(&facts),
        hbond_acceptors: lipinski::hbond_acceptors_with(&facts),
        lipinski_nhoh_count: lipinski::lipinski_nhoh_count(g),
        lipinski_no_count: lipinski::lipinski_no_count(g),
        rotatable_bonds: lipinski::rotatable_bonds_with(&facts),
        ring_count: g.rings.len() as u32,
        sssr_count: sssr_count(g),
        aromatic_ring_count: aromatic_ring_count(g),
        fraction_csp3: fraction_csp3(g),
        heavy_atom_count: g.atoms.iter().filter(|a| a.atomic_number != 1).count() as u32,
        heteroatom_count: g
            .atoms
            .iter()
            .filter(|a| a.atomic_number != 1 && a.atomic_number != 6)
            .count() as u32,
        formal_charge: g.atoms.iter().map(|a| i32::from(a.formal_charge)).sum(),
        aromatic_atom_count: g.atoms.iter().filter(|a| a.aromatic).count() as u32,
        hydrogen_count: g
            .atoms
            .iter()
            .map(|a| u32::from(a.hydrogens) + u32::from(a.atomic_number == 1))
            .sum(),
        mcgowan_volume_cm3_mol: mcgowan,
        mcgowan_vx_100cm3_mol: mcgowan.map(|v| v / 100.0),
    }
}

/// Cyclomatic number: bonds − atoms + connected components (the SSSR size).
pub fn sssr_count(g: &MolGraph) -> u32 {
    let n = g.atoms.len();
    let mut seen = vec![false; n];
    let mut components = 0i64;
    for s in 0..n {
        if seen[s] {
            continue;
        }
        components += 1;
        let mut stack = vec![s];
        seen[s] = true;
        while let Some(x) = stack.pop() {
            for &(y, _) in &g.neighbours[x] {
                if !seen[y] {
                    seen[y] = true;
                    stack.push(y);
                }
            }
        }
    }
    (g.bonds.len() as i64 - n as i64 + components).max(0) as u32
}

/// Rings of `g.rings` whose every bond is aromatic (RDKit `CalcNumAromaticRings`).
pub fn aromatic_ring_count(g: &MolGraph) -> u32 {
    g.rings
        .iter()
        .filter(|ring| {
            !ring.is_empty()
                && (0..ring.len()).all(|k| {
                    let (a, b) = (ring[k], ring[(k + 1) % ring.len()]);
                    g.bond_between(a, b)
                        .is_some_and(|bond| g.bonds[bond].order == BondOrder::Aromatic)
                })
        })
        .count() as u32
}

/// Fraction of carbons that are sp3 (RDKit `CalcFractionCSP3`): a carbon with
/// only single bonds and four connections (neighbours plus hydrogens), or a
/// (RDKit's hybridization; a carbanion such as benzyl `[CH2-]` is
/// conjugated and sp2 there, so three-connected carbons never count).
pub fn fraction_csp3(g: &MolGraph) -> f64 {
    let mut carbons = 0u32;
    let mut sp3 = 0u32;
    for (i, a) in g.atoms.iter().enumerate() {
        if a.atomic_number != 6 {
            continue;
        }
        carbons += 1;
        let only_single = g.neighbours[i]
            .iter()
            .all(|&(_, b)| g.bonds[b].order == BondOrder::Single);
        let connections = g.degree(i) + usize::from(a.hydrogens);
        if only_single && connections == 4 {
            sp3 += 1;
        }
    }
    if carbons == 0 {
        0.0
    } else {
        f64::from(sp3) / f64::from(carbons)
    }
}
