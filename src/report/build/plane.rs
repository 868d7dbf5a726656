//! The measurement plane: dimensions, layout, every point with its probe mark, and the straight
//! runs and point count as the plane checks judged them. The blank field data sheet
//! ([`field_sheet_data`]) lays out the same plane.

use super::header::{paper, software};
use super::{chart_units, status, text, Job, Trade};
use crate::checks::Finding;
use crate::display::{fixed, inch_eighths, DisplayTable, Kind, UnitSystem};
use crate::geometry::Shape as GShape;
use crate::layout::{probe_marks, Layout, MarkStep, Method, ProbeMark};
use crate::report::model::{
    FieldSheetData, LineOrientation, Plane, PointPosition, Quantity, ReadingsColumns, Shape,
    SheetFields, Status, StraightRun, TraverseLine,
};
use crate::survey::{Construction, ConventionId};

pub(super) fn section(job: &Job) -> Plane {
    let s = job.survey();
    let layout = &job.e.plane.layout;
    let marks = probe_marks(layout, s.port_length_m, mark_step(job.table.system));
    let mut plane = plane_model(layout, &marks, &job.table, s.port_length_m);
    if s.liner_m > 0.0 {
        plane
            .dimensions
            .push(job.plain("Liner (subtracted twice)", Kind::Length, s.liner_m));
    }
    plane.dimensions.push(Quantity::new(
        "Construction",
        match s.construction {
            Construction::Steel => "steel (or other non-brick)",
            Construction::Brick => "brick and mortar",
        },
        "",
    ));
    let findings: Vec<&Finding> = job.a.checks.iter().collect();
    if let Some(f) = findings.iter().find(|f| f.id == "point-count") {
        plane.points_required = f.limit.to_string();
        plane.point_count_status = status(f.status);
    }
    plane.straight_runs = findings
        .iter()
        .filter(|f| f.id.starts_with("straight-run"))
        .map(|f| StraightRun {
            label: "Upstream / downstream".into(),
            value: straight_runs(s.upstream_d, s.downstream_d),
            requirement: f.limit.to_string(),
            status: status(f.status),
        })
        .collect();
    plane
}

fn straight_runs(up: Option<f64>, down: Option<f64>) -> String {
    let d = |x: Option<f64>| {
        x.map(|v| format!("{} D", fixed(v, 1)))
            .unwrap_or_else(|| "not given".into())
    };
    format!("{} / {}", d(up), d(down))
}

/// The marking step a job's probes are marked in: eighths of an inch for inch-pound jobs, whole
/// millimetres otherwise (common practice).
pub fn mark_step(system: UnitSystem) -> MarkStep {
    match system {
        UnitSystem::InchPound => MarkStep::EIGHTH_INCH,
        UnitSystem::Si | UnitSystem::EpaMetric => MarkStep::MILLIMETRE,
    }
}

fn method_words(m: Method) -> &'static str {
    match m {
        Method::EqualArea => "Equal-area (centroids of equal areas)",
        Method::LogLinear => "Log-linear (equal weights)",
        Method::LogTchebycheff => "Log-Tchebycheff (equal weights)",
    }
}

/// The plane as a page shows it, in `table`'s units. Point count, straight runs and extra
/// dimensions are the caller's to fill.
fn plane_model(
    layout: &Layout,
    marks: &[ProbeMark],
    table: &DisplayTable,
    port_length_m: f64,
) -> Plane {
    let l = |m: f64| text(table, Kind::Length, m);
    let si_beside = table.system == UnitSystem::InchPound;
    let si = |kind: Kind, v: f64| {
        if si_beside {
            text(&table.si(), kind, v)
        } else {
            String::new()
        }
    };
    let duct = layout.duct();
    let (shape, description, mut dims) = match duct.shape() {
        GShape::Round { diameter_m } => (
            Shape::Round { diameter_m },
            format!("Round duct, {} inside diameter", l(diameter_m)),
            vec![Quantity::new(
                "Inside diameter",
                l(diameter_m),
                si(Kind::Length, diameter_m),
            )],
        ),
        GShape::Rectangular { width_m, height_m } => (
            Shape::Rectangular { width_m, height_m },
            format!(
                "Rectangular duct, {} × {} inside (ports in the {} side)",
                l(width_m),
                l(height_m),
                l(width_m)
            ),
            vec![
                Quantity::new(
                    "Inside width (port side)",
                    l(width_m),
                    si(Kind::Length, width_m),
                ),
                Quantity::new("Inside height", l(height_m), si(Kind::Length, height_m)),
                Quantity::new(
                    "Equivalent diameter",
                    l(duct.equivalent_diameter_m()),
                    si(Kind::Length, duct.equivalent_diameter_m()),
                ),
            ],
        ),
    };
    dims.push(Quantity::new(
        "Area",
        text(table, Kind::Area, duct.area_m2()),
        si(Kind::Area, duct.area_m2()),
    ));
    dims.push(Quantity::new(
        "Port length (nipple + wall)",
        l(port_length_m),
        "",
    ));
    let eighths = table.system == UnitSystem::InchPound
        && marks
            .iter()
            .all(|m| inch_eighths(table.get(Kind::Length).value(m.mark_m)).is_some());
    Plane {
        shape,
        description,
        dimensions: dims,
        method: method_words(layout.method()).to_string(),
        method_source: layout.source().to_string(),
        point_count: format!(
            "{} ({} lines × {})",
            layout.total_points(),
            layout.lines(),
            layout.points_per_line()
        ),
        points_required: "not set by the rule book".into(),
        point_count_status: Status::NotApplicable,
        straight_runs: Vec::new(),
        lines: lines(layout, marks, table, eighths),
        marks_note: if eighths {
            "Probe marks in inches and eighths, measured from the outer end of the port (port length included)."
        } else {
            "Probe marks measured from the outer end of the port (port length included)."
        }
        .to_string(),
    }
}

