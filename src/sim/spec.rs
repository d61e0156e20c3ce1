//! How a simulated excavation is specified: groups and preservation.

use crate::catalogue::Region;
use serde::Serialize;
use std::collections::BTreeMap;

/// One group of a simulated cemetery: name, number of individuals, proportion female.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct GroupSpec {
    /// Group name (written to the `group` column).
    pub name: String,
    /// Individuals.
    pub n: usize,
    /// Proportion female.
    pub pi: f64,
}

impl GroupSpec {
    /// One unnamed population of `n` individuals with proportion female `pi`.
    pub fn single(n: usize, pi: f64) -> GroupSpec {
        GroupSpec {
            name: String::new(),
            n,
            pi,
        }
    }
}

/// Parse `name:count:pi,name:count:pi,…`, e.g. `north:40:0.5,chapel:15:0.2`.
///
/// # Errors
/// A message naming the malformed item.
pub fn parse_groups(spec: &str) -> Result<Vec<GroupSpec>, String> {
    let mut out = Vec::new();
    for item in spec.split(',').map(str::trim).filter(|s| !s.is_empty()) {
        let parts: Vec<&str> = item.split(':').collect();
        let bad = || format!("`{item}`: expected name:count:proportion_female, e.g. north:40:0.5");
        if parts.len() != 3 || parts[0].trim().is_empty() {
            return Err(bad());
        }
        let n: usize = parts[1].trim().parse().map_err(|_| bad())?;
        let pi: f64 = parts[2].trim().parse().map_err(|_| bad())?;
        if !(0.0..=1.0).contains(&pi) {
            return Err(format!("`{item}`: the proportion female lies in [0, 1]"));
        }
        if out.iter().any(|g: &GroupSpec| g.name == parts[0].trim()) {
            return Err(format!("`{item}`: group named twice"));
        }
        out.push(GroupSpec {
            name: parts[0].trim().to_string(),
            n,
            pi,
        });
    }
    if out.is_empty() {
        return Err("no group given".into());
    }
    Ok(out)
}

/// Preservation and recording of a simulated excavation.
///
/// Written `key=rate,…`: a region word (`cranium`, `pelvis`, `postcranial`, `dental`) is the
/// rate at which that whole region is missing; `trait` the rate at which each remaining trait
/// is missing on its own; `range` the rate at which an exact grade is recorded as a range of
/// two neighbouring grades; `subadult` the share of subadults (their morphological evidence is
/// not recorded); `dna` the share of individuals with ancient-DNA read counts.
#[derive(Debug, Clone, PartialEq, Default, Serialize)]
pub struct MissingSpec {
    /// Whole-region loss rates.
    pub region: BTreeMap<Region, f64>,
    /// Single-trait loss rate.
    pub trait_rate: f64,
    /// Share of grades recorded as ranges.
    pub range_rate: f64,
    /// Share of subadults.
    pub subadult_rate: f64,
    /// Share with DNA read counts.
    pub dna_rate: f64,
}

impl MissingSpec {
    /// The preservation a command uses: the given spec, or without one a typical fragmentary
    /// cemetery ([`MissingSpec::fragmentary`]); `simulate` and `plan` share this default.
    ///
    /// # Errors
    /// As [`MissingSpec::parse`].
    pub fn given_or_fragmentary(spec: Option<&str>) -> Result<MissingSpec, String> {
        spec.map_or_else(|| Ok(MissingSpec::fragmentary()), MissingSpec::parse)
    }

    /// Parse `cranium=0.3,pelvis=0.5,trait=0.1,range=0.1,subadult=0.05,dna=0.1` (any subset);
    /// `none` (or nothing) is a skeleton that lost nothing.
    ///
    /// # Errors
    /// A message naming the malformed item.
    pub fn parse(spec: &str) -> Result<MissingSpec, String> {
        let mut m = MissingSpec::default();
        if spec.trim() == "none" {
            return Ok(m);
        }
        for item in spec.split(',').map(str::trim).filter(|s| !s.is_empty()) {
            let (k, v) = item
                .split_once('=')
                .ok_or_else(|| format!("`{item}`: expected key=rate, e.g. cranium=0.3"))?;
            let rate: f64 = v
                .trim()
                .parse()
                .map_err(|_| format!("`{item}`: the rate is a number from 0 to 1"))?;
            if !(0.0..=1.0).contains(&rate) {
                return Err(format!("`{item}`: the rate is a number from 0 to 1"));
            }
            match k.trim() {
                "trait" => m.trait_rate = rate,
                "range" => m.range_rate = rate,
                "subadult" => m.subadult_rate = rate,
                "dna" => m.dna_rate = rate,
                w => {
                    let region = Region::ALL
                        .into_iter()
                        .find(|r| r.as_str() == w && r.is_morphological())
                        .ok_or_else(|| {
                            format!("`{w}`: expected cranium, pelvis, postcranial, dental, trait, range, subadult or dna")
                        })?;
                    m.region.insert(region, rate);
                }
            }
        }
        Ok(m)
    }

    /// The specification written back in its own `key=rate,…` form (every key, in a fixed
    /// order), for reports.
    pub fn describe(&self) -> String {
        let mut items: Vec<String> = self
            .region
            .iter()
            .map(|(r, v)| format!("{}={v}", r.as_str()))
            .collect();
        items.extend([
            format!("trait={}", self.trait_rate),
            format!("range={}", self.range_rate),
            format!("subadult={}", self.subadult_rate),
            format!("dna={}", self.dna_rate),
        ]);
        items.join(",")
    }

    /// A typical fragmentary cemetery (common practice, not a measured rate): regions lost at
    /// 30–50%, single traits at 15%, ranges at 5%, 8% subadults, 10% with DNA.
    pub fn fragmentary() -> MissingSpec {
        MissingSpec::parse("cranium=0.35,pelvis=0.5,postcranial=0.3,dental=0.4,trait=0.15,range=0.05,subadult=0.08,dna=0.1")
            .unwrap_or_default()
    }
}

#[cfg(test)]
#[path = "tests/spec.rs"]
mod tests;
