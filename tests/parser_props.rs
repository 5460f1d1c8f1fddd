//! Property tests: every parser owned here (curve TOML, job TOML, nodes, elements, outlines)
//! takes arbitrary bytes or text and answers with a value or an error, never a panic.

use neckline::grid::read::{elements_from_table, nodes_from_table, read_table_from};
use neckline::job::Job;
use neckline::limit::LimitCurve;
use proptest::prelude::*;
use std::path::Path;

/// Text that looks like CSV: digits, signs, separators, quotes, letters of the column names.
fn csvish() -> impl Strategy<Value = String> {
    proptest::string::string_regex("[0-9a-zA-Z.,;\t\"\\- \\n#eE+]{0,300}").unwrap()
}

/// Text that looks like TOML: keys, brackets, quotes, numbers, newlines.
fn tomlish() -> impl Strategy<Value = String> {
    let keys = prop::sample::select(vec![
        "name = \"a\"\n",
        "source = \"s\"\n",
        "points = [",
        "[",
        "]",
        ", ",
        "-30",
        "0",
        "1e308",
        "nan",
        "inf",
        "strain = \"true\"\n",
        "[keeler_brazier]\n",
        "n = 0.2\n",
        "thickness_mm = 0.8\n",
        "d0 = ",
        "unit = \"in\"\n",
        "margin = ",
        "limit = \"x\"\n",
        "\n",
        "\"",
        "=",
        "reading_error = ",
        "-2.5",
        "\n]\n",
    ]);
    prop::collection::vec(keys, 0..40).prop_map(|v| v.concat())
}

/// Either arbitrary bytes or CSV-like text, as a byte vector.
fn csv_input() -> impl Strategy<Value = Vec<u8>> {
    prop_oneof![
        prop::collection::vec(any::<u8>(), 0..400),
        csvish().prop_map(String::into_bytes),
        csvish().prop_map(|s| format!("row,col,X,Y,x,y,z\n{s}").into_bytes()),
        csvish().prop_map(|s| format!("id,X,Y,x,y\n{s}").into_bytes()),
        csvish().prop_map(|s| format!("id,x,y\n{s}").into_bytes()),
    ]
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(256))]

    #[test]
    fn curve_toml_never_panics(text in prop_oneof![tomlish(), any::<String>()]) {
        let _ = LimitCurve::parse(&text, Path::new("c.toml"));
        if let Ok(c) = LimitCurve::parse(&text, Path::new("c.toml")) {
            // A curve that parses answers queries without a panic too.
            let _ = c.limit_major_eng(neckline::strain::TrueStrain(0.0));
        }
    }

    #[test]
    fn job_toml_never_panics(text in prop_oneof![tomlish(), any::<String>()]) {
        let _ = Job::parse(&text, Path::new("job.toml"));
    }

    #[test]
    fn nodes_never_panic(bytes in csv_input()) {
        if let Ok(t) = read_table_from(&bytes[..], Path::new("n.csv"), "nodes") {
            if let Ok(set) = nodes_from_table(t) {
                let _ = neckline::grid::read::grid_cells(&set);
            }
        }
    }

    #[test]
    fn elements_never_panic(bytes in csv_input()) {
        let nodes = read_table_from(
            &b"id,X,Y,x,y\nA,0,0,0,0\nB,1,0,1,0\nC,0,1,0,1\n"[..],
            Path::new("n.csv"),
            "nodes",
        )
        .unwrap();
        let set = nodes_from_table(nodes).unwrap();
        if let Ok(t) = read_table_from(&bytes[..], Path::new("e.csv"), "elements") {
            let _ = elements_from_table(&t, &set);
        }
    }

    #[test]
    fn outlines_never_panic(bytes in csv_input()) {
        if let Ok(t) = read_table_from(&bytes[..], Path::new("o.csv"), "outlines") {
            if let Ok((list, _)) = neckline::commands::fit::outlines(&t) {
                for o in list {
                    let _ = neckline::fit::fit_robust(&o.points);
                }
            }
        }
    }
}
