//! Simulated commingled remains with known truth: individuals drawn from a model, their
//! skeletons broken into elements (cranium, mandible, os coxae, femur, humerus), each element
//! surviving or not, its traits lost one by one, the elements mixed, and some associations
//! recorded as an excavator would (a mandible fitting a cranium, a pair of femora).
//!
//! Every number here (survival of each element, trait loss, how often associations are
//! recorded and with what probability) is a choice of ours for demo data and tests.

use super::assemblage::{observation_cell, within_plausible_range};
use super::{draw_observations, draw_sex, SimError};
use crate::commingled::ElementSide;
use crate::data::{Individual, Observation, Sex};
use crate::model::Model;
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// One element type of the simulation: its name, sides, the traits it carries (catalogue ids;
/// those not in the model are skipped) and its chance of surviving, per side.
pub struct ElementPlan {
    /// Element type.
    pub element: &'static str,
    /// Paired (left and right) or not.
    pub paired: bool,
    /// Traits read on it.
    pub traits: &'static [&'static str],
    /// Chance that one such element (one side) survives.
    pub survival: f64,
}

/// The elements of the default model's traits (survival rates invented for demo data).
pub const DEFAULT_PLAN: [ElementPlan; 5] = [
    ElementPlan {
        element: "cranium",
        paired: false,
        traits: &["glabella", "mastoid", "supraorbital_margin", "nuchal_crest"],
        survival: 0.45,
    },
    ElementPlan {
        element: "mandible",
        paired: false,
        traits: &["mental_eminence", "canine_bl_diameter"],
        survival: 0.4,
    },
    ElementPlan {
        element: "os coxae",
        paired: true,
        traits: &[
            "ventral_arc",
            "subpubic_concavity",
            "ischiopubic_ramus",
            "sciatic_notch",
        ],
        survival: 0.35,
    },
    ElementPlan {
        element: "femur",
        paired: true,
        traits: &["femur_head_diameter", "femur_midshaft_circumference"],
        survival: 0.55,
    },
    ElementPlan {
        element: "humerus",
        paired: true,
        traits: &["humerus_head_diameter"],
        survival: 0.45,
    },
];

/// Chance that one trait of a surviving element is lost (invented).
const TRAIT_LOSS: f64 = 0.2;

/// One simulated element with its truth.
#[derive(Debug, Clone)]
pub struct SimulatedElement {
    /// The element as an input row (only its own traits recorded).
    pub row: Individual,
    /// Element type.
    pub element: String,
    /// Side.
    pub side: ElementSide,
    /// Recorded association label and probability, if the excavation recorded one.
    pub association: Option<(String, f64)>,
    /// Index of the individual it came from.
    pub true_individual: usize,
    /// That individual's sex.
    pub true_sex: Sex,
}

/// A simulated commingled deposit.
#[derive(Debug, Clone)]
pub struct SimulatedElements {
    /// Elements, mixed (in a seeded random order).
    pub elements: Vec<SimulatedElement>,
    /// The sex of every individual of the deposit, surviving elements or not.
    pub individuals: Vec<Sex>,
    /// Catalogue positions of the trait columns written.
    pub trait_columns: Vec<usize>,
}

