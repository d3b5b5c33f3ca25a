//! A small, tolerant reader for the reviewable TSV data files: `#` comment lines and blank lines
//! are skipped, a UTF-8 byte-order mark and Windows line endings are accepted, cells are trimmed,
//! missing trailing cells count as empty. Every error names the file, the 1-based line and the
//! column, so a reviewer can fix the table without reading code.

use super::PhaseError;

/// A parsed table: header names plus data rows that borrow from the source text.
#[cfg_attr(not(test), allow(dead_code))]
#[derive(Debug)]
pub(crate) struct Table<'a> {
    file: &'static str,
    header: Vec<&'a str>,
    rows: Vec<Row<'a>>,
}

/// One data row with its 1-based line number in the file.
#[derive(Debug)]
pub(crate) struct Row<'a> {
    file: &'static str,
    line: usize,
    cells: Vec<(&'a str, &'a str)>,
}

impl<'a> Table<'a> {
    /// Parses `text` (the contents of `file`) and checks that all `required` columns exist.
    pub(crate) fn parse(
        file: &'static str,
        text: &'a str,
        required: &[&str],
    ) -> Result<Self, PhaseError> {
        let text = text.strip_prefix('\u{feff}').unwrap_or(text);
        let mut header: Option<Vec<&'a str>> = None;
        let mut rows = Vec::new();
        for (index, raw) in text.split('\n').enumerate() {
            let line = index + 1;
            let raw = raw.strip_suffix('\r').unwrap_or(raw);
            if raw.trim().is_empty() || raw.trim_start().starts_with('#') {
                continue;
            }
            let cells: Vec<&'a str> = raw.split('\t').map(str::trim).collect();
            match &header {
                None => {
                    for (position, name) in cells.iter().enumerate() {
                        if name.is_empty() {
                            return Err(PhaseError::BadHeader {
                                file,
                                line,
                                reason: format!("column {} has an empty name", position + 1),
                            });
                        }
                        if cells[..position].contains(name) {
                            return Err(PhaseError::BadHeader {
                                file,
                                line,
                                reason: format!("column `{name}` appears twice"),
                            });
                        }
                    }
                    header = Some(cells);
                }
                Some(names) => {
                    if cells.len() > names.len() {
                        return Err(PhaseError::TooManyCells {
                            file,
                            line,
                            found: cells.len(),
                            expected: names.len(),
                        });
                    }
                    let paired = names
                        .iter()
                        .enumerate()
                        .map(|(i, name)| (*name, cells.get(i).copied().unwrap_or("")))
                        .collect();
                    rows.push(Row {
                        file,
                        line,
                        cells: paired,
                    });
                }
            }
        }
        let header = header.ok_or(PhaseError::BadHeader {
            file,
            line: 0,
            reason: "no header row found".to_string(),
        })?;
        for column in required {
            if !header.contains(column) {
                return Err(PhaseError::MissingColumn {
                    file,
                    column: (*column).to_string(),
                });
            }
        }
        Ok(Self { file, header, rows })
    }

    /// The data rows in file order.
    pub(crate) fn rows(&self) -> &[Row<'a>] {
        &self.rows
    }

    /// The file name this table was read from.
    #[cfg(test)]
    pub(crate) fn file(&self) -> &'static str {
        self.file
    }

    /// Header names in file order.
    #[cfg(test)]
    pub(crate) fn header(&self) -> &[&'a str] {
        &self.header
    }
}

impl<'a> Row<'a> {
    /// 1-based line number in the source file.
    pub(crate) fn line(&self) -> usize {
        self.line
    }

