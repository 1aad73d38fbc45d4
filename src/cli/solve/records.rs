//! The CSV records of `solve`'s input, read with the `csv` crate's rules at the speed of a
//! byte scan.
//!
//! # Why not the `csv` crate's reader
//!
//! `solve` reads a million rows a second. The `csv` crate runs every byte through its
//! state machine, copies each record into a record buffer, and the chunk then copies it
//! again; that was a sixth of the command's CPU. Most data lines hold no quote and end in
//! LF or CRLF, and for those the state machine's answer is known: the fields are the text
//! between commas. This reader takes such lines in one scan and copies them once, straight
//! into the chunk. A line with a quote goes through `csv_core`, the `csv` crate's own state
//! machine, so quoted fields, doubled quotes and line breaks inside quotes read exactly as
//! they did.
//!
//! # The `csv` crate's rules kept here (reader settings: flexible, everything else default)
//!
//! - A record ends at LF, at CR, or at CRLF (the `\n` of a CRLF is skipped as the start of
//!   an empty line); empty lines are skipped; the last line needs no terminator.
//! - A quote is special only at the start of a field; any line holding one takes the
//!   state machine.
//! - A UTF-8 byte-order mark at the start of the file is dropped (by `csv_core`, which reads
//!   the header record).
//!
//! One rule differs, for the better: a record's line (named in messages) is the line its
//! first byte is on, 1 plus the count of `\n` bytes before it. The `csv` crate counts only
//! up to the end of the record before, so it named line 2 for a bad cell on line 4 after a
//! skipped empty line in a CRLF file.

use std::io::{self, Read};

use csv_core::ReadRecordResult;

/// Bytes asked of the source per read.
const READ_SIZE: usize = 1 << 20;

/// What a byte means to [`scan`]: ordinary, a comma, or a byte that ends the scan (a line
/// end, or a quote, which sends the line to the state machine). A table look-up per byte
/// measured twice as fast as matching the byte against the four values.
const ORDINARY: u8 = 0;
const COMMA: u8 = 1;
const STOP: u8 = 2;
const CLASS: [u8; 256] = {
    let mut t = [ORDINARY; 256];
    t[b',' as usize] = COMMA;
    t[b'\n' as usize] = STOP;
    t[b'\r' as usize] = STOP;
    t[b'"' as usize] = STOP;
    t
};

/// Scan `avail` to its first line end or quote, pushing `base` plus the offset of every
/// comma before it onto `ends`; returns that byte and its offset, if there is one.
fn scan(avail: &[u8], base: usize, ends: &mut Vec<usize>) -> Option<(usize, u8)> {
    for (i, &b) in avail.iter().enumerate() {
        match CLASS.get(usize::from(b)).copied().unwrap_or(ORDINARY) {
            ORDINARY => {}
            COMMA => ends.push(base + i),
            _ => return Some((i, b)),
        }
    }
    None
}

/// Reads records from a byte source (see the module doc).
///
/// Records are appended to a text buffer and a list of field ends: each field's bytes
/// followed by one separator byte (`,`), and the offset of that separator. The separator
/// lets a plain line be copied whole, commas and all; a field runs from one past the end
/// before it to its own end.
pub(super) struct Records<R> {
    src: R,
    /// Input bytes; `buf[start..end]` are read and not yet consumed.
    buf: Vec<u8>,
    start: usize,
    end: usize,
    eof: bool,
    /// The `csv` crate's state machine, for lines holding a quote (and the header).
    core: csv_core::Reader,
    /// 1 plus the `\n` bytes consumed so far.
    line: u64,
    /// Scratch output of the state machine.
    out: Vec<u8>,
    out_ends: Vec<usize>,
}

impl<R: Read> Records<R> {
    pub(super) fn new(src: R) -> Records<R> {
        Records {
            src,
            buf: vec![0; READ_SIZE],
            start: 0,
            end: 0,
            eof: false,
            core: csv_core::Reader::new(),
            line: 1,
            out: Vec::new(),
            out_ends: Vec::new(),
        }
    }

    /// The header line's raw bytes (byte-order mark included), read by the state machine,
    /// so that the `csv` crate can read them exactly as it reads a whole file's first
    /// record. Empty for an empty file.
    pub(super) fn header_bytes(&mut self) -> io::Result<Vec<u8>> {
        // A byte-order mark is only recognised when its three bytes are read together.
        while self.end < 3 && !self.eof {
            self.refill()?;
        }
        let first = self.start;
        let (mut text, mut ends) = (Vec::new(), Vec::new());
        self.machine_record(&mut text, &mut ends)?;
        Ok(self.buf.get(first..self.start).unwrap_or_default().to_vec())
    }

