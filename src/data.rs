//! Observed counts for `fit`: a CSV table `k,count` (header optional) or one observed `k` per
//! line. Blank lines and `#` comments are allowed; a bad row is a `Diagnostic` at its line and
//! column, never a guess.

use std::collections::BTreeMap;

use crate::diagnostic::Diagnostic;

/// How many times each k was observed (only k with a positive count are kept).
#[derive(Clone, Debug, Default, PartialEq, Eq)]
pub struct Counts {
    pub by_k: BTreeMap<i64, u64>,
}

/// Largest total count accepted (absurd sizes are refused).
pub const MAX_OBSERVATIONS: u64 = 1 << 50;

impl Counts {
    pub fn from_pairs(pairs: impl IntoIterator<Item = (i64, u64)>) -> Counts {
        let mut by_k = BTreeMap::new();
        for (k, n) in pairs {
            if n > 0 {
                *by_k.entry(k).or_insert(0) += n;
            }
        }
        Counts { by_k }
    }

    /// Every observation once, in increasing order of k.
    pub fn from_observations(ks: impl IntoIterator<Item = i64>) -> Counts {
        Counts::from_pairs(ks.into_iter().map(|k| (k, 1)))
    }

    pub fn total(&self) -> u64 {
        self.by_k.values().sum()
    }

    pub fn max_k(&self) -> Option<i64> {
        self.by_k.keys().next_back().copied()
    }

    /// Only the observations with k ≥ `k_min`, and how many were left out.
    pub fn at_least(&self, k_min: i64) -> (Counts, u64) {
        let kept: BTreeMap<i64, u64> = self.by_k.range(k_min..).map(|(k, n)| (*k, *n)).collect();
        let dropped = self.total() - kept.values().sum::<u64>();
        (Counts { by_k: kept }, dropped)
    }

    /// Sample mean as an exact fraction (numerator, denominator).
    pub fn mean_fraction(&self) -> (i128, u128) {
        let sum: i128 = self.by_k.iter().map(|(k, n)| *k as i128 * *n as i128).sum();
        (sum, self.total() as u128)
    }
}

/// Reads counts from the text of a data file. The layout is chosen by the first data line:
/// with a comma it is `k,count`, without one it is one observation per line.
pub fn parse_counts(text: &str) -> Result<Counts, Diagnostic> {
    let mut pairs: Vec<(i64, u64)> = Vec::new();
    let mut csv: Option<bool> = None;
    let mut offset = 0usize;
    let mut seen_data = false;
    let mut total: u64 = 0;
    for line in text.split_inclusive('\n') {
        let start = offset;
        offset += line.len();
        let content = line.split('#').next().unwrap_or("");
        let content = content.trim_end_matches(['\n', '\r']);
        if content.trim().is_empty() {
            continue;
        }
        let is_csv = *csv.get_or_insert_with(|| content.contains(','));
        let fields = split_fields(content, start, is_csv);
        let first_data_line = !seen_data;
        seen_data = true;
        if is_csv {
            if fields.len() != 2 {
                let (_, s, e) = fields.last().cloned().unwrap_or(("", start, start));
                let span = if fields.len() > 2 {
                    fields[2].1..e
                } else {
                    s..e
                };
                return Err(Diagnostic::new(
                    format!("expected two fields `k,count`, found {}", fields.len()),
                    span,
                )
                .with_help("every row of a k,count table has exactly two fields"));
            }
            // A first row whose fields are not numbers is the header.
            if first_data_line && fields.iter().all(|(f, _, _)| f.parse::<i64>().is_err()) {
                continue;
            }
            let k = parse_k(fields[0])?;
            let n = parse_count(fields[1])?;
            total = add_total(total, n, fields[1].1..fields[1].2)?;
            pairs.push((k, n));
        } else {
            if fields.len() != 1 {
                return Err(Diagnostic::new(
                    "expected one observed k on this line",
                    fields[1].1..fields[fields.len() - 1].2,
                )
                .with_help("the first data line has no comma, so the file lists one observation per line; for a table write `k,count` on every row"));
            }
            if first_data_line && fields[0].0.parse::<i64>().is_err() && !looks_numeric(fields[0].0)
            {
                continue;
            }
            let k = parse_k(fields[0])?;
            total = add_total(total, 1, fields[0].1..fields[0].2)?;
            pairs.push((k, 1));
        }
    }
    Ok(Counts::from_pairs(pairs))
}

