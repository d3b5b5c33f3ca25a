//! The project's own element table: symbols, standard atomic weights and
//! monoisotopic masses, H (1) to U (92).
//!
//! **Average masses** follow the convention of RDKit's periodic table
//! (`Code/GraphMol/atomic_data.cpp`, BSD licence), because the project's
//! reference values come from RDKit 2026.09.1 (`tests/data/README.md`). RDKit
//! keeps older IUPAC conventional weights rounded to three decimals for some
//! elements (S 32.067 rather than IUPAC 2013's 32.06; B 10.812; Se 78.96;
//! Zn 65.39). The values for C, H, N, O, F, P, S, Cl, Br and I are confirmed by
//! the reference test (every molar mass of the 2,000 reference molecules
//! agrees within 0.001 g/mol); the other elements' values are "from memory"
//! of RDKit's table and IUPAC conventional weights, unchecked.
//!
//! **Monoisotopic masses** are the masses of each element's most abundant
//! isotope (AME/NIST atomic-mass evaluation values, "from memory"; C, H, N, O,
//! F, P, S, Cl, Br, I are confirmed by the reference test against RDKit's
//! `ExactMolWt`).
//!
//! Isotope-labelled atoms (`[13C]`, `[2H]`) use the mass of that isotope for
//! both averages and exact masses, as RDKit does; [`isotope_mass_da`] covers
//! the common labels and otherwise approximates a nuclide by its mass number.

/// One element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Atomic number.
    pub atomic_number: u8,
    /// Symbol, e.g. `Cl`.
    pub symbol: &'static str,
    /// Standard atomic weight (RDKit convention), g/mol.
    pub average_mass_g_mol: f64,
    /// Mass of the most abundant isotope, Da.
    pub monoisotopic_mass_da: f64,
    /// Mass number of the most abundant isotope.
    pub most_abundant_mass_number: u16,
}

