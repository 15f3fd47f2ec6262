//! Turning TOML and serde errors into one-line messages that name the file and line and, for an
//! unknown key, suggest the nearest valid one.

/// Edit distance between two short strings (Levenshtein).
fn distance(a: &str, b: &str) -> usize {
    let b: Vec<char> = b.chars().collect();
    let mut prev: Vec<usize> = (0..=b.len()).collect();
    for (i, ca) in a.chars().enumerate() {
        let mut cur = vec![i + 1];
        for (j, cb) in b.iter().enumerate() {
            let sub = prev[j] + usize::from(ca != *cb);
            cur.push(sub.min(prev[j + 1] + 1).min(cur[j] + 1));
        }
        prev = cur;
    }
    prev[b.len()]
}

/// The message of a TOML deserialisation error on one line, prefixed with `origin`, with a
/// "did you mean" suggestion when serde reports an unknown field and lists the expected ones.
pub fn describe(e: &toml::de::Error, origin: &str) -> String {
    let text: Vec<String> =
        e.to_string().lines().map(|l| l.trim().to_string()).filter(|l| !l.is_empty()).collect();
    let mut msg = format!("{origin}: {}", text.join(" "));
    if let Some(rest) = msg.split("unknown field `").nth(1) {
        let unknown = rest.split('`').next().unwrap_or("").to_string();
        let expected: Vec<String> = msg
            .split("expected one of ")
            .nth(1)
            .or_else(|| msg.split("expected ").nth(1))
            .map(|l| l.split('`').skip(1).step_by(2).map(str::to_string).collect())
            .unwrap_or_default();
        if let Some(best) = expected.iter().min_by_key(|k| distance(&unknown, k)) {
            msg.push_str(&format!("; did you mean `{best}`?"));
        }
    }
    msg
}

/// The 1-based line of the key at `path` (`survey.luminaire[1].intensity`) in the TOML `text`,
/// found by walking the parsed document and reading the key's span. When the full path is not
/// in the document (a key that is missing), the line of the deepest enclosing key that is.
pub fn line_of_key(text: &str, path: &str) -> Option<usize> {
    use toml::de::{DeTable, DeValue};
    let doc = DeTable::parse(text).ok()?;
    let mut table = doc.get_ref();
    let mut found: Option<usize> = None;
    let segments: Vec<&str> = path.split('.').collect();
    for (n, seg) in segments.iter().enumerate() {
        let (name, index) = match seg.split_once('[') {
            Some((k, rest)) => (k, rest.trim_end_matches(']').parse::<usize>().ok()),
            None => (*seg, None),
        };
        let Some((key, value)) = table.iter().find(|(k, _)| k.get_ref().as_ref() == name) else {
            break;
        };
        found = Some(key.span().start);
        let value = match (value.get_ref(), index) {
            (DeValue::Array(items), Some(i)) => {
                let Some(item) = items.get(i) else {
                    break;
                };
                found = Some(item.span().start);
                item.get_ref()
            }
            (v, _) => v,
        };
        match value {
            DeValue::Table(inner) if n + 1 < segments.len() => table = inner,
            _ => break,
        }
    }
    found.map(|offset| text[..offset.min(text.len())].matches('\n').count() + 1)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[derive(serde::Deserialize, Debug)]
    #[serde(deny_unknown_fields)]
    #[allow(dead_code, reason = "fields are only deserialised in this test")]
    struct S {
        species: String,
        pupil: String,
    }

    #[test]
    fn locates_keys_inside_their_table() {
        let text = "[subject]\nspecies = \"human\"\n[[source]]\nid = \"a\"\ndistance = \"1 m\"\n[[source]]\nid = \"b\"\ndistance = \"2\"\n";
        assert_eq!(line_of_key(text, "source[1].distance"), Some(8));
        assert_eq!(line_of_key(text, "source[0].distance"), Some(5));
        assert_eq!(line_of_key(text, "subject.species"), Some(2));
        // A missing key: the line of its table.
        assert_eq!(line_of_key(text, "subject.pupil"), Some(1));
        assert_eq!(line_of_key(text, "nothing"), None);
        let inline = "[[step]]\nsource = { spectrum = \"x\", distance = \"1\" }\n";
        assert_eq!(line_of_key(inline, "step[0].source.distance"), Some(2));
    }

    #[test]
    fn suggests_the_nearest_key_and_names_the_line() {
        let e = toml::from_str::<S>("species = \"mouse\"\npupl = \"dark\"\n").unwrap_err();
        let m = describe(&e, "x.toml");
        assert!(m.starts_with("x.toml: "), "{m}");
        assert!(m.contains("line 2"), "{m}");
        assert!(m.contains("did you mean `pupil`?"), "{m}");
    }
}