    /// Append the next record to `text` and `ends` (see [`Records`]); returns the line its
    /// first byte is on (see the module doc) and whether it was a plain line (no
    /// field holds a comma, quote or line break, so none needs quoting when written), or
    /// `None` at the end of the input.
    pub(super) fn next(
        &mut self,
        text: &mut Vec<u8>,
        ends: &mut Vec<usize>,
    ) -> io::Result<Option<(u64, bool)>> {
        let (base, ends_before) = (text.len(), ends.len());
        loop {
            let avail = self.buf.get(self.start..self.end).unwrap_or_default();
            let stop = scan(avail, base, ends);
            match stop {
                // An empty line (or the LF of a CRLF): skipped.
                Some((0, b @ (b'\n' | b'\r'))) => {
                    self.consume(1, b);
                    continue;
                }
                Some((i, b @ (b'\n' | b'\r'))) => {
                    push_plain(text, ends, avail.get(..i).unwrap_or_default());
                    let line = self.line;
                    self.consume(i + 1, b);
                    return Ok(Some((line, true)));
                }
                // A quote: the state machine reads this record.
                Some(_) => {
                    ends.truncate(ends_before);
                    let line = self.line;
                    let found = self.machine_record(text, ends)?;
                    return Ok(found.then_some((line, false)));
                }
                None if self.eof => {
                    if avail.is_empty() {
                        return Ok(None);
                    }
                    push_plain(text, ends, avail);
                    self.start = self.end;
                    return Ok(Some((self.line, true)));
                }
                None => {
                    ends.truncate(ends_before);
                    self.refill()?;
                }
            }
        }
    }

    /// Consume `n` bytes, the last of which is `last`.
    fn consume(&mut self, n: usize, last: u8) {
        self.start += n;
        self.line += u64::from(last == b'\n');
    }

    /// Move the unconsumed bytes to the front (growing the buffer when they fill it) and
    /// read more; sets `eof` when the source has no more.
    fn refill(&mut self) -> io::Result<()> {
        if self.start > 0 {
            self.buf.copy_within(self.start..self.end, 0);
            self.end -= self.start;
            self.start = 0;
        }
        if self.end + READ_SIZE / 2 > self.buf.len() {
            self.buf.resize(self.buf.len() * 2, 0);
        }
        loop {
            let Some(space) = self.buf.get_mut(self.end..) else {
                return Ok(());
            };
            match self.src.read(space) {
                Ok(0) => {
                    self.eof = true;
                    return Ok(());
                }
                Ok(n) => {
                    self.end += n;
                    return Ok(());
                }
                Err(e) if e.kind() == io::ErrorKind::Interrupted => {}
                Err(e) => return Err(e),
            }
        }
    }

    /// Append one record read with the `csv` crate's state machine; false at the end of
    /// the input.
    fn machine_record(&mut self, text: &mut Vec<u8>, ends: &mut Vec<usize>) -> io::Result<bool> {
        let (mut nout_total, mut nend_total) = (0, 0);
        if self.out.is_empty() {
            self.out.resize(1024, 0);
            self.out_ends.resize(64, 0);
        }
        loop {
            if self.start == self.end && !self.eof {
                self.refill()?;
                continue;
            }
            let input = self.buf.get(self.start..self.end).unwrap_or_default();
            let out = self.out.get_mut(nout_total..).unwrap_or_default();
            let out_ends = self.out_ends.get_mut(nend_total..).unwrap_or_default();
            let (res, nin, nout, nend) = self.core.read_record(input, out, out_ends);
            let newlines = input
                .get(..nin)
                .unwrap_or_default()
                .iter()
                .filter(|&&b| b == b'\n')
                .count();
            self.line += newlines as u64;
            self.start += nin;
            nout_total += nout;
            nend_total += nend;
            match res {
                ReadRecordResult::InputEmpty => {}
                ReadRecordResult::OutputFull => {
                    let n = self.out.len() * 2;
                    self.out.resize(n, 0);
                }
                ReadRecordResult::OutputEndsFull => {
                    let n = self.out_ends.len() * 2;
                    self.out_ends.resize(n, 0);
                }
                ReadRecordResult::Record => {
                    let mut from = 0;
                    for &end in self.out_ends.get(..nend_total).unwrap_or_default() {
                        let field = self.out.get(from..end).unwrap_or_default();
                        text.extend_from_slice(field);
                        ends.push(text.len());
                        text.push(b',');
                        from = end;
                    }
                    return Ok(true);
                }
                ReadRecordResult::End => return Ok(false),
            }
        }
    }
}

