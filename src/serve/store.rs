//! Uploaded tables and finished runs, held in memory with a cap on each (the oldest dropped
//! first). Nothing is written to disk.

use crate::output::OutputSet;
use std::collections::VecDeque;

/// An uploaded table.
#[derive(Debug, Clone)]
pub struct Table {
    /// The file name as uploaded (its extension says whether it is a workbook).
    pub name: String,
    /// The file's bytes.
    pub bytes: Vec<u8>,
}

/// Tables and runs by id.
#[derive(Debug, Default)]
pub struct Store {
    next: u64,
    tables: VecDeque<(String, Table)>,
    runs: VecDeque<(String, String, OutputSet)>,
}

impl Store {
    fn id(&mut self, prefix: &str) -> String {
        self.next += 1;
        format!("{prefix}{}", self.next)
    }

    /// Keep a table; returns its id.
    pub fn add_table(&mut self, table: Table) -> String {
        let id = self.id("t");
        self.tables.push_back((id.clone(), table));
        while self.tables.len() > super::KEPT_TABLES {
            self.tables.pop_front();
        }
        id
    }

    /// A kept table.
    pub fn table(&self, id: &str) -> Option<Table> {
        self.tables
            .iter()
            .find(|(k, _)| k == id)
            .map(|(_, t)| t.clone())
    }

    /// Keep a run's files under the name of its table; returns the run's id.
    pub fn add_run(&mut self, table_name: &str, files: OutputSet) -> String {
        let id = self.id("r");
        self.runs
            .push_back((id.clone(), table_name.to_string(), files));
        while self.runs.len() > super::KEPT_RUNS {
            self.runs.pop_front();
        }
        id
    }

    /// A kept run: its table's name and its files.
    pub fn run(&self, id: &str) -> Option<(String, OutputSet)> {
        self.runs
            .iter()
            .find(|(k, _, _)| k == id)
            .map(|(_, n, f)| (n.clone(), f.clone()))
    }
}
