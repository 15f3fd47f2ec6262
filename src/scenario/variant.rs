//! Variants inside a scenario file: `[[variant]]` tables, each a `name` and a patch applied to
//! the base scenario before it is resolved, so one file can say "the same room with the panels
//! dimmed to 60 %", "the lamp at 1 m", "with a diffuser", "another lamp".
//!
//! ```toml
//! [[variant]]
//! name = "dimmed to 60 %"
//! [[variant.source]]
//! id = "panels"
//! scale = 0.6                  # multiplies the source's level (illuminance, luminance, …)
//!
//! [[variant]]
//! name = "lamp at 1 m, diffuser"
//! [[variant.source]]
//! id = "lamp"
//! distance = "1 m"             # replaces the key
//! [[variant.filter]]
//! name = "opal diffuser"
//! add = true                   # a new entry, complete as in the base
//! transmittance = "0.5"
//! ```
//!
//! The rules, kept small:
//!
//! - A variant holds tables named like the scenario's sections (`scenario`, `subject`, `source`,
//!   `filter`, `schedule`, `limits`, `guidance`, `room`). Tables merge key by key; any other
//!   value (a string, a number, a plain array such as `on` or `sets`) replaces the base's.
//! - The arrays of tables `[[source]]`, `[[room.luminaire]]`, `[[room.rack]]` (matched by `id`),
//!   `[[filter]]`, `[[schedule.step]]` and `[[room.event]]` (matched by `name`) are patched entry
//!   by entry: an entry changes the base entry with the same id or name (an error when there is
//!   none), `add = true` appends a new one (an error when the id is taken), `remove = true` drops
//!   one. Any other array of tables (a rack's `position` list) is replaced whole.
//! - `scale = f` (above 0) on a source, luminaire or event multiplies its level: the source's
//!   `illuminance`, `luminance`, `irradiance`, `photon_irradiance`, `radiance`,
//!   `luminous_intensity`, `luminous_flux` or `radiant_flux`, a luminaire's `intensity`, an
//!   event's `lux`. The level's unit is kept.
//! - A key cannot be deleted, only replaced.
//!
//! The patched scenario is then read by [`parse_scenario_file`] like any other, so it is checked
//! by the same rules. Every error names the file, the line and key of the variant (as
//! `variant[i].…`), the variant's name and what would be valid.

use std::path::Path;

use toml::{Table, Value};

use crate::base::error::{Error, Result};
use crate::scenario::file::{Scenario, parse_scenario_file};

/// Most variants one file may hold (each is assessed in full).
pub const MAX_VARIANTS: usize = 64;

/// The sections a variant may patch.
const SECTIONS: [&str; 8] =
    ["scenario", "subject", "source", "filter", "schedule", "limits", "guidance", "room"];

/// The arrays of tables patched entry by entry: the path and the key entries are matched by.
const KEYED: [(&str, &str); 6] = [
    ("source", "id"),
    ("filter", "name"),
    ("schedule.step", "name"),
    ("room.luminaire", "id"),
    ("room.rack", "id"),
    ("room.event", "name"),
];

/// The level keys `scale` multiplies, per array.
const LEVELS: [(&str, &[&str]); 3] = [
    ("source", &crate::spectrum::scale::SCALE_KEYS),
    ("room.luminaire", &["intensity"]),
    ("room.event", &["lux"]),
];

/// One variant of a scenario, resolved.
#[derive(Debug, Clone)]
pub struct Variant {
    /// Its name (unique in the file).
    pub name: String,
    /// The base scenario with the variant's patch applied, resolved.
    pub scenario: Scenario,
}

/// How many `[[variant]]` tables `text` holds (0 when it is not valid TOML or has none).
pub fn count(text: &str) -> usize {
    toml::from_str::<Table>(text)
        .ok()
        .and_then(|t| t.get("variant").and_then(Value::as_array).map(Vec::len))
        .unwrap_or(0)
}

