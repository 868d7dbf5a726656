//! `annulus init`: a new survey file and blank readings sheets, in layout order, ready to fill.

use super::layout::plane_for;
use super::output::Ctx;
use super::plane_args::{PlaneArgs, PlaneSetting};
use crate::config::SignoffDefaults;
use crate::diag::{Diagnostic, Error, Location};
use crate::display::{Kind, UnitSystem};
use crate::geometry::Shape;
use crate::plane::Plane;
use crate::survey::ConventionId;
use crate::units::{PA_PER_INH2O, PA_PER_INHG};
use clap::Args;
use std::path::{Path, PathBuf};

#[derive(Debug, Args)]
pub struct InitArgs {
    /// Folder to write into (created if missing).
    #[arg(default_value = ".")]
    pub dir: PathBuf,
    #[command(flatten)]
    pub plane: PlaneArgs,
    /// Number of runs (one blank readings sheet each).
    #[arg(long, default_value_t = 3)]
    pub runs: usize,
    /// Survey title.
    #[arg(long)]
    pub title: Option<String>,
    /// Test date, YYYY-MM-DD (default: today).
    #[arg(long)]
    pub date: Option<String>,
    /// Replace the survey and blank readings sheets that already exist (a sheet that holds
    /// readings is never replaced).
    #[arg(long)]
    pub force: bool,
}

/// The survey text for a plane: every section present, values to fill left empty, quantities
/// and examples in the job's units (`--units` / `--si` choose others; `epa-metric` makes an EPA
/// Method 2 survey reduce in the method's metric units). The sign-off is filled from `signoff`
/// (the user configuration's technician, certificate and firm), else left empty.
pub fn survey_text(
    s: &PlaneSetting,
    plane: &Plane,
    runs: usize,
    title: &str,
    date: &str,
    signoff: &SignoffDefaults,
) -> String {
    let t = &s.table;
    let len = |m: f64| t.get(Kind::Position).input(m);
    let l = &plane.layout;
    let duct = match l.duct().shape() {
        Shape::Round { diameter_m } => {
            format!("shape = \"round\"\ndiameter = \"{}\"          # inside diameter", len(diameter_m))
        }
        Shape::Rectangular { width_m, height_m } => format!(
            "shape = \"rectangular\"\nwidth = \"{}\"             # inside, the side with the ports\nheight = \"{}\"",
            len(width_m),
            len(height_m)
        ),
    };
    // examples in the job's units: 29.62 inHg barometric, -0.85 inH2O static, 68 °F
    let barometric = t.get(Kind::Barometric).input(29.62 * PA_PER_INHG);
    let static_p = t.get(Kind::StaticPressure).input(-0.85 * PA_PER_INH2O);
    let air = t.get(Kind::Temperature).input(293.15);
    let epa_metric = s.convention == ConventionId::EpaMethod2 && t.system == UnitSystem::EpaMetric;
    let dist = |d: Option<f64>| d.map(|x| format!("{x:.1} D")).unwrap_or_default();
    let stack = !s.convention.is_hvac();
    let mut t = format!(
        r#"# annulus survey: fill in the empty values, then `annulus compute` this file.
# Quantities are strings with a unit ("{barometric}", "{air}", "8.1 %"); see the README.

[survey]
title = "{title}"
site = ""
client = ""
plane = ""                       # where the measurement plane is
date = "{date}"
convention = "{conv}"

[duct]
{duct}
construction = "steel"           # steel | brick
upstream = "{up}"                # straight run from the upstream disturbance, e.g. "6.2 D"
downstream = "{down}"            # straight run to the next disturbance or the exit
port_length = "{port}"           # nipple + wall, added to the probe marks

[layout]
method = "{method}"
lines = {lines}
points_per_line = {ppl}

[probe]
kind = "{kind}"                  # s-type | standard
coefficient = {cp}
serial = ""
calibrated = ""                  # YYYY-MM-DD of the probe's calibration

{flow}[gas]
barometric = ""                  # absolute, e.g. "{barometric}"
static = ""                      # duct static (gauge), e.g. "{static_p}"
"#,
        conv = s.convention.name(),
        up = dist(s.upstream_d),
        down = dist(s.downstream_d),
        port = len(s.port_length_m),
        flow = if epa_metric {
            "[flow]\nepa_units = \"metric\"             # reduced in EPA Method 2's metric units\n\n"
        } else {
            ""
        },
        method = l.method(),
        lines = l.lines(),
        ppl = l.points_per_line(),
        kind = if stack { "s-type" } else { "standard" },
        cp = if stack { "0.84" } else { "0.99" },
    );
    if stack {
        t += "o2 = \"\"                         # dry basis; N2 is the balance\nco2 = \"\"\nco = \"0 %\"\n\
              # moisture = \"\"                 # water vapour by volume (e.g. \"9.8 %\") in place of the\n\
              #                                 Method 4 trains below (then delete the [run.method4] blocks)\n";
    } else {
        t += "rh = \"\"                         # or wet_bulb / dew_point; remove for dry air\n";
    }
    // a TOML basic string, escaped as the toml crate writes it
    let quoted =
        |v: &Option<String>| toml::Value::String(v.clone().unwrap_or_default()).to_string();
    t += &format!(
        "\n[signoff]\ntested_by = {}\ncertificate = {}\nreviewed_by = \"\"\norganisation = {}\n",
        quoted(&signoff.technician),
        quoted(&signoff.certificate),
        quoted(&signoff.organisation),
    );
    for i in 1..=runs {
        t += &format!(
            "\n[[run]]\nid = \"{i}\"\nreadings = \"run{i}.csv\"\nstarted = \"\"                    # YYYY-MM-DDTHH:MM\n"
        );
        if stack {
            t += "leak_check = { before = \"\", after = \"\" }   # pass | fail\n";
            t += &method4_block(&s.table);
        }
    }
    t
}

