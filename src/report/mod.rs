//! Tables for people, CSV and JSON for scripts, from one [`Table`] so that the three carry the
//! same numbers. The people's table rounds numbers to a column's stated decimals; CSV and JSON
//! print every number in full (shortest representation that reads back to the same f64).
//! Column names carry their units (`energy_cm-1`, `r_angstrom`). Knows nothing of how the
//! numbers were made.

pub mod tables;

use std::fmt::Write;

/// One cell of a table.
#[derive(Debug, Clone, PartialEq)]
pub enum Cell {
    Number(f64),
    Integer(i64),
    Text(String),
    Flag(bool),
    /// An error estimate: two significant figures for people (a rounded error must never read
    /// as zero), every digit in CSV and JSON.
    Error(f64),
    Missing,
}

/// A column: its name (with unit suffix) and the decimals shown to people.
#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    pub name: String,
    pub decimals: usize,
}

impl Column {
    pub fn new(name: impl Into<String>, decimals: usize) -> Column {
        Column {
            name: name.into(),
            decimals,
        }
    }
}

/// A titled table with notes printed under it (to people) or kept as metadata (JSON).
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Table {
    pub title: String,
    pub columns: Vec<Column>,
    pub rows: Vec<Vec<Cell>>,
    pub notes: Vec<String>,
}

/// Output format.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, clap::ValueEnum)]
pub enum Format {
    /// Aligned table for people.
    #[default]
    Table,
    /// Comma-separated values with a header row.
    Csv,
    /// JSON: {"title", "columns", "rows": [{column: value}], "notes"}.
    Json,
}

/// A number as people read it in a table: `decimals` places but at most ten significant
/// figures, exponent form (7 figures) from 1e9 and (4 figures) below 1e-3; CSV and JSON keep
/// every digit (our own display rule).
fn people_cell(cell: &Cell, decimals: usize) -> String {
    match cell {
        Cell::Number(x) if x.is_finite() => {
            if x.abs() >= 1e9 {
                format!("{x:.6e}")
            } else if x.abs() >= 1e-3 || *x == 0.0 || decimals == 0 {
                // At most 10 significant figures for people (CSV and JSON keep them all).
                let integer_digits = x.abs().log10().floor().max(0.0) as usize + 1;
                let shown = decimals.min(10usize.saturating_sub(integer_digits));
                format!("{x:.shown$}")
            } else {
                format!("{x:.3e}")
            }
        }
        Cell::Number(x) => format!("{x}"),
        Cell::Error(x) => format!("{x:.1e}"),
        Cell::Integer(i) => i.to_string(),
        Cell::Text(t) => t.clone(),
        Cell::Flag(b) => if *b { "yes" } else { "NO" }.to_string(),
        Cell::Missing => "-".to_string(),
    }
}

fn csv_cell(cell: &Cell) -> String {
    match cell {
        // Shortest text that reads back to the same f64; exponent form for very small and
        // very large magnitudes, which plain decimals would spell out digit by digit.
        Cell::Number(x) | Cell::Error(x) if *x != 0.0 && (x.abs() < 1e-4 || x.abs() >= 1e15) => {
            format!("{x:e}")
        }
        Cell::Number(x) | Cell::Error(x) => format!("{x}"),
        Cell::Integer(i) => i.to_string(),
        Cell::Text(t) => t.clone(),
        Cell::Flag(b) => b.to_string(),
        Cell::Missing => String::new(),
    }
}

fn json_cell(cell: &Cell) -> serde_json::Value {
    match cell {
        Cell::Number(x) | Cell::Error(x) => serde_json::Number::from_f64(*x)
            .map_or(serde_json::Value::Null, serde_json::Value::Number),
        Cell::Integer(i) => serde_json::Value::from(*i),
        Cell::Text(t) => serde_json::Value::from(t.clone()),
        Cell::Flag(b) => serde_json::Value::from(*b),
        Cell::Missing => serde_json::Value::Null,
    }
}

