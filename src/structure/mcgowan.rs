//! McGowan characteristic volume.
//!
//! Source: M. H. Abraham and J. C. McGowan, "The use of characteristic
//! volumes to measure cavity terms in reversed phase liquid chromatography",
//! Chromatographia 1987, 23, 243–246: V = Σ atom increments − 6.56 × (number
//! of bonds), in cm³/mol, every bond counted once whatever its order (bonds to
//! hydrogen included: B = N_atoms − 1 + rings). Abraham's solute descriptor
//! `Vx` is the same quantity in units of 100 cm³/mol. The atom increments below
//! are the published ones (values "from memory" of the paper's table, checked
//! against the paper's benzene example: Vx = 0.7164).

use super::graph::MolGraph;

/// Volume increment per bond, cm³/mol (Abraham & McGowan 1987).
pub const BOND_INCREMENT_CM3_MOL: f64 = 6.56;

/// Atom increment in cm³/mol, if the paper gives one for this element.
pub fn atom_increment_cm3_mol(z: u8) -> Option<f64> {
    Some(match z {
        1 => 8.71,
        5 => 18.32,
        6 => 16.35,
        7 => 14.39,
        8 => 12.43,
        9 => 10.48,
        14 => 26.83,
        15 => 24.87,
        16 => 22.91,
        17 => 20.95,
        32 => 31.02,
        33 => 29.42,
        34 => 27.81,
        35 => 26.21,
        50 => 39.35,
        51 => 37.74,
        52 => 36.14,
        53 => 34.53,
        80 => 34.00,
        82 => 43.44,
        83 => 42.14,
        _ => return None,
    })
}

/// McGowan characteristic volume in cm³/mol (divide by 100 for Abraham's Vx).
/// `None` when an element has no published increment.
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, mcgowan::mcgowan_volume_cm3_mol};
/// let v = mcgowan_volume_cm3_mol(&parse_smiles("c1ccccc1").unwrap().graph).unwrap();
/// assert!((v - 71.64).abs() < 1e-9); // Abraham & McGowan 1987: benzene Vx 0.7164
/// ```
pub fn mcgowan_volume_cm3_mol(g: &MolGraph) -> Option<f64> {
    let mut v = 0.0;
    let mut n_atoms: usize = 0;
    for a in &g.atoms {
        v += atom_increment_cm3_mol(a.atomic_number)?;
        v += f64::from(a.hydrogens) * atom_increment_cm3_mol(1)?;
        n_atoms += 1 + usize::from(a.hydrogens);
    }
    if n_atoms == 0 {
        return Some(0.0);
    }
    // Bonds: graph bonds plus one per implicit hydrogen.
    let bonds = g.bonds.len()
        + g.atoms
            .iter()
            .map(|a| usize::from(a.hydrogens))
            .sum::<usize>();
    Some(v - BOND_INCREMENT_CM3_MOL * bonds as f64)
}