/// Parses the base scenario of `text` and every variant it lists, each resolved; `origin` names
/// the file in errors and `base` is the folder relative files are read from.
///
/// # Errors
/// The base scenario's errors, as [`parse_scenario_file`] gives them; for a variant, an error
/// located at the variant's key (`variant[1].source[0].scale`) and line, naming the variant:
/// a missing, empty or repeated name, an unknown section, an entry matching nothing, a bad
/// `scale`, or anything the patched scenario breaks.
pub fn parse_with_variants(
    text: &str,
    origin: &str,
    base: Option<&Path>,
) -> Result<(Scenario, Vec<Variant>)> {
    let scenario = parse_scenario_file(text, origin, base)?;
    let mut doc: Table = toml::from_str(text).map_err(|e| Error::data(e.message().to_string()))?;
    let list = match doc.remove("variant") {
        None => return Ok((scenario, Vec::new())),
        Some(Value::Array(list)) => list,
        Some(_) => {
            let msg = "`variant` must be an array of tables: write each as [[variant]] with a name";
            return Err(Error::input(msg).key("variant").in_file(origin, Some(text)));
        }
    };
    if list.len() > MAX_VARIANTS {
        let msg = format!("{} variants; at most {MAX_VARIANTS} can be compared", list.len());
        return Err(Error::input(msg).key("variant").in_file(origin, Some(text)));
    }
    let mut out: Vec<Variant> = Vec::with_capacity(list.len());
    for (i, v) in list.iter().enumerate() {
        let at = format!("variant[{i}]");
        let v = variant(v, &at, &doc, &out, (origin, base)).map_err(|e| e.in_file(origin, Some(text)))?;
        out.push(v);
    }
    Ok((scenario, out))
}

/// One variant: its name checked, its patch applied and the result resolved.
fn variant(
    v: &Value,
    at: &str,
    doc: &Table,
    done: &[Variant],
    file: (&str, Option<&Path>),
) -> Result<Variant> {
    let Some(table) = v.as_table() else {
        return Err(Error::input("a variant must be a table: [[variant]] with a name").key(at));
    };
    let name = match table.get("name") {
        None => return Err(Error::input("this variant has no name; give it one: name = \"dimmed\"").key(at)),
        Some(Value::String(s)) if !s.trim().is_empty() => s.clone(),
        Some(_) => {
            let msg = "the name must be text that is not empty: name = \"dimmed\"";
            return Err(Error::input(msg).key("name").key(at));
        }
    };
    if done.iter().any(|d| d.name == name) {
        let msg = format!("the name '{name}' is used by an earlier variant; names must differ");
        return Err(Error::input(msg).key("name").key(at));
    }
    let named = |e: Error| Error::new(e.kind(), format!("variant '{name}': {}", e.message()));
    let mut patch = table.clone();
    patch.remove("name");
    for k in patch.keys() {
        if !SECTIONS.contains(&k.as_str()) {
            let whole = if k == "file" {
                " (whole scenario files are listed in a variants file: retidose compare --variants FILE)"
            } else {
                ""
            };
            let msg = format!(
                "unknown section `{k}`; a variant holds a name and the sections it changes: {}{whole}",
                SECTIONS.map(|s| format!("`{s}`")).join(", ")
            );
            return Err(named(Error::input(msg)).key(k).key(at));
        }
    }
    let mut merged = doc.clone();
    merge_table(&mut merged, &patch, "", "").map_err(|(e, key)| named(e).key(&key).key(at))?;
    let text = toml::to_string(&merged)
        .map_err(|e| Error::data(format!("cannot write the patched scenario: {e}")))?;
    let shown = format!("{} (variant '{name}')", file.0);
    match parse_scenario_file(&text, &shown, file.1) {
        Ok(scenario) => Ok(Variant { name, scenario }),
        Err(e) => Err(relocate(&e, &text, &shown, &patch, &merged, at, &name)),
    }
}

/// A patch error: the error and the key path in the patch (without `variant[i]`).
type PatchError = (Error, String);

/// `a.b`, or the one that is not empty.
fn join(a: &str, b: &str) -> String {
    match (a.is_empty(), b.is_empty()) {
        (true, _) => b.to_string(),
        (_, true) => a.to_string(),
        _ => format!("{a}.{b}"),
    }
}

