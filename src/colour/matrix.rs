//! 3 × 3 matrices for the linear steps between colour spaces.
//!
//! Every function is a `const fn`, so the matrices that are derived from published constants
//! (the sRGB matrix from its primaries, inverses of published matrices) are computed once, by
//! the compiler, with plain IEEE arithmetic: the same values on every machine.

/// A 3 × 3 matrix in row-major order, acting on column vectors.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Mat3(pub [[f64; 3]; 3]);

impl Mat3 {
    /// `self · v`.
    pub const fn apply(&self, v: [f64; 3]) -> [f64; 3] {
        let m = &self.0;
        [
            m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
            m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
            m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
        ]
    }

    /// The matrix whose column `j` is `columns[j]`.
    pub const fn from_columns(columns: [[f64; 3]; 3]) -> Mat3 {
        let c = &columns;
        Mat3([
            [c[0][0], c[1][0], c[2][0]],
            [c[0][1], c[1][1], c[2][1]],
            [c[0][2], c[1][2], c[2][2]],
        ])
    }

    /// `self · diag(s)`: column `j` multiplied by `s[j]`.
    pub const fn scale_columns(&self, s: [f64; 3]) -> Mat3 {
        let m = &self.0;
        Mat3([
            [m[0][0] * s[0], m[0][1] * s[1], m[0][2] * s[2]],
            [m[1][0] * s[0], m[1][1] * s[1], m[1][2] * s[2]],
            [m[2][0] * s[0], m[2][1] * s[1], m[2][2] * s[2]],
        ])
    }

    /// The inverse, by cofactors. Every matrix inverted here is a published, well-conditioned
    /// colour matrix (determinant far from zero), which the unit tests check.
    pub const fn inverse(&self) -> Mat3 {
        let m = &self.0;
        let c00 = m[1][1] * m[2][2] - m[1][2] * m[2][1];
        let c01 = m[1][2] * m[2][0] - m[1][0] * m[2][2];
        let c02 = m[1][0] * m[2][1] - m[1][1] * m[2][0];
        let det = m[0][0] * c00 + m[0][1] * c01 + m[0][2] * c02;
        Mat3([
            [
                c00 / det,
                (m[0][2] * m[2][1] - m[0][1] * m[2][2]) / det,
                (m[0][1] * m[1][2] - m[0][2] * m[1][1]) / det,
            ],
            [
                c01 / det,
                (m[0][0] * m[2][2] - m[0][2] * m[2][0]) / det,
                (m[0][2] * m[1][0] - m[0][0] * m[1][2]) / det,
            ],
            [
                c02 / det,
                (m[0][1] * m[2][0] - m[0][0] * m[2][1]) / det,
                (m[0][0] * m[1][1] - m[0][1] * m[1][0]) / det,
            ],
        ])
    }

    /// The sum of each row.
    pub const fn row_sums(&self) -> [f64; 3] {
        self.apply([1.0, 1.0, 1.0])
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn inverse_times_matrix_is_the_identity() {
        let m = Mat3([[2.0, -1.0, 0.5], [0.25, 3.0, 1.0], [-1.5, 0.5, 4.0]]);
        let inv = m.inverse();
        for (j, unit) in [[1.0, 0.0, 0.0], [0.0, 1.0, 0.0], [0.0, 0.0, 1.0]]
            .into_iter()
            .enumerate()
        {
            let back = m.apply(inv.apply(unit));
            for (i, v) in back.into_iter().enumerate() {
                let expected = if i == j { 1.0 } else { 0.0 };
                assert!((v - expected).abs() < 1e-14, "{i},{j}: {v}");
            }
        }
    }

    #[test]
    fn columns_and_scaling_place_values_where_expected() {
        let m = Mat3::from_columns([[1.0, 2.0, 3.0], [4.0, 5.0, 6.0], [7.0, 8.0, 9.0]]);
        assert_eq!(m.0[0], [1.0, 4.0, 7.0]);
        assert_eq!(m.scale_columns([1.0, 0.0, 2.0]).0[2], [3.0, 0.0, 18.0]);
        assert_eq!(m.row_sums(), [12.0, 15.0, 18.0]);
    }
}