/// A run's EPA Method 4 train to fill in, its examples in the job's units.
fn method4_block(t: &crate::display::DisplayTable) -> String {
    use crate::gas::method4::M3_PER_FT3;
    use crate::units::PA_PER_INH2O;
    let volume = t.get(Kind::GasVolume).input(34.215 * M3_PER_FT3);
    let dh = t.get(Kind::OrificePressure).input(1.85 * PA_PER_INH2O);
    let temp = t.get(Kind::Temperature).input((84.0 + 459.67) / 1.8);
    format!(
        "[run.method4]                   # this run's moisture train (EPA Method 4)\n\
         impinger_gain = \"\"               # Vf − Vi: weighed (\"152.3 g\") or read (\"152 mL\")\n\
         silica_gain = \"\"                 # Wf − Wi, e.g. \"18.7 g\"\n\
         meter_volume = \"\"                # as read, e.g. \"{volume}\"\n\
         meter_y = 1.000                  # the meter's calibration factor Y\n\
         meter_dh = \"\"                    # orifice ΔH, e.g. \"{dh}\" (or meter_pressure, absolute)\n\
         meter_temperature = \"\"           # average meter temperature, e.g. \"{temp}\"\n"
    )
}

/// The blank readings sheet: one row per point, in layout order.
pub fn readings_text(s: &PlaneSetting, plane: &Plane) -> String {
    let yaw = !s.convention.is_hvac();
    let mut t = format!(
        "line,point,{},{}{}\n",
        s.table.get(Kind::VelocityPressure).header("dp"),
        s.table.get(Kind::Temperature).header("temperature"),
        if yaw { ",yaw[deg]" } else { "" }
    );
    for p in plane.layout.points() {
        t += &format!("{},{},,{}\n", p.line, p.point, if yaw { "," } else { "" });
    }
    t
}