    /// The file this row came from.
    pub(crate) fn file(&self) -> &'static str {
        self.file
    }

    /// The raw (trimmed) cell; empty when the column is absent or blank.
    pub(crate) fn cell(&self, column: &str) -> &'a str {
        self.cells
            .iter()
            .find(|(name, _)| *name == column)
            .map(|(_, value)| *value)
            .unwrap_or("")
    }

    /// An error for this row and column.
    pub(crate) fn bad(&self, column: &str, value: &str, reason: impl Into<String>) -> PhaseError {
        PhaseError::BadValue {
            file: self.file,
            line: self.line,
            column: column.to_string(),
            value: value.to_string(),
            reason: reason.into(),
        }
    }

    /// A required, non-empty text cell.
    pub(crate) fn text(&self, column: &str) -> Result<&'a str, PhaseError> {
        let value = self.cell(column);
        if value.is_empty() {
            Err(self.bad(column, value, "is required but empty"))
        } else {
            Ok(value)
        }
    }

    /// An optional text cell (empty gives `None`).
    pub(crate) fn opt_text(&self, column: &str) -> Option<&'a str> {
        let value = self.cell(column);
        (!value.is_empty()).then_some(value)
    }

    /// An optional finite number; empty gives `None`.
    pub(crate) fn opt_number(&self, column: &str) -> Result<Option<f64>, PhaseError> {
        let value = self.cell(column);
        if value.is_empty() {
            return Ok(None);
        }
        match value.parse::<f64>() {
            Ok(number) if number.is_finite() => Ok(Some(number)),
            _ => Err(self.bad(column, value, "is not a finite number")),
        }
    }

    /// A required finite number within `[min, max]` (inclusive).
    pub(crate) fn number_in(&self, column: &str, min: f64, max: f64) -> Result<f64, PhaseError> {
        match self.opt_number_in(column, min, max)? {
            Some(number) => Ok(number),
            None => Err(self.bad(column, "", "is required but empty")),
        }
    }

    /// An optional finite number that, when present, lies within `[min, max]`.
    pub(crate) fn opt_number_in(
        &self,
        column: &str,
        min: f64,
        max: f64,
    ) -> Result<Option<f64>, PhaseError> {
        let number = self.opt_number(column)?;
        if let Some(value) = number
            && (value < min || value > max)
        {
            return Err(self.bad(
                column,
                self.cell(column),
                format!("is outside the plausible range {min} to {max}"),
            ));
        }
        Ok(number)
    }

    /// A semicolon-separated list; empty items are dropped.
    pub(crate) fn list(&self, column: &str) -> Vec<&'a str> {
        self.cell(column)
            .split(';')
            .map(str::trim)
            .filter(|item| !item.is_empty())
            .collect()
    }

    /// Requires the listed columns to be empty (they belong to another mode).
    pub(crate) fn require_empty(&self, columns: &[&str], why: &str) -> Result<(), PhaseError> {
        for column in columns {
            let value = self.cell(column);
            if !value.is_empty() {
                return Err(self.bad(column, value, format!("must be empty {why}")));
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    #[test]
    fn comments_blank_lines_bom_and_crlf_are_tolerated() {
        let text = "\u{feff}# note\r\n\r\nid\tvalue\r\n# late comment\r\na\t1\r\nb\r\n";
        let table = Table::parse("t.tsv", text, &["id", "value"]).unwrap();
        assert_eq!(table.header(), &["id", "value"]);
        assert_eq!(table.rows().len(), 2);
        assert_eq!(table.rows()[0].cell("value"), "1");
        assert_eq!(table.rows()[0].line(), 5);
        assert_eq!(table.rows()[1].cell("value"), "");
        assert_eq!(table.file(), "t.tsv");
    }

    #[test]
    fn too_many_cells_names_file_and_line() {
        let err = Table::parse("t.tsv", "id\tv\na\t1\t2\n", &[]).unwrap_err();
        let message = err.to_string();
        assert!(
            message.contains("t.tsv") && message.contains("line 2"),
            "{message}"
        );
    }

    #[test]
    fn missing_column_and_missing_header_are_errors() {
        assert!(matches!(
            Table::parse("t.tsv", "id\n", &["source"]),
            Err(PhaseError::MissingColumn { .. })
        ));
        assert!(matches!(
            Table::parse("t.tsv", "# only a comment\n", &[]),
            Err(PhaseError::BadHeader { .. })
        ));
        assert!(matches!(
            Table::parse("t.tsv", "id\tid\n", &[]),
            Err(PhaseError::BadHeader { .. })
        ));
    }

    #[test]
    fn number_errors_name_the_column_and_value() {
        let table = Table::parse("t.tsv", "id\tx\na\tfast\nb\t900\n", &[]).unwrap();
        let err = table.rows()[0].number_in("x", 0.0, 10.0).unwrap_err();
        assert!(err.to_string().contains("`x`") && err.to_string().contains("fast"));
        let err = table.rows()[1].number_in("x", 0.0, 10.0).unwrap_err();
        assert!(err.to_string().contains("900"), "{err}");
        assert!(table.rows()[0].opt_number("missing").unwrap().is_none());
    }

    proptest! {
        // Property test for the parser: arbitrary text never panics, and any table it accepts
        // has rows with no more cells than the header.
        #[test]
        fn parser_never_panics(text in "[a-z0-9#\t\r\n .;-]{0,200}") {
            if let Ok(table) = Table::parse("p.tsv", &text, &[]) {
                for row in table.rows() {
                    prop_assert!(row.cells.len() == table.header().len());
                }
            }
        }

        #[test]
        fn numbers_round_trip(value in -1.0e6f64..1.0e6) {
            let text = format!("id\tx\na\t{value}\n");
            let table = Table::parse("p.tsv", &text, &[]).unwrap();
            prop_assert_eq!(table.rows()[0].opt_number("x").unwrap(), Some(value));
        }
    }
}
