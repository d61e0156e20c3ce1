//! Joint draws from the posterior — (μ, κ, πg, s₁ … sₙ) — so that every later analysis
//! carries the uncertainty in sex; and the exact distribution of the number of females under
//! a fixed π (Poisson-binomial), used as a cross-check.

use super::hierarchy::Hierarchy;
use super::posterior::{p_female_given, PiPosterior};
use rand::{RngExt, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// Joint posterior draws.
#[derive(Debug, Clone, PartialEq)]
pub struct Draws {
    /// Group names (one unnamed group without a hierarchy).
    pub groups: Vec<String>,
    /// μ per draw (π of the assemblage without groups).
    pub mu: Vec<f64>,
    /// κ per draw (`None` without groups).
    pub kappa: Vec<Option<f64>>,
    /// πg per draw and group.
    pub pi: Vec<Vec<f64>>,
    /// Sex per draw and individual: female where the bit is set (8 individuals a byte: a
    /// regional run's 200 draws of a million sexes take 25 MB, not 200 MB).
    pub female: Vec<SexDraw>,
}

/// One draw of every individual's sex, a bit each (set: female).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct SexDraw {
    bits: Vec<u64>,
    len: usize,
}

impl SexDraw {
    /// Individuals in the draw.
    pub fn len(&self) -> usize {
        self.len
    }

    /// Whether the draw holds no individual.
    pub fn is_empty(&self) -> bool {
        self.len == 0
    }

    /// Whether individual `i` is female in this draw.
    pub fn is_female(&self, i: usize) -> bool {
        i < self.len && self.bits[i / 64] >> (i % 64) & 1 == 1
    }

    /// Females in the draw.
    pub fn n_female(&self) -> usize {
        self.bits.iter().map(|w| w.count_ones() as usize).sum()
    }

    /// Every individual's sex in order (`true`: female).
    pub fn iter(&self) -> impl Iterator<Item = bool> + '_ {
        (0..self.len).map(|i| self.is_female(i))
    }
}

impl SexDraw {
    /// A draw from its words: individual i is bit i % 64 of word i / 64 (bits past `len`
    /// clear).
    fn from_words(bits: Vec<u64>, len: usize) -> SexDraw {
        SexDraw { bits, len }
    }
}

impl FromIterator<bool> for SexDraw {
    fn from_iter<I: IntoIterator<Item = bool>>(it: I) -> SexDraw {
        let mut d = SexDraw::default();
        for f in it {
            if d.len % 64 == 0 {
                d.bits.push(0);
            }
            if f {
                d.bits[d.len / 64] |= 1 << (d.len % 64);
            }
            d.len += 1;
        }
        d
    }
}

/// A draw of every individual's sex as the summaries by sex read it: one row of the joint
/// draws, unpacked into a list of `true` for female (`Vec<bool>` rows are accepted too).
pub trait SexRow {
    /// The row as `true` (female) / `false`, into `out` (cleared first).
    fn unpack_into(&self, out: &mut Vec<bool>);
    /// Whether individual `i` is female in this row.
    fn is_female(&self, i: usize) -> bool;
}

impl SexRow for SexDraw {
    fn unpack_into(&self, out: &mut Vec<bool>) {
        out.clear();
        out.extend(self.iter());
    }
    fn is_female(&self, i: usize) -> bool {
        SexDraw::is_female(self, i)
    }
}

impl SexRow for Vec<bool> {
    fn unpack_into(&self, out: &mut Vec<bool>) {
        out.clear();
        out.extend_from_slice(self);
    }
    fn is_female(&self, i: usize) -> bool {
        self[i]
    }
}

/// Mixed into the seed of the generator whose streams draw the sexes (a constant of ours), so
/// that they differ from the streams keyed by the seed itself elsewhere.
const SEX_DRAW_SALT: u64 = 0x5e8d_7a11_c3b9_0f27;

/// An index drawn with probability proportional to `mass`.
pub(crate) fn pick(rng: &mut ChaCha8Rng, mass: &[f64]) -> usize {
    let u: f64 = rng.random::<f64>() * mass.iter().sum::<f64>();
    let mut acc = 0.0;
    for (k, &m) in mass.iter().enumerate() {
        acc += m;
        if u < acc {
            return k;
        }
    }
    mass.len() - 1
}

fn within(rng: &mut ChaCha8Rng, edges: &[f64], k: usize) -> f64 {
    let (a, b) = (edges[k], edges[k + 1]);
    a + rng.random::<f64>() * (b - a)
}

