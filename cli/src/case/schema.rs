//! JSON Schema of the case file (`boreflux schema`), generated from the raw structs.

use super::raw::RawCase;

/// The JSON Schema (draft 2020-12) of the case file. Quantities are "number or string"
/// with a pattern, and their descriptions list the accepted units.
pub fn schema() -> serde_json::Value {
    schemars::schema_for!(RawCase).to_value()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn schema_lists_sections_and_drives() {
        let s = schema();
        let props = s["properties"].as_object().unwrap();
        for key in ["well", "pack", "formation", "drive", "duration", "numerics"] {
            assert!(props.contains_key(key), "{key}");
        }
        let required: Vec<&str> = s["required"]
            .as_array()
            .unwrap()
            .iter()
            .map(|v| v.as_str().unwrap())
            .collect();
        // `duration` may be left out for a schedule (the sum of its stages).
        assert_eq!(required, ["well", "pack", "formation", "drive"]);
        assert_eq!(s["additionalProperties"], false);
        let kinds: Vec<&str> = props["drive"]["oneOf"]
            .as_array()
            .unwrap()
            .iter()
            .map(|d| d["properties"]["kind"]["const"].as_str().unwrap())
            .collect();
        assert_eq!(
            kinds,
            [
                "sine_head",
                "constant_rate",
                "slug",
                "table",
                "surge_block",
                "swab",
                "pump_backwash",
                "jet_pulse",
                "schedule"
            ]
        );
        let length = &s["$defs"]["Length"];
        assert!(length["description"]
            .as_str()
            .unwrap()
            .contains("m, cm, mm, in, ft"));
    }
}
