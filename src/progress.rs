//! How a long computation tells its caller how far it has got, without the library knowing
//! who listens: the command line draws a bar on the terminal, the web page sends its own
//! messages, tests and benches listen to nothing ([`Silent`]).

/// A listener to the progress of a run. Stages are announced by whoever runs them; the
/// computations themselves only [`advance`](Progress::advance), from any thread.
pub trait Progress: Sync {
    /// A stage begins: what is being done, in a few words, and how many steps it has.
    fn stage(&self, what: &str, steps: u64);
    /// `n` more steps of the current stage are done.
    fn advance(&self, n: u64);
    /// The current stage is over.
    fn finish(&self);
}

/// Progress that nobody listens to.
#[derive(Debug, Clone, Copy, Default)]
pub struct Silent;

impl Progress for Silent {
    fn stage(&self, _what: &str, _steps: u64) {}
    fn advance(&self, _n: u64) {}
    fn finish(&self) {}
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::sync::atomic::{AtomicU64, Ordering};

    struct Counter(AtomicU64);
    impl Progress for Counter {
        fn stage(&self, _what: &str, _steps: u64) {
            self.0.store(0, Ordering::Relaxed);
        }
        fn advance(&self, n: u64) {
            self.0.fetch_add(n, Ordering::Relaxed);
        }
        fn finish(&self) {}
    }

    #[test]
    fn the_evidence_stage_advances_once_per_individual() {
        let model = crate::model::Model::default_model().expect("the embedded model loads");
        let table = "id,glabella,mastoid\nA,1,2\nB,4,5\nC,,\n";
        let a = crate::data::read_assemblage_text(
            "t.csv",
            table.as_bytes(),
            &model.catalogue,
            &crate::data::ReadSettings::default(),
        )
        .expect("the table reads");
        let c = Counter(AtomicU64::new(0));
        c.stage("weighing the evidence", 3);
        let ev = crate::likelihood::evaluate_with_progress(
            &model,
            &a,
            &crate::model::Context::new(1),
            &c,
        );
        assert_eq!(ev.len(), 3);
        assert_eq!(c.0.load(Ordering::Relaxed), 3);
    }
}
