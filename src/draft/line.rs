//! The least-squares straight line designers use to make chord and twist simpler to make.

/// A straight line `y = intercept + slope * x`.
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Line {
    /// Value at `x = 0`, in the unit of `y`.
    pub intercept: f64,
    /// Change of `y` per unit of `x`.
    pub slope: f64,
}

impl Line {
    /// The line's value at `x`.
    pub fn at(&self, x: f64) -> f64 {
        self.intercept + self.slope * x
    }

    /// The ordinary least-squares line through the points `(xs[i], ys[i])`: it minimises
    /// the sum of squared vertical distances. Computed about the means for precision:
    /// `slope = sum((x - mx)(y - my)) / sum((x - mx)^2)`, `intercept = my - slope mx`.
    ///
    /// Returns `None` when the slices differ in length, hold fewer than two points, a
    /// value is not finite, or all `x` are equal (no line is defined).
    pub fn fit(xs: &[f64], ys: &[f64]) -> Option<Self> {
        if xs.len() != ys.len() || xs.len() < 2 {
            return None;
        }
        if xs.iter().chain(ys).any(|v| !v.is_finite()) {
            return None;
        }
        let n = xs.len() as f64;
        let mx = xs.iter().sum::<f64>() / n;
        let my = ys.iter().sum::<f64>() / n;
        let (mut sxy, mut sxx) = (0.0, 0.0);
        for (x, y) in xs.iter().zip(ys) {
            sxy += (x - mx) * (y - my);
            sxx += (x - mx) * (x - mx);
        }
        if sxx <= f64::EPSILON * mx.abs().max(1.0) {
            return None;
        }
        let slope = sxy / sxx;
        Some(Self {
            intercept: my - slope * mx,
            slope,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn exact_line_is_recovered() {
        let xs = [1.0, 2.0, 4.0, 7.0];
        let ys: Vec<f64> = xs.iter().map(|x| 3.0 - 0.5 * x).collect();
        let l = Line::fit(&xs, &ys).unwrap();
        assert!((l.slope + 0.5).abs() < 1e-12 && (l.intercept - 3.0).abs() < 1e-12);
    }

    #[test]
    fn degenerate_input_gives_none() {
        assert!(Line::fit(&[1.0, 1.0], &[0.0, 2.0]).is_none());
        assert!(Line::fit(&[1.0], &[0.0]).is_none());
        assert!(Line::fit(&[1.0, 2.0], &[0.0]).is_none());
    }
}
