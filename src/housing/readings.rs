//! Lux readings per cage position (a handheld meter at cage level), matched to the room's racks
//! in linear time: a grid rack by arithmetic, a listed rack through one hash map.
//!
//! The file is CSV with a header: `rack,shelf,column,lux` and optionally `dark_lux` (the
//! dark-phase reading); `rack` may be left out when the room has one rack. `#` starts a comment.

use std::collections::HashMap;

use crate::base::error::{Error, Result};
use crate::housing::room::{Layout, Rack};

/// Readings matched to positions.
#[derive(Debug, Clone, PartialEq)]
pub struct Readings {
    /// The file the readings came from.
    pub origin: String,
    /// Light-phase reading per global position index, lx (NaN where none).
    pub lux: Vec<f64>,
    /// Dark-phase reading per global position index, lx (NaN where none), when the file has them.
    pub dark_lux: Option<Vec<f64>>,
    /// How many positions have a light-phase reading.
    pub count: usize,
}

impl Readings {
    /// The reading at global position `i`, if any.
    pub fn at(&self, i: usize) -> Option<f64> {
        self.lux.get(i).copied().filter(|v| !v.is_nan())
    }
}

/// Finds a position from (rack, shelf, column) in constant time.
struct Index<'a> {
    racks: &'a [Rack],
    offsets: Vec<usize>,
    by_id: HashMap<&'a str, usize>,
    lists: Vec<Option<HashMap<(u32, u32), usize>>>,
}

