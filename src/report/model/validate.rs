//! What the templates and charts rely on, checked before Typst runs, and why a model is refused.

use std::collections::BTreeSet;
use std::fmt;

use super::{ChartUnits, FieldPoint, Plane, ReportData};

impl ChartUnits {
    pub(crate) fn validate(&self) -> Result<(), ModelError> {
        for (what, value) in [
            ("units.length_per_m", self.length_per_m),
            ("units.velocity_per_m_s", self.velocity_per_m_s),
        ] {
            if !(value.is_finite() && value > 0.0) {
                return Err(ModelError::BadNumber {
                    what: what.into(),
                    value,
                });
            }
        }
        Ok(())
    }
}

fn validate_field(plane: &Plane, run: &str, field: &[FieldPoint]) -> Result<(), ModelError> {
    for p in field {
        if plane.line(&p.line).is_none() {
            return Err(ModelError::UnknownLine {
                run: run.to_string(),
                line: p.line.clone(),
            });
        }
        for (what, value) in [
            ("position_m", p.position_m),
            ("x_m", p.x_m),
            ("y_m", p.y_m),
            ("velocity_m_s", p.velocity_m_s),
        ] {
            if !value.is_finite() {
                return Err(ModelError::BadNumber {
                    what: format!("run {run}, line {} point {}: {what}", p.line, p.point),
                    value,
                });
            }
        }
    }
    Ok(())
}

impl ReportData {
    /// Checks what the template and the charts rely on. The engine calls this before rendering.
    pub fn validate(&self) -> Result<(), ModelError> {
        let hex = &self.header.content_sha256;
        if hex.len() != 64 || !hex.bytes().all(|b| b.is_ascii_hexdigit()) {
            return Err(ModelError::BadFingerprint { found: hex.clone() });
        }
        if self.header.report_id.trim().is_empty() {
            return Err(ModelError::Empty {
                what: "header.report_id".into(),
            });
        }
        self.units.validate()?;
        self.plane.validate()?;
        self.validate_columns()?;
        let mut ids = BTreeSet::new();
        for run in &self.runs {
            if !ids.insert(run.id.as_str()) {
                return Err(ModelError::Duplicate {
                    what: "run".into(),
                    name: run.id.clone(),
                });
            }
            validate_field(&self.plane, &run.id, &run.field)?;
        }
        Ok(())
    }

    /// Every row of a table has one value per column (the templates index by column).
    fn validate_columns(&self) -> Result<(), ModelError> {
        for table in &self.results {
            let columns = table.columns.len();
            for row in &table.rows {
                let si_ok = if row.si_unit.is_empty() {
                    row.si_values.is_empty() || row.si_values.len() == columns
                } else {
                    row.si_values.len() == columns
                };
                if row.values.len() != columns || !si_ok {
                    return Err(ModelError::ColumnCount {
                        row: row.label.clone(),
                        expected: columns,
                        found: row.values.len(),
                    });
                }
            }
        }
        for m in &self.checks.matrices {
            for row in &m.rows {
                if row.cells.len() != m.runs.len() {
                    return Err(ModelError::ColumnCount {
                        row: row.id.clone(),
                        expected: m.runs.len(),
                        found: row.cells.len(),
                    });
                }
            }
        }
        Ok(())
    }
}

/// Why a presentation model was rejected.
#[derive(Debug, Clone, PartialEq)]
pub enum ModelError {
    BadFingerprint {
        found: String,
    },
    BadNumber {
        what: String,
        value: f64,
    },
    Empty {
        what: String,
    },
    Duplicate {
        what: String,
        name: String,
    },
    BadLine {
        line: String,
        reason: &'static str,
    },
    UnknownLine {
        run: String,
        line: String,
    },
    ColumnCount {
        row: String,
        expected: usize,
        found: usize,
    },
}

