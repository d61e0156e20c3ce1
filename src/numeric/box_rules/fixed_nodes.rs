//! The one-factor box rule on fixed nodes shared by every box: a fast path for the
//! equicorrelated blocks, whose many observation patterns use a few intervals per trait.
//!
//! P(a < X < b) = ∫ φ(z) ∏ᵢ [Φ((bᵢ − λᵢz)/√dᵢ) − Φ((aᵢ − λᵢz)/√dᵢ)] dz (Curnow & Dunnett
//! 1962, see [`super`]) is taken by composite 15-point Gauss–Kronrod quadrature (Piessens et
//! al. 1983) over [−[`REACH`], [`REACH`]] in [`PANELS`] equal panels. The nodes are the same
//! for every box, so each trait's factor ln[Φ(·) − Φ(·)] is tabulated once at all nodes per
//! (λᵢ, √dᵢ, aᵢ, bᵢ) and kept ([`Tables`]): a box then costs one sum of its traits' tables and
//! one exponential per node instead of evaluating Φ at adaptive nodes.
//!
//! The result is accepted only where it meets the adaptive rule's own test: the panels'
//! QUADPACK error estimates plus a bound on the integrand beyond the two extreme nodes (by
//! concavity of its logarithm, the chord through the highest node bounds the tail, as in
//! [`crate::numeric::log_concave`]) within [`REL_TOL`] of the integral. Otherwise (a narrow
//! integrand, from strong correlations; a peak far out) the caller uses the adaptive rule.

use super::{OneFactor, ONE_FACTOR_TOL, REL_TOL};
use crate::numeric::mvn::LnProbability;
use crate::numeric::normal::{ln_interval, LN_SQRT_2PI};
use crate::numeric::quadrature::{kronrod_15_of, GK15};
use std::collections::HashMap;
use std::sync::{Arc, Mutex, OnceLock};

/// Half-width of the range of z covered (a choice of ours: φ(10) ≈ 7.7e-23, and a box whose
/// integrand peaks near the edge fails the tail test and goes to the adaptive rule).
pub const REACH: f64 = 10.0;

/// Panels over [−REACH, REACH]: width 0.5, against an integrand whose standard deviation in
/// z is at least 1/√(1 + Σ λᵢ²/dᵢ) (about 0.5 for five traits correlated 0.35).
pub const PANELS: usize = 40;

/// Nodes per panel.
const PER_PANEL: usize = 15;

/// Tables kept before the store is emptied (a bound on memory for a long-lived process: each
/// table is 600 numbers; a run of the shipped model uses a few hundred).
const MOST_TABLES: usize = 4096;

/// The nodes, panel by panel in the order of [`GK15`]: the centre, then each abscissa's
/// left and right node.
fn nodes() -> &'static [f64] {
    static NODES: OnceLock<Vec<f64>> = OnceLock::new();
    NODES.get_or_init(|| {
        let h = REACH / PANELS as f64;
        let mut z = Vec::with_capacity(PANELS * PER_PANEL);
        for p in 0..PANELS {
            let c = -REACH + (2 * p + 1) as f64 * h;
            for &(x, _, _) in &GK15 {
                if x == 0.0 {
                    z.push(c);
                } else {
                    z.push(c - h * x);
                    z.push(c + h * x);
                }
            }
        }
        z
    })
}

/// ln φ at the nodes.
fn ln_phi() -> &'static [f64] {
    static LN_PHI: OnceLock<Vec<f64>> = OnceLock::new();
    LN_PHI.get_or_init(|| nodes().iter().map(|z| -0.5 * z * z - LN_SQRT_2PI).collect())
}

/// Each trait's factor at the nodes, by (λ, √d, a, b) bit for bit.
type Tables = HashMap<[u64; 4], Arc<[f64]>>;

fn store() -> &'static Mutex<Tables> {
    static STORE: OnceLock<Mutex<Tables>> = OnceLock::new();
    STORE.get_or_init(|| Mutex::new(HashMap::new()))
}

/// ln[Φ((b − λz)/s) − Φ((a − λz)/s)] at every node, made once and kept. The values do not
/// depend on what is kept, so neither do the results.
fn factor(loading: f64, own_sd: f64, a: f64, b: f64) -> Arc<[f64]> {
    let key = [loading, own_sd, a, b].map(f64::to_bits);
    if let Some(t) = store().lock().ok().and_then(|s| s.get(&key).cloned()) {
        return t;
    }
    let t: Arc<[f64]> = nodes()
        .iter()
        .map(|z| ln_interval((a - loading * z) / own_sd, (b - loading * z) / own_sd))
        .collect();
    if let Ok(mut s) = store().lock() {
        if s.len() >= MOST_TABLES {
            s.clear();
        }
        s.insert(key, t.clone());
    }
    t
}

/// ln P(lower < X < upper) for X ~ N(0, λλᵀ + diag(d)) on the fixed nodes (module docs);
/// `None` where the fixed rule does not meet the tolerance (the caller then integrates
/// adaptively) or the box is empty.
pub fn ln_box_one_factor_on_nodes(
    lower: &[f64],
    upper: &[f64],
    f: &OneFactor,
) -> Option<LnProbability> {
    let mut s = ln_phi().to_vec();
    for i in 0..lower.len() {
        let t = factor(f.loadings[i], f.own_sd[i], lower[i], upper[i]);
        for (x, y) in s.iter_mut().zip(t.iter()) {
            *x += y;
        }
    }
    let z = nodes();
    let (peak, top) = s
        .iter()
        .copied()
        .enumerate()
        .max_by(|x, y| x.1.total_cmp(&y.1))?;
    if !top.is_finite() {
        return None;
    }
    // Beyond the extreme nodes (the left one is a panel's second node, the right its third),
    // the chord through the highest node bounds ln g: a tail of at most g(z)·|z − peak| / drop.
    let tail = |k: usize| -> Option<f64> {
        let drop = top - s[k];
        (drop > 0.0 && k != peak).then(|| (-drop).exp() * (z[k] - z[peak]).abs() / drop)
    };
    let left = 2 * (GK15.len() - 1) - 1;
    let right = (PANELS - 1) * PER_PANEL + 2 * (GK15.len() - 1);
    let tails = tail(left)? + tail(right)?;
    let h = REACH / PANELS as f64;
    let (mut total, mut error) = (0.0, 0.0);
    for panel in s.chunks_exact(PER_PANEL) {
        let mut values = [(0.0, 0.0); 8];
        values[0] = ((panel[0] - top).exp(), 0.0);
        for (m, v) in values.iter_mut().enumerate().skip(1) {
            *v = ((panel[2 * m - 1] - top).exp(), (panel[2 * m] - top).exp());
        }
        let (v, e) = kronrod_15_of(&values, h);
        total += v;
        error += e;
    }
    let error = error + tails;
    if !(total > 0.0 && error <= REL_TOL * total) {
        return None;
    }
    Some(LnProbability {
        ln_p: top + total.ln(),
        error: error / total + ONE_FACTOR_TOL * lower.len() as f64,
    })
}
