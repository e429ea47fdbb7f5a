//! Iterative proportional fitting (Deming and Stephan, 1940): rescale a table's cells,
//! one dimension at a time, until the sums over every category of every dimension
//! match their targets.
//!
//! The table is flat: cell `i` belongs to category `dims[j][i]` of dimension `j`. A cell
//! that starts at 0 stays 0 (every step multiplies), so the seed's zeros are structural.
//!
//! ```
//! use stratamap::build::ipf::fit;
//! // A 2 × 2 table with a uniform seed: the fit is the product of the margins over the
//! // total, (row × column) / total.
//! let rows = [0, 0, 1, 1];
//! let cols = [0, 1, 0, 1];
//! let f = fit(&[1.0; 4], &[&rows, &cols], &[&[30.0, 70.0], &[40.0, 60.0]], 1e-9, 100);
//! assert!(f.converged);
//! assert!((f.cells[0] - 30.0 * 40.0 / 100.0).abs() < 1e-9);
//! ```

/// The outcome of a fit.
#[derive(Debug, Clone, PartialEq)]
pub struct Fit {
    pub cells: Vec<f64>,
    /// Full cycles over the dimensions that were run.
    pub iterations: usize,
    /// Largest |sum over a category − its target| after the last cycle.
    pub max_error: f64,
    /// Whether `max_error` came within the tolerance.
    pub converged: bool,
}

/// Fit `seed` to `targets` (per dimension, per category), cycling over the dimensions in
/// the order given until the largest error is at most `tolerance` (in the cells' units)
/// or `max_iterations` cycles have run. The last dimension of each cycle is matched
/// exactly (up to rounding), so put the one that must hold exactly last.
///
/// A category whose cells sum to 0 cannot be rescaled: when its target is above 0 the
/// fit cannot converge, and callers say why before calling.
pub fn fit(
    seed: &[f64],
    dims: &[&[usize]],
    targets: &[&[f64]],
    tolerance: f64,
    max_iterations: usize,
) -> Fit {
    let mut cells = seed.to_vec();
    let mut sums: Vec<f64> = Vec::new();
    let mut iterations = 0;
    let mut max_error = error(&cells, dims, targets, &mut sums);
    while max_error > tolerance && iterations < max_iterations {
        iterations += 1;
        for (cat, target) in dims.iter().zip(targets) {
            category_sums(&cells, cat, target.len(), &mut sums);
            // The factor per category; 0/0 leaves the (zero) cells as they are.
            for (s, t) in sums.iter_mut().zip(target.iter()) {
                *s = if *s > 0.0 { t / *s } else { 1.0 };
            }
            for (x, &c) in cells.iter_mut().zip(cat.iter()) {
                *x *= sums[c];
            }
        }
        max_error = error(&cells, dims, targets, &mut sums);
    }
    Fit {
        cells,
        iterations,
        max_error,
        converged: max_error <= tolerance,
    }
}

fn category_sums(cells: &[f64], cat: &[usize], n: usize, sums: &mut Vec<f64>) {
    sums.clear();
    sums.resize(n, 0.0);
    for (x, &c) in cells.iter().zip(cat) {
        sums[c] += x;
    }
}