type Field<'a> = (&'a str, usize, usize);

/// Fields with their byte spans in the whole text, surrounding spaces trimmed.
fn split_fields(content: &str, line_start: usize, csv: bool) -> Vec<Field<'_>> {
    let mut out = Vec::new();
    if csv {
        let mut at = 0usize;
        for raw in content.split(',') {
            out.push(trim_span(raw, line_start + at));
            at += raw.len() + 1;
        }
    } else {
        let mut rest = content;
        let mut at = 0usize;
        while let Some(begin) = rest.find(|c: char| !c.is_whitespace()) {
            let word_len = rest[begin..]
                .find(char::is_whitespace)
                .unwrap_or(rest.len() - begin);
            let s = line_start + at + begin;
            out.push((&rest[begin..begin + word_len], s, s + word_len));
            at += begin + word_len;
            rest = &rest[begin + word_len..];
        }
    }
    out
}

fn trim_span(raw: &str, start: usize) -> Field<'_> {
    let lead = raw.len() - raw.trim_start().len();
    let t = raw.trim();
    let s = start + lead;
    (t, s, s + t.len().max(if t.is_empty() { 0 } else { 1 }))
}

fn looks_numeric(s: &str) -> bool {
    s.chars()
        .next()
        .is_some_and(|c| c.is_ascii_digit() || c == '-' || c == '+' || c == '.')
}

fn parse_k(field: Field<'_>) -> Result<i64, Diagnostic> {
    let (text, s, e) = field;
    let span = s..e.max(s + 1);
    text.parse::<i64>().map_err(|_| {
        let why = if text.is_empty() {
            "missing k".to_string()
        } else if text.contains('.') || text.contains('/') {
            format!("`{text}` is not an integer k")
        } else {
            format!("`{text}` is not a k (an integer)")
        };
        Diagnostic::new(why, span).with_help("k is the observed index, a whole number such as 7")
    })
}

fn parse_count(field: Field<'_>) -> Result<u64, Diagnostic> {
    let (text, s, e) = field;
    let span = s..e.max(s + 1);
    text.parse::<u64>().map_err(|_| {
        let why = if text.is_empty() {
            "missing count".to_string()
        } else if text.starts_with('-') {
            format!("`{text}`: a count cannot be negative")
        } else {
            format!("`{text}` is not a count (a whole number ≥ 0)")
        };
        Diagnostic::new(why, span).with_help("a count says how many times k was observed")
    })
}

fn add_total(total: u64, n: u64, span: std::ops::Range<usize>) -> Result<u64, Diagnostic> {
    match total.checked_add(n) {
        Some(t) if t <= MAX_OBSERVATIONS => Ok(t),
        _ => Err(Diagnostic::new(
            format!(
                "more than 2^50 observations in all; the data are limited to {MAX_OBSERVATIONS}"
            ),
            span,
        )),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_a_table_with_header_comments_and_blank_lines() {
        let text = "# visits\nk,count\n\n0, 5\n1,3 # note\n1,2\n";
        let counts = parse_counts(text).unwrap();
        assert_eq!(counts.by_k, BTreeMap::from([(0, 5), (1, 5)]));
        assert_eq!(counts.total(), 10);
    }

    #[test]
    fn reads_one_observation_per_line() {
        let counts = parse_counts("k\n3\n1\n3\n").unwrap();
        assert_eq!(counts.by_k, BTreeMap::from([(1, 1), (3, 2)]));
    }

    #[test]
    fn a_bad_row_points_at_its_line_and_column() {
        let text = "k,count\n1,4\n2,x\n";
        let err = parse_counts(text).unwrap_err();
        assert_eq!(err.line_column(text), (3, 3));
        let err = parse_counts("1,2\n2,-1\n").unwrap_err();
        assert!(err.message.contains("negative"), "{}", err.message);
        let err = parse_counts("1,2,3\n").unwrap_err();
        assert!(err.message.contains("two fields"));
        let err = parse_counts("4\n5 6\n").unwrap_err();
        assert_eq!(err.line_column("4\n5 6\n"), (2, 3));
        let err = parse_counts("4\n2.5\n").unwrap_err();
        assert!(err.message.contains("integer"));
    }

    #[test]
    fn k_min_leaves_out_the_head() {
        let counts = Counts::from_observations([1, 2, 2, 5]);
        let (kept, dropped) = counts.at_least(2);
        assert_eq!((kept.total(), dropped), (3, 1));
    }
}
