//! Published logistic equations as evidence.
//!
//! # Formula
//! An equation logit P(M | x) = β₀ + β·x fitted on n_F females and n_M males has posterior
//! odds that include the training sample's prior odds n_M / n_F. The likelihood ratio is what
//! remains when those odds are removed:
//! ln LR(F:M) = −(β₀ + β·x) + ln(n_M / n_F); for an equation on logit P(F | x),
//! ln LR(F:M) = (β₀ + β·x) − ln(n_F / n_M). With balanced training classes the correction is 0.

use super::evidence::{BlockEvidence, BlockStatus};
use super::spec::{RawEquationBlock, RawTraining};
use super::ModelProblem;
use crate::catalogue::{Catalogue, TraitKind};
use crate::data::{Individual, Observation, Sex};

/// One validated equation.
#[derive(Debug, Clone, PartialEq)]
pub struct Equation {
    /// Name (author, year, variant).
    pub name: String,
    /// Input trait ids (shared with the evidence of every individual the equation is used for).
    pub inputs: std::sync::Arc<[String]>,
    /// Catalogue positions of the inputs.
    pub input_index: Vec<usize>,
    /// Coefficients.
    pub coefficients: Vec<f64>,
    /// Intercept.
    pub intercept: f64,
    /// The sex whose log-odds the equation gives.
    pub predicts: Sex,
    /// ln(n_F / n_M) of the training sample (0 for balanced classes).
    pub ln_training_odds_female: f64,
    /// Source.
    pub source: String,
}

impl Equation {
    /// The linear predictor β₀ + β·x.
    pub fn predictor(&self, x: &[f64]) -> f64 {
        self.intercept
            + self
                .coefficients
                .iter()
                .zip(x)
                .map(|(b, v)| b * v)
                .sum::<f64>()
    }

    /// ln LR(F:M) for inputs x, the training odds removed (see module docs).
    pub fn ln_lr(&self, x: &[f64]) -> f64 {
        let eta = self.predictor(x);
        match self.predicts {
            Sex::Male => -eta - self.ln_training_odds_female,
            Sex::Female => eta - self.ln_training_odds_female,
        }
    }
}

/// A block of equations in order of preference.
#[derive(Debug, Clone, PartialEq)]
pub struct EquationBlock {
    /// Block id.
    pub id: String,
    /// Readable label.
    pub label: String,
    /// Equations, most preferred first.
    pub equations: Vec<Equation>,
}

impl EquationBlock {
    pub(crate) fn from_raw(
        raw: &RawEquationBlock,
        catalogue: &Catalogue,
        problems: &mut Vec<ModelProblem>,
    ) -> Option<EquationBlock> {
        let start = problems.len();
        let mut equations = Vec::new();
        if raw.equations.is_empty() {
            problems.push(ModelProblem {
                place: format!("block `{}`", raw.id),
                message: "an equations block needs at least one equation".into(),
            });
        }
        for e in &raw.equations {
            let mut fail = |m: String| {
                problems.push(ModelProblem {
                    place: format!("block `{}`, equation `{}`", raw.id, e.name),
                    message: m,
                })
            };
            if e.inputs.is_empty() || e.inputs.len() != e.coefficients.len() {
                fail(format!(
                    "{} inputs but {} coefficients",
                    e.inputs.len(),
                    e.coefficients.len()
                ));
            }
            if !e.intercept.is_finite() || e.coefficients.iter().any(|c| !c.is_finite()) {
                fail("coefficients and intercept must be finite".into());
            }
            let mut input_index = Vec::new();
            for i in &e.inputs {
                match catalogue.get(i).map(|d| &d.kind) {
                    Some(TraitKind::Ordinal { .. } | TraitKind::Metric { .. }) => {
                        input_index.push(catalogue.position(i).unwrap_or(0))
                    }
                    Some(TraitKind::Count) => {
                        fail(format!("`{i}` is a read count, not an equation input"))
                    }
                    None => fail(format!("`{i}` is not a trait of the catalogue")),
                }
            }
            let predicts = match e.predicts.as_str() {
                "male" => Sex::Male,
                "female" => Sex::Female,
                other => {
                    fail(format!("predicts: `{other}`; expected male (logit P(male)) or female (logit P(female))"));
                    Sex::Male
                }
            };
            let odds = match &e.training {
                RawTraining::Word(w) if w == "equal" => 0.0,
                RawTraining::Word(w) => {
                    fail(format!(
                        "training: `{w}`; expected `equal` or {{female: n, male: n}}"
                    ));
                    0.0
                }
                RawTraining::Counts { female, male } => {
                    if !(*female > 0.0 && *male > 0.0 && female.is_finite() && male.is_finite()) {
                        fail("training counts must be positive".into());
                        0.0
                    } else {
                        (female / male).ln()
                    }
                }
            };
            if e.source.trim().is_empty() {
                fail("source is required".into());
            }
            equations.push(Equation {
                name: e.name.clone(),
                inputs: e.inputs.as_slice().into(),
                input_index,
                coefficients: e.coefficients.clone(),
                intercept: e.intercept,
                predicts,
                ln_training_odds_female: odds,
                source: e.source.clone(),
            });
        }
        (problems.len() == start).then(|| EquationBlock {
            id: raw.id.clone(),
            label: raw.label.clone(),
            equations,
        })
    }

    /// The first equation (in order of preference) whose inputs are all observed as exact
    /// values gives the block's LR. A grade range is not an exact input.
    pub fn evaluate(&self, ind: &Individual) -> BlockEvidence {
        let mut any = false;
        for e in &self.equations {
            let mut x = Vec::with_capacity(e.inputs.len());
            for &i in &e.input_index {
                match ind.observations[i] {
                    Some(Observation::Grade { low, high }) if low == high => x.push(f64::from(low)),
                    Some(Observation::Measurement { value }) => x.push(value),
                    Some(_) => any = true,
                    None => {}
                }
            }
            any |= !x.is_empty();
            if x.len() == e.inputs.len() {
                let ln_lr = e.ln_lr(&x);
                return BlockEvidence {
                    status: BlockStatus::Used,
                    traits_used: e.inputs.clone(),
                    ln_l_female: f64::NAN,
                    ln_l_male: f64::NAN,
                    ln_lr,
                    error: 0.0,
                    note: format!("equation: {}", e.name).into(),
                };
            }
        }
        if any {
            BlockEvidence::not_used(
                BlockStatus::NoUsableEquation,
                "no equation has all its inputs recorded as exact values",
            )
        } else {
            BlockEvidence::not_used(BlockStatus::NoEvidence, "no input of any equation recorded")
        }
    }
}