/// Existing files: refused without `--force`; with it, the survey and blank sheets may be
/// replaced, but never a readings sheet that holds readings.
fn refuse_existing(survey: &Path, sheets: &[PathBuf], force: bool) -> Result<(), Error> {
    let exists = |p: &Path| std::fs::symlink_metadata(p).is_ok();
    for p in std::iter::once(survey).chain(sheets.iter().map(PathBuf::as_path)) {
        if exists(p) && !force {
            return Err(Error::input(
                Diagnostic::new(format!("`{}` already exists", p.display()))
                    .at(Location::file(p.display().to_string()))
                    .hint(
                        "choose another folder, or pass --force to replace it (blank sheets only)",
                    ),
            ));
        }
    }
    for p in sheets {
        if exists(p) && crate::input::fs::sheet_holds_readings(p) {
            return Err(Error::input(
                Diagnostic::new(format!(
                    "`{}` holds readings; --force replaces only blank sheets",
                    p.display()
                ))
                .at(Location::file(p.display().to_string()))
                .hint("move the filled-in sheet away first, or choose another folder"),
            ));
        }
    }
    Ok(())
}

pub fn run(args: InitArgs, ctx: &Ctx) -> Result<i32, Error> {
    if args.runs == 0 || args.runs > crate::limits::MAX_RUNS {
        return Err(Error::input(
            Diagnostic::new(format!(
                "--runs {} is not a usable number of runs",
                args.runs
            ))
            .hint("a stack test usually has 3 runs; an HVAC traverse 1"),
        ));
    }
    let date = match &args.date {
        Some(d) => match chrono::NaiveDate::parse_from_str(d, "%Y-%m-%d") {
            Ok(_) => d.clone(),
            Err(_) => {
                return Err(Error::input(
                    Diagnostic::new(format!("--date is not a date: `{d}`"))
                        .hint("write YYYY-MM-DD"),
                ))
            }
        },
        None => super::today().format("%Y-%m-%d").to_string(),
    };
    // the user configuration: its convention when none is given, its names in the sign-off
    let config = crate::input::config_file::load_config()?.unwrap_or_default();
    let mut plane_args = args.plane;
    if plane_args.convention.is_none() {
        plane_args.convention = config.convention;
    }
    let setting = plane_args.settle(None)?;
    let plane = plane_for(&setting)?;
    let title = args.title.clone().unwrap_or_else(|| "New traverse".into());
    let survey_path = args.dir.join("survey.toml");
    let sheets: Vec<PathBuf> = (1..=args.runs)
        .map(|i| args.dir.join(format!("run{i}.csv")))
        .collect();
    refuse_existing(&survey_path, &sheets, args.force)?;
    let made_dir = !args.dir.exists();
    std::fs::create_dir_all(&args.dir)
        .map_err(|e| Error::Environment(format!("cannot create `{}`: {e}", args.dir.display())))?;
    let sheet = readings_text(&setting, &plane).into_bytes();
    let mut files = vec![(
        survey_path.clone(),
        survey_text(
            &setting,
            &plane,
            args.runs,
            &title,
            &date,
            &config.signoff_defaults(),
        )
        .into_bytes(),
    )];
    files.extend(sheets.iter().map(|p| (p.clone(), sheet.clone())));
    // all files or none: a failed or interrupted init leaves nothing a re-run would trip over
    if let Err(e) = crate::write::write_all_or_none(&files, &[]) {
        if made_dir {
            let _ = std::fs::remove_dir(&args.dir);
        }
        return Err(e.into());
    }
    if !ctx.quiet {
        eprintln!(
            "wrote {} and {} blank readings sheet{} ({} points each) in {}",
            survey_path.display(),
            args.runs,
            if args.runs == 1 { "" } else { "s" },
            plane.layout.total_points(),
            args.dir.display()
        );
        eprintln!(
            "next: fill in the empty values, then `annulus compute {}`",
            survey_path.display()
        );
    }
    Ok(0)
}