/// Several tables in one output: one after another for people and in CSV (each CSV block
/// headed by a `# title` comment line), a JSON array of the tables.
pub fn render_all(tables: &[Table], format: Format) -> String {
    match format {
        Format::Json => {
            let all: Vec<serde_json::Value> = tables.iter().map(Table::to_json).collect();
            serde_json::to_string_pretty(&all).expect("JSON of plain values") + "\n"
        }
        Format::Csv => tables
            .iter()
            .map(|t| format!("# {}\n{}", t.title, t.render(Format::Csv)))
            .collect::<Vec<_>>()
            .join("\n"),
        Format::Table => tables
            .iter()
            .map(|t| t.render(Format::Table))
            .collect::<Vec<_>>()
            .join("\n"),
    }
}

impl Table {
    pub fn render(&self, format: Format) -> String {
        match format {
            Format::Table => self.render_people(),
            Format::Csv => self.render_csv(),
            Format::Json => {
                serde_json::to_string_pretty(&self.to_json()).expect("JSON of plain values") + "\n"
            }
        }
    }

    fn render_people(&self) -> String {
        let texts: Vec<Vec<String>> = self
            .rows
            .iter()
            .map(|row| {
                row.iter()
                    .zip(&self.columns)
                    .map(|(c, col)| people_cell(c, col.decimals))
                    .collect()
            })
            .collect();
        let widths: Vec<usize> = self
            .columns
            .iter()
            .enumerate()
            .map(|(k, col)| {
                texts
                    .iter()
                    .map(|r| r[k].chars().count())
                    .chain([col.name.len()])
                    .max()
                    .unwrap_or(0)
            })
            .collect();
        let mut out = String::new();
        if !self.title.is_empty() {
            let _ = writeln!(out, "{}", self.title);
        }
        let header: Vec<String> = self
            .columns
            .iter()
            .zip(&widths)
            .map(|(c, w)| format!("{:>w$}", c.name))
            .collect();
        let _ = writeln!(out, "{}", header.join("  "));
        for row in &texts {
            let line: Vec<String> = row
                .iter()
                .zip(&widths)
                .map(|(t, w)| format!("{t:>w$}"))
                .collect();
            let _ = writeln!(out, "{}", line.join("  "));
        }
        for note in &self.notes {
            let _ = writeln!(out, "note: {note}");
        }
        out
    }

    fn render_csv(&self) -> String {
        let mut writer = csv::Writer::from_writer(Vec::new());
        let _ = writer.write_record(self.columns.iter().map(|c| c.name.as_str()));
        for row in &self.rows {
            let _ = writer.write_record(row.iter().map(csv_cell));
        }
        String::from_utf8(writer.into_inner().unwrap_or_default()).unwrap_or_default()
    }

    pub fn to_json(&self) -> serde_json::Value {
        let rows: Vec<serde_json::Value> = self
            .rows
            .iter()
            .map(|row| {
                serde_json::Value::Object(
                    self.columns
                        .iter()
                        .zip(row)
                        .map(|(c, v)| (c.name.clone(), json_cell(v)))
                        .collect(),
                )
            })
            .collect();
        serde_json::json!({
            "title": self.title,
            "columns": self.columns.iter().map(|c| c.name.clone()).collect::<Vec<_>>(),
            "rows": rows,
            "notes": self.notes,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn sample() -> Table {
        Table {
            title: "t".into(),
            columns: vec![Column::new("v", 0), Column::new("energy_cm-1", 4)],
            rows: vec![vec![Cell::Integer(0), Cell::Number(2170.272500000123)]],
            notes: vec!["n".into()],
        }
    }

    #[test]
    fn csv_and_json_carry_full_precision() {
        let table = sample();
        assert!(table.render(Format::Csv).contains("2170.272500000123"));
        let json: serde_json::Value = serde_json::from_str(&table.render(Format::Json)).unwrap();
        assert_eq!(
            json["rows"][0]["energy_cm-1"].as_f64(),
            Some(2170.272500000123)
        );
        assert!(table.render(Format::Table).contains("2170.2725"));
    }

    #[test]
    fn people_see_at_most_ten_significant_figures() {
        // The expected strings follow our own display rule (see people_cell), not a source:
        // at most ten significant figures, exponent form (7 figures) from 1e9 on.
        assert_eq!(
            people_cell(&Cell::Number(254796.74771234), 8),
            "254796.7477"
        );
        assert_eq!(people_cell(&Cell::Number(1.5e12), 2), "1.500000e12");
        assert_eq!(people_cell(&Cell::Number(0.5), 4), "0.5000");
    }
}
