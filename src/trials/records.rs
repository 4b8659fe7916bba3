//! The records of a delimited text file, read as a stream with the exact line each
//! starts on. The csv crate's own positions point at the end of the previous record
//! (before any blank lines, and on the LF of a CRLF end), so this drives its
//! state machine (csv-core) directly and counts the line ends itself.

use std::io::Read;

/// Bytes read from the file at a time.
const BLOCK: usize = 1 << 20;

pub struct Records<R> {
    input: R,
    parser: csv_core::Reader,
    block: Vec<u8>,
    /// The unread part of `block`.
    start: usize,
    end: usize,
    at_end_of_file: bool,
    started: bool,
    /// The byte order of a UTF-16 mark at the start of the file, if there is one.
    utf16: Option<&'static str>,
    /// Line ends consumed so far.
    newlines: usize,
    fields: Vec<u8>,
    ends: Vec<usize>,
}

/// One record: its fields as bytes and the 1-based line it starts on.
pub struct Record<'a> {
    pub line: usize,
    fields: &'a [u8],
    ends: &'a [usize],
}

impl<'a> Record<'a> {
    pub fn cell_count(&self) -> usize {
        self.ends.len()
    }

    pub fn fields(&self) -> impl Iterator<Item = &'a [u8]> + use<'a> {
        let (fields, ends) = (self.fields, self.ends);
        (0..ends.len()).map(move |i| {
            let start = if i == 0 { 0 } else { ends[i - 1] };
            &fields[start..ends[i]]
        })
    }
}

impl<R: Read> Records<R> {
    pub fn new(input: R, delimiter: u8) -> Self {
        Records {
            input,
            parser: csv_core::ReaderBuilder::new().delimiter(delimiter).build(),
            block: vec![0; BLOCK],
            start: 0,
            end: 0,
            at_end_of_file: false,
            started: false,
            utf16: None,
            newlines: 0,
            fields: vec![0; 1024],
            ends: vec![0; 64],
        }
    }

    /// Refills the block when it is used up; false at the end of the file.
    fn fill(&mut self) -> std::io::Result<bool> {
        if self.start < self.end {
            return Ok(true);
        }
        if self.at_end_of_file {
            return Ok(false);
        }
        self.start = 0;
        let mut read = self.read_into(0)?;
        if !self.started {
            self.started = true;
            // A UTF-8 byte-order mark, as some spreadsheets write, is not part of the text.
            while read > 0 && read < 3 {
                match self.read_into(read)? {
                    0 => break,
                    more => read += more,
                }
            }
            self.utf16 = crate::files::utf16_mark(&self.block[..read]);
            if self.block[..read].starts_with(b"\xEF\xBB\xBF") {
                self.start = 3;
            }
        }
        self.end = read;
        if read == 0 {
            self.at_end_of_file = true;
            return Ok(false);
        }
        Ok(self.start < self.end)
    }

    /// The byte order of a UTF-16 mark the file starts with, if it does (reads the
    /// first block).
    pub fn utf16(&mut self) -> std::io::Result<Option<&'static str>> {
        self.fill()?;
        Ok(self.utf16)
    }

    fn read_into(&mut self, offset: usize) -> std::io::Result<usize> {
        loop {
            match self.input.read(&mut self.block[offset..]) {
                Err(err) if err.kind() == std::io::ErrorKind::Interrupted => continue,
                other => return other,
            }
        }
    }

    /// The next record, or `None` after the last one. Blank lines between records are
    /// skipped (and counted).
    pub fn next_record(&mut self) -> std::io::Result<Option<Record<'_>>> {
        // Skip the line ends before the record, so that its first line is known.
        while self.fill()? {
            match self.block[self.start] {
                b'\n' => self.newlines += 1,
                b'\r' => {}
                _ => break,
            }
            self.start += 1;
        }
        let line = self.newlines + 1;
        let (mut written, mut cells) = (0, 0);
        loop {
            let more = self.fill()?;
            let input = if more {
                &self.block[self.start..self.end]
            } else {
                &[][..] // tells the parser the file has ended
            };
            let (result, read, wrote, ended) = self.parser.read_record(
                input,
                &mut self.fields[written..],
                &mut self.ends[cells..],
            );
            self.newlines += input[..read].iter().filter(|&&b| b == b'\n').count();
            self.start += read;
            written += wrote;
            cells += ended;
            match result {
                csv_core::ReadRecordResult::InputEmpty => {}
                csv_core::ReadRecordResult::OutputFull => {
                    let doubled = self.fields.len() * 2;
                    self.fields.resize(doubled, 0);
                }
                csv_core::ReadRecordResult::OutputEndsFull => {
                    let doubled = self.ends.len() * 2;
                    self.ends.resize(doubled, 0);
                }
                csv_core::ReadRecordResult::Record => {
                    return Ok(Some(Record {
                        line,
                        fields: &self.fields[..written],
                        ends: &self.ends[..cells],
                    }));
                }
                csv_core::ReadRecordResult::End => return Ok(None),
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn lines_and_cells(text: &str) -> Vec<(usize, Vec<String>)> {
        let mut records = Records::new(text.as_bytes(), b',');
        let mut found = Vec::new();
        while let Some(record) = records.next_record().unwrap() {
            let cells = record
                .fields()
                .map(|f| String::from_utf8(f.to_vec()).unwrap())
                .collect();
            found.push((record.line, cells));
        }
        found
    }

    #[test]
    fn lines_are_exact_with_blank_lines_crlf_and_quoted_line_breaks() {
        let expected = |cr: &str| {
            vec![
                (1, vec!["a".to_string(), "b".into()]),
                (2, vec!["1".into(), "2".into()]),
                (4, vec!["3".into(), "4".into()]),
                (5, vec![format!("x{cr}\ny"), "5".into()]),
                (7, vec!["6".into(), "7".into()]),
            ]
        };
        assert_eq!(
            lines_and_cells("a,b\n1,2\n\n3,4\n\"x\ny\",5\n6,7\n"),
            expected("")
        );
        assert_eq!(
            lines_and_cells("a,b\r\n1,2\r\n\r\n3,4\r\n\"x\r\ny\",5\r\n6,7"),
            expected("\r")
        );
        assert_eq!(
            lines_and_cells("\u{feff}\n\na,b\n"),
            vec![(3, vec!["a".to_string(), "b".into()])]
        );
    }

    #[test]
    fn records_longer_than_a_block_and_a_buffer_are_whole() {
        let long = "x".repeat(3 * BLOCK);
        let text = format!("a,b\n{long},\"q\"\"q\"\n2,3\n");
        let found = lines_and_cells(&text);
        assert_eq!(found.len(), 3);
        assert_eq!(found[1].1, [long, "q\"q".to_string()]);
        assert_eq!(found[2], (3, vec!["2".to_string(), "3".into()]));
    }
}
