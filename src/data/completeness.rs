//! How complete an assemblage is: individuals, groups, maturity, and how often each trait
//! and each body region survives. This is what `tessera check` reports.

use super::age::{Maturity, ADULT_AGE_YEARS};
use super::problem::Warning;
use super::reader::{Assemblage, SideUsed};
use crate::catalogue::Region;
use serde::Serialize;

/// How often one trait was recorded.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct TraitCompleteness {
    /// Trait id.
    pub trait_id: String,
    /// Body region.
    pub region: Region,
    /// Individuals with the trait recorded.
    pub recorded: usize,
    /// Share of all individuals, 0–1.
    pub share: f64,
    /// Of those, recorded as a grade range rather than one grade.
    pub as_range: usize,
    /// Taken from the left side.
    pub left: usize,
    /// Taken from the right side.
    pub right: usize,
    /// Both sides joined.
    pub both: usize,
}

/// How often a body region has at least one trait recorded.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct RegionCompleteness {
    /// The region.
    pub region: Region,
    /// Traits of this region with a column in the file.
    pub traits_in_file: usize,
    /// Individuals with at least one trait of the region recorded.
    pub individuals: usize,
    /// Share of all individuals, 0–1.
    pub share: f64,
}

/// Individuals per group.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupCount {
    /// Group name (`(none)` for rows without a group).
    pub group: String,
    /// Individuals.
    pub individuals: usize,
}

/// The summary `tessera check` prints.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Completeness {
    /// The file.
    pub file: String,
    /// SHA-256 of the file.
    pub sha256: String,
    /// Individuals (rows).
    pub individuals: usize,
    /// Adults at the minimum age.
    pub adults: usize,
    /// Below the minimum age.
    pub subadults: usize,
    /// Age not recorded, or straddling the minimum age.
    pub maturity_unknown: usize,
    /// The minimum age used to count adults.
    pub minimum_age: f64,
    /// Individuals with no trait recorded.
    pub without_evidence: usize,
    /// Individuals with a documented sex (reference samples).
    pub with_known_sex: usize,
    /// Individuals per group, in name order.
    pub groups: Vec<GroupCount>,
    /// Per trait with a column in the file, in catalogue order.
    pub traits: Vec<TraitCompleteness>,
    /// Per region with at least one trait column in the file.
    pub regions: Vec<RegionCompleteness>,
    /// Columns carried through unchanged.
    pub carried_columns: Vec<String>,
    /// Warnings found while reading.
    pub warnings: Vec<Warning>,
}

impl Completeness {
    /// Summarise an assemblage; adults are those at or above `minimum_age` years
    /// (default [`ADULT_AGE_YEARS`]).
    pub fn of(a: &Assemblage, minimum_age: Option<f64>) -> Completeness {
        let minimum_age = minimum_age.unwrap_or(ADULT_AGE_YEARS);
        let n = a.individuals.len();
        let share = |k: usize| if n == 0 { 0.0 } else { k as f64 / n as f64 };
        let (mut adults, mut subadults, mut unknown) = (0, 0, 0);
        for ind in &a.individuals {
            match ind.age.map(|x| x.maturity(minimum_age)) {
                Some(Maturity::Adult) => adults += 1,
                Some(Maturity::Subadult) => subadults += 1,
                _ => unknown += 1,
            }
        }
        // Groups in file order (phases are usually chronological), as every other screen;
        // looked up by name, not by a scan of the list per individual.
        let mut groups: Vec<(String, usize)> = Vec::new();
        if a.individuals.iter().any(|i| i.group.is_some()) {
            let mut place: std::collections::HashMap<&str, usize> =
                std::collections::HashMap::new();
            for ind in &a.individuals {
                let g = ind.group.as_deref().unwrap_or("(none)");
                match place.get(g) {
                    Some(&k) => groups[k].1 += 1,
                    None => {
                        place.insert(g, groups.len());
                        groups.push((g.to_string(), 1));
                    }
                }
            }
        }
        // One pass over each individual's recorded traits (not one pass over everybody per
        // trait of the catalogue).
        let columns: Vec<usize> = (0..a.catalogue.len())
            .filter(|&t| a.trait_columns[t])
            .collect();
        let mut slot = vec![usize::MAX; a.catalogue.len()];
        for (k, &t) in columns.iter().enumerate() {
            slot[t] = k;
        }
        let mut traits: Vec<TraitCompleteness> = columns
            .iter()
            .map(|&t| {
                let def = &a.catalogue.traits()[t];
                TraitCompleteness {
                    trait_id: def.id.clone(),
                    region: def.region,
                    recorded: 0,
                    share: 0.0,
                    as_range: 0,
                    left: 0,
                    right: 0,
                    both: 0,
                }
            })
            .collect();
        let region_of = |t: usize| {
            Region::ALL
                .iter()
                .position(|r| *r == a.catalogue.traits()[t].region)
                .unwrap_or(0)
        };
        let mut with_region = vec![0usize; Region::ALL.len()];
        for ind in &a.individuals {
            let mut seen = [false; 16];
            for (t, o) in ind.observations.recorded() {
                let Some(c) = traits.get_mut(slot[t]) else {
                    continue;
                };
                c.recorded += 1;
                c.as_range += usize::from(o.is_range());
                match ind.observations.side(t) {
                    Some(SideUsed::Left) => c.left += 1,
                    Some(SideUsed::Right) => c.right += 1,
                    Some(SideUsed::Both) => c.both += 1,
                    _ => {}
                }
                let r = region_of(t);
                if !seen[r] {
                    seen[r] = true;
                    with_region[r] += 1;
                }
            }
        }
        for c in &mut traits {
            c.share = share(c.recorded);
        }
        let mut regions = Vec::new();
        for (r, region) in Region::ALL.into_iter().enumerate() {
            let traits_in_file = columns
                .iter()
                .filter(|&&t| a.catalogue.traits()[t].region == region)
                .count();
            if traits_in_file == 0 {
                continue;
            }
            regions.push(RegionCompleteness {
                region,
                traits_in_file,
                individuals: with_region[r],
                share: share(with_region[r]),
            });
        }
        Completeness {
            file: a.file.clone(),
            sha256: a.sha256.clone(),
            individuals: n,
            adults,
            subadults,
            maturity_unknown: unknown,
            minimum_age,
            without_evidence: a.individuals.iter().filter(|i| i.n_observed() == 0).count(),
            with_known_sex: a
                .individuals
                .iter()
                .filter(|i| i.known_sex.is_some())
                .count(),
            groups: groups
                .into_iter()
                .map(|(group, individuals)| GroupCount { group, individuals })
                .collect(),
            traits,
            regions,
            carried_columns: a.carried_columns.clone(),
            warnings: a.warnings.clone(),
        }
    }
}

#[cfg(test)]
#[path = "tests/completeness.rs"]
mod tests;
