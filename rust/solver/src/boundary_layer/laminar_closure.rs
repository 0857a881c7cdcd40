//! Laminar closure relations of the two-equation integral method, as functions of the shape
//! factor H, from the project's own Falkner–Skan similarity solutions.
//!
//! The table `data/falkner_skan_closure.csv` is written by `scripts/falkner_skan_closures.py`
//! (scipy `solve_bvp` of f''' + f f'' + β(1 − f'²) = 0; Schlichting & Gersten, *Boundary-Layer
//! Theory*, ch. 7), covering the attached branch from β = 10 through Blasius to separation
//! (H = 4.029) and the reversed-flow lower branch (Stewartson 1954) beyond it. H increases
//! monotonically along that combined branch, so each closure is single-valued in H. Between the
//! rows the closures are interpolated by monotone cubics (C¹, no overshoot); outside the table
//! they continue with the bounded, sign-preserving extension of
//! `MonotoneCubic` (`interpolation`).

use std::sync::OnceLock;

use super::interpolation::MonotoneCubic;

/// Laminar closure as functions of the shape factor H (project's Falkner–Skan solutions).
pub trait LaminarClosure: Send + Sync {
    /// Energy shape factor H* = δ_E/θ.
    fn energy_shape_factor(&self, h: f64) -> f64;
    /// Cf·Reθ with Cf = τw/(½ρ ue²).
    fn skin_friction_re_theta(&self, h: f64) -> f64;
    /// CD·Reθ with CD = D/(ρ ue³) the dissipation coefficient.
    fn dissipation_re_theta(&self, h: f64) -> f64;
    /// The three at once, [H*, Cf·Reθ, CD·Reθ] (a table-backed closure locates H once).
    fn values(&self, h: f64) -> [f64; 3] {
        [
            self.energy_shape_factor(h),
            self.skin_friction_re_theta(h),
            self.dissipation_re_theta(h),
        ]
    }
}

/// Largest saturation width, in units of H, of the extensions beyond the table's ends.
const EXTENSION_WIDTH: f64 = 2.0;

/// Table-backed laminar closure from the shipped Falkner–Skan solutions.
#[derive(Debug, Clone)]
pub struct FalknerSkanClosure {
    energy_shape_factor: MonotoneCubic,
    skin_friction_re_theta: MonotoneCubic,
    dissipation_re_theta: MonotoneCubic,
    re_theta_growth: MonotoneCubic,
    pressure_gradient_beta: MonotoneCubic,
}

/// One parsed closure table: column name → values, rows in file order.
pub(crate) struct ClosureTable {
    names: Vec<String>,
    columns: Vec<Vec<f64>>,
    /// Text columns (such as `branch`) are kept as strings.
    text: Vec<Vec<String>>,
}

impl ClosureTable {
    /// Parses a comma-separated table with `#` comment lines and one header line.
    pub(crate) fn parse(source: &str, what: &str) -> Result<Self, String> {
        let mut lines = source
            .lines()
            .map(str::trim)
            .filter(|l| !l.is_empty() && !l.starts_with('#'));
        let header = lines
            .next()
            .ok_or_else(|| format!("{what}: no header line"))?;
        let names: Vec<String> = header.split(',').map(|s| s.trim().to_string()).collect();
        let mut columns = vec![Vec::new(); names.len()];
        let mut text = vec![Vec::new(); names.len()];
        for (row, line) in lines.enumerate() {
            let cells: Vec<&str> = line.split(',').map(str::trim).collect();
            if cells.len() != names.len() {
                return Err(format!(
                    "{what}: row {row} has {} cells, header has {}",
                    cells.len(),
                    names.len()
                ));
            }
            for (j, cell) in cells.iter().enumerate() {
                text[j].push(cell.to_string());
                columns[j].push(cell.parse::<f64>().unwrap_or(f64::NAN));
            }
        }
        Ok(Self {
            names,
            columns,
            text,
        })
    }

    /// Numeric column by name; every entry must be a finite number.
    pub(crate) fn column(&self, name: &str, what: &str) -> Result<Vec<f64>, String> {
        let j = self.index(name, what)?;
        if let Some(i) = self.columns[j].iter().position(|v| !v.is_finite()) {
            return Err(format!(
                "{what}: column {name}, row {i}: '{}' is not a number",
                self.text[j][i]
            ));
        }
        Ok(self.columns[j].clone())
    }

