//! The reference catalogue of the plan and the text it is matched against.

use std::fmt::Write as _;

use super::is_lc;
use crate::report::advice::AdviceReport;

/// Reference catalogue: key, the words that show the method or data set was used, citation.
pub(super) struct RefEntry {
    pub(super) key: &'static str,
    pub(super) needles: &'static [&'static str],
    pub(super) citation: &'static str,
}

pub(super) const REFERENCES: &[RefEntry] = &[
    RefEntry {
        key: "pubchem-chemicals",
        needles: &["chemicals", "pubchem"],
        citation: "Compound identifiers, names and structures: PubChem (public domain, US \
                   National Library of Medicine) as packaged in the `chemicals` Python package \
                   by C. Bell and contributors (MIT licence).",
    },
    RefEntry {
        key: "wikidata",
        needles: &["wikidata"],
        citation: "Wikidata property values (boiling point, logP), CC0 1.0, via the \
                   `chemicals` package.",
    },
    RefEntry {
        key: "pka-ccby",
        needles: &["baltruschat", "czodrowski", "pka-ccby"],
        citation: "Experimental pKa: M. Baltruschat, P. Czodrowski, \"Machine learning meets \
                   pKa\", F1000Research 9:113 (2020), data CC BY 4.0 (only rows under that \
                   licence are used).",
    },
    RefEntry {
        key: "crippen",
        needles: &["crippen"],
        citation: "logP and molar refractivity estimates: S. A. Wildman, G. M. Crippen, J. \
                   Chem. Inf. Comput. Sci. 39 (1999) 868-873 (atom contributions).",
    },
    RefEntry {
        key: "ertl",
        needles: &["ertl", "tpsa"],
        citation: "Polar surface area: P. Ertl, B. Rohde, P. Selzer, J. Med. Chem. 43 (2000) \
                   3714-3717 (topological PSA).",
    },
    RefEntry {
        key: "joback",
        needles: &["joback"],
        citation: "Boiling point estimates: K. G. Joback, R. C. Reid, Chem. Eng. Commun. 57 \
                   (1987) 233-243 (group contributions).",
    },
    RefEntry {
        key: "report",
        needles: &["report", "memory", "descriptor", "lc-regression"],
        citation: "Open retention data used to train and check the LC retention model: RepoRT, \
                   F. Kretschmer et al., Nature Methods (2024), CC BY-SA 4.0.",
    },
    RefEntry {
        key: "gradient",
        needles: &["gradient", "lss", "snyder"],
        citation: "Gradient retention and peak width from the linear-solvent-strength model: \
                   L. R. Snyder, J. W. Dolan, High-Performance Gradient Elution, Wiley (2007).",
    },
    RefEntry {
        key: "mcreynolds",
        needles: &["mcreynolds", "retention-index", "gc-"],
        citation: "GC phase polarity constants: W. O. McReynolds, J. Chromatogr. Sci. 8 (1970) \
                   685-691.",
    },
    RefEntry {
        key: "kovats",
        needles: &["retention-index", "kovats", "van den dool"],
        citation: "Retention indices: E. Kováts, Helv. Chim. Acta 41 (1958) 1915-1932; \
                   temperature-programmed form: H. van den Dool, P. D. Kratz, J. Chromatogr. 11 \
                   (1963) 463-471.",
    },
    RefEntry {
        key: "ionisation",
        needles: &["ionisation", "henderson", "logd"],
        citation: "Ionisation and logD: Henderson-Hasselbalch relation with the pH-partition \
                   hypothesis (independent sites); see A. Avdeef, Absorption and Drug \
                   Development, Wiley (2012), ch. 3-4.",
    },
];

/// Lower-cased text of everything in the report that can name a method or data source.
pub(super) fn provenance_haystack(report: &AdviceReport) -> String {
    let mut h = String::new();
    for a in &report.analytes {
        for p in &a.properties {
            let _ = write!(h, " {} {} {}", p.property, p.source, p.licence);
        }
        if a.ionisation.is_some() {
            h.push_str(" ionisation");
        }
    }
    let recs = report
        .recommendations
        .iter()
        .chain(report.backup.as_ref().map(|b| &b.recommendation));
    for r in recs {
        let _ = write!(h, " {}-{}", r.mode, r.phase.id);
        if is_lc(&r.mode) && r.conditions.program.len() > 1 {
            h.push_str(" gradient");
        }
        for p in &r.predictions {
            let _ = write!(h, " {}", p.path);
        }
        for reason in &r.reasons {
            let _ = write!(h, " {}", reason.source);
        }
    }
    h.to_lowercase()
}
