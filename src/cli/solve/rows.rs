//! A chunk of CSV rows held in one contiguous buffer: the text of every field one after the
//! other, each followed by a separator byte, the end offset of each field, and the field
//! count at the end of each row.
//!
//! `solve` reads a chunk on one thread and solves it on others. A record per row (two heap
//! blocks each) scattered the chunk over memory, and the solving threads waited on a cache
//! miss for nearly every row; one buffer is read front to back and the hardware prefetches
//! it. The buffers are reused from chunk to chunk, so memory stays constant.

use std::io::Read;

use super::records::Records;

/// Rows of one chunk (see the module doc).
#[derive(Default)]
pub(super) struct Rows {
    /// Every field's text followed by a separator byte, concatenated (validated UTF-8).
    text: String,
    /// End offset in `text` of each field; a field starts one past the end before it.
    ends: Vec<usize>,
    /// For each row: the count of fields up to and including it.
    row_ends: Vec<usize>,
    /// For each row: the line its first byte is on (for messages; see [`Records::next`]).
    lines: Vec<u64>,
    /// For each row: whether no field needs quoting (see [`Records::next`]).
    plain: Vec<bool>,
}

/// One row of a [`Rows`] chunk.
#[derive(Clone, Copy)]
pub(super) struct Row<'a> {
    text: &'a str,
    /// End offsets of this row's fields.
    ends: &'a [usize],
    /// Start offset of the first field.
    start: usize,
    /// No field needs quoting when written to CSV.
    pub(super) plain: bool,
}

impl Row<'_> {
    /// The count of fields in this row.
    pub(super) fn len(&self) -> usize {
        self.ends.len()
    }

    /// Field `i`, if the row has it.
    pub(super) fn get(&self, i: usize) -> Option<&str> {
        self.text.get(self.start_of(i)?..*self.ends.get(i)?)
    }

    /// Where field `i` starts: one past the end of the field before, or the row's start.
    fn start_of(&self, i: usize) -> Option<usize> {
        match i.checked_sub(1) {
            None => Some(self.start),
            Some(p) => Some(*self.ends.get(p)? + 1),
        }
    }

    /// Field `i`'s bytes, if the row has it (the chunk's text is UTF-8 throughout, and a
    /// field ends at a separator, so these bytes are a field's whole text).
    pub(super) fn bytes(&self, i: usize) -> Option<&[u8]> {
        self.text
            .as_bytes()
            .get(self.start_of(i)?..*self.ends.get(i)?)
    }

    /// Fields `first..=last` as they stand in the text: separated by commas, as CSV.
    pub(super) fn span(&self, first: usize, last: usize) -> Option<&str> {
        self.text.get(self.start_of(first)?..*self.ends.get(last)?)
    }
}

impl Rows {
    /// The count of rows held.
    pub(super) fn len(&self) -> usize {
        self.row_ends.len()
    }

    /// Row `i`, if there is one.
    pub(super) fn row(&self, i: usize) -> Option<Row<'_>> {
        let last = *self.row_ends.get(i)?;
        let first = match i.checked_sub(1) {
            None => 0,
            Some(p) => *self.row_ends.get(p)?,
        };
        let start = match first.checked_sub(1) {
            None => 0,
            Some(f) => *self.ends.get(f)? + 1,
        };
        Some(Row {
            text: &self.text,
            ends: self.ends.get(first..last)?,
            start,
            plain: *self.plain.get(i)?,
        })
    }

    /// Empty the chunk, keeping its buffers, and read up to `max_rows` rows into it. A cell
    /// that is not UTF-8 stops the read with a message naming the line and column.
    pub(super) fn fill<R: Read>(
        &mut self,
        records: &mut Records<R>,
        header: &csv::StringRecord,
        max_rows: usize,
    ) -> Result<(), String> {
        let mut bytes = std::mem::take(&mut self.text).into_bytes();
        bytes.clear();
        self.ends.clear();
        self.row_ends.clear();
        self.lines.clear();
        self.plain.clear();
        while self.row_ends.len() < max_rows {
            match records.next(&mut bytes, &mut self.ends) {
                Ok(Some((line, plain))) => {
                    self.row_ends.push(self.ends.len());
                    self.lines.push(line);
                    self.plain.push(plain);
                }
                Ok(None) => break,
                Err(e) => return Err(format!("cannot read the input: {e}")),
            }
        }
        // One check of the whole chunk; the first bad byte names its row and field.
        match String::from_utf8(bytes) {
            Ok(text) => {
                self.text = text;
                Ok(())
            }
            Err(e) => Err(self.utf8_message(e.utf8_error().valid_up_to(), header)),
        }
    }

    /// The message for the text not being UTF-8 from byte `at` on.
    fn utf8_message(&self, at: usize, header: &csv::StringRecord) -> String {
        let field = self.ends.partition_point(|&e| e < at);
        let row = self.row_ends.partition_point(|&n| n <= field);
        let first = row
            .checked_sub(1)
            .and_then(|p| self.row_ends.get(p))
            .copied()
            .unwrap_or(0);
        let line = self.lines.get(row).copied().unwrap_or(0);
        super::utf8_error(line, field - first, header)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_give_back_their_fields() {
        let data = "a,b,c\n1,,\"x,y\"\n\n22,3\n\"\u{e9}t\u{e9}\",\u{fc}\n";
        let mut records = Records::new(data.as_bytes());
        let header = csv::StringRecord::from(vec!["a", "b", "c"]);
        let head = records.header_bytes().unwrap();
        assert_eq!(head, b"a,b,c\n");
        let mut rows = Rows::default();
        rows.fill(&mut records, &header, 10).unwrap();
        assert_eq!(rows.len(), 3);
        let r0 = rows.row(0).unwrap();
        assert_eq!(r0.len(), 3);
        assert_eq!(
            (r0.get(0), r0.get(1), r0.get(2), r0.get(3)),
            (Some("1"), Some(""), Some("x,y"), None)
        );
        assert_eq!((r0.plain, r0.span(1, 2)), (false, Some(",x,y")));
        let r1 = rows.row(1).unwrap();
        assert_eq!((r1.len(), r1.get(0), r1.get(1)), (2, Some("22"), Some("3")));
        assert_eq!(
            (r1.plain, r1.span(0, 1), r1.span(1, 1)),
            (true, Some("22,3"), Some("3"))
        );
        let r2 = rows.row(2).unwrap();
        assert_eq!(
            (r2.len(), r2.get(0), r2.get(1)),
            (2, Some("\u{e9}t\u{e9}"), Some("\u{fc}"))
        );
        assert!(rows.row(3).is_none());
        assert_eq!(
            (r2.bytes(1), r2.bytes(2)),
            (Some("\u{fc}".as_bytes()), None)
        );
        // Refilling reuses the buffers and forgets the old rows.
        rows.fill(&mut records, &header, 10).unwrap();
        assert_eq!(rows.len(), 0);
    }

    /// The bad cell is named by line (the file's, header = line 1) and column, counted by
    /// hand here: the third data row's second field.
    #[test]
    fn a_bad_cell_is_named_by_line_and_column() {
        let data = b"a,b,c\n1,2,3\n\"q\nq\",5,6\n7,\xff,9\n10,11,12\n";
        let mut records = Records::new(&data[..]);
        let header = csv::StringRecord::from(vec!["a", "b", "c"]);
        records.header_bytes().unwrap();
        let mut rows = Rows::default();
        let err = rows.fill(&mut records, &header, 10).unwrap_err();
        assert!(err.starts_with("line 5, column 2 (`b`)"), "{err}");
    }
}
