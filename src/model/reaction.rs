//! The reaction-equation parser: `[coef] id + [coef] id -> [coef] id + ...`.
//! It knows only text; checking ids against the compound table is done by the
//! loader, which has the line numbers.

/// One side's term: a coefficient and a compound id as written.
#[derive(Debug, Clone, PartialEq)]
pub struct Term {
    /// Positive stoichiometric coefficient.
    pub coef: f64,
    /// Compound id as written.
    pub id: String,
}

/// A parsed equation: substrates and products in the written direction.
#[derive(Debug, Clone, PartialEq)]
pub struct Equation {
    /// Left-hand side.
    pub left: Vec<Term>,
    /// Right-hand side.
    pub right: Vec<Term>,
}

/// Most terms one reaction may have, both sides together.
pub const MAX_TERMS: usize = 100;

/// Arrows read as the written (forward) direction, longest first so that
/// `<=>` is not read as `=`. `→` is how the explorer shows `->`.
const ARROWS: [&str; 7] = ["<=>", "<->", "->", "=>", "→", "⇌", "="];

/// True for ids made of letters, digits and `_` that start with a letter, or
/// with a digit (model ids such as `13dpg_c`) as long as they are not a bare
/// number (`12`, `1e5`).
pub fn valid_id(id: &str) -> bool {
    let mut c = id.chars();
    let first_ok = match c.next() {
        Some(f) if f.is_ascii_alphabetic() => true,
        Some(f) if f.is_ascii_digit() => id.parse::<f64>().is_err(),
        _ => false,
    };
    first_ok && c.all(|ch| ch.is_ascii_alphanumeric() || ch == '_')
}

/// What the message says an id may be.
pub const ID_RULE: &str =
    "ids contain letters, digits and '_', start with a letter or digit, and are not a bare number";

/// Why an equation could not be read; each message quotes the reaction
/// (shortened) and says what to write instead.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum ReactionError {
    /// No arrow at all.
    #[error(
        "reaction '{0}' has no arrow; write it as \"a + b -> c\" (-> → => <-> <=> ⇌ or = all work)"
    )]
    NoArrow(String),
    /// Two arrows or more.
    #[error("reaction '{0}' has more than one arrow; write exactly one")]
    TwoArrows(String),
    /// More than `MAX_TERMS` terms.
    #[error(
        "reaction '{reaction}' has {terms} terms, over the limit of {MAX_TERMS}; write it as several steps"
    )]
    TooManyTerms {
        /// The reaction.
        reaction: String,
        /// Terms on both sides.
        terms: usize,
    },
    /// One side is empty.
    #[error("reaction '{0}' needs compounds on both sides of the arrow")]
    OneSided(String),
    /// A stray '+'.
    #[error("reaction '{0}' has an empty term (a stray '+'?)")]
    EmptyTerm(String),
    /// Three words or more in one term.
    #[error(
        "'{term}' in reaction '{reaction}' is not 'coefficient id'; separate compounds with ' + '"
    )]
    NotCoefficientId {
        /// The term as written.
        term: String,
        /// The reaction.
        reaction: String,
    },
    /// The coefficient word is not a number.
    #[error("'{word}' in reaction '{reaction}' is not a number; write e.g. \"2 {id}\"")]
    BadCoefficient {
        /// The coefficient as written.
        word: String,
        /// The reaction.
        reaction: String,
        /// The id that follows it.
        id: String,
    },
    /// Zero, negative or not finite.
    #[error(
        "coefficient {coef} of '{id}' in reaction '{reaction}' must be a positive number; put the compound on the other side instead of using a negative or zero coefficient"
    )]
    NotPositive {
        /// The coefficient.
        coef: f64,
        /// The compound id.
        id: String,
        /// The reaction.
        reaction: String,
    },
    /// H+ written as a compound.
    #[error(
        "reaction '{0}' contains H+; dG'° values are transformed at fixed pH, so leave H+ out and state it with protons = N (net H+ released)"
    )]
    Proton(String),
    /// An id that breaks `ID_RULE`.
    #[error("'{id}' in reaction '{reaction}' is not a valid compound id; {ID_RULE}")]
    BadId {
        /// The id as written.
        id: String,
        /// The reaction.
        reaction: String,
    },
}

