//! Plain words for enum values that reach output: the value's serde name (snake_case, as in
//! the JSON) with underscores as spaces, e.g. `AromaticCarboxylicAcid` → "aromatic carboxylic
//! acid", `SuitableAfterDerivatisation` → "suitable after derivatisation". One rule for every
//! enum, so no internal (Rust) name is ever printed.

use serde::Serialize;

/// Plain words of a unit-variant enum value (or any value serialising to a string); falls back
/// to "unknown" for values that do not serialise to a string.
pub fn words<T: Serialize + ?Sized>(v: &T) -> String {
    match serde_json::to_value(v) {
        Ok(serde_json::Value::String(s)) => s.replace('_', " "),
        _ => "unknown".to_string(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::structure::ionisable::{GroupClass, SiteKind};
    use crate::structure::volatility::GcVerdict;

    #[test]
    fn enum_values_become_plain_words() {
        assert_eq!(
            words(&GroupClass::AromaticCarboxylicAcid),
            "aromatic carboxylic acid"
        );
        assert_eq!(words(&GroupClass::WeakAzoleNitrogen), "weak azole nitrogen");
        assert_eq!(
            words(&GcVerdict::SuitableAfterDerivatisation),
            "suitable after derivatisation"
        );
        assert_eq!(words(&SiteKind::PermanentCation), "permanent cation");
        // no capital letter survives from a Rust name
        assert!(
            !words(&GroupClass::QuaternaryAmmonium)
                .chars()
                .any(char::is_uppercase)
        );
    }
}
