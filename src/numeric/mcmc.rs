//! Convergence diagnostics of Markov chains: split-R̂ and the effective sample size
//! (Gelman et al. 2013, *Bayesian Data Analysis*, 3rd ed., §11.4–11.5; Geyer 1992,
//! *Statistical Science* 7, 473–483, for the initial positive sequence).

/// R̂ above which a quantity is said not to have converged (Vehtari et al. 2021, *Bayesian
/// Analysis* 16, 667–718; from memory).
pub const MAX_RHAT: f64 = 1.01;
/// Effective sample size below which a quantity is said to need longer chains (Vehtari et al.
/// 2021; from memory).
pub const MIN_ESS: f64 = 400.0;

/// Split-R̂ of several chains of one scalar.
pub fn split_rhat(chains: &[Vec<f64>]) -> f64 {
    let halves: Vec<&[f64]> = chains
        .iter()
        .flat_map(|c| {
            let h = c.len() / 2;
            [&c[..h], &c[h..2 * h]]
        })
        .collect();
    let m = halves.len() as f64;
    let n = halves.iter().map(|h| h.len()).min().unwrap_or(0) as f64;
    if n < 2.0 {
        return f64::NAN;
    }
    let means: Vec<f64> = halves
        .iter()
        .map(|h| h.iter().sum::<f64>() / h.len() as f64)
        .collect();
    let grand = means.iter().sum::<f64>() / m;
    let b = n / (m - 1.0) * means.iter().map(|x| (x - grand).powi(2)).sum::<f64>();
    let w = halves
        .iter()
        .zip(&means)
        .map(|(h, mu)| h.iter().map(|x| (x - mu).powi(2)).sum::<f64>() / (h.len() as f64 - 1.0))
        .sum::<f64>()
        / m;
    if w <= 0.0 {
        return 1.0;
    }
    (((n - 1.0) / n * w + b / n) / w).sqrt()
}

/// Effective sample size over chains (autocorrelations summed in pairs until a pair turns
/// negative: Geyer's initial positive sequence).
pub fn ess(chains: &[Vec<f64>]) -> f64 {
    let m = chains.len();
    let n = chains.iter().map(Vec::len).min().unwrap_or(0);
    if n < 4 {
        return f64::NAN;
    }
    let means: Vec<f64> = chains
        .iter()
        .map(|c| c.iter().sum::<f64>() / n as f64)
        .collect();
    let vars: Vec<f64> = chains
        .iter()
        .zip(&means)
        .map(|(c, mu)| c.iter().map(|x| (x - mu).powi(2)).sum::<f64>() / n as f64)
        .collect();
    let w = vars.iter().sum::<f64>() / m as f64;
    if w <= 0.0 {
        return (m * n) as f64;
    }
    let rho = |lag: usize| -> f64 {
        let mut s = 0.0;
        for (c, mu) in chains.iter().zip(&means) {
            s += (0..n - lag)
                .map(|t| (c[t] - mu) * (c[t + lag] - mu))
                .sum::<f64>()
                / n as f64;
        }
        s / m as f64 / w
    };
    let mut sum = 0.0;
    let mut lag = 1;
    while lag + 1 < n {
        let pair = rho(lag) + rho(lag + 1);
        if pair < 0.0 {
            break;
        }
        sum += pair;
        lag += 2;
    }
    let tau = -1.0 + 2.0 * (1.0 + sum);
    (m * n) as f64 / tau.max(1e-9)
}

#[cfg(test)]
#[path = "tests/mcmc.rs"]
mod tests;