/// Parses an equation; the error says what is wrong and what to write instead.
pub fn parse(text: &str) -> Result<Equation, ReactionError> {
    parse_with(text, &|_| false)
}

/// Parses an equation where `known` tells which ids are declared, so that a
/// declared id starting with digits (`13dpg_c`) is not read as a coefficient
/// glued to an id (`2atp`).
pub fn parse_with(text: &str, known: &dyn Fn(&str) -> bool) -> Result<Equation, ReactionError> {
    let shown = super::pathway::shorten(text);
    let mut found: Option<(usize, &str)> = None;
    for arrow in ARROWS {
        if let Some(pos) = text.find(arrow) {
            found = Some((pos, arrow));
            break;
        }
    }
    let Some((pos, arrow)) = found else {
        return Err(ReactionError::NoArrow(shown));
    };
    let (l, r) = (&text[..pos], &text[pos + arrow.len()..]);
    if ARROWS.iter().any(|a| r.contains(a)) {
        return Err(ReactionError::TwoArrows(shown));
    }
    let left = side(l, &shown, known)?;
    let right = side(r, &shown, known)?;
    if left.len() + right.len() > MAX_TERMS {
        return Err(ReactionError::TooManyTerms {
            terms: left.len() + right.len(),
            reaction: shown,
        });
    }
    if left.is_empty() || right.is_empty() {
        return Err(ReactionError::OneSided(shown));
    }
    Ok(Equation { left, right })
}

/// The terms of one side of the arrow (`whole` is the reaction, for messages).
fn side(s: &str, whole: &str, known: &dyn Fn(&str) -> bool) -> Result<Vec<Term>, ReactionError> {
    let s = s.trim();
    if s.is_empty() {
        return Ok(Vec::new());
    }
    let mut out = Vec::new();
    for raw in s.split(" + ").flat_map(|p| split_plus(p)) {
        let part = raw.trim();
        if part.is_empty() {
            return Err(ReactionError::EmptyTerm(whole.to_string()));
        }
        let mut words = part.split_whitespace();
        let first = words.next().unwrap_or("");
        let (coef, id) = match words.next() {
            Some(second) => {
                if words.next().is_some() {
                    return Err(ReactionError::NotCoefficientId {
                        term: part.to_string(),
                        reaction: whole.to_string(),
                    });
                }
                let c: f64 = first.parse().map_err(|_| ReactionError::BadCoefficient {
                    word: first.to_string(),
                    reaction: whole.to_string(),
                    id: second.to_string(),
                })?;
                (c, second)
            }
            None if known(first) => (1.0, first),
            None => split_glued(first),
        };
        if !coef.is_finite() || coef <= 0.0 {
            return Err(ReactionError::NotPositive {
                coef,
                id: id.to_string(),
                reaction: whole.to_string(),
            });
        }
        if id == "H+" || id == "h+" || id.eq_ignore_ascii_case("h") || id == "H" || id == "proton" {
            return Err(ReactionError::Proton(whole.to_string()));
        }
        if !valid_id(id) {
            return Err(ReactionError::BadId {
                id: id.to_string(),
                reaction: whole.to_string(),
            });
        }
        out.push(Term {
            coef,
            id: id.to_string(),
        });
    }
    Ok(out)
}

/// Splits on '+' signs that separate terms, keeping a '+' inside "H+" for the H+ check.
fn split_plus(p: &str) -> Vec<&str> {
    let mut out = Vec::new();
    let mut start = 0;
    let b = p.as_bytes();
    for i in 0..b.len() {
        if b[i] == b'+' {
            let prev_alnum = i > 0 && (b[i - 1] as char).is_ascii_alphanumeric();
            let next_end = i + 1 >= b.len() || b[i + 1] == b' ';
            if prev_alnum && next_end && i > 0 && (b[i - 1] == b'H' || b[i - 1] == b'h') {
                // "H+" as a token: keep it whole.
                continue;
            }
            out.push(&p[start..i]);
            start = i + 1;
        }
    }
    out.push(&p[start..]);
    out
}