/// Largest |category sum − target| over every dimension.
fn error(cells: &[f64], dims: &[&[usize]], targets: &[&[f64]], sums: &mut Vec<f64>) -> f64 {
    let mut worst: f64 = 0.0;
    for (cat, target) in dims.iter().zip(targets) {
        category_sums(cells, cat, target.len(), sums);
        for (s, t) in sums.iter().zip(target.iter()) {
            worst = worst.max((s - t).abs());
        }
    }
    worst
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grid(r: usize, c: usize) -> (Vec<usize>, Vec<usize>) {
        let rows = (0..r * c).map(|i| i / c).collect();
        let cols = (0..r * c).map(|i| i % c).collect();
        (rows, cols)
    }

    /// The worked example of the encyclopaedia article "Iterative proportional fitting"
    /// (Wikipedia, section "Example"): a 4 × 4 seed with row targets 150, 300, 400, 150
    /// and column targets 200, 300, 400, 100. The inputs are as the `ipfn` package's
    /// documentation (PyPI, version 1.4.4) reproduces them. The fitted values below are
    /// what `ipfn` 1.4.4 computes on them (convergence_rate 1e-10), to 3 decimals: the
    /// article's own result table was recalled from memory, and the recollection did not
    /// match a converged fit, so it is not used. Independently of any library, a
    /// converged fit keeps every cross-product ratio of the seed (the fit is P·Z·Q with
    /// diagonal P and Q; Mosteller, "Association and estimation in contingency tables",
    /// JASA 1968, from memory), which is checked too.
    #[test]
    fn published_four_by_four_example() {
        let seed = [
            40.0, 30.0, 20.0, 10.0, //
            35.0, 50.0, 100.0, 75.0, //
            30.0, 80.0, 70.0, 120.0, //
            20.0, 30.0, 40.0, 50.0,
        ];
        let (rows, cols) = grid(4, 4);
        let f = fit(
            &seed,
            &[&rows, &cols],
            &[&[150.0, 300.0, 400.0, 150.0], &[200.0, 300.0, 400.0, 100.0]],
            1e-10,
            1000,
        );
        assert!(f.converged, "{f:?}");
        let want = [
            64.559, 46.232, 35.384, 3.825, //
            49.968, 68.159, 156.499, 25.374, //
            56.722, 144.428, 145.082, 53.767, //
            28.752, 41.180, 63.035, 17.034,
        ];
        for (got, want) in f.cells.iter().zip(want) {
            assert!((got - want).abs() <= 0.0005 + 1e-9, "{got} vs {want}");
        }
        let x = |i: usize, j: usize| f.cells[i * 4 + j];
        let z = |i: usize, j: usize| seed[i * 4 + j];
        for (i, j) in [(0, 1), (1, 3), (2, 0), (0, 3)] {
            let fitted = x(i, j) * x(3, 2) / (x(i, 2) * x(3, j));
            let seeded = z(i, j) * z(3, 2) / (z(i, 2) * z(3, j));
            assert!((fitted / seeded - 1.0).abs() < 1e-9, "{i},{j}");
        }
    }

    /// With a uniform seed the fit of a two-way table is (row total × column total) /
    /// total, after a single cycle (worked by hand: 30·40/100 = 12, 30·60/100 = 18,
    /// 70·40/100 = 28, 70·60/100 = 42).
    #[test]
    fn two_by_two_by_hand() {
        let (rows, cols) = grid(2, 2);
        let f = fit(
            &[5.0; 4],
            &[&rows, &cols],
            &[&[30.0, 70.0], &[40.0, 60.0]],
            1e-12,
            100,
        );
        assert_eq!(f.iterations, 1);
        for (got, want) in f.cells.iter().zip([12.0, 18.0, 28.0, 42.0]) {
            assert!((got - want).abs() < 1e-12, "{got} vs {want}");
        }
    }

    #[test]
    fn zeros_stay_zero_and_the_rest_fits() {
        let (rows, cols) = grid(3, 3);
        let seed = [0.0, 2.0, 1.0, 3.0, 0.0, 1.0, 1.0, 1.0, 0.0];
        let f = fit(
            &seed,
            &[&rows, &cols],
            &[&[10.0, 20.0, 30.0], &[25.0, 15.0, 20.0]],
            1e-9,
            10_000,
        );
        assert!(f.converged, "{f:?}");
        for i in [0, 4, 8] {
            assert_eq!(f.cells[i], 0.0);
        }
        let row0: f64 = f.cells[0..3].iter().sum();
        assert!((row0 - 10.0).abs() <= 1e-9);
        let col1 = f.cells[1] + f.cells[4] + f.cells[7];
        assert!((col1 - 15.0).abs() <= 1e-9);
    }

    /// Margins that the zeros make impossible: row 0 has only column 0, which must be 0.
    #[test]
    fn impossible_margins_do_not_converge() {
        let (rows, cols) = grid(2, 2);
        let f = fit(
            &[1.0, 0.0, 1.0, 1.0],
            &[&rows, &cols],
            &[&[10.0, 10.0], &[0.0, 20.0]],
            1e-9,
            50,
        );
        assert!(!f.converged);
        assert_eq!(f.iterations, 50);
    }
}
