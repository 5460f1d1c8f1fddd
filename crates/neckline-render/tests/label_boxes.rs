//! The labels of the diagram and the map overlap nowhere: every label box the placer put on a
//! picture is checked against every other (rectangle intersection, common practice).

use neckline_core::output::fixture;
use neckline_core::strain::StrainMeasure;
use neckline_render::chart::label::{boxes_overlap, take_placed};
use neckline_render::fld::{fld_svg, FldOptions};
use neckline_render::map::{map_svg, MapValue};

fn assert_apart(picture: &str, boxes: &[(i32, i32, i32, i32)]) {
    assert!(!boxes.is_empty(), "{picture}: no label placed");
    for (i, a) in boxes.iter().enumerate() {
        for b in &boxes[i + 1..] {
            assert!(
                !boxes_overlap(*a, *b),
                "{picture}: labels {a:?} and {b:?} overlap"
            );
        }
    }
}

#[test]
fn diagram_labels_overlap_nowhere() {
    for measure in [StrainMeasure::Engineering, StrainMeasure::True] {
        let a = fixture::analysis(true);
        take_placed();
        let opts = FldOptions {
            measure,
            ..FldOptions::default()
        };
        fld_svg(&a, &opts).unwrap();
        assert_apart(&format!("fld {measure:?}"), &take_placed());
    }
}

#[test]
fn map_labels_overlap_nowhere() {
    let a = fixture::analysis(true);
    for value in [MapValue::Margin, MapValue::Thinning, MapValue::Major] {
        take_placed();
        assert!(map_svg(&a, value).unwrap().is_some());
        assert_apart(&format!("map {value:?}"), &take_placed());
    }
}