/// Append a plain line (no quote, no line end) as a record: `ends` already holds the
/// offsets of its commas, which end every field but the last.
fn push_plain(text: &mut Vec<u8>, ends: &mut Vec<usize>, line: &[u8]) {
    text.extend_from_slice(line);
    ends.push(text.len());
    text.push(b',');
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every record of `data` as the `csv` crate reads it, with the line of its first byte:
    /// (fields, line). The crate gives the byte where it began reading the record; empty
    /// lines (CR and LF bytes) are skipped from there, and the LF bytes before are counted.
    fn by_csv(data: &[u8]) -> Vec<(Vec<Vec<u8>>, u64)> {
        let mut rdr = csv::ReaderBuilder::new()
            .flexible(true)
            .has_headers(false)
            .from_reader(data);
        let mut rec = csv::ByteRecord::new();
        let mut all = Vec::new();
        while rdr.read_byte_record(&mut rec).unwrap() {
            let from = rec.position().unwrap().byte() as usize;
            let skipped = data[from..]
                .iter()
                .take_while(|b| matches!(b, b'\r' | b'\n'))
                .count();
            let before = &data[..from + skipped];
            let line = 1 + before.iter().filter(|&&b| b == b'\n').count() as u64;
            all.push((rec.iter().map(<[u8]>::to_vec).collect(), line));
        }
        all
    }

    /// The same through [`Records`], reading `chunk` bytes at a time from the source.
    fn by_records(data: &[u8], chunk: usize) -> Vec<(Vec<Vec<u8>>, u64)> {
        struct Trickle<'a>(&'a [u8], usize);
        impl Read for Trickle<'_> {
            fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
                let n = self.1.min(buf.len()).min(self.0.len());
                let (head, rest) = self.0.split_at(n);
                buf[..n].copy_from_slice(head);
                self.0 = rest;
                Ok(n)
            }
        }
        let mut r = Records::new(Trickle(data, chunk));
        // Records are appended after one already held, as in a chunk.
        let (mut text, mut ends) = (b"junk,".to_vec(), vec![4]);
        let mut all = Vec::new();
        loop {
            let before = ends.len();
            let Some((line, plain)) = r.next(&mut text, &mut ends).unwrap() else {
                break;
            };
            let mut from = ends[before - 1] + 1;
            let fields = ends[before..]
                .iter()
                .map(|&e| {
                    let f = text[from..e].to_vec();
                    from = e + 1;
                    f
                })
                .collect::<Vec<Vec<u8>>>();
            // A plain record's fields need no quoting.
            if plain {
                assert!(fields.iter().flatten().all(|b| !b",\"\r\n".contains(b)));
            }
            all.push((fields, line));
        }
        all
    }

    /// Worked by hand: a header, a row, an empty line, a row with a quoted line break, a
    /// row after CRLF ends; lines 1, 2, 4, 6.
    #[test]
    fn lines_are_those_of_each_records_first_byte() {
        let data = b"h,i\r\n1,2\r\n\r\n\"a\nb\",3\r\n4,5\r\n";
        let lines: Vec<u64> = by_records(data, 3).iter().map(|r| r.1).collect();
        assert_eq!(lines, [1, 2, 4, 6]);
    }

    #[test]
    fn reads_as_the_csv_crate_on_worked_texts() {
        for data in [
            &b"a,b,c\n1,2,3\n"[..],
            b"a,b\r\n1,2\r\n3,4",
            b"a,b\r1,2\r3,4\r",
            b"\n\na,b\n\n\n1,\n,\n,,,\n",
            b"x,\"q,1\",y\n\"multi\nline\",2\n3,\"a\"\"b\"\n",
            b"a\"b,c\nd,e\"\"\n",
            b"\"unterminated,1\n2,3\n",
            b"\"a\"b,c\r\n\r\nd\n",
            b"",
            b"\n",
            b"\r\n",
            b"only",
            b"\"\"",
            b"a,b\n\"x\"\r\n1,2\n",
            b"\xc3\xa9t\xc3\xa9,\xff\n",
        ] {
            let want = by_csv(data);
            for chunk in [1, 2, 3, 7, 1 << 20] {
                assert_eq!(
                    by_records(data, chunk),
                    want,
                    "{:?} read {chunk} bytes at a time",
                    String::from_utf8_lossy(data)
                );
            }
        }
    }

    proptest::proptest! {
        /// Any text of commas, quotes, line ends and letters reads as the `csv` crate reads it,
        /// with each record's line that of its first byte, however the source splits its reads.
        #[test]
        fn reads_as_the_csv_crate_on_any_text(data in proptest::collection::vec(
            proptest::sample::select(vec![b'a', b'1', b',', b'"', b'\n', b'\r', b' ', 0xc3, 0xa9]),
            0..200), chunk in 1usize..40) {
            proptest::prop_assert_eq!(by_records(&data, chunk), by_csv(&data));
        }
    }
}
