//! Did-you-mean suggestions for names and units.

/// The candidate closest to `name`, when one is close enough to be a likely typo: equal up to
/// case, or within an edit distance of about a third of the name's length (at least 1).
pub fn did_you_mean<'a>(
    name: &str,
    candidates: impl IntoIterator<Item = &'a str>,
) -> Option<&'a str> {
    let limit = (name.chars().count() / 3).clamp(1, 3);
    let mut best: Option<(usize, &'a str)> = None;
    for cand in candidates {
        if cand == name {
            continue;
        }
        let dist = if cand.eq_ignore_ascii_case(name) {
            0
        } else {
            strsim::osa_distance(name, cand)
        };
        if dist <= limit && best.is_none_or(|(d, c)| dist < d || (dist == d && cand < c)) {
            best = Some((dist, cand));
        }
    }
    best.map(|(_, c)| c)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn close_names_only() {
        let names = ["rubber", "column", "head", "base"];
        assert_eq!(did_you_mean("rubbr", names), Some("rubber"));
        assert_eq!(did_you_mean("Head", names), Some("head"));
        assert_eq!(did_you_mean("xyzzy", names), None);
        assert_eq!(did_you_mean("head", names), None);
    }
}
