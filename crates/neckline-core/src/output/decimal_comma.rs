//! A table written for a spreadsheet set to a decimal comma: `;` between fields and `,` as the
//! decimal mark, the form such spreadsheets read and write (common practice in continental
//! Europe). Text columns are left as they are.

use std::io::{self, Read, Write};

/// Columns whose cells are text even where they read as a number.
const TEXT_COLUMNS: &[&str] = &["id", "stage", "note", "file", "tryout"];

/// Whether `cell` of column `name` is a number to write with a decimal comma.
fn numeric(name: &str, cell: &str) -> bool {
    !TEXT_COLUMNS.contains(&name) && cell.trim().parse::<f64>().is_ok_and(f64::is_finite)
}

/// Copy the comma-separated table `input` (header first) to `output` with `;` between fields
/// and a decimal comma in its numbers, one record at a time.
pub fn to_decimal_comma(input: impl Read, output: impl Write) -> io::Result<()> {
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(false)
        .flexible(true)
        .from_reader(input);
    let mut writer = csv::WriterBuilder::new()
        .delimiter(b';')
        .flexible(true)
        .from_writer(output);
    let mut record = csv::StringRecord::new();
    let mut names: Option<Vec<String>> = None;
    let mut out: Vec<String> = Vec::new();
    let bad = |e: csv::Error| io::Error::new(io::ErrorKind::InvalidData, e.to_string());
    while reader.read_record(&mut record).map_err(bad)? {
        out.clear();
        match &names {
            None => {
                names = Some(record.iter().map(str::to_string).collect());
                out.extend(record.iter().map(str::to_string));
            }
            Some(names) => {
                for (i, cell) in record.iter().enumerate() {
                    let name = names.get(i).map_or("", String::as_str);
                    out.push(if numeric(name, cell) {
                        cell.replace('.', ",")
                    } else {
                        cell.to_string()
                    });
                }
            }
        }
        writer.write_record(&out).map_err(bad)?;
    }
    writer.flush()
}

#[cfg(test)]
mod tests {
    //! Expectations from the module documentation: `;` between fields, decimal commas in the
    //! numbers, text untouched (a `;` inside text quoted as RFC 4180 quotes a separator).
    use super::*;

    fn convert(text: &str) -> String {
        let mut out = Vec::new();
        to_decimal_comma(text.as_bytes(), &mut out).unwrap();
        String::from_utf8(out).unwrap()
    }

    #[test]
    fn numbers_take_a_decimal_comma_and_text_stays() {
        let text = "id,major_eng_pct,zone,note\n1.5,-3.25,safe,\"a; b, c\"\nA2,1e-3,failed,\n";
        assert_eq!(
            convert(text),
            "id;major_eng_pct;zone;note\n1.5;-3,25;safe;\"a; b, c\"\nA2;1e-3;failed;\n"
        );
    }
}
