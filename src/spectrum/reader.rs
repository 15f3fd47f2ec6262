//! Reading two-column spectrum files.
//!
//! Accepted layout: comma-, semicolon-, tab- or whitespace-separated columns
//! `wavelength_nm, value`, an optional header row, and `#` comment lines anywhere. Comment
//! lines of the form `# key: value` before the data are metadata; the keys read here are
//! `kind` (what the values measure: radiance, irradiance, intensity, flux, relative), `basis`
//! (energy or photon), `name` and `source`. Parsing uses the `csv` crate.
//!
//! Every error names the file, the line and what would be right.

use std::collections::BTreeMap;

use crate::base::curve::Curve;
use crate::base::error::{Error, Result};
use crate::spectrum::{Basis, Measure, Spectrum};

/// Metadata from `# key: value` comment lines, keys in lowercase.
pub type Metadata = BTreeMap<String, Vec<String>>;

/// A parsed two-column table with its metadata.
#[derive(Debug, Clone)]
pub struct Table {
    /// The data.
    pub curve: Curve,
    /// `# key: value` metadata (a key may repeat).
    pub metadata: Metadata,
}

impl Table {
    /// The first value given for `key`, if any.
    pub fn meta(&self, key: &str) -> Option<&str> {
        self.metadata.get(key).and_then(|v| v.first()).map(String::as_str)
    }
}

/// Reads a two-column table from `text`; `origin` (a file name) prefixes every error.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming `origin`, the line and the problem: a missing
/// column, a number that does not parse, a wavelength that does not increase, a NaN.
pub fn read_table(text: &str, origin: &str) -> Result<Table> {
    let metadata = read_metadata(text);
    let delimiter = sniff_delimiter(text);
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .comment(Some(b'#'))
        .delimiter(delimiter)
        .flexible(true)
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let mut wavelength = Vec::new();
    let mut value: Vec<f64> = Vec::new();
    let mut lines = Vec::new();
    let mut seen_row = false;
    for record in reader.records() {
        let record = record.map_err(|e| {
            let line = e.position().map_or(0, |p| p.line());
            Error::data(format!("{origin}:{line}: cannot read the row: {e}"))
        })?;
        let line = record.position().map_or(0, |p| p.line());
        let fields: Vec<&str> = record.iter().filter(|f| !f.is_empty()).collect();
        if fields.is_empty() {
            continue;
        }
        let first = fields[0].parse::<f64>();
        if first.is_err() && !seen_row && wavelength.is_empty() {
            // A header row: the first non-comment row whose first field is not a number.
            seen_row = true;
            continue;
        }
        seen_row = true;
        if fields.len() < 2 {
            return Err(Error::data(format!(
                "{origin}:{line}: missing column: found 1 field '{}', expected 2 (wavelength in nm, value)",
                fields[0]
            )));
        }
        if fields.len() > 2 {
            return Err(Error::data(format!(
                "{origin}:{line}: found {} fields, expected 2 (wavelength in nm, value)",
                fields.len()
            )));
        }
        let w = parse_number(fields[0], origin, line, "wavelength")?;
        let v = parse_number(fields[1], origin, line, "value")?;
        if w <= 0.0 {
            return Err(Error::data(format!("{origin}:{line}: wavelength {w} nm is not positive")));
        }
        if let Some(&prev) = wavelength.last() {
            if w == prev {
                return Err(Error::data(format!(
                    "{origin}:{line}: duplicate wavelength {w} nm; each wavelength may appear once"
                )));
            }
            if w < prev {
                return Err(Error::data(format!(
                    "{origin}:{line}: wavelength {w} nm is below the previous {prev} nm; rows must be sorted by increasing wavelength"
                )));
            }
        }
        wavelength.push(w);
        value.push(v);
        lines.push(line);
    }
    if wavelength.len() < 2 {
        return Err(Error::data(format!(
            "{origin}: found {} data rows, a spectrum needs at least 2 (wavelength in nm, value)",
            wavelength.len()
        )));
    }
    let curve = Curve::new(wavelength, value).map_err(|e| e.context(origin))?;
    Ok(Table { curve, metadata })
}

/// Reads a spectrum file. The measure and basis come from the `kind` and `basis` metadata
/// unless `measure` or `basis` is given; a file that declares neither is a relative energy
/// shape.
///
/// # Errors
/// As [`read_table`], and for a negative value (naming its line) or an unknown `kind`.
pub fn read_spectrum(
    text: &str,
    origin: &str,
    measure: Option<Measure>,
    basis: Option<Basis>,
) -> Result<Spectrum> {
    let table = read_table(text, origin)?;
    if let Some(i) = table.curve.values().iter().position(|v| *v < 0.0) {
        let line = data_line_numbers(text).get(i).copied().unwrap_or(0);
        return Err(Error::data(format!(
            "{origin}:{line}: value {} at {} nm is negative; spectral values must be ≥ 0",
            table.curve.values()[i],
            table.curve.wavelength_nm()[i]
        )));
    }
    let measure = match (measure, table.meta("kind")) {
        (Some(m), _) => m,
        (None, Some(k)) => Measure::parse(k).map_err(|e| e.context(format!("{origin}: metadata 'kind'")))?,
        (None, None) => Measure::Relative,
    };
    let basis = match (basis, table.meta("basis")) {
        (Some(b), _) => b,
        (None, Some(b)) => Basis::parse(b).map_err(|e| e.context(format!("{origin}: metadata 'basis'")))?,
        (None, None) => Basis::Energy,
    };
    let label = table.meta("name").unwrap_or(origin).to_string();
    let provenance = table.meta("source").map(str::to_string);
    let s = Spectrum::new(table.curve, measure, basis, label).map_err(|e| e.context(origin))?;
    Ok(match provenance {
        Some(p) => s.with_provenance(p),
        None => s,
    })
}