/// "2atp" -> (2, "atp"); "atp" -> (1, "atp").
fn split_glued(word: &str) -> (f64, &str) {
    let n = word
        .char_indices()
        .find(|(_, c)| !(c.is_ascii_digit() || *c == '.'))
        .map(|(i, _)| i)
        .unwrap_or(word.len());
    if n == 0 || n == word.len() {
        return (1.0, word);
    }
    match word[..n].parse::<f64>() {
        Ok(c) => (c, &word[n..]),
        Err(_) => (1.0, word),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_arrows_the_explorer_shows_are_read() {
        for text in ["a + b → c", "a + b ⇌ c", "a+b→c"] {
            let e = parse(text).unwrap();
            assert_eq!(ids(&e.left), vec![(1.0, "a"), (1.0, "b")], "{text}");
            assert_eq!(ids(&e.right), vec![(1.0, "c")], "{text}");
        }
        assert!(
            parse("a → b → c")
                .unwrap_err()
                .to_string()
                .contains("more than one arrow")
        );
    }

    fn ids(terms: &[Term]) -> Vec<(f64, &str)> {
        terms.iter().map(|t| (t.coef, t.id.as_str())).collect()
    }

    #[test]
    fn parses_every_arrow() {
        for arrow in ["->", "=>", "<->", "<=>", "="] {
            let e = parse(&format!("glc + atp {arrow} g6p + adp")).unwrap();
            assert_eq!(ids(&e.left), vec![(1.0, "glc"), (1.0, "atp")]);
            assert_eq!(ids(&e.right), vec![(1.0, "g6p"), (1.0, "adp")]);
        }
    }

    #[test]
    fn coefficients_spaced_or_glued() {
        let e = parse("2 nad + 0.5 o2 -> 2nadh + h2o").unwrap();
        assert_eq!(ids(&e.left), vec![(2.0, "nad"), (0.5, "o2")]);
        assert_eq!(ids(&e.right), vec![(2.0, "nadh"), (1.0, "h2o")]);
    }

    #[test]
    fn rejects_h_plus_with_advice() {
        let e = parse("nadh + H+ + o2 -> nad + h2o")
            .unwrap_err()
            .to_string();
        assert!(e.contains("protons"), "{e}");
        let e = parse("a -> b + H+").unwrap_err().to_string();
        assert!(e.contains("H+"), "{e}");
    }

    #[test]
    fn rejects_bad_coefficients_and_shapes() {
        assert!(
            parse("0 a -> b")
                .unwrap_err()
                .to_string()
                .contains("positive")
        );
        assert!(
            parse("-1 a -> b")
                .unwrap_err()
                .to_string()
                .contains("positive")
        );
        assert!(parse("a b").unwrap_err().to_string().contains("no arrow"));
        assert!(
            parse("a -> ")
                .unwrap_err()
                .to_string()
                .contains("both sides")
        );
        assert!(
            parse("a -> b -> c")
                .unwrap_err()
                .to_string()
                .contains("more than one arrow")
        );
        assert!(
            parse("a + + b -> c")
                .unwrap_err()
                .to_string()
                .contains("empty term")
        );
        assert!(
            parse("2x a -> b")
                .unwrap_err()
                .to_string()
                .contains("not a number")
        );
    }

    #[test]
    fn id_rule() {
        assert!(valid_id("g6p") && valid_id("Fru_16bp") && valid_id("6pg") && !valid_id("a-b"));
        // Model ids may start with a digit; a bare number never is an id.
        assert!(valid_id("13dpg_c") && valid_id("2pg_c") && valid_id("nan"));
        assert!(!valid_id("12") && !valid_id("1e5") && !valid_id("1.5") && !valid_id("_a"));
    }

    #[test]
    fn declared_ids_starting_with_digits_are_not_coefficients() {
        let known = |id: &str| id == "13dpg_c" || id == "atp";
        let e = parse_with("13dpg_c + 2atp -> 2 13dpg_c", &known).unwrap();
        assert_eq!(ids(&e.left), vec![(1.0, "13dpg_c"), (2.0, "atp")]);
        assert_eq!(ids(&e.right), vec![(2.0, "13dpg_c")]);
        // Without the declaration the glued reading stays.
        let e = parse("2atp -> b").unwrap();
        assert_eq!(ids(&e.left), vec![(2.0, "atp")]);
    }
}
