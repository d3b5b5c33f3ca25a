//! Topological polar surface area.
//!
//! Source: P. Ertl, B. Rohde and P. Selzer, "Fast Calculation of Molecular
//! Polar Surface Area as a Sum of Fragment-Based Contributions and Its
//! Application to the Prediction of Drug Transport Properties", J. Med. Chem.
//! 2000, 43, 3714–3717, Table 1. Only nitrogen and oxygen contribute, as in
//! RDKit's default `CalcTPSA(includeSandP=False)`. Each N or O is classified
//! by its heavy-atom degree, attached hydrogens, formal charge, counts of
//! single, double, triple and aromatic bonds and membership of a three-membered
//! ring; the table's rows are tried in RDKit's order (`MolSurf.cpp`), and an
//! atom matching no row gets RDKit's fallback estimate
//! (N: 30.5 − 8.2·degree + 1.5·H; O: 28.5 − 8.6·degree + 1.5·H; never below 0).

use super::graph::{BondOrder, MolGraph};

/// TPSA in Å² (N and O contributions).
///
/// # Examples
/// ```
/// use phasewise::structure::{adapter::parse_smiles, tpsa::tpsa_a2};
/// // Acetic acid: O= 17.07 + OH 20.23 (Ertl 2000, Table 1).
/// let g = parse_smiles("CC(=O)O").unwrap().graph;
/// assert!((tpsa_a2(&g) - 37.30).abs() < 1e-9);
/// ```
pub fn tpsa_a2(g: &MolGraph) -> f64 {
    (0..g.atoms.len()).map(|i| atom_tpsa(g, i)).sum()
}

/// One atom's contribution in Å² (zero for atoms other than N and O).
pub fn atom_tpsa(g: &MolGraph, i: usize) -> f64 {
    let a = &g.atoms[i];
    if a.atomic_number != 7 && a.atomic_number != 8 {
        return 0.0;
    }
    let (mut n_single, mut n_double, mut n_triple, mut n_arom) = (0, 0, 0, 0);
    let mut n_h = i32::from(a.hydrogens);
    let mut n_nbrs = 0;
    for &(n, b) in &g.neighbours[i] {
        if g.atoms[n].atomic_number == 1 {
            n_h += 1;
            continue;
        }
        n_nbrs += 1;
        match g.bonds[b].order {
            BondOrder::Single => n_single += 1,
            BondOrder::Double => n_double += 1,
            BondOrder::Triple => n_triple += 1,
            BondOrder::Aromatic => n_arom += 1,
        }
    }
    let chg = i32::from(a.formal_charge);
    let in3 = g.rings.iter().any(|r| r.len() == 3 && r.contains(&i));
    let mut tmp = -1.0;
    if a.atomic_number == 7 {
        match n_nbrs {
            1 => {
                if n_h == 0 && chg == 0 && n_triple == 1 {
                    tmp = 23.79;
                } else if n_h == 1 && chg == 0 && n_double == 1 {
                    tmp = 23.85;
                } else if n_h == 2 && chg == 0 && n_single == 1 {
                    tmp = 26.02;
                } else if n_h == 2 && chg == 1 && n_double == 1 {
                    tmp = 25.59;
                } else if n_h == 3 && chg == 1 && n_single == 1 {
                    tmp = 27.64;
                }
            }
            2 => {
                if n_h == 0 && chg == 0 && n_single == 1 && n_double == 1 {
                    tmp = 12.36;
                } else if n_h == 0 && chg == 0 && n_triple == 1 && n_double == 1 {
                    tmp = 13.60;
                } else if n_h == 1 && chg == 0 && n_single == 2 && in3 {
                    tmp = 21.94;
                } else if n_h == 1 && chg == 0 && n_single == 2 && !in3 {
                    tmp = 12.03;
                } else if n_h == 0 && chg == 1 && n_triple == 1 && n_single == 1 {
                    tmp = 4.36;
                } else if n_h == 1 && chg == 1 && n_double == 1 && n_single == 1 {
                    tmp = 13.97;
                } else if n_h == 2 && chg == 1 && n_single == 2 {
                    tmp = 16.61;
                } else if n_h == 0 && chg == 0 && n_arom == 2 {
                    tmp = 12.89;
                } else if n_h == 1 && chg == 0 && n_arom == 2 {
                    tmp = 15.79;
                } else if n_h == 1 && chg == 1 && n_arom == 2 {
                    tmp = 14.14;
                }
            }
            3 => {
                if n_h == 0 && chg == 0 && n_single == 3 && in3 {
                    tmp = 3.01;
                } else if n_h == 0 && chg == 0 && n_single == 3 && !in3 {
                    tmp = 3.24;
                } else if n_h == 0 && chg == 0 && n_single == 1 && n_double == 2 {
                    tmp = 11.68;
                } else if n_h == 0 && chg == 1 && n_single == 2 && n_double == 1 {
                    tmp = 3.01;
                } else if n_h == 1 && chg == 1 && n_single == 3 {
                    tmp = 4.44;
                } else if n_h == 0 && chg == 0 && n_arom == 3 {
                    tmp = 4.41;
                } else if n_h == 0 && chg == 0 && n_single == 1 && n_arom == 2 {
                    tmp = 4.93;
                } else if n_h == 0 && chg == 0 && n_double == 1 && n_arom == 2 {
                    tmp = 8.39;
                } else if n_h == 0 && chg == 1 && n_arom == 3 {
                    tmp = 4.10;
                } else if n_h == 0 && chg == 1 && n_single == 1 && n_arom == 2 {
                    tmp = 3.88;
                }
            }
            4 if n_h == 0 && chg == 1 && n_single == 4 => {
                tmp = 0.00;
            }
            _ => {}
        }
        if tmp < 0.0 {
            tmp = (30.5 - f64::from(n_nbrs) * 8.2 + f64::from(n_h) * 1.5).max(0.0);
        }
    } else {
        match n_nbrs {
            1 => {
                if n_h == 0 && chg == 0 && n_double == 1 {
                    tmp = 17.07;
                } else if n_h == 1 && chg == 0 && n_single == 1 {
                    tmp = 20.23;
                } else if n_h == 0 && chg == -1 && n_single == 1 {
                    tmp = 23.06;
                }
            }
            2 => {
                if n_h == 0 && chg == 0 && n_single == 2 && in3 {
                    tmp = 12.53;
                } else if n_h == 0 && chg == 0 && n_single == 2 && !in3 {
                    tmp = 9.23;
                } else if n_h == 0 && chg == 0 && n_arom == 2 {
                    tmp = 13.14;
                }
            }
            _ => {}
        }
        if tmp < 0.0 {
            tmp = (28.5 - f64::from(n_nbrs) * 8.6 + f64::from(n_h) * 1.5).max(0.0);
        }
    }
    tmp
}