fn parse_number(field: &str, origin: &str, line: u64, what: &str) -> Result<f64> {
    let v: f64 = field
        .parse()
        .map_err(|_| Error::data(format!("{origin}:{line}: {what} '{field}' is not a number")))?;
    if !v.is_finite() {
        return Err(Error::data(format!(
            "{origin}:{line}: {what} '{field}' is not a finite number (NaN and infinity are not allowed)"
        )));
    }
    Ok(v)
}

fn read_metadata(text: &str) -> Metadata {
    let mut meta = Metadata::new();
    for line in text.lines() {
        let Some(rest) = line.trim_start().strip_prefix('#') else { continue };
        if let Some((key, value)) = rest.split_once(':') {
            let key = key.trim().to_ascii_lowercase();
            if !key.is_empty() && !key.contains(' ') {
                meta.entry(key).or_default().push(value.trim().to_string());
            }
        }
    }
    meta
}

/// 1-based line numbers of the data rows (not comments, blanks or the header).
fn data_line_numbers(text: &str) -> Vec<u64> {
    let mut out = Vec::new();
    let mut header_possible = true;
    for (i, line) in text.lines().enumerate() {
        let t = line.trim();
        if t.is_empty() || t.starts_with('#') {
            continue;
        }
        let first = t.split(|c: char| c == ',' || c == ';' || c.is_whitespace()).next().unwrap_or("");
        if header_possible && first.parse::<f64>().is_err() {
            header_possible = false;
            continue;
        }
        header_possible = false;
        out.push(i as u64 + 1);
    }
    out
}

fn sniff_delimiter(text: &str) -> u8 {
    let line = text.lines().map(str::trim).find(|l| !l.is_empty() && !l.starts_with('#')).unwrap_or("");
    if line.contains(',') {
        b','
    } else if line.contains(';') {
        b';'
    } else if line.contains('\t') {
        b'\t'
    } else {
        b' '
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_csv_with_header_comments_and_metadata() {
        let text =
            "# kind: irradiance\n# name: test lamp\nwavelength_nm,value\n400,1\n# a comment\n410,2.5\n";
        let s = read_spectrum(text, "t.csv", None, None).unwrap();
        assert_eq!(s.measure(), Measure::Irradiance);
        assert_eq!(s.label(), "test lamp");
        assert_eq!(s.curve().values(), &[1.0, 2.5]);
    }

    #[test]
    fn reads_whitespace_and_tab_separated_files() {
        let s = read_spectrum("400   1\n410\t 2\n420  3\n", "w.txt", None, None).unwrap();
        assert_eq!(s.curve().wavelength_nm(), &[400.0, 410.0, 420.0]);
        let s = read_spectrum("400\t1\n410\t2\n", "t.tsv", None, None).unwrap();
        assert_eq!(s.curve().values(), &[1.0, 2.0]);
        assert_eq!(s.measure(), Measure::Relative);
    }

    #[test]
    fn errors_name_file_and_line() {
        let cases = [
            ("400,1\n390,1\n", "x.csv:2: wavelength 390 nm is below the previous 400 nm"),
            ("400,1\n400,2\n", "x.csv:2: duplicate wavelength 400 nm"),
            ("400,1\n410,-2\n", "x.csv:2: value -2 at 410 nm is negative"),
            ("400,1\n410,NaN\n", "x.csv:2: value 'NaN' is not a finite number"),
            ("400,1\n410\n", "x.csv:2: missing column"),
            ("# c\nwl,v\n400,1\n410,abc\n", "x.csv:4: value 'abc' is not a number"),
            ("400,1\n", "x.csv: found 1 data rows"),
        ];
        for (text, expected) in cases {
            let err = read_spectrum(text, "x.csv", None, None).unwrap_err();
            assert!(err.message().starts_with(expected), "{text:?}: got '{err}', expected '{expected}'");
        }
    }

    #[test]
    fn unknown_kind_in_metadata_is_an_error() {
        let err = read_spectrum("# kind: luminance\n400,1\n410,1\n", "k.csv", None, None).unwrap_err();
        assert!(err.message().contains("k.csv: metadata 'kind'"), "{err}");
    }
}
