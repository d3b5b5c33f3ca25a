//! Molecular formula (Hill order) and masses.
//!
//! Hill order (E. A. Hill, J. Am. Chem. Soc. 1900, 22, 478): C first, H
//! second, then the other elements alphabetically; without carbon, every
//! element alphabetically. The net charge is appended as RDKit's
//! `CalcMolFormula` does: `+`/`-` for ±1, `+2`/`-3` beyond. Isotope labels are
//! counted as their element (RDKit's default, `separateIsotopes=False`).
//!
//! Average molar mass uses the standard atomic weights of
//! [`super::elements`] (RDKit's convention); a labelled atom uses its
//! isotope's mass. Monoisotopic mass uses the most abundant isotope of each
//! element, or the label's isotope, minus the electrons an ion has lost
//! (plus those it has gained), as RDKit's `ExactMolWt`.

use super::elements::{element, isotope_mass_da};
use super::graph::MolGraph;

/// Hill-order formula with the net charge appended, e.g. `C2H4O2`, `C5H12N+`.
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, formula::molecular_formula};
/// let g = parse_smiles("C[NH3+]").unwrap().graph;
/// assert_eq!(molecular_formula(&g), "CH6N+");
/// ```
pub fn molecular_formula(g: &MolGraph) -> String {
    let mut counts = [0u32; 256];
    let mut charge: i32 = 0;
    for a in &g.atoms {
        counts[usize::from(a.atomic_number)] += 1;
        counts[1] += u32::from(a.hydrogens);
        charge += i32::from(a.formal_charge);
    }
    let symbol = |z: usize| -> String {
        u8::try_from(z)
            .ok()
            .and_then(element)
            .map_or_else(|| format!("[#{z}]"), |e| e.symbol.to_string())
    };
    let mut out = String::new();
    let push = |out: &mut String, z: usize, n: u32| {
        out.push_str(&symbol(z));
        if n > 1 {
            out.push_str(&n.to_string());
        }
    };
    let mut others: Vec<(String, usize)> = Vec::new();
    let has_carbon = counts[6] > 0;
    for (z, &n) in counts.iter().enumerate() {
        if n == 0 || (has_carbon && (z == 6 || z == 1)) {
            continue;
        }
        others.push((symbol(z), z));
    }
    others.sort();
    if has_carbon {
        push(&mut out, 6, counts[6]);
        if counts[1] > 0 {
            push(&mut out, 1, counts[1]);
        }
    }
    for (_, z) in others {
        push(&mut out, z, counts[z]);
    }
    if charge > 0 {
        out.push('+');
        if charge > 1 {
            out.push_str(&charge.to_string());
        }
    } else if charge < 0 {
        out.push('-');
        if charge < -1 {
            out.push_str(&(-charge).to_string());
        }
    }
    out
}

/// Average molar mass in g/mol, or the first atomic number without a tabulated mass.
///
/// # Errors
/// `Err(z)` when an atom's element is not in [`super::elements::ELEMENTS`].
pub fn molar_mass_g_mol(g: &MolGraph) -> Result<f64, u8> {
    mass(g, false)
}

/// Monoisotopic mass in Da, or the first atomic number without a tabulated mass.
///
/// As RDKit's `ExactMolWt`, the mass of the ion: one electron mass
/// ([`ELECTRON_MASS_DA`]) is subtracted per positive charge and added per
/// negative charge.
///
/// # Errors
/// `Err(z)` when an atom's element is not in [`super::elements::ELEMENTS`].
pub fn monoisotopic_mass_da(g: &MolGraph) -> Result<f64, u8> {
    mass(g, true)
}

/// Electron mass, Da (CODATA 2018: 5.48579909065e-4 u).
pub const ELECTRON_MASS_DA: f64 = 5.485_799_090_65e-4;

fn mass(g: &MolGraph, exact: bool) -> Result<f64, u8> {
    let h = element(1).ok_or(1u8)?;
    let h_mass = if exact {
        h.monoisotopic_mass_da
    } else {
        h.average_mass_g_mol
    };
    let mut total = 0.0;
    for a in &g.atoms {
        let e = element(a.atomic_number).ok_or(a.atomic_number)?;
        total += match a.isotope {
            Some(mass_number) => isotope_mass_da(a.atomic_number, mass_number),
            None if exact => e.monoisotopic_mass_da,
            None => e.average_mass_g_mol,
        };
        total += f64::from(a.hydrogens) * h_mass;
        if exact {
            total -= f64::from(a.formal_charge) * ELECTRON_MASS_DA;
        }
    }
    Ok(total)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::adapter::parse_smiles;

    #[test]
    fn hill_order_and_charge() {
        let f = |s: &str| molecular_formula(&parse_smiles(s).unwrap().graph);
        assert_eq!(f("CCO"), "C2H6O");
        assert_eq!(f("O"), "H2O");
        assert_eq!(f("ClCBr"), "CH2BrCl");
        assert_eq!(f("[O-]C(=O)CC(=O)[O-]"), "C3H2O4-2");
        assert_eq!(f("N[Si](Cl)(Cl)Cl"), "Cl3H2NSi");
    }

    #[test]
    fn masses() {
        // Acetic acid: 2*12.011 + 4*1.008 + 2*15.999 = 60.052 (RDKit MolWt 60.052).
        let g = parse_smiles("CC(=O)O").unwrap().graph;
        assert!((molar_mass_g_mol(&g).unwrap() - 60.052).abs() < 1e-9);
        assert!((monoisotopic_mass_da(&g).unwrap() - 60.021129).abs() < 1e-5);
        let d = parse_smiles("[2H]C([2H])([2H])O").unwrap().graph;
        assert!((molar_mass_g_mol(&d).unwrap() - 35.061).abs() < 1e-3);
    }
}