impl fmt::Display for ModelError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ModelError::BadFingerprint { found } => write!(
                f,
                "content fingerprint must be 64 hex digits (SHA-256), found `{found}`"
            ),
            ModelError::BadNumber { what, value } => {
                write!(
                    f,
                    "{what} must be a finite number in range, found `{value}`"
                )
            }
            ModelError::Empty { what } => write!(f, "{what} must not be empty"),
            ModelError::Duplicate { what, name } => write!(f, "{what} `{name}` appears twice"),
            ModelError::BadLine { line, reason } => write!(f, "traverse line `{line}`: {reason}"),
            ModelError::UnknownLine { run, line } => write!(
                f,
                "run `{run}` has a point on line `{line}`, which the plane does not have"
            ),
            ModelError::ColumnCount {
                row,
                expected,
                found,
            } => write!(
                f,
                "row `{row}` must have {expected} values (one per column), found {found}"
            ),
        }
    }
}

impl std::error::Error for ModelError {}

#[cfg(test)]
mod tests {
    use crate::report::model::{LineOrientation, Shape};
    use crate::report::testkit::report;

    #[test]
    fn validate_names_what_is_wrong() {
        let mut data = report("stack");
        data.results[0].rows[0].values.pop();
        assert_eq!(
            data.validate().unwrap_err().to_string(),
            "row `Mean gas temperature` must have 4 values (one per column), found 3"
        );

        let mut data = report("stack");
        data.checks.matrices[0].rows[0].cells.pop();
        assert!(data.validate().is_err());

        let mut data = report("stack");
        data.runs[0].field[0].line = "Z".into();
        assert_eq!(
            data.validate().unwrap_err().to_string(),
            "run `1` has a point on line `Z`, which the plane does not have"
        );

        let mut data = report("stack");
        data.plane.shape = Shape::Round { diameter_m: -1.0 };
        assert!(data
            .validate()
            .unwrap_err()
            .to_string()
            .starts_with("plane.shape.diameter_m must be a finite number"));

        let mut data = report("hvac");
        data.plane.lines[0].orientation = LineOrientation::AngleDeg(0.0);
        assert!(data
            .validate()
            .unwrap_err()
            .to_string()
            .starts_with("traverse line `A`: orientation does not fit"));

        let mut data = report("hvac");
        data.header.content_sha256 = "abc".into();
        assert!(data.validate().is_err());
    }

    #[test]
    fn points_are_placed_as_drawn() {
        const TOL_M: f64 = 1e-12;
        // sample-data/stack: a 96 in (2.4384 m) round stack
        let round = report("stack").plane;
        let r = 2.4384 / 2.0;
        // Line A (0°) enters at the top: a point 0.1 m in is 0.1 m below the top wall.
        let (x, y) = round.point_xy(LineOrientation::AngleDeg(0.0), 0.1);
        assert!(x.abs() < TOL_M && (y - (r - 0.1)).abs() < TOL_M);
        // Line B (90°) enters on the right.
        let (x, y) = round.point_xy(LineOrientation::AngleDeg(90.0), 0.1);
        assert!((x - (r - 0.1)).abs() < TOL_M && y.abs() < TOL_M);
        // sample-data/hvac: 36 × 24 in, ports in the 36 in side
        let rect = report("hvac").plane;
        let (x, y) = rect.point_xy(LineOrientation::OffsetM(0.0), 0.0);
        assert!((x + 18.0 * 0.0254).abs() < TOL_M && (y - 12.0 * 0.0254).abs() < TOL_M);
    }

    #[test]
    fn the_model_serialises_with_our_field_names() {
        let json = serde_json::to_value(report("stack")).unwrap();
        assert_eq!(json["plane"]["shape"]["kind"], "round");
        assert_eq!(json["plane"]["lines"][1]["orientation"]["angle_deg"], 90.0);
        assert_eq!(json["summary"]["verdict"], "pass");
        assert_eq!(json["header"]["paper"], "us-letter");
        let rect = serde_json::to_value(report("hvac")).unwrap();
        assert_eq!(rect["plane"]["shape"]["kind"], "rectangular");
        assert_eq!(rect["header"]["paper"], "us-letter");
    }
}