/// Merges `patch` into `base`; `path` is the section path without indexes (for [`KEYED`]) and
/// `at` the key path in the patch, for errors.
fn merge_table(base: &mut Table, patch: &Table, path: &str, at: &str) -> std::result::Result<(), PatchError> {
    for (k, pv) in patch {
        let here = join(path, k);
        let key_at = join(at, k);
        if let Some(&(_, field)) = KEYED.iter().find(|(p, _)| *p == here) {
            let Value::Array(entries) = pv else {
                let msg =
                    format!("`{k}` is a list of tables here: write each entry as [[…{k}]] with its {field}");
                return Err((Error::input(msg), key_at));
            };
            let list = base.entry(k.clone()).or_insert_with(|| Value::Array(Vec::new()));
            let Value::Array(list) = list else {
                return Err((
                    Error::input(format!("the base scenario's `{k}` is not a list of tables")),
                    key_at,
                ));
            };
            merge_entries(list, entries, (&here, field), &key_at)?;
            continue;
        }
        match (base.get_mut(k), pv) {
            (Some(Value::Table(b)), Value::Table(p)) => merge_table(b, p, &here, &key_at)?,
            _ => {
                base.insert(k.clone(), pv.clone());
            }
        }
    }
    Ok(())
}

/// What an entry of a keyed array asks for.
enum Action {
    Change,
    Add,
    Remove,
}

/// Patches the entries of a keyed array: `what` is its path and the field entries are matched by.
fn merge_entries(
    list: &mut Vec<Value>,
    entries: &[Value],
    what: (&str, &str),
    at: &str,
) -> std::result::Result<(), PatchError> {
    let (path, field) = what;
    let mut seen: Vec<String> = Vec::new();
    for (j, e) in entries.iter().enumerate() {
        let at = format!("{at}[{j}]");
        let fail = |msg: String, key: &str| Err((Error::input(msg), join(&at, key)));
        let Some(entry) = e.as_table() else {
            return fail(format!("each entry must be a table with its {field}"), "");
        };
        let Some(id) = entry.get(field).and_then(Value::as_str) else {
            return fail(format!("this entry needs its {field} (text) to say which one it changes"), "");
        };
        if seen.iter().any(|s| s == id) {
            return fail(format!("'{id}' is patched twice in this variant; merge the two entries"), field);
        }
        seen.push(id.to_string());
        let mut entry = entry.clone();
        let action = action(&mut entry).map_err(|(e, key)| (e, join(&at, &key)))?;
        let pos = list.iter().position(|v| v.get(field).and_then(Value::as_str) == Some(id));
        let ids: Vec<String> = list
            .iter()
            .filter_map(|v| v.get(field).and_then(Value::as_str))
            .map(|s| format!("'{s}'"))
            .collect();
        let known = if ids.is_empty() { "none".to_string() } else { ids.join(", ") };
        match (action, pos) {
            (Action::Add, Some(_)) => {
                return fail(
                    format!("'{id}' is already in the base scenario; leave out add = true to change it"),
                    "add",
                );
            }
            (Action::Add, None) => {
                if entry.contains_key("scale") {
                    return fail(
                        "scale changes an existing entry; give the new entry its level instead".into(),
                        "scale",
                    );
                }
                list.push(Value::Table(entry));
            }
            (_, None) => {
                return fail(
                    format!(
                        "no {path} with {field} '{id}' in the base scenario ({known}); to add one, give add = true"
                    ),
                    field,
                );
            }
            (Action::Remove, Some(p)) => {
                if let Some(k) = entry.keys().find(|k| *k != field) {
                    return fail(
                        format!("an entry that removes takes only its {field} and remove = true"),
                        k,
                    );
                }
                list.remove(p);
            }
            (Action::Change, Some(p)) => {
                let scale = entry.remove("scale");
                let Some(target) = list[p].as_table_mut() else {
                    return fail(format!("the base scenario's {path} entry '{id}' is not a table"), "");
                };
                merge_table(target, &entry, path, &at)?;
                if let Some(s) = scale {
                    scale_levels(target, &entry, &s, path).map_err(|e| (e, join(&at, "scale")))?;
                }
            }
        }
    }
    Ok(())
}

/// Takes `add` and `remove` out of an entry and says what it asks for.
fn action(entry: &mut Table) -> std::result::Result<Action, PatchError> {
    let mut flag = |key: &str| -> std::result::Result<bool, PatchError> {
        match entry.remove(key) {
            None => Ok(false),
            Some(Value::Boolean(b)) => Ok(b),
            Some(_) => Err((Error::input(format!("{key} is true or false")), key.to_string())),
        }
    };
    match (flag("add")?, flag("remove")?) {
        (true, true) => Err((Error::input("an entry is either added or removed, not both"), "remove".into())),
        (true, false) => Ok(Action::Add),
        (false, true) => Ok(Action::Remove),
        (false, false) => Ok(Action::Change),
    }
}