/// The table, indexed by atomic number minus one.
pub const ELEMENTS: &[Element] = &[
    Element {
        atomic_number: 1,
        symbol: "H",
        average_mass_g_mol: 1.008,
        monoisotopic_mass_da: 1.00782503223,
        most_abundant_mass_number: 1,
    },
    Element {
        atomic_number: 2,
        symbol: "He",
        average_mass_g_mol: 4.003,
        monoisotopic_mass_da: 4.00260325413,
        most_abundant_mass_number: 4,
    },
    Element {
        atomic_number: 3,
        symbol: "Li",
        average_mass_g_mol: 6.941,
        monoisotopic_mass_da: 7.0160034366,
        most_abundant_mass_number: 7,
    },
    Element {
        atomic_number: 4,
        symbol: "Be",
        average_mass_g_mol: 9.012,
        monoisotopic_mass_da: 9.012183065,
        most_abundant_mass_number: 9,
    },
    Element {
        atomic_number: 5,
        symbol: "B",
        average_mass_g_mol: 10.812,
        monoisotopic_mass_da: 11.00930536,
        most_abundant_mass_number: 11,
    },
    Element {
        atomic_number: 6,
        symbol: "C",
        average_mass_g_mol: 12.011,
        monoisotopic_mass_da: 12.0,
        most_abundant_mass_number: 12,
    },
    Element {
        atomic_number: 7,
        symbol: "N",
        average_mass_g_mol: 14.007,
        monoisotopic_mass_da: 14.00307400443,
        most_abundant_mass_number: 14,
    },
    Element {
        atomic_number: 8,
        symbol: "O",
        average_mass_g_mol: 15.999,
        monoisotopic_mass_da: 15.99491461957,
        most_abundant_mass_number: 16,
    },
    Element {
        atomic_number: 9,
        symbol: "F",
        average_mass_g_mol: 18.998,
        monoisotopic_mass_da: 18.99840316273,
        most_abundant_mass_number: 19,
    },
    Element {
        atomic_number: 10,
        symbol: "Ne",
        average_mass_g_mol: 20.18,
        monoisotopic_mass_da: 19.9924401762,
        most_abundant_mass_number: 20,
    },
    Element {
        atomic_number: 11,
        symbol: "Na",
        average_mass_g_mol: 22.99,
        monoisotopic_mass_da: 22.989769282,
        most_abundant_mass_number: 23,
    },
    Element {
        atomic_number: 12,
        symbol: "Mg",
        average_mass_g_mol: 24.305,
        monoisotopic_mass_da: 23.985041697,
        most_abundant_mass_number: 24,
    },
    Element {
        atomic_number: 13,
        symbol: "Al",
        average_mass_g_mol: 26.982,
        monoisotopic_mass_da: 26.98153853,
        most_abundant_mass_number: 27,
    },
    Element {
        atomic_number: 14,
        symbol: "Si",
        average_mass_g_mol: 28.086,
        monoisotopic_mass_da: 27.97692653465,
        most_abundant_mass_number: 28,
    },
    Element {
        atomic_number: 15,
        symbol: "P",
        average_mass_g_mol: 30.974,
        monoisotopic_mass_da: 30.97376199842,
        most_abundant_mass_number: 31,
    },
    Element {
        atomic_number: 16,
        symbol: "S",
        average_mass_g_mol: 32.067,
        monoisotopic_mass_da: 31.9720711744,
        most_abundant_mass_number: 32,
    },
    Element {
        atomic_number: 17,
        symbol: "Cl",
        average_mass_g_mol: 35.453,
        monoisotopic_mass_da: 34.968852682,
        most_abundant_mass_number: 35,
    },
    Element {
        atomic_number: 18,
        symbol: "Ar",
        average_mass_g_mol: 39.948,
        monoisotopic_mass_da: 39.9623831237,
        most_abundant_mass_number: 40,
    },
    Element {
        atomic_number: 19,
        symbol: "K",
        average_mass_g_mol: 39.098,
        monoisotopic_mass_da: 38.9637064864,
        most_abundant_mass_number: 39,
    },
    Element {
        atomic_number: 20,
        symbol: "Ca",
        average_mass_g_mol: 40.078,
        monoisotopic_mass_da: 39.962590863,
        most_abundant_mass_number: 40,
    },
    Element {
        atomic_number: 21,
        symbol: "Sc",
        average_mass_g_mol: 44.956,
        monoisotopic_mass_da: 44.95590828,
        most_abundant_mass_number: 45,
    },
    Element {
        atomic_number: 22,
        symbol: "Ti",
        average_mass_g_mol: 47.867,
        monoisotopic_mass_da: 47.94794198,
        most_abundant_mass_number: 48,
    },
    Element {
        atomic_number: 23,
        symbol: "V",
        average_mass_g_mol: 50.942,
        monoisotopic_mass_da: 50.94395704,
        most_abundant_mass_number: 51,
    },
    Element {
        atomic_number: 24,
        symbol: "Cr",
        average_mass_g_mol: 51.996,
        monoisotopic_mass_da: 51.94050623,
        most_abundant_mass_number: 52,
    },
    Element {
        atomic_number: 25,
        symbol: "Mn",
        average_mass_g_mol: 54.938,
        monoisotopic_mass_da: 54.93804391,
        most_abundant_mass_number: 55,
    },
    Element {
        atomic_number: 26,
        symbol: "Fe",
        average_mass_g_mol: 55.845,
        monoisotopic_mass_da: 55.93493633,
        most_abundant_mass_number: 56,
    },
    Element {
        atomic_number: 27,
        symbol: "Co",
        average_mass_g_mol: 58.933,
        monoisotopic_mass_da: 58.93319429,
        most_abundant_mass_number: 59,
    },
    Element {
        atomic_number: 28,
        symbol: "Ni",
        average_mass_g_mol: 58.693,
        monoisotopic_mass_da: 57.93534241,
        most_abundant_mass_number: 58,
    },
    Element {
        atomic_number: 29,
        symbol: "Cu",
        average_mass_g_mol: 63.546,
        monoisotopic_mass_da: 62.92959772,
        most_abundant_mass_number: 63,
    },
    Element {
        atomic_number: 30,
        symbol: "Zn",
        average_mass_g_mol: 65.39,
        monoisotopic_mass_da: 63.92914201,
        most_abundant_mass_number: 64,
    },
    Element {
        atomic_number: 31,
        symbol: "Ga",
        average_mass_g_mol: 69.723,
        monoisotopic_mass_da: 68.9255735,
        most_abundant_mass_number: 69,
    },
    Element {
        atomic_number: 32,
        symbol: "Ge",
        average_mass_g_mol: 72.61,
        monoisotopic_mass_da: 73.921177761,
        most_abundant_mass_number: 74,
    },
    Element {
        atomic_number: 33,
        symbol: "As",
        average_mass_g_mol: 74.922,
        monoisotopic_mass_da: 74.92159457,
        most_abundant_mass_number: 75,
    },
    Element {
        atomic_number: 34,
        symbol: "Se",
        average_mass_g_mol: 78.96,
        monoisotopic_mass_da: 79.9165218,
        most_abundant_mass_number: 80,
    },
    Element {
        atomic_number: 35,
        symbol: "Br",
        average_mass_g_mol: 79.904,
        monoisotopic_mass_da: 78.9183376,
        most_abundant_mass_number: 79,
    },
    Element {
        atomic_number: 36,
        symbol: "Kr",
        average_mass_g_mol: 83.8,
        monoisotopic_mass_da: 83.9114977282,
        most_abundant_mass_number: 84,
    },
    Element {
        atomic_number: 37,
        symbol: "Rb",
        average_mass_g_mol: 85.468,
        monoisotopic_mass_da: 84.9117897379,
        most_abundant_mass_number: 85,
    },
    Element {
        atomic_number: 38,
        symbol: "Sr",
        average_mass_g_mol: 87.62,
        monoisotopic_mass_da: 87.9056125,
        most_abundant_mass_number: 88,
    },
    Element {
        atomic_number: 39,
        symbol: "Y",
        average_mass_g_mol: 88.906,
        monoisotopic_mass_da: 88.9058403,
        most_abundant_mass_number: 89,
    },
    Element {
        atomic_number: 40,
        symbol: "Zr",
        average_mass_g_mol: 91.224,
        monoisotopic_mass_da: 89.9046977,
        most_abundant_mass_number: 90,
    },
    Element {
        atomic_number: 41,
        symbol: "Nb",
        average_mass_g_mol: 92.906,
        monoisotopic_mass_da: 92.906373,
        most_abundant_mass_number: 93,
    },
    Element {
        atomic_number: 42,
        symbol: "Mo",
        average_mass_g_mol: 95.94,
        monoisotopic_mass_da: 97.90540482,
        most_abundant_mass_number: 98,
    },
    Element {
        atomic_number: 43,
        symbol: "Tc",
        average_mass_g_mol: 98.0,
        monoisotopic_mass_da: 97.9072124,
        most_abundant_mass_number: 98,
    },
    Element {
        atomic_number: 44,
        symbol: "Ru",
        average_mass_g_mol: 101.07,
        monoisotopic_mass_da: 101.9043441,
        most_abundant_mass_number: 102,
    },
    Element {
        atomic_number: 45,
        symbol: "Rh",
        average_mass_g_mol: 102.906,
        monoisotopic_mass_da: 102.905498,
        most_abundant_mass_number: 103,
    },
    Element {
        atomic_number: 46,
        symbol: "Pd",
        average_mass_g_mol: 106.42,
        monoisotopic_mass_da: 105.9034804,
        most_abundant_mass_number: 106,
    },
    Element {
        atomic_number: 47,
        symbol: "Ag",
        average_mass_g_mol: 107.868,
        monoisotopic_mass_da: 106.9050916,
        most_abundant_mass_number: 107,
    },
    Element {
        atomic_number: 48,
        symbol: "Cd",
        average_mass_g_mol: 112.411,
        monoisotopic_mass_da: 113.90336509,
        most_abundant_mass_number: 114,
    },
    Element {
        atomic_number: 49,
        symbol: "In",
        average_mass_g_mol: 114.818,
        monoisotopic_mass_da: 114.903878776,
        most_abundant_mass_number: 115,
    },
    Element {
        atomic_number: 50,
        symbol: "Sn",
        average_mass_g_mol: 118.71,
        monoisotopic_mass_da: 119.90220163,
        most_abundant_mass_number: 120,
    },
    Element {
        atomic_number: 51,
        symbol: "Sb",
        average_mass_g_mol: 121.76,
        monoisotopic_mass_da: 120.903812,
        most_abundant_mass_number: 121,
    },
    Element {
        atomic_number: 52,
        symbol: "Te",
        average_mass_g_mol: 127.6,
        monoisotopic_mass_da: 129.906222748,
        most_abundant_mass_number: 130,
    },
    Element {
        atomic_number: 53,
        symbol: "I",
        average_mass_g_mol: 126.904,
        monoisotopic_mass_da: 126.9044719,
        most_abundant_mass_number: 127,
    },
    Element {
        atomic_number: 54,
        symbol: "Xe",
        average_mass_g_mol: 131.29,
        monoisotopic_mass_da: 131.9041550856,
        most_abundant_mass_number: 132,
    },
    Element {
        atomic_number: 55,
        symbol: "Cs",
        average_mass_g_mol: 132.905,
        monoisotopic_mass_da: 132.905451961,
        most_abundant_mass_number: 133,
    },
    Element {
        atomic_number: 56,
        symbol: "Ba",
        average_mass_g_mol: 137.328,
        monoisotopic_mass_da: 137.905247,
        most_abundant_mass_number: 138,
    },
    Element {
        atomic_number: 57,
        symbol: "La",
        average_mass_g_mol: 138.906,
        monoisotopic_mass_da: 138.9063563,
        most_abundant_mass_number: 139,
    },
    Element {
        atomic_number: 58,
        symbol: "Ce",
        average_mass_g_mol: 140.116,
        monoisotopic_mass_da: 139.9054431,
        most_abundant_mass_number: 140,
    },
    Element {
        atomic_number: 59,
        symbol: "Pr",
        average_mass_g_mol: 140.908,
        monoisotopic_mass_da: 140.9076576,
        most_abundant_mass_number: 141,
    },
    Element {
        atomic_number: 60,
        symbol: "Nd",
        average_mass_g_mol: 144.24,
        monoisotopic_mass_da: 141.907729,
        most_abundant_mass_number: 142,
    },
    Element {
        atomic_number: 61,
        symbol: "Pm",
        average_mass_g_mol: 145.0,
        monoisotopic_mass_da: 144.9127559,
        most_abundant_mass_number: 145,
    },
    Element {
        atomic_number: 62,
        symbol: "Sm",
        average_mass_g_mol: 150.36,
        monoisotopic_mass_da: 151.9197397,
        most_abundant_mass_number: 152,
    },
    Element {
        atomic_number: 63,
        symbol: "Eu",
        average_mass_g_mol: 151.964,
        monoisotopic_mass_da: 152.921238,
        most_abundant_mass_number: 153,
    },
    Element {
        atomic_number: 64,
        symbol: "Gd",
        average_mass_g_mol: 157.25,
        monoisotopic_mass_da: 157.9241123,
        most_abundant_mass_number: 158,
    },
    Element {
        atomic_number: 65,
        symbol: "Tb",
        average_mass_g_mol: 158.925,
        monoisotopic_mass_da: 158.9253547,
        most_abundant_mass_number: 159,
    },
    Element {
        atomic_number: 66,
        symbol: "Dy",
        average_mass_g_mol: 162.5,
        monoisotopic_mass_da: 163.9291819,
        most_abundant_mass_number: 164,
    },
    Element {
        atomic_number: 67,
        symbol: "Ho",
        average_mass_g_mol: 164.93,
        monoisotopic_mass_da: 164.9303288,
        most_abundant_mass_number: 165,
    },
    Element {
        atomic_number: 68,
        symbol: "Er",
        average_mass_g_mol: 167.26,
        monoisotopic_mass_da: 165.9302995,
        most_abundant_mass_number: 166,
    },
    Element {
        atomic_number: 69,
        symbol: "Tm",
        average_mass_g_mol: 168.934,
        monoisotopic_mass_da: 168.9342179,
        most_abundant_mass_number: 169,
    },
    Element {
        atomic_number: 70,
        symbol: "Yb",
        average_mass_g_mol: 173.04,
        monoisotopic_mass_da: 173.9388664,
        most_abundant_mass_number: 174,
    },
    Element {
        atomic_number: 71,
        symbol: "Lu",
        average_mass_g_mol: 174.967,
        monoisotopic_mass_da: 174.9407752,
        most_abundant_mass_number: 175,
    },
    Element {
        atomic_number: 72,
        symbol: "Hf",
        average_mass_g_mol: 178.49,
        monoisotopic_mass_da: 179.946557,
        most_abundant_mass_number: 180,
    },
    Element {
        atomic_number: 73,
        symbol: "Ta",
        average_mass_g_mol: 180.948,
        monoisotopic_mass_da: 180.9479958,
        most_abundant_mass_number: 181,
    },
    Element {
        atomic_number: 74,
        symbol: "W",
        average_mass_g_mol: 183.84,
        monoisotopic_mass_da: 183.95093092,
        most_abundant_mass_number: 184,
    },
    Element {
        atomic_number: 75,
        symbol: "Re",
        average_mass_g_mol: 186.207,
        monoisotopic_mass_da: 186.9557501,
        most_abundant_mass_number: 187,
    },
    Element {
        atomic_number: 76,
        symbol: "Os",
        average_mass_g_mol: 190.23,
        monoisotopic_mass_da: 191.961477,
        most_abundant_mass_number: 192,
    },
    Element {
        atomic_number: 77,
        symbol: "Ir",
        average_mass_g_mol: 192.217,
        monoisotopic_mass_da: 192.9629216,
        most_abundant_mass_number: 193,
    },
    Element {
        atomic_number: 78,
        symbol: "Pt",
        average_mass_g_mol: 195.078,
        monoisotopic_mass_da: 194.9647917,
        most_abundant_mass_number: 195,
    },
    Element {
        atomic_number: 79,
        symbol: "Au",
        average_mass_g_mol: 196.967,
        monoisotopic_mass_da: 196.96656879,
        most_abundant_mass_number: 197,
    },
    Element {
        atomic_number: 80,
        symbol: "Hg",
        average_mass_g_mol: 200.59,
        monoisotopic_mass_da: 201.9706434,
        most_abundant_mass_number: 202,
    },
    Element {
        atomic_number: 81,
        symbol: "Tl",
        average_mass_g_mol: 204.383,
        monoisotopic_mass_da: 204.9744278,
        most_abundant_mass_number: 205,
    },
    Element {
        atomic_number: 82,
        symbol: "Pb",
        average_mass_g_mol: 207.2,
        monoisotopic_mass_da: 207.9766525,
        most_abundant_mass_number: 208,
    },
    Element {
        atomic_number: 83,
        symbol: "Bi",
        average_mass_g_mol: 208.98,
        monoisotopic_mass_da: 208.9803991,
        most_abundant_mass_number: 209,
    },
    Element {
        atomic_number: 84,
        symbol: "Po",
        average_mass_g_mol: 209.0,
        monoisotopic_mass_da: 208.9824308,
        most_abundant_mass_number: 209,
    },
    Element {
        atomic_number: 85,
        symbol: "At",
        average_mass_g_mol: 210.0,
        monoisotopic_mass_da: 209.9871479,
        most_abundant_mass_number: 210,
    },
    Element {
        atomic_number: 86,
        symbol: "Rn",
        average_mass_g_mol: 222.0,
        monoisotopic_mass_da: 222.0175782,
        most_abundant_mass_number: 222,
    },
    Element {
        atomic_number: 87,
        symbol: "Fr",
        average_mass_g_mol: 223.0,
        monoisotopic_mass_da: 223.019736,
        most_abundant_mass_number: 223,
    },
    Element {
        atomic_number: 88,
        symbol: "Ra",
        average_mass_g_mol: 226.0,
        monoisotopic_mass_da: 226.0254103,
        most_abundant_mass_number: 226,
    },
    Element {
        atomic_number: 89,
        symbol: "Ac",
        average_mass_g_mol: 227.0,
        monoisotopic_mass_da: 227.0277523,
        most_abundant_mass_number: 227,
    },
    Element {
        atomic_number: 90,
        symbol: "Th",
        average_mass_g_mol: 232.038,
        monoisotopic_mass_da: 232.0380558,
        most_abundant_mass_number: 232,
    },
    Element {
        atomic_number: 91,
        symbol: "Pa",
        average_mass_g_mol: 231.036,
        monoisotopic_mass_da: 231.0358842,
        most_abundant_mass_number: 231,
    },
    Element {
        atomic_number: 92,
        symbol: "U",
        average_mass_g_mol: 238.029,
        monoisotopic_mass_da: 238.0507884,
        most_abundant_mass_number: 238,
    },
];

