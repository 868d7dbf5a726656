//! Command-line value lists taken from the enums themselves, so adding a variant (a layout
//! method, a convention) adds it to `--help`, to the completions and to the parser at once: no
//! list of strings can be left behind.

use clap::builder::{PossibleValuesParser, TypedValueParser};

/// A clap value parser accepting the names of `all` (as `name` gives them) and yielding the
/// variant.
pub fn one_of<T>(all: &'static [T], name: fn(T) -> &'static str) -> impl TypedValueParser<Value = T>
where
    T: Copy + Send + Sync + 'static,
{
    PossibleValuesParser::new(all.iter().map(|v| name(*v))).map(move |text: String| {
        all.iter()
            .copied()
            .find(|v| name(*v) == text)
            // the possible-values parser accepted `text`, so it is one of the names
            .unwrap_or(all[0])
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::layout::Method;
    use crate::survey::ConventionId;
    use clap::Parser;

    #[derive(Parser)]
    struct Args {
        #[arg(long, value_parser = one_of(&Method::ALL, Method::name))]
        method: Option<Method>,
        #[arg(long, value_parser = one_of(&ConventionId::ALL, ConventionId::name))]
        convention: Option<ConventionId>,
    }

    #[test]
    fn every_variant_is_accepted_and_nothing_else() {
        for m in Method::ALL {
            let a = Args::try_parse_from(["x", "--method", m.name()]).unwrap();
            assert_eq!(a.method, Some(m));
        }
        for c in ConventionId::ALL {
            let a = Args::try_parse_from(["x", "--convention", c.name()]).unwrap();
            assert_eq!(a.convention, Some(c));
        }
        let e = Args::try_parse_from(["x", "--method", "equal_area"])
            .err()
            .unwrap();
        assert!(e.to_string().contains("equal-area"), "{e}");
    }
}
