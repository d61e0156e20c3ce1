//! One individual's observations, held sparsely: only the traits recorded (or set) are
//! stored, with their catalogue positions, so that a catalogue of many recording systems costs
//! nothing for the traits a table does not hold. Read by catalogue position like a dense list
//! (`ind.observations[k]` is `None` where nothing is recorded).

use super::{Observation, SideUsed};
use serde::{Serialize, Serializer};
use std::ops::{Index, IndexMut};

/// What every position without an entry holds.
static NOT_RECORDED: Option<Observation> = None;

/// Observations by catalogue position (see the module documentation).
#[derive(Debug, Clone, Default)]
pub struct Observations {
    /// The catalogue's size: positions run from 0 below it.
    len: usize,
    /// (position, side it came from, observation), sorted by position, each position at most
    /// once (the side fits in the padding: 24 bytes an entry either way).
    entries: Vec<(u32, Option<SideUsed>, Option<Observation>)>,
}

impl Observations {
    /// No observation, for a catalogue of `len` traits.
    pub fn empty(len: usize) -> Observations {
        Observations {
            len,
            entries: Vec::new(),
        }
    }

    /// The catalogue's size (the positions that may be read).
    pub fn len(&self) -> usize {
        self.len
    }

    /// Whether the catalogue is empty.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// The observation at a position, or `None` beyond the catalogue.
    pub fn get(&self, position: usize) -> Option<&Option<Observation>> {
        (position < self.len).then(|| &self[position])
    }

    /// Every position in order, `None` where nothing is recorded (a dense view).
    pub fn iter(&self) -> impl Iterator<Item = &Option<Observation>> + '_ {
        (0..self.len).map(move |k| &self[k])
    }

    /// The recorded observations with their positions, in order.
    pub fn recorded(&self) -> impl Iterator<Item = (usize, Observation)> + '_ {
        self.entries
            .iter()
            .filter_map(|(k, _, o)| o.map(|o| (*k as usize, o)))
    }

    /// How many positions hold an observation.
    pub fn n_recorded(&self) -> usize {
        self.entries.iter().filter(|(_, _, o)| o.is_some()).count()
    }

    /// The side the observation at `position` came from (`None`: unsided, or nothing there).
    pub fn side(&self, position: usize) -> Option<SideUsed> {
        self.find(position).ok().and_then(|i| self.entries[i].1)
    }

    /// Observations of a catalogue of `len` traits from (position, side, observation) in
    /// increasing position order; entries without an observation are left out, and the rest
    /// are held in exactly the memory they need (a million individuals' spare capacity was
    /// 60 MB).
    pub fn from_recorded(
        len: usize,
        recorded: impl IntoIterator<Item = (usize, Option<SideUsed>, Option<Observation>)>,
    ) -> Self {
        let mut entries: Vec<_> = recorded
            .into_iter()
            .filter(|e| e.2.is_some())
            .map(|(k, side, o)| (k as u32, side, o))
            .collect();
        entries.shrink_to_fit();
        debug_assert!(entries.windows(2).all(|w| w[0].0 < w[1].0));
        Observations { len, entries }
    }

    /// The dense list (one entry per catalogue position).
    pub fn to_dense(&self) -> Vec<Option<Observation>> {
        self.iter().copied().collect()
    }

    fn find(&self, position: usize) -> Result<usize, usize> {
        self.entries
            .binary_search_by_key(&position, |(k, _, _)| *k as usize)
    }
}

impl PartialEq for Observations {
    /// Equal when they hold the same observations at the same positions of catalogues of the
    /// same size (however the slots were made).
    fn eq(&self, other: &Observations) -> bool {
        self.len == other.len && self.recorded().eq(other.recorded())
    }
}

impl From<Vec<Option<Observation>>> for Observations {
    /// The recorded positions of a dense list, without sides.
    fn from(dense: Vec<Option<Observation>>) -> Observations {
        let len = dense.len();
        Observations::from_recorded(
            len,
            dense.into_iter().enumerate().map(|(k, o)| (k, None, o)),
        )
    }
}

impl Index<usize> for Observations {
    type Output = Option<Observation>;

    /// The observation at `position`; `None` where nothing is recorded and beyond the
    /// catalogue.
    fn index(&self, position: usize) -> &Option<Observation> {
        match self.find(position) {
            Ok(i) => &self.entries[i].2,
            Err(_) => &NOT_RECORDED,
        }
    }
}

impl IndexMut<usize> for Observations {
    /// The slot at `position`, made if absent (the catalogue grows to hold it).
    fn index_mut(&mut self, position: usize) -> &mut Option<Observation> {
        self.len = self.len.max(position + 1);
        let i = match self.find(position) {
            Ok(i) => i,
            Err(i) => {
                self.entries.insert(i, (position as u32, None, None));
                i
            }
        };
        &mut self.entries[i].2
    }
}

impl Serialize for Observations {
    /// As the dense list, one entry per catalogue position.
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(self.iter())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_like_the_dense_list_it_came_from() {
        let g = |x: i32| Some(Observation::Grade { low: x, high: x });
        let dense = vec![None, g(3), None, None, g(5), None];
        let mut o = Observations::from(dense.clone());
        assert_eq!(o.len(), 6);
        assert_eq!(o.n_recorded(), 2);
        assert_eq!(o.to_dense(), dense);
        assert_eq!(o[1], g(3));
        assert_eq!(o[2], None);
        assert_eq!(o[40], None);
        assert_eq!(o.get(40), None);
        o[2] = g(1);
        o[4] = None;
        assert_eq!(o.to_dense(), vec![None, g(3), g(1), None, None, None]);
        assert_eq!(o.recorded().collect::<Vec<_>>().len(), 2);
        assert_eq!(o, Observations::from(o.to_dense()));
        assert_eq!(
            serde_json::to_string(&o).unwrap(),
            serde_json::to_string(&o.to_dense()).unwrap()
        );
    }
}