/// Draw `n` individuals with proportion female `pi`, break them into the elements of
/// [`DEFAULT_PLAN`] and mix them. Where a cranium and a mandible of one individual both
/// survive, half the time the excavation records them as probably together (association 0.9);
/// where both femora survive, a third of the time (association 0.7).
///
/// # Errors
/// [`SimError::NothingToSimulate`] when the model carries none of the plan's traits.
pub fn simulate_elements(
    model: &Model,
    n: usize,
    pi: f64,
    seed: u64,
) -> Result<SimulatedElements, SimError> {
    let cat = &model.catalogue;
    let model_traits: Vec<usize> = model
        .blocks
        .iter()
        .filter_map(|b| match b {
            crate::model::Block::Latent(l) => Some(l.traits.iter().map(|t| t.catalogue_index)),
            _ => None,
        })
        .flatten()
        .collect();
    let plan: Vec<(&ElementPlan, Vec<usize>)> = DEFAULT_PLAN
        .iter()
        .map(|p| {
            let t = p
                .traits
                .iter()
                .filter_map(|id| cat.position(id))
                .filter(|i| model_traits.contains(i))
                .collect::<Vec<_>>();
            (p, t)
        })
        .filter(|(_, t)| !t.is_empty())
        .collect();
    if plan.is_empty() {
        return Err(SimError::NothingToSimulate);
    }
    let trait_columns: Vec<usize> = plan.iter().flat_map(|(_, t)| t.clone()).collect();
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let mut out = SimulatedElements {
        elements: Vec::new(),
        individuals: Vec::new(),
        trait_columns,
    };
    let mut labels = 0;
    for person in 0..n {
        let sex = draw_sex(pi, &mut rng);
        out.individuals.push(sex);
        let mut obs = draw_observations(model, sex, 0, &mut rng);
        within_plausible_range(model, (sex, None), &mut obs, &mut rng);
        let start = out.elements.len();
        for (p, traits) in &plan {
            let sides: &[ElementSide] = if p.paired {
                &[ElementSide::Left, ElementSide::Right]
            } else {
                &[ElementSide::Unpaired]
            };
            for &side in sides {
                if rng.random::<f64>() >= p.survival {
                    continue;
                }
                let mut own: Vec<Option<Observation>> = vec![None; cat.len()];
                for &t in traits {
                    if rng.random::<f64>() >= TRAIT_LOSS {
                        own[t] = obs[t];
                    }
                }
                out.elements.push(SimulatedElement {
                    row: Individual {
                        id: String::new(),
                        row: 0,
                        group: None,
                        age: None,
                        known_sex: None,
                        observations: own.into(),
                        carried: Vec::new(),
                    },
                    element: p.element.to_string(),
                    side,
                    association: None,
                    true_individual: person,
                    true_sex: sex,
                });
            }
        }
        // Associations the excavation records (true ones only).
        let mine: Vec<usize> = (start..out.elements.len()).collect();
        let find = |el: &str, side: ElementSide, v: &[SimulatedElement]| {
            mine.iter()
                .copied()
                .find(|&i| v[i].element == el && v[i].side == side)
        };
        for (a, b, chance, p) in [
            (
                ("cranium", ElementSide::Unpaired),
                ("mandible", ElementSide::Unpaired),
                0.5,
                0.9,
            ),
            (
                ("femur", ElementSide::Left),
                ("femur", ElementSide::Right),
                1.0 / 3.0,
                0.7,
            ),
        ] {
            let (Some(i), Some(j)) = (find(a.0, a.1, &out.elements), find(b.0, b.1, &out.elements))
            else {
                continue;
            };
            if rng.random::<f64>() < chance {
                labels += 1;
                let label = format!("A{labels:03}");
                out.elements[i].association = Some((label.clone(), 1.0));
                out.elements[j].association = Some((label, p));
            }
        }
    }
    // Mix the deposit (Fisher–Yates), then number the elements.
    for i in (1..out.elements.len()).rev() {
        let j = (rng.random::<f64>() * (i + 1) as f64) as usize % (i + 1);
        out.elements.swap(i, j);
    }
    for (k, e) in out.elements.iter_mut().enumerate() {
        e.row.id = format!("E-{:04}", k + 1);
        e.row.row = k + 2;
    }
    Ok(out)
}

impl SimulatedElements {
    /// The deposit as an element table (CSV): `id, element, side, individual, association`,
    /// the trait columns, then the truth, `true_individual` and `true_sex` (carried through,
    /// never evidence).
    ///
    /// # Errors
    /// [`RenderError`](crate::report::RenderError) when a row cannot be written.
    pub fn to_csv(&self, model: &Model) -> Result<Vec<u8>, crate::report::RenderError> {
        let cat = &model.catalogue;
        let mut rows = vec![["id", "element", "side", "individual", "association"]
            .iter()
            .map(|s| s.to_string())
            .chain(
                self.trait_columns
                    .iter()
                    .map(|&t| cat.traits()[t].id.clone()),
            )
            .chain(["true_individual".to_string(), "true_sex".to_string()])
            .collect::<Vec<_>>()];
        for e in &self.elements {
            let (label, p) = match &e.association {
                Some((l, p)) if *p >= 1.0 => (l.clone(), String::new()),
                Some((l, p)) => (l.clone(), format!("{p}")),
                None => (String::new(), String::new()),
            };
            let mut r = vec![
                e.row.id.clone(),
                e.element.clone(),
                e.side.as_str().to_string(),
                label,
                p,
            ];
            for &t in &self.trait_columns {
                r.push(observation_cell(
                    e.row.observations[t],
                    &cat.traits()[t].kind,
                ));
            }
            r.push(format!("P-{:04}", e.true_individual + 1));
            r.push(e.true_sex.letter().to_string());
            rows.push(r);
        }
        crate::report::csv_bytes(rows)
    }
}