impl Draws {
    /// Draw `n` joint samples. `ln_lrs[i]` is 0 for individuals without evidence (their sex
    /// is then drawn from their group's π). With a hierarchy, (μ, κ) are drawn from the
    /// hyper-grid, then each πg from its conditional on the group's grid; without one, π from
    /// the single posterior. Sexes are drawn given π: P(F) = π LR / (π LR + 1 − π).
    ///
    /// Draw d takes its random numbers from stream d of a ChaCha8 generator keyed by `seed`
    /// (salted, so that they are not the streams the tables by sex draw ages from), so the
    /// draws are made in parallel and are the same whatever the number of threads.
    pub fn sample(
        post: &PiPosterior,
        hier: Option<&Hierarchy>,
        ln_lrs: &[f64],
        n: usize,
        seed: u64,
    ) -> Draws {
        use rayon::prelude::*;
        let flat_w: Vec<f64> = hier
            .map(|h| h.w.iter().flatten().copied().collect())
            .unwrap_or_default();
        // LR of each individual where it is moderate (|ln LR| ≤ 40); NaN marks the logistic
        // form beyond.
        let lr: Vec<f64> = ln_lrs
            .iter()
            .map(|&l| if l.abs() <= 40.0 { l.exp() } else { f64::NAN })
            .collect();
        let no_groups = vec![0usize; if hier.is_some() { 0 } else { ln_lrs.len() }];
        let membership: &[usize] = hier.map_or(&no_groups, |h| &h.membership);
        let one = |draw: usize| {
            let mut rng = ChaCha8Rng::seed_from_u64(seed ^ SEX_DRAW_SALT);
            rng.set_stream(draw as u64);
            let (mu, kappa, pis) = match hier {
                None => {
                    let k = pick(&mut rng, &post.mass);
                    let pi = if post.edges[k] == post.edges[k + 1] {
                        post.grid[k]
                    } else {
                        within(&mut rng, &post.edges, k)
                    };
                    (pi, None, vec![pi])
                }
                Some(h) => {
                    let nk = h.hyper.kappa.len();
                    let c = pick(&mut rng, &flat_w);
                    let (i, j) = (c / nk, c % nk);
                    let (mu, kappa) = (h.hyper.mu[i], h.hyper.kappa[j]);
                    let pis: Vec<f64> = h
                        .grids
                        .iter()
                        .map(|g| {
                            let lp = g.ln_prior_mass(mu * kappa, (1.0 - mu) * kappa);
                            let ln: Vec<f64> =
                                lp.iter().zip(&g.ln_lik).map(|(a, b)| a + b).collect();
                            let m = ln.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                            let mass: Vec<f64> = ln.iter().map(|v| (v - m).exp()).collect();
                            let k = pick(&mut rng, &mass);
                            within(&mut rng, &g.edges, k)
                        })
                        .collect();
                    (mu, Some(kappa), pis)
                }
            };
            // π LR < u (π LR + 1 − π), both terms positive: P(F) = π LR / (π LR + 1 − π)
            // with no logarithm and no division per individual; 64 sexes to a word.
            let not_pi: Vec<f64> = pis.iter().map(|p| 1.0 - p).collect();
            let mut words = vec![0u64; ln_lrs.len().div_ceil(64)];
            for (c, word) in words.iter_mut().enumerate() {
                let at = c * 64..(c * 64 + 64).min(ln_lrs.len());
                for (j, ((&l, &e), &g)) in ln_lrs[at.clone()]
                    .iter()
                    .zip(&lr[at.clone()])
                    .zip(&membership[at])
                    .enumerate()
                {
                    let u = rng.random::<f64>();
                    let female = if e.is_nan() {
                        u < p_female_given(pis[g], l)
                    } else {
                        let f = pis[g] * e;
                        u * (f + not_pi[g]) < f
                    };
                    *word |= u64::from(female) << j;
                }
            }
            let sexes = SexDraw::from_words(words, ln_lrs.len());
            (mu, kappa, pis, sexes)
        };
        let rows: Vec<(f64, Option<f64>, Vec<f64>, SexDraw)> =
            (0..n).into_par_iter().map(one).collect();
        let mut d = Draws {
            groups: hier
                .map(|h| h.groups.clone())
                .unwrap_or_else(|| vec![String::new()]),
            mu: Vec::with_capacity(n),
            kappa: Vec::with_capacity(n),
            pi: Vec::with_capacity(n),
            female: Vec::with_capacity(n),
        };
        for (mu, kappa, pis, sexes) in rows {
            d.mu.push(mu);
            d.kappa.push(kappa);
            d.pi.push(pis);
            d.female.push(sexes);
        }
        d
    }

    /// Number of females in each draw.
    pub fn n_female(&self) -> Vec<usize> {
        self.female.iter().map(SexDraw::n_female).collect()
    }
}

/// Mean and 95% interval (2.5% and 97.5% order statistics) of counts.
pub fn count_summary(counts: &[usize]) -> (f64, usize, usize) {
    if counts.is_empty() {
        return (f64::NAN, 0, 0);
    }
    let mut v = counts.to_vec();
    v.sort_unstable();
    (
        counts.iter().sum::<usize>() as f64 / counts.len() as f64,
        order_statistic(&v, 0.025),
        order_statistic(&v, 0.975),
    )
}

/// The p-quantile of sorted counts as the order statistic at the rounded position
/// p·(n − 1), the rule of [`count_summary`]; 0 for no counts.
pub fn order_statistic(sorted: &[usize], p: f64) -> usize {
    match sorted.len() {
        0 => 0,
        n => sorted[((p * (n - 1) as f64).round() as usize).min(n - 1)],
    }
}

/// The Poisson-binomial distribution of the number of successes among independent trials
/// with probabilities `p` (exact, by the recursion over trials; O(n²)).
pub fn poisson_binomial(p: &[f64]) -> Vec<f64> {
    let mut dist = vec![1.0];
    for &q in p {
        let mut next = vec![0.0; dist.len() + 1];
        for (k, &d) in dist.iter().enumerate() {
            next[k] += d * (1.0 - q);
            next[k + 1] += d * q;
        }
        dist = next;
    }
    dist
}

#[cfg(test)]
#[path = "tests/draws.rs"]
mod tests;
