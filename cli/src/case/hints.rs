//! "Did you mean …?" hints for misspelt keys and names, by edit distance.

/// Edit distance between `a` and `b`, counted in characters, letter case ignored: the
/// optimal-string-alignment distance (Levenshtein's insertions, deletions and substitutions,
/// and a swap of two neighbouring letters as one edit, the commonest slip: `pcv` → `pvc`;
/// the `strsim` crate's, which clap's suggestions use too).
pub fn edit_distance(a: &str, b: &str) -> usize {
    strsim::osa_distance(&a.to_lowercase(), &b.to_lowercase())
}

/// The candidate closest to `word`, if it is close enough to be a likely misspelling: at
/// most one edit per three characters (at least one, at most three), or `word` is a
/// prefix of it of three or more characters (`freq` → `frequency`).
pub fn closest<'a>(word: &str, candidates: &[&'a str]) -> Option<&'a str> {
    let limit = (word.chars().count() / 3).clamp(1, 3);
    let best = candidates
        .iter()
        .map(|c| (edit_distance(word, c), *c))
        .min_by_key(|&(d, _)| d);
    match best {
        Some((d, c)) if d <= limit => Some(c),
        _ => {
            let lower = word.to_lowercase();
            candidates
                .iter()
                .copied()
                .find(|c| lower.chars().count() >= 3 && c.starts_with(&lower))
        }
    }
}

/// `did you mean `x`?` for `word` among `candidates`, or the list of candidates when none
/// is close.
pub fn suggestion(word: &str, candidates: &[&str]) -> String {
    match closest(word, candidates) {
        Some(c) => format!("did you mean `{c}`?"),
        None if candidates.is_empty() => "this section takes no keys".to_owned(),
        None => format!("expected one of: {}", candidates.join(", ")),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn edit_distance_works() {
        // Textbook example: kitten → sitting takes 3 edits (common practice, no source).
        assert_eq!(edit_distance("kitten", "sitting"), 3);
        assert_eq!(edit_distance("", "abc"), 3);
        assert_eq!(edit_distance("Porosity", "porosity"), 0);
        assert_eq!(edit_distance("porosty", "porosity"), 1);
        // Counted in characters, not bytes: one substitution of a two-byte letter.
        assert_eq!(edit_distance("bär", "bar"), 1);
        // A swap of neighbouring letters is one edit (Levenshtein would count two).
        assert_eq!(edit_distance("pcv", "pvc"), 1);
        assert_eq!(edit_distance("porostiy", "porosity"), 1);
    }

    #[test]
    fn closest_works() {
        let keys = ["outer_radius", "porosity", "conductivity", "d50"];
        assert_eq!(closest("porosty", &keys), Some("porosity"));
        assert_eq!(closest("conductivty", &keys), Some("conductivity"));
        assert_eq!(closest("d5", &keys), Some("d50"));
        assert_eq!(closest("cond", &keys), Some("conductivity"));
        assert_eq!(closest("zzzzzz", &keys), None);
    }
}