fn lines(
    layout: &Layout,
    marks: &[ProbeMark],
    table: &DisplayTable,
    eighths: bool,
) -> Vec<TraverseLine> {
    let len = table.get(Kind::Length);
    let mark_text = |m: f64| match inch_eighths(len.value(m)) {
        Some(t) if eighths => len.with_unit(t),
        _ => text(table, Kind::Length, m),
    };
    (0..layout.lines())
        .filter_map(|li| {
            let pts: Vec<(&crate::layout::Point, &ProbeMark)> = layout
                .points()
                .iter()
                .zip(marks)
                .filter(|(p, _)| p.line_index == li)
                .collect();
            let first = pts.first()?.0;
            let (orientation, orientation_text) = match (first.line_angle_deg, first.line_offset_m)
            {
                (Some(a), _) => (LineOrientation::AngleDeg(a), format!("{}°", fixed(a, 0))),
                (_, Some(o)) => (
                    LineOrientation::OffsetM(o),
                    format!("{} from the left wall", text(table, Kind::Length, o)),
                ),
                _ => (LineOrientation::AngleDeg(0.0), "0°".into()),
            };
            Some(TraverseLine {
                name: first.line.clone(),
                port: format!("Port {}", first.line),
                orientation,
                orientation_text,
                length: text(table, Kind::Length, layout.duct().line_length_m()),
                points: pts
                    .iter()
                    .map(|(p, m)| PointPosition {
                        point: p.point as u32,
                        position_m: p.position_m,
                        position: text(table, Kind::Length, p.position_m),
                        fraction: format!("{} %", fixed(p.fraction * 100.0, 1)),
                        insertion: mark_text(m.mark_m),
                        adjusted: p.adjusted,
                    })
                    .collect(),
            })
        })
        .collect()
}

/// What a blank field data sheet is made from: the plane, its marks and the survey's names.
#[derive(Debug, Clone)]
pub struct SheetPlane<'a> {
    pub layout: &'a Layout,
    pub marks: &'a [ProbeMark],
    pub convention: ConventionId,
    /// The units the sheet is printed in (the convention's, or the user's choice).
    pub system: UnitSystem,
    pub port_length_m: f64,
    pub required_points: Option<usize>,
    /// The survey's title, site and plane, when the sheet is made from a survey file.
    pub title: Option<String>,
    pub site: Option<String>,
    pub plane_location: Option<String>,
}

