//! A chunk of CSV rows held in one contiguous buffer: the text of every field one after the
//! other, the end offset of each field, and the field count at the end of each row.
//!
//! `solve` reads a chunk on one thread and solves it on others. A record per row (two heap
//! blocks each) scattered the chunk over memory, and the solving threads waited on a cache
//! miss for nearly every row; one buffer is read front to back and the hardware prefetches
//! it. The buffers are reused from chunk to chunk, so memory stays constant.

use std::io::Read;

/// Rows of one chunk (see the module doc).
#[derive(Default)]
pub(super) struct Rows {
    /// Every field's text, concatenated (validated UTF-8).
    text: String,
    /// End offset in `text` of each field; a field starts where the one before ends.
    ends: Vec<usize>,
    /// For each row: the count of fields up to and including it.
    row_ends: Vec<usize>,
}

/// One row of a [`Rows`] chunk.
#[derive(Clone, Copy)]
pub(super) struct Row<'a> {
    text: &'a str,
    /// End offsets of this row's fields.
    ends: &'a [usize],
    /// Start offset of the first field.
    start: usize,
}

impl Row<'_> {
    /// The count of fields in this row.
    pub(super) fn len(&self) -> usize {
        self.ends.len()
    }

    /// Field `i`, if the row has it.
    pub(super) fn get(&self, i: usize) -> Option<&str> {
        let end = *self.ends.get(i)?;
        let start = match i.checked_sub(1) {
            None => self.start,
            Some(p) => *self.ends.get(p)?,
        };
        self.text.get(start..end)
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
            Some(f) => *self.ends.get(f)?,
        };
        Some(Row {
            text: &self.text,
            ends: self.ends.get(first..last)?,
            start,
        })
    }

    /// Empty the chunk, keeping its buffers, and read up to `max_rows` rows into it through
    /// `record` (a scratch record). A cell that is not UTF-8 stops the read with a message
    /// naming the line and column.
    pub(super) fn fill<R: Read>(
        &mut self,
        rdr: &mut csv::Reader<R>,
        record: &mut csv::ByteRecord,
        header: &csv::StringRecord,
        max_rows: usize,
    ) -> Result<(), String> {
        self.text.clear();
        self.ends.clear();
        self.row_ends.clear();
        while self.row_ends.len() < max_rows {
            match rdr.read_byte_record(record) {
                Ok(true) => self.push(record, header)?,
                Ok(false) => break,
                Err(e) => return Err(super::read_error(&e, header)),
            }
        }
        Ok(())
    }

    fn push(&mut self, record: &csv::ByteRecord, header: &csv::StringRecord) -> Result<(), String> {
        // A record's fields lie one after the other in its buffer: validate them in one go.
        let Ok(all) = std::str::from_utf8(record.as_slice()) else {
            let field = record
                .iter()
                .position(|f| std::str::from_utf8(f).is_err())
                .unwrap_or(0);
            let line = record.position().map_or(0, |p| p.line());
            return Err(super::utf8_error(line, field, header));
        };
        let mut end = self.text.len();
        self.text.push_str(all);
        for field in record.iter() {
            end += field.len();
            self.ends.push(end);
        }
        self.row_ends.push(self.ends.len());
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_give_back_their_fields() {
        let data = "a,b,c\n1,,\"x,y\"\n\n22,3\n\"\u{e9}t\u{e9}\",\u{fc}\n";
        let mut rdr = csv::ReaderBuilder::new()
            .flexible(true)
            .from_reader(data.as_bytes());
        let header = rdr.headers().unwrap().clone();
        let mut rows = Rows::default();
        let mut rec = csv::ByteRecord::new();
        rows.fill(&mut rdr, &mut rec, &header, 10).unwrap();
        assert_eq!(rows.len(), 3);
        let r0 = rows.row(0).unwrap();
        assert_eq!(r0.len(), 3);
        assert_eq!(
            (r0.get(0), r0.get(1), r0.get(2), r0.get(3)),
            (Some("1"), Some(""), Some("x,y"), None)
        );
        let r1 = rows.row(1).unwrap();
        assert_eq!((r1.len(), r1.get(0), r1.get(1)), (2, Some("22"), Some("3")));
        let r2 = rows.row(2).unwrap();
        assert_eq!(
            (r2.len(), r2.get(0), r2.get(1)),
            (2, Some("\u{e9}t\u{e9}"), Some("\u{fc}"))
        );
        assert!(rows.row(3).is_none());
        // Refilling reuses the buffers and forgets the old rows.
        rows.fill(&mut rdr, &mut rec, &header, 10).unwrap();
        assert_eq!(rows.len(), 0);
    }
}