impl<'a> Index<'a> {
    fn new(racks: &'a [Rack]) -> Index<'a> {
        let mut offsets = Vec::with_capacity(racks.len());
        let mut at = 0;
        for r in racks {
            offsets.push(at);
            at += r.len();
        }
        let lists = racks
            .iter()
            .map(|r| match &r.layout {
                Layout::List(v) => {
                    Some(v.iter().enumerate().map(|(i, s)| ((s.shelf, s.column), i)).collect())
                }
                Layout::Grid(_) => None,
            })
            .collect();
        Index {
            racks,
            offsets,
            by_id: racks.iter().enumerate().map(|(i, r)| (r.id.as_str(), i)).collect(),
            lists,
        }
    }

    fn find(&self, rack: usize, shelf: u32, column: u32) -> Option<usize> {
        let local = match (&self.racks[rack].layout, &self.lists[rack]) {
            (Layout::Grid(g), _) => (shelf >= 1 && shelf <= g.shelves && column >= 1 && column <= g.columns)
                .then(|| (shelf as usize - 1) * g.columns as usize + column as usize - 1),
            (Layout::List(_), Some(map)) => map.get(&(shelf, column)).copied(),
            (Layout::List(_), None) => None,
        };
        local.map(|l| self.offsets[rack] + l)
    }
}

/// Column positions of the header.
struct Columns {
    rack: Option<usize>,
    shelf: usize,
    column: usize,
    lux: usize,
    dark: Option<usize>,
}

fn columns(headers: &csv::StringRecord, origin: &str, racks: &[Rack]) -> Result<Columns> {
    let col = |name: &str| headers.iter().position(|h| h.eq_ignore_ascii_case(name));
    let (Some(shelf), Some(column), Some(lux)) = (col("shelf"), col("column"), col("lux")) else {
        return Err(Error::data(format!(
            "{origin}:1: the header needs rack, shelf, column and lux (and optionally dark_lux); it has: {}",
            headers.iter().collect::<Vec<_>>().join(", ")
        )));
    };
    let rack = col("rack");
    if rack.is_none() && racks.len() > 1 {
        return Err(Error::data(format!(
            "{origin}:1: the room has {} racks, so the header needs a rack column (the rack ids: {})",
            racks.len(),
            racks.iter().map(|r| r.id.as_str()).collect::<Vec<_>>().join(", ")
        )));
    }
    Ok(Columns { rack, shelf, column, lux, dark: col("dark_lux") })
}

/// Reads lux readings from CSV `text` (named `origin` in errors) and matches them to `racks`.
///
/// # Errors
/// [`crate::ErrorKind::InvalidData`] naming the file, the line and the field: a missing column,
/// a value that is not a number, a negative or non-finite reading, a shelf or column that is not
/// a whole number from 1, a rack or position that does not exist, a position given twice.
pub fn read_readings(text: &str, origin: &str, racks: &[Rack]) -> Result<Readings> {
    let mut rdr =
        csv::ReaderBuilder::new().comment(Some(b'#')).trim(csv::Trim::All).from_reader(text.as_bytes());
    let headers = rdr.headers().map_err(|e| Error::data(format!("{origin}: {e}")))?.clone();
    let cols = columns(&headers, origin, racks)?;
    let index = Index::new(racks);
    let n: usize = racks.iter().map(Rack::len).sum();
    let mut lux = vec![f64::NAN; n];
    let mut dark = cols.dark.map(|_| vec![f64::NAN; n]);
    let mut count = 0;
    for rec in rdr.records() {
        let rec = rec.map_err(|e| Error::data(format!("{origin}: {e}")))?;
        let line = rec.position().map_or(0, |p| p.line());
        let row = Row { rec: &rec, origin, line };
        let rack = match cols.rack {
            Some(i) => {
                let id = row.text(i, "rack")?;
                *index.by_id.get(id).ok_or_else(|| {
                    row.error("rack", &format!("'{id}' is not a rack of the room (racks: {})", ids(racks)))
                })?
            }
            None => 0,
        };
        let (shelf, column) = (row.whole(cols.shelf, "shelf")?, row.whole(cols.column, "column")?);
        let i = index.find(rack, shelf, column).ok_or_else(|| {
            let r = &racks[rack];
            let what = format!(
                "rack {} has no shelf {shelf}, column {column} (shelves 1–{}, columns 1–{})",
                r.id,
                r.top_shelf(),
                r.last_column()
            );
            row.error("shelf", &what)
        })?;
        if !lux[i].is_nan() {
            return Err(row.error(
                "shelf",
                &format!("rack {} shelf {shelf} column {column} is given twice", racks[rack].id),
            ));
        }
        lux[i] = row.lux(cols.lux, "lux")?;
        count += 1;
        if let (Some(d), Some(di)) = (dark.as_mut(), cols.dark)
            && !row.text(di, "dark_lux")?.is_empty()
        {
            d[i] = row.lux(di, "dark_lux")?;
        }
    }
    if count == 0 {
        return Err(Error::data(format!("{origin}: the file has a header but no readings")));
    }
    Ok(Readings { origin: origin.to_string(), lux, dark_lux: dark, count })
}

fn ids(racks: &[Rack]) -> String {
    racks.iter().map(|r| r.id.as_str()).collect::<Vec<_>>().join(", ")
}

/// One record with its place, for errors.
struct Row<'a> {
    rec: &'a csv::StringRecord,
    origin: &'a str,
    line: u64,
}

impl Row<'_> {
    fn error(&self, field: &str, what: &str) -> Error {
        Error::data(format!("{}:{}: field '{field}': {what}", self.origin, self.line))
    }

    fn text(&self, i: usize, field: &str) -> Result<&str> {
        self.rec.get(i).ok_or_else(|| self.error(field, "is missing (the row is shorter than the header)"))
    }

    fn number(&self, i: usize, field: &str) -> Result<f64> {
        let t = self.text(i, field)?;
        t.parse().map_err(|_| self.error(field, &format!("'{t}' is not a number")))
    }

    fn lux(&self, i: usize, field: &str) -> Result<f64> {
        let v = self.number(i, field)?;
        if !(v >= 0.0 && v.is_finite()) {
            return Err(self.error(field, &format!("{v} lx: a reading is a finite number ≥ 0 lx")));
        }
        Ok(v)
    }

    fn whole(&self, i: usize, field: &str) -> Result<u32> {
        let v = self.number(i, field)?;
        if v.fract() != 0.0 || !(1.0..=1e9).contains(&v) {
            return Err(
                self.error(field, &format!("{v} is not a {field} number: give a whole number from 1"))
            );
        }
        Ok(v as u32)
    }
}