/// Multiplies the level keys of the merged entry `target` by `scale`; `patch` is the entry as
/// the variant wrote it (a level given there and a scale are refused together).
fn scale_levels(target: &mut Table, patch: &Table, scale: &Value, path: &str) -> Result<()> {
    let Some(&(_, keys)) = LEVELS.iter().find(|(p, _)| *p == path) else {
        return Err(Error::input(format!(
            "scale applies to sources, luminaires and events, not to {path} entries"
        )));
    };
    let f = match scale {
        Value::Float(f) => *f,
        Value::Integer(i) => *i as f64,
        _ => return Err(Error::input("scale is a number above 0, e.g. 0.6 for 60 %")),
    };
    if !(f > 0.0 && f.is_finite() && f <= 1e9) {
        return Err(Error::input(format!("scale {f} must be above 0 and at most 1e9, e.g. 0.6 for 60 %")));
    }
    if let Some(k) = keys.iter().find(|k| patch.contains_key(**k)) {
        return Err(Error::input(format!("give either a new {k} or a scale, not both")));
    }
    let mut scaled = 0;
    for k in keys {
        if let Some(Value::String(t)) = target.get(*k) {
            let new = scale_text(t, f).map_err(|e| e.key(k))?;
            target.insert((*k).to_string(), Value::String(new));
            scaled += 1;
        }
    }
    if scaled == 0 {
        return Err(Error::input(format!(
            "this entry has no level to scale; scale multiplies one of: {}",
            keys.join(", ")
        )));
    }
    Ok(())
}

/// A quantity written as text (`"250 lx"`) with its number multiplied by `f`, its unit kept.
fn scale_text(text: &str, f: f64) -> Result<String> {
    let t = text.trim();
    let numeric = t.char_indices().take_while(|(_, c)| c.is_ascii_digit() || ".eE+-".contains(*c)).count();
    // The longest leading part that is a number ("2e" of "2 em" is not).
    let (value, rest) =
        (1..=numeric).rev().find_map(|n| t[..n].parse::<f64>().ok().map(|v| (v, &t[n..]))).ok_or_else(
            || Error::input(format!("'{text}' does not start with a number, so it cannot be scaled")),
        )?;
    let v = value * f;
    if !v.is_finite() {
        return Err(Error::input(format!("'{text}' scaled by {f} is not a finite number")));
    }
    let rest = rest.trim_start();
    Ok(if rest.is_empty() { format!("{v}") } else { format!("{v} {rest}") })
}

/// The patch's key paths against the merged scenario's: (merged path, patch path) for every key
/// and entry the patch wrote.
fn trace(patch: &Table, merged: &Table, paths: (&str, &str, &str), out: &mut Vec<(String, String)>) {
    let (section, m_at, p_at) = paths;
    for (k, pv) in patch {
        let here = join(section, k);
        let (m, p) = (join(m_at, k), join(p_at, k));
        if let Some(&(_, field)) = KEYED.iter().find(|(s, _)| *s == here) {
            let (Some(entries), Some(list)) = (pv.as_array(), merged.get(k).and_then(Value::as_array)) else {
                continue;
            };
            for (j, e) in entries.iter().enumerate() {
                let id = e.get(field).and_then(Value::as_str);
                let Some(idx) = list.iter().position(|v| v.get(field).and_then(Value::as_str) == id) else {
                    continue;
                };
                let (me, pe) = (format!("{m}[{idx}]"), format!("{p}[{j}]"));
                out.push((me.clone(), pe.clone()));
                if let (Some(et), Some(mt)) = (e.as_table(), list[idx].as_table()) {
                    trace(et, mt, (&here, &me, &pe), out);
                }
            }
            continue;
        }
        out.push((m.clone(), p.clone()));
        if let (Some(pt), Some(mt)) = (pv.as_table(), merged.get(k).and_then(Value::as_table)) {
            trace(pt, mt, (&here, &m, &p), out);
        }
    }
}

