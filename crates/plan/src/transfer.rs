//! Evaluations and map libraries as bytes, for another copy of the same build: the workbench's
//! evaluation worker and its page hand them to each other this way.
//!
//! Not a boundary format: both ends run the same code, so there is no version and nothing is kept
//! for other programs (the plan file, the link, the library files and the JSON summary are the
//! boundaries). Bytes carry every number exactly, NaN included, so a library arrives with the same
//! content hash it left with. An evaluation leaves its per-frame maps and coldest-point trace
//! behind: they are most of its bytes, and what they feed (kills, verdicts, curves) is already in
//! it.

use crate::error::PlanError;
use crate::evaluate::Evaluation;
use crate::library::MapLibrary;

fn encode<T: serde::Serialize>(what: &str, value: &T) -> Result<Vec<u8>, PlanError> {
    postcard::to_allocvec(value)
        .map_err(|e| PlanError::new(what, format!("the {what} could not be encoded ({e})")))
}

fn decode<T: serde::de::DeserializeOwned>(what: &str, bytes: &[u8]) -> Result<T, PlanError> {
    postcard::from_bytes(bytes).map_err(|e| {
        PlanError::new(
            what,
            format!("the {what} that arrived could not be read ({e})"),
        )
    })
}

impl Evaluation {
    /// This evaluation as bytes, without [`TimeCourse::frames`] and
    /// [`TimeCourse::coldest_trace`].
    ///
    /// [`TimeCourse::frames`]: traycast_thermal::simulate::TimeCourse::frames
    /// [`TimeCourse::coldest_trace`]: traycast_thermal::simulate::TimeCourse::coldest_trace
    pub fn to_transfer(mut self) -> Result<Vec<u8>, PlanError> {
        self.course.frames = Vec::new();
        self.course.coldest_trace = Vec::new();
        encode("evaluation", &self)
    }

    /// Reads [`Evaluation::to_transfer`]'s bytes.
    pub fn from_transfer(bytes: &[u8]) -> Result<Evaluation, PlanError> {
        decode("evaluation", bytes)
    }
}

impl MapLibrary {
    /// This library as bytes.
    pub fn to_transfer(&self) -> Result<Vec<u8>, PlanError> {
        encode("library", self)
    }

    /// Reads [`MapLibrary::to_transfer`]'s bytes.
    pub fn from_transfer(bytes: &[u8]) -> Result<MapLibrary, PlanError> {
        decode("library", bytes)
    }
}

#[cfg(test)]
mod tests {
    use crate::demos;
    use crate::evaluate::{Evaluation, Evaluator, Options};
    use crate::library::MapLibrary;

    /// Everything the page shows survives the trip, NaN temperatures of empty cells included.
    #[test]
    fn every_demo_evaluation_survives_the_trip() {
        for name in demos::DEMOS {
            let plan = demos::demo(name).expect("demo");
            let mut eval = Evaluator::new()
                .evaluate(&plan, Options::default())
                .expect("evaluates");
            let bytes = eval.clone().to_transfer().expect("encodes");
            let back = Evaluation::from_transfer(&bytes).expect("decodes");
            eval.course.frames.clear();
            eval.course.coldest_trace.clear();
            // PartialEq fails on NaN, so compare the debug forms, which spell NaN alike.
            assert_eq!(format!("{back:?}"), format!("{eval:?}"), "{name}");
        }
    }

    /// A library keeps every bit of its numbers, so its content hash (and a plan pointed at it)
    /// still matches on the other side; text forms can lose the last bit of a float.
    #[test]
    fn a_library_arrives_with_its_hash() {
        use crate::library::{RateBasis, RecordedLoad, Uncertainty};
        use traycast_thermal::dielectric::LossClass;
        let library = MapLibrary {
            name: "bench, oven 2".into(),
            width: 2,
            height: 1,
            cell_mm: 12.5,
            configs: 2,
            basis: RateBasis::Thawed,
            loads: vec![RecordedLoad {
                name: "lunch".into(),
                layout: vec![Some(LossClass::Meat), None],
                rates: vec![1.0 / 3.0, 0.0, 0.1 + 0.2, 0.0],
                uncertainty: Some(Uncertainty {
                    se: vec![1e-7 / 3.0, 0.0, 2f64.sqrt(), f64::MIN_POSITIVE / 8.0],
                    filled: vec![false, false, true, false],
                }),
            }],
        };
        let back =
            MapLibrary::from_transfer(&library.to_transfer().expect("encodes")).expect("decodes");
        assert_eq!(back.content_hash(), library.content_hash());
        assert_eq!(back, library);
    }

    #[test]
    fn bytes_that_are_not_an_evaluation_are_refused() {
        let e = Evaluation::from_transfer(&[1, 2, 3]).unwrap_err();
        assert!(e.to_string().contains("could not be read"), "{e}");
    }
}