    fn index(&self, name: &str, what: &str) -> Result<usize, String> {
        self.names
            .iter()
            .position(|n| n == name)
            .ok_or_else(|| format!("{what}: no column named {name}"))
    }
}

impl FalknerSkanClosure {
    /// The closure built from the table shipped with the crate, parsed once.
    pub fn shipped() -> &'static FalknerSkanClosure {
        static SHIPPED: OnceLock<FalknerSkanClosure> = OnceLock::new();
        SHIPPED.get_or_init(|| {
            Self::from_csv(include_str!("data/falkner_skan_closure.csv"))
                .expect("the shipped Falkner–Skan closure table is valid (checked by unit tests)")
        })
    }

    /// Builds the closure from a table in the format written by `scripts/falkner_skan_closures.py`.
    pub fn from_csv(source: &str) -> Result<Self, String> {
        let what = "Falkner–Skan closure table";
        let table = ClosureTable::parse(source, what)?;
        let h = table.column("shape_factor", what)?;
        let build = |name: &str| -> Result<MonotoneCubic, String> {
            MonotoneCubic::new(h.clone(), table.column(name, what)?, EXTENSION_WIDTH)
                .map_err(|e| format!("{what}, column {name}: {e}"))
        };
        // (All on the same abscissae, the column of shape factors: `values` locates H once.)
        Ok(Self {
            energy_shape_factor: build("energy_shape_factor")?,
            skin_friction_re_theta: build("skin_friction_re_theta")?,
            dissipation_re_theta: build("dissipation_re_theta")?,
            re_theta_growth: build("re_theta_growth")?,
            pressure_gradient_beta: build("beta")?,
        })
    }

    /// θ·dReθ/dx of the Falkner–Skan flow with shape factor `h` (equals (1+m)k²/2 with
    /// k = θ√(ue/(νx)); the rate at which a similar layer's Reθ grows, used by the e^N envelope).
    pub fn re_theta_growth(&self, h: f64) -> f64 {
        self.re_theta_growth.value(h)
    }

    /// Hartree's pressure-gradient parameter β of the Falkner–Skan flow with shape factor `h`.
    pub fn pressure_gradient_beta(&self, h: f64) -> f64 {
        self.pressure_gradient_beta.value(h)
    }

    /// Range of shape factors covered by the table (outside it the closures are extended).
    pub fn shape_factor_range(&self) -> (f64, f64) {
        self.energy_shape_factor.range()
    }

    /// dH*/dH, continuous in H (for Newton iterations of the integral equations).
    pub fn energy_shape_factor_slope(&self, h: f64) -> f64 {
        self.energy_shape_factor.value_and_derivative(h).1
    }

    /// d(Cf·Reθ)/dH, continuous in H.
    pub fn skin_friction_re_theta_slope(&self, h: f64) -> f64 {
        self.skin_friction_re_theta.value_and_derivative(h).1
    }

    /// d(CD·Reθ)/dH, continuous in H.
    pub fn dissipation_re_theta_slope(&self, h: f64) -> f64 {
        self.dissipation_re_theta.value_and_derivative(h).1
    }
}

