//! Analyses run in the background so that the page can show how far they have got: a job
//! holds its progress (the stage the pipeline announces and its steps) and, once done, its
//! answer. At most [`KEPT_JOBS`] jobs are kept, the oldest dropped first.

use super::WebResponse;
use crate::progress::Progress;
use std::collections::VecDeque;
use std::sync::atomic::{AtomicU64, Ordering};
use std::sync::{Arc, Mutex};

/// Jobs kept at once (a choice of ours: two per kept run).
pub const KEPT_JOBS: usize = 16;

/// One analysis in the background.
#[derive(Debug, Default)]
pub struct Job {
    stage: Mutex<String>,
    steps: AtomicU64,
    done: AtomicU64,
    answer: Mutex<Option<WebResponse>>,
}

impl Progress for Job {
    fn stage(&self, what: &str, steps: u64) {
        if let Ok(mut s) = self.stage.lock() {
            *s = what.to_string();
        }
        self.steps.store(steps, Ordering::Relaxed);
        self.done.store(0, Ordering::Relaxed);
    }
    fn advance(&self, n: u64) {
        self.done.fetch_add(n, Ordering::Relaxed);
    }
    fn finish(&self) {}
}

impl Job {
    /// Keep the job's answer.
    pub fn complete(&self, answer: WebResponse) {
        if let Ok(mut a) = self.answer.lock() {
            *a = Some(answer);
        }
    }

    /// The answer when done; otherwise 202 with the stage and its steps.
    pub fn poll(&self) -> WebResponse {
        if let Ok(a) = self.answer.lock() {
            if let Some(answer) = a.as_ref() {
                return answer.clone();
            }
        }
        let stage = self.stage.lock().map(|s| s.clone()).unwrap_or_default();
        WebResponse::json(
            202,
            &serde_json::json!({
                "stage": if stage.is_empty() { "starting".to_string() } else { stage },
                "done": self.done.load(Ordering::Relaxed),
                "steps": self.steps.load(Ordering::Relaxed),
            }),
        )
    }
}

/// The jobs by id.
#[derive(Debug, Default)]
pub struct Jobs {
    next: u64,
    jobs: VecDeque<(String, Arc<Job>)>,
}

impl Jobs {
    /// A new job; returns its id.
    pub fn add(&mut self) -> (String, Arc<Job>) {
        self.next += 1;
        let id = format!("j{}", self.next);
        let job = Arc::new(Job::default());
        self.jobs.push_back((id.clone(), Arc::clone(&job)));
        while self.jobs.len() > KEPT_JOBS {
            self.jobs.pop_front();
        }
        (id, job)
    }

    /// A kept job.
    pub fn get(&self, id: &str) -> Option<Arc<Job>> {
        self.jobs
            .iter()
            .find(|(k, _)| k == id)
            .map(|(_, j)| Arc::clone(j))
    }
}