/// The blank field data sheet for a plane.
pub fn field_sheet_data(p: &SheetPlane) -> FieldSheetData {
    let table = DisplayTable::new(p.convention, p.system);
    let trade = Trade::of(p.convention);
    let mut plane = plane_model(p.layout, p.marks, &table, p.port_length_m);
    if let Some(n) = p.required_points {
        let ok = p.layout.total_points() >= n;
        plane.points_required = format!("≥ {n} points");
        plane.point_count_status = if ok { Status::Pass } else { Status::Fail };
    }
    let unit = |k: Kind| table.get(k).symbol;
    FieldSheetData {
        title: p
            .title
            .clone()
            .unwrap_or_else(|| "Field data sheet".to_string()),
        site: p.site.clone(),
        plane_location: p.plane_location.clone(),
        plane,
        units: chart_units(&table),
        readings: ReadingsColumns {
            position: format!("Position ({})", unit(Kind::Length)),
            dp: format!("{} ({})", trade.dp(), unit(Kind::VelocityPressure)),
            temperature: format!("T ({})", unit(Kind::Temperature)),
            yaw: (trade == Trade::Stack).then(|| "Yaw (°)".to_string()),
            velocity: format!("Velocity ({})", unit(Kind::Velocity)),
        },
        fields: SheetFields {
            barometric_label: format!("Barometric pressure ({})", unit(Kind::Barometric)),
            static_label: format!("Static pressure ({})", unit(Kind::StaticPressure)),
            temperature_label: format!(
                "{} temperature, if one value ({})",
                super::capitalised(trade.gas()),
                unit(Kind::Temperature)
            ),
            ..SheetFields::default()
        },
        leak_checks: trade.records_leak_checks(),
        footnote: match trade {
            Trade::Stack => {
                "A: point moved by the wall rule. Read Δp signed; mark a reading that \
                             swings by more than a quarter of its value. Record yaw as the null \
                             angle with its sign."
            }
            Trade::Hvac => {
                "A: point moved by the wall rule. Read velocity pressure signed; mark a \
                            reading that swings by more than a quarter of its value. Note dampers, \
                            fan speed and filter state at the time of the traverse."
            }
        }
        .to_string(),
        paper: paper(p.system),
        software: software(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::report::testkit::evaluated;

    #[test]
    fn stack_plane_in_inches_with_marks_in_eighths() {
        let (e, a) = evaluated("stack");
        let p = section(&Job::new(&e, &a));
        assert_eq!(p.description, "Round duct, 96.00 in inside diameter");
        assert_eq!(p.dimensions[0].value, "96.00 in");
        assert_eq!(p.dimensions[0].si, "2,438 mm");
        // 96 in: area π·48² in² = 50.2655 ft²
        assert_eq!(p.dimensions[1].value, "50.2655 ft²");
        assert_eq!(p.point_count, "24 (2 lines × 12)");
        assert_eq!(p.point_count_status, Status::Pass);
        // EPA Method 1 Table 1-2, 12 points on a diameter: point 1 at 2.1 % of 96 in = 2.016 in,
        // plus the 6 in port = 8.016 in, marked to the nearest eighth: 8 in
        let a1 = &p.lines[0].points[0];
        assert_eq!(a1.position, "2.02 in");
        assert_eq!(a1.insertion, "8 in");
        assert_eq!(p.lines[0].points[1].insertion, "12 3/8 in");
        assert!(p.marks_note.contains("eighths"));
        assert_eq!(p.straight_runs.len(), 1);
        assert_eq!(p.straight_runs[0].value, "8.5 D / 2.4 D");
    }

    #[test]
    fn metric_plane_in_millimetres() {
        let (e, a) = evaluated("stack-metric");
        let p = section(&Job::new(&e, &a));
        assert_eq!(p.dimensions[0].value, "1,500 mm");
        assert!(p.dimensions[0].si.is_empty());
        assert!(p.lines[0].points[0].insertion.ends_with(" mm"));
        assert!(!p.marks_note.contains("eighths"));
    }

    #[test]
    fn field_sheet_carries_the_survey_names_and_hvac_words() {
        let (e, _) = evaluated("hvac");
        let s = &e.loaded.survey;
        let marks = probe_marks(&e.plane.layout, s.port_length_m, MarkStep::EIGHTH_INCH);
        let sheet = field_sheet_data(&SheetPlane {
            layout: &e.plane.layout,
            marks: &marks,
            convention: s.convention,
            system: UnitSystem::InchPound,
            port_length_m: s.port_length_m,
            required_points: e.plane.required_points,
            title: Some(s.title.clone()),
            site: s.site.clone(),
            plane_location: s.plane.clone(),
        });
        assert_eq!(sheet.title, "AHU-3 supply main, airflow verification");
        assert_eq!(sheet.site.as_deref(), s.site.as_deref());
        assert_eq!(sheet.readings.dp, "VP (inH2O)");
        assert_eq!(sheet.readings.yaw, None);
        assert!(!sheet.leak_checks);
        assert_eq!(sheet.fields.barometric_label, "Barometric pressure (inHg)");
        // log-Tchebycheff 5 points on 24 in: point 1 at 0.074·24 = 1.776 in + 1 in port → 2 3/4 in
        assert_eq!(sheet.plane.lines[0].points[0].insertion, "2 3/4 in");
        assert_eq!(sheet.plane.points_required, "≥ 25 points");
    }
}