impl LaminarClosure for FalknerSkanClosure {
    fn energy_shape_factor(&self, h: f64) -> f64 {
        self.energy_shape_factor.value(h)
    }
    fn skin_friction_re_theta(&self, h: f64) -> f64 {
        self.skin_friction_re_theta.value(h)
    }
    fn dissipation_re_theta(&self, h: f64) -> f64 {
        self.dissipation_re_theta.value(h)
    }
    fn values(&self, h: f64) -> [f64; 3] {
        // (The tables share their abscissae, the shape factors of the table: `from_csv`.)
        let at = self.energy_shape_factor.position(h);
        [
            self.energy_shape_factor.value_at(&at),
            self.skin_friction_re_theta.value_at(&at),
            self.dissipation_re_theta.value_at(&at),
        ]
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const BLASIUS_H: f64 = 2.5911;

    #[test]
    fn shipped_table_parses_and_covers_both_branches() {
        let c = FalknerSkanClosure::shipped();
        let (lo, hi) = c.shape_factor_range();
        assert!(lo < 2.2 && hi >= 10.0, "range {lo}..{hi}");
    }

    #[test]
    fn the_three_closures_at_once_are_the_three_apart() {
        // Our design: `values` locates H once and gives bit for bit the separate lookups,
        // inside the table, at its ends and on the extensions beyond them.
        let c = FalknerSkanClosure::shipped();
        let (lo, hi) = c.shape_factor_range();
        for h in [lo - 1.0, lo, 2.3, BLASIUS_H, 3.5, 4.03, 7.0, hi, hi + 3.0] {
            let [h_star, cf, cd] = c.values(h);
            assert_eq!(
                h_star.to_bits(),
                c.energy_shape_factor(h).to_bits(),
                "H = {h}"
            );
            assert_eq!(
                cf.to_bits(),
                c.skin_friction_re_theta(h).to_bits(),
                "H = {h}"
            );
            assert_eq!(cd.to_bits(), c.dissipation_re_theta(h).to_bits(), "H = {h}");
        }
    }

    #[test]
    fn blasius_values() {
        // Blasius flat plate, Schlichting & Gersten, Boundary-Layer Theory, §7.2; White, Viscous
        // Fluid Flow, §4-3: H = 2.591, Cf·Reθ = 2·0.2205 = 0.441, H* = 1.572.
        let c = FalknerSkanClosure::shipped();
        assert!((c.skin_friction_re_theta(BLASIUS_H) - 0.441).abs() < 0.001);
        assert!((c.energy_shape_factor(BLASIUS_H) - 1.572).abs() < 0.001);
        // θ dReθ/dx = (0.664)²/2 for Blasius (θ/x = 0.664/√Re_x, same sources).
        assert!((c.re_theta_growth(BLASIUS_H) - 0.664f64.powi(2) / 2.0).abs() < 0.001);
        assert!(c.pressure_gradient_beta(BLASIUS_H).abs() < 1e-3);
    }

    #[test]
    fn separation_and_stagnation() {
        // Falkner–Skan separation profile, β = −0.1988, H = 4.029 (Schlichting & Gersten, Table 7.1,
        // from memory): zero wall shear. Stagnation flow β = 1: H = 2.2162 (same table).
        let c = FalknerSkanClosure::shipped();
        assert!(c.skin_friction_re_theta(4.0292).abs() < 1e-3);
        assert!((c.pressure_gradient_beta(4.0292) + 0.1988).abs() < 1e-3);
        assert!((c.pressure_gradient_beta(2.2162) - 1.0).abs() < 2e-3);
        assert!(
            c.skin_friction_re_theta(6.0) < 0.0,
            "reversed-flow branch has negative wall shear"
        );
    }

    #[test]
    fn closures_are_smooth_and_bounded_everywhere() {
        let c = FalknerSkanClosure::shipped();
        let mut h = 1.05;
        while h < 60.0 {
            for f in [
                |c: &FalknerSkanClosure, h| c.energy_shape_factor(h),
                |c: &FalknerSkanClosure, h| c.skin_friction_re_theta(h),
                |c: &FalknerSkanClosure, h| c.dissipation_re_theta(h),
            ] {
                let v = f(c, h);
                assert!(
                    v.is_finite() && v.abs() < 5.0,
                    "closure value {v} at H = {h}"
                );
                let jump = (f(c, h + 1e-7) - 2.0 * v + f(c, h - 1e-7)).abs();
                assert!(jump < 1e-9, "kink at H = {h}");
            }
            assert!(c.dissipation_re_theta(h) > 0.0);
            assert!(c.energy_shape_factor(h) > 1.0);
            h += 0.0137;
        }
        assert!(c.skin_friction_re_theta(60.0) < 0.0);
    }

    #[test]
    fn malformed_table_names_the_problem() {
        let err = FalknerSkanClosure::from_csv("shape_factor,beta\n2.0,x\n").unwrap_err();
        assert!(
            err.contains("energy_shape_factor") || err.contains("beta"),
            "{err}"
        );
    }
}