/// The element with atomic number `z`, if in the table.
///
/// # Examples
/// ```
/// use phasewise::structure::elements::element;
/// assert_eq!(element(6).map(|e| e.symbol), Some("C"));
/// assert!(element(0).is_none());
/// ```
pub fn element(z: u8) -> Option<&'static Element> {
    if z == 0 {
        return None;
    }
    ELEMENTS.get(usize::from(z) - 1)
}

/// The element with this symbol (case-sensitive, e.g. `Cl`).
pub fn element_by_symbol(symbol: &str) -> Option<&'static Element> {
    ELEMENTS.iter().find(|e| e.symbol == symbol)
}

/// Mass of a specific nuclide (atomic number `z`, mass number `a`), Da.
///
/// Exact values for common labels (AME 2016, from memory); any other nuclide
/// is approximated by its mass number (error below 0.1 Da for light nuclides),
/// which is what a label without a tabulated mass can honestly give.
pub fn isotope_mass_da(z: u8, a: u16) -> f64 {
    let exact = match (z, a) {
        (1, 1) => Some(1.00782503223),
        (1, 2) => Some(2.01410177812),
        (1, 3) => Some(3.0160492779),
        (6, 11) => Some(11.0114336),
        (6, 12) => Some(12.0),
        (6, 13) => Some(13.00335483507),
        (6, 14) => Some(14.0032419884),
        (7, 14) => Some(14.00307400443),
        (7, 15) => Some(15.00010889888),
        (8, 16) => Some(15.99491461957),
        (8, 17) => Some(16.99913175650),
        (8, 18) => Some(17.99915961286),
        (9, 18) => Some(18.0009380),
        (9, 19) => Some(18.99840316273),
        (15, 31) => Some(30.97376199842),
        (15, 32) => Some(31.97390764),
        (16, 32) => Some(31.9720711744),
        (16, 34) => Some(33.967867004),
        (16, 35) => Some(34.96903231),
        (17, 35) => Some(34.968852682),
        (17, 37) => Some(36.965902602),
        (35, 79) => Some(78.9183376),
        (35, 81) => Some(80.9162897),
        (53, 123) => Some(122.9055898),
        (53, 125) => Some(124.9046294),
        (53, 127) => Some(126.9044719),
        (53, 131) => Some(130.9061263),
        _ => None,
    };
    exact.unwrap_or(f64::from(a))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn table_is_indexed_by_atomic_number() {
        for (i, e) in ELEMENTS.iter().enumerate() {
            assert_eq!(usize::from(e.atomic_number), i + 1, "{}", e.symbol);
            assert!(e.average_mass_g_mol > 0.9 && e.monoisotopic_mass_da > 0.9);
            // Average and most-abundant masses stay within 3 Da of each other
            // for every element up to U (common knowledge, no source).
            assert!(
                (e.average_mass_g_mol - e.monoisotopic_mass_da).abs() < 3.0,
                "{}",
                e.symbol
            );
        }
        assert_eq!(ELEMENTS.len(), 92);
    }

    #[test]
    fn rdkit_convention_values() {
        // RDKit atomic_data.cpp values (confirmed by the reference molar masses).
        assert_eq!(
            element_by_symbol("S").map(|e| e.average_mass_g_mol),
            Some(32.067)
        );
        assert_eq!(
            element_by_symbol("Cl").map(|e| e.average_mass_g_mol),
            Some(35.453)
        );
        assert_eq!(element(1).map(|e| e.average_mass_g_mol), Some(1.008));
    }
}
