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

/// Best-effort line number (1-based) of the key named in an error `message` about the TOML
/// `text`: the last `key '…'` in the message, looked up inside the table the message points to
/// (`source N`, `filter N`, `schedule.step[i]`, `survey.luminaire[i]`, or the key path's first
/// table), else anywhere if it occurs once.
pub fn locate(text: &str, message: &str) -> Option<usize> {
    let key = message.rsplit("key '").next().filter(|_| message.contains("key '"))?.split('\'').next()?;
    let leaf = key.rsplit('.').next()?.split('[').next()?.to_string();
    let lines: Vec<&str> = text.lines().collect();
    let is_key_line = |l: &str| {
        let t = l.trim_start();
        t.strip_prefix(leaf.as_str()).is_some_and(|rest| rest.trim_start().starts_with('='))
    };
    // Which table block: (header, index).
    let numbered = |word: &str| -> Option<usize> {
        message
            .split(&format!("{word} "))
            .nth(1)?
            .split(|c: char| !c.is_ascii_digit())
            .next()?
            .parse::<usize>()
            .ok()
    };
    let indexed = |path: &str| -> Option<usize> {
        key.strip_prefix(path)?.strip_prefix('[')?.split(']').next()?.parse::<usize>().ok().map(|i| i + 1)
    };
    let block = if let Some(n) = numbered("source") {
        Some(("[[source]]", n))
    } else if let Some(n) = numbered("filter") {
        Some(("[[filter]]", n))
    } else if let Some(n) = indexed("schedule.step") {
        Some(("[[schedule.step]]", n))
    } else if let Some(n) = indexed("survey.luminaire") {
        Some(("[[survey.luminaire]]", n))
    } else if key.contains('.') {
        key.split('.').next().map(|t| (t, 1))
    } else {
        None
    };
    if let Some((header, n)) = block {
        let want = if header.starts_with('[') { header.to_string() } else { format!("[{header}]") };
        let start = lines.iter().enumerate().filter(|(_, l)| l.trim() == want).nth(n - 1).map(|(i, _)| i)?;
        for (i, l) in lines.iter().enumerate().skip(start + 1) {
            if l.trim_start().starts_with('[') {
                break;
            }
            if is_key_line(l) {
                return Some(i + 1);
            }
        }
        return Some(start + 1);
    }
    let hits: Vec<usize> =
        lines.iter().enumerate().filter(|(_, l)| is_key_line(l)).map(|(i, _)| i + 1).collect();
    (hits.len() == 1).then(|| hits[0])
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
        assert_eq!(locate(text, "x.toml: source 2: key 'distance': no unit"), Some(8));
        assert_eq!(locate(text, "x.toml: key 'subject.species': bad"), Some(2));
        assert_eq!(locate(text, "no key here"), None);
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