/// An error of the patched scenario, moved to the variant: its key in the patch (the nearest
/// key or entry the variant wrote that encloses the failing key), named by the variant.
fn relocate(
    e: &Error,
    text: &str,
    shown: &str,
    patch: &Table,
    merged: &Table,
    at: &str,
    name: &str,
) -> Error {
    let (failing, message) = match e.location().and_then(|l| l.key.clone()) {
        Some(k) => (Some(k), e.message().to_string()),
        None => parse_error_place(e.message(), text, shown),
    };
    let mut map = Vec::new();
    trace(patch, merged, ("", "", ""), &mut map);
    let within =
        |m: &str, k: &str| k == m || k.starts_with(&format!("{m}.")) || k.starts_with(&format!("{m}["));
    let found = failing.as_deref().and_then(|k| {
        map.iter()
            .filter(|(m, _)| within(m, k))
            .max_by_key(|(m, _)| m.len())
            .map(|(m, p)| (m == k, p.clone()))
    });
    let note = match (&failing, &found) {
        (Some(k), Some((false, _)) | None) => format!(" (key '{k}' of the patched scenario)"),
        _ => String::new(),
    };
    let err = Error::new(e.kind(), format!("variant '{name}'{note}: {message}"));
    match found {
        Some((_, p)) => err.key(&p).key(at),
        None => err.key(at),
    }
}

/// For a TOML error of the patched text (`"{shown}:{line}: what…"`): the key at that line of
/// the patched text and the message without its place and the quoted line.
fn parse_error_place(message: &str, text: &str, shown: &str) -> (Option<String>, String) {
    let rest = message.strip_prefix(shown).and_then(|r| r.strip_prefix(':')).unwrap_or(message);
    let mut lines = rest.lines();
    let first = lines.next().unwrap_or_default();
    let (line, what) = match first.split_once(": ") {
        Some((n, w)) if n.trim().parse::<usize>().is_ok() => (n.trim().parse::<usize>().ok(), w.to_string()),
        _ => (None, first.trim().to_string()),
    };
    // Skip the quoted line and the caret line; keep the suggestion and the allowed keys.
    let tail: Vec<&str> = if line.is_some() { lines.skip(2).collect() } else { lines.collect() };
    let mut msg = what;
    for t in tail {
        msg.push('\n');
        msg.push_str(t);
    }
    (line.and_then(|l| key_at_line(text, l)), msg)
}

/// The deepest key path whose key starts on `line` (1-based) of the TOML `text`.
fn key_at_line(text: &str, line: usize) -> Option<String> {
    use toml::de::{DeTable, DeValue};
    fn line_of(text: &str, offset: usize) -> usize {
        text[..offset.min(text.len())].matches('\n').count() + 1
    }
    fn walk(text: &str, t: &DeTable<'_>, prefix: &str, line: usize, best: &mut Option<String>) {
        for (k, v) in t {
            let path = join(prefix, k.get_ref());
            if line_of(text, k.span().start) == line {
                *best = Some(path.clone());
            }
            match v.get_ref() {
                DeValue::Table(inner) => walk(text, inner, &path, line, best),
                DeValue::Array(items) => {
                    for (i, item) in items.iter().enumerate() {
                        if let DeValue::Table(inner) = item.get_ref() {
                            walk(text, inner, &format!("{path}[{i}]"), line, best);
                        }
                    }
                }
                _ => {}
            }
        }
    }
    let doc = DeTable::parse(text).ok()?;
    let mut best = None;
    walk(text, doc.get_ref(), "", line, &mut best);
    best
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn scaling_keeps_the_unit_and_refuses_what_is_not_a_number() {
        assert_eq!(scale_text("250 lx", 0.5).unwrap(), "125 lx");
        assert_eq!(scale_text("2e3cd", 2.0).unwrap(), "4000 cd");
        assert_eq!(scale_text(" 0.8 ", 0.5).unwrap(), "0.4");
        assert_eq!(scale_text("2 em", 2.0).unwrap(), "4 em");
        assert!(scale_text("lx 5", 2.0).is_err());
    }

    #[test]
    fn finds_the_key_of_a_line() {
        let text = "[a]\nb = 1\n[[c]]\nd = 2\n[[c]]\ne = 3\n";
        assert_eq!(key_at_line(text, 2).as_deref(), Some("a.b"));
        assert_eq!(key_at_line(text, 6).as_deref(), Some("c[1].e"));
        assert_eq!(key_at_line(text, 9), None);
    }
}
