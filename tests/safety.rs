//! Never destroy, never hang: the real binary against careless and hostile outputs and inputs.
//!
//! Each case checks what the user would check: the input still byte-equal, a special file still
//! special, the error text and exit code, and a generous time bound where an input used to hang or
//! take minutes (bounds are wide enough not to flake on a loaded two-core machine in debug).

mod common;
use common::root;
use std::path::{Path, PathBuf};
use std::process::{Command, Stdio};
use std::time::{Duration, Instant};

struct Run {
    code: i32,
    stdout: Vec<u8>,
    err: String,
    took: Duration,
}

impl Run {
    fn out(&self) -> String {
        String::from_utf8_lossy(&self.stdout).into_owned()
    }
}

/// Runs the binary in `dir`; a run that outlives `limit` is killed and fails the test (so a hang
/// is a failure, not a stuck test run).
fn annulus_in(dir: &Path, args: &[&str], env: &[(&str, &str)], limit: Duration) -> Run {
    let start = Instant::now();
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_annulus"));
    cmd.args(args)
        .current_dir(dir)
        .env("NO_COLOR", "1")
        .env_remove("SOURCE_DATE_EPOCH")
        .env_remove("ANNULUS_MAX_INPUT_MB")
        .stdin(Stdio::null())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped());
    for (k, v) in env {
        cmd.env(k, v);
    }
    let mut child = cmd.spawn().expect("binary runs");
    // read the pipes on threads so a large output cannot block the child
    let mut so = child.stdout.take().unwrap();
    let mut se = child.stderr.take().unwrap();
    let out_t = std::thread::spawn(move || {
        let mut v = Vec::new();
        std::io::Read::read_to_end(&mut so, &mut v).ok();
        v
    });
    let err_t = std::thread::spawn(move || {
        let mut v = Vec::new();
        std::io::Read::read_to_end(&mut se, &mut v).ok();
        v
    });
    let status = loop {
        if let Some(s) = child.try_wait().unwrap() {
            break s;
        }
        if start.elapsed() > limit {
            let _ = child.kill();
            let _ = child.wait();
            panic!("`annulus {}` still running after {limit:?}", args.join(" "));
        }
        std::thread::sleep(Duration::from_millis(20));
    };
    let took = start.elapsed();
    Run {
        code: status.code().unwrap_or(-1),
        stdout: out_t.join().unwrap(),
        err: String::from_utf8_lossy(&err_t.join().unwrap()).into_owned(),
        took,
    }
}

/// Generous: a report renders in about a second in debug; two cores are shared.
const SLOW: Duration = Duration::from_secs(120);
/// For refusals and errors that must come before any real work.
const QUICK: Duration = Duration::from_secs(20);

fn annulus(dir: &Path, args: &[&str]) -> Run {
    annulus_in(dir, args, &[], SLOW)
}

/// A copy of sample-data in a temporary folder (the samples are never written to).
fn samples() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    copy_dir(&root().join("sample-data"), dir.path());
    dir
}

fn copy_dir(from: &Path, to: &Path) {
    std::fs::create_dir_all(to).unwrap();
    for e in std::fs::read_dir(from).unwrap() {
        let e = e.unwrap();
        let target = to.join(e.file_name());
        if e.file_type().unwrap().is_dir() {
            copy_dir(&e.path(), &target);
        } else {
            std::fs::copy(e.path(), &target).unwrap();
        }
    }
}

fn read(p: &Path) -> Vec<u8> {
    std::fs::read(p).unwrap()
}

fn names(dir: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

#[cfg(unix)]
fn mkfifo(p: &Path) {
    let ok = Command::new("mkfifo").arg(p).status().unwrap().success();
    assert!(ok, "mkfifo {}", p.display());
}

#[cfg(unix)]
fn is_fifo(p: &Path) -> bool {
    use std::os::unix::fs::FileTypeExt;
    std::fs::symlink_metadata(p).unwrap().file_type().is_fifo()
}

/// The survey in `dir` with its readings path replaced.
fn survey_reading(dir: &Path, readings: &str) -> PathBuf {
    let text = std::fs::read_to_string(dir.join("survey.toml")).unwrap();
    let p = dir.join("hostile.toml");
    std::fs::write(
        &p,
        text.replace(
            "readings = \"traverse.csv\"",
            &format!("readings = \"{readings}\""),
        ),
    )
    .unwrap();
    p
}

/// Where the hostile survey names its readings file: `hostile.toml:LINE:12`.
fn readings_at(dir: &Path) -> String {
    let text = std::fs::read_to_string(dir.join("hostile.toml")).unwrap();
    let line = text
        .lines()
        .position(|l| l.starts_with("readings = "))
        .unwrap()
        + 1;
    format!("hostile.toml:{line}:12 (`run.readings`)")
}

// ---- outputs ------------------------------------------------------------------------------------

#[test]
fn report_refuses_to_write_over_any_of_its_inputs() {
    let s = samples();
    let stack = s.path().join("stack");
    // the survey, a readings file, the calibration and its readings (in ../calibration), the
    // template and the signing key: each left byte-equal, exit 1, and nothing else written
    std::fs::write(stack.join("firm.typ"), "#let x = 1\n").unwrap();
    let keygen = annulus(&stack, &["keygen", "signer"]);
    assert_eq!(keygen.code, 0, "{}", keygen.err);
    for target in [
        "survey.toml",
        "run2.csv",
        "../calibration/ts-0417.toml",
        "../calibration/ts-0417.csv",
        "firm.typ",
        "signer.key",
        // another spelling of an input is still that input
        "./../stack/run1.csv",
    ] {
        let path = stack.join(target);
        let before = read(&path);
        let listing = names(&stack);
        let r = annulus(
            &stack,
            &[
                "report",
                "survey.toml",
                "-o",
                target,
                "--template",
                "firm.typ",
                "--sign",
                "signer.key",
            ],
        );
        assert_eq!(r.code, 1, "{target}: {}", r.err);
        // (after the note on the shared calibration in ../calibration)
        let err = r.err.lines().skip(1).collect::<Vec<_>>().join("\n");
        assert!(
            err.starts_with(&format!(
                "error: refusing to write over `{target}`: it is one of this command's inputs\n --> {target}\n   = hint: name a new file"
            )),
            "{target}: {}",
            r.err
        );
        assert!(
            r.err.starts_with("note: `../calibration/ts-0417.toml`"),
            "{}",
            r.err
        );
        assert_eq!(read(&path), before, "{target} changed");
        assert_eq!(names(&stack), listing, "{target}: files appeared");
    }
}

#[cfg(unix)]
#[test]
fn a_hard_link_to_an_input_is_that_input() {
    let s = samples();
    let hvac = s.path().join("hvac");
    std::fs::hard_link(hvac.join("traverse.csv"), hvac.join("linked.pdf")).unwrap();
    let before = read(&hvac.join("traverse.csv"));
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "linked.pdf"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains("it is one of this command's inputs"),
        "{}",
        r.err
    );
    assert_eq!(read(&hvac.join("traverse.csv")), before);
}

#[cfg(unix)]
#[test]
fn a_fifo_stays_a_fifo() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let fifo = hvac.join("out.pdf");
    mkfifo(&fifo);
    let r = annulus_in(
        &hvac,
        &["report", "survey.toml", "-o", "out.pdf"],
        &[],
        QUICK,
    );
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.starts_with(
            "error: refusing to write over `out.pdf`: it is a FIFO (named pipe), not a regular file\n --> out.pdf\n"
        ),
        "{}",
        r.err
    );
    assert!(is_fifo(&fifo));
    assert!(!names(&hvac).iter().any(|n| n.ends_with(".tmp")));
}

#[cfg(unix)]
#[test]
fn a_device_node_stays_a_device() {
    use std::os::unix::fs::FileTypeExt;
    let s = samples();
    let hvac = s.path().join("hvac");
    // A node of our own where we may make one (as root); otherwise /dev/null, which a user who
    // cannot make nodes cannot replace either, so the test can never damage it.
    let own = hvac.join("null.pdf");
    let made = Command::new("mknod")
        .arg(&own)
        .args(["c", "1", "3"])
        .stderr(Stdio::null())
        .status()
        .is_ok_and(|s| s.success());
    let target = if made {
        own.clone()
    } else {
        PathBuf::from("/dev/null")
    };
    let shown = target.to_str().unwrap();
    let r = annulus_in(&hvac, &["report", "survey.toml", "-o", shown], &[], QUICK);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.starts_with(&format!(
            "error: refusing to write over `{shown}`: it is a character device, not a regular file"
        )),
        "{}",
        r.err
    );
    let meta = std::fs::symlink_metadata(&target).unwrap();
    assert!(meta.file_type().is_char_device());
}

#[test]
fn a_folder_as_output_gets_the_pdf_named_after_the_survey() {
    let s = samples();
    let hvac = s.path().join("hvac");
    std::fs::create_dir(hvac.join("out")).unwrap();
    for arg in ["out", "out/"] {
        let r = annulus(&hvac, &["report", "survey.toml", "-o", arg]);
        assert_eq!(r.code, 0, "{}", r.err);
        let pdf = read(&hvac.join("out/survey.pdf"));
        assert!(pdf.starts_with(b"%PDF"));
        assert!(r.err.starts_with("wrote out"), "{}", r.err);
    }
    assert_eq!(names(&hvac.join("out")), vec!["survey.pdf"]);
}

#[test]
fn a_missing_folder_is_one_message_without_temporary_paths() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "no-such/"]);
    assert_eq!(r.code, 2, "{}", r.err);
    assert_eq!(
        r.err,
        "error: cannot write `no-such/survey.pdf`: the folder `no-such` does not exist\n   = hint: create the folder first, or name a file in an existing one\n"
    );
    assert!(!hvac.join("no-such").exists());
}

#[cfg(unix)]
#[test]
fn a_write_failure_names_the_target_not_the_temporary_file() {
    use std::os::unix::fs::PermissionsExt;
    let s = samples();
    let hvac = s.path().join("hvac");
    let locked = hvac.join("locked");
    std::fs::create_dir(&locked).unwrap();
    std::fs::set_permissions(&locked, std::fs::Permissions::from_mode(0o555)).unwrap();
    // root ignores folder permissions: nothing to show there
    if std::fs::write(locked.join("probe"), b"x").is_ok() {
        return;
    }
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "locked/r.pdf"]);
    assert_eq!(r.code, 2, "{}", r.err);
    assert!(
        r.err
            .starts_with("error: cannot write `locked/r.pdf` (creating a file in its folder): "),
        "{}",
        r.err
    );
    assert!(
        !r.err.contains(".annulus-") && !r.err.contains("/tmp"),
        "{}",
        r.err
    );
    assert_eq!(r.err.matches("cannot write").count(), 1, "{}", r.err);
}

#[test]
fn a_read_only_report_is_not_replaced() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let old = hvac.join("old.pdf");
    std::fs::write(&old, b"%PDF signed and filed").unwrap();
    let mut p = std::fs::metadata(&old).unwrap().permissions();
    p.set_readonly(true);
    std::fs::set_permissions(&old, p).unwrap();
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "old.pdf"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err
            .starts_with("error: refusing to replace `old.pdf`: it is read-only\n"),
        "{}",
        r.err
    );
    assert_eq!(read(&old), b"%PDF signed and filed");
}

#[cfg(unix)]
#[test]
fn a_symbolic_link_is_written_through_and_stays_a_link() {
    let s = samples();
    let hvac = s.path().join("hvac");
    std::fs::create_dir(hvac.join("reports")).unwrap();
    std::fs::write(hvac.join("reports/2026.pdf"), b"last year").unwrap();
    std::os::unix::fs::symlink("reports/2026.pdf", hvac.join("latest.pdf")).unwrap();
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "latest.pdf"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(std::fs::symlink_metadata(hvac.join("latest.pdf"))
        .unwrap()
        .file_type()
        .is_symlink());
    assert!(read(&hvac.join("reports/2026.pdf")).starts_with(b"%PDF"));
    // a link that points at an input is that input
    std::os::unix::fs::symlink("traverse.csv", hvac.join("sneaky.pdf")).unwrap();
    let before = read(&hvac.join("traverse.csv"));
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "sneaky.pdf"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert_eq!(read(&hvac.join("traverse.csv")), before);
}

#[test]
fn dash_is_standard_output_for_every_pdf() {
    let s = samples();
    let d = s.path();
    for (dir, args) in [
        ("hvac", vec!["report", "survey.toml", "-o", "-"]),
        ("hvac", vec!["layout", "survey.toml", "--pdf", "-"]),
        ("calibration", vec!["calibrate", "ts-0417.toml", "-o", "-"]),
        ("rata", vec!["rata", "unit2-rata.toml", "-o", "-"]),
    ] {
        let here = d.join(dir);
        let before = names(&here);
        let r = annulus(&here, &args);
        assert!(r.code == 0 || r.code == 3, "{args:?}: {}", r.err);
        // the PDF is the whole of standard output; no file named `-`
        assert!(r.stdout.starts_with(b"%PDF-"), "{args:?}");
        assert!(r.stdout.ends_with(b"%%EOF") || r.stdout.ends_with(b"%%EOF\n"));
        assert_eq!(names(&here), before, "{args:?}");
        assert!(r.err.contains("to standard output"), "{}", r.err);
    }
}

#[test]
fn verify_reads_a_report_from_standard_input() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "r.pdf"]);
    assert_eq!(r.code, 0, "{}", r.err);
    let mut child = Command::new(env!("CARGO_BIN_EXE_annulus"))
        .args(["verify", "-", "--format", "json"])
        .current_dir(&hvac)
        .stdin(std::fs::File::open(hvac.join("r.pdf")).unwrap())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    let mut out = String::new();
    std::io::Read::read_to_string(child.stdout.as_mut().unwrap(), &mut out).unwrap();
    let status = child.wait().unwrap();
    assert_eq!(status.code(), Some(0), "{out}");
    assert!(out.contains("report_id"), "{out}");
}

#[test]
fn stale_temporary_files_of_ours_are_cleared_on_the_next_write() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let stale = hvac.join(".annulus-Kx81aQ.tmp");
    let fresh = hvac.join(".annulus-Zp02bR.tmp");
    let theirs = hvac.join(".editor-swap.tmp");
    for p in [&stale, &fresh, &theirs] {
        std::fs::write(p, b"half a PDF").unwrap();
    }
    let two_hours_ago = std::time::SystemTime::now() - Duration::from_secs(2 * 3600);
    for p in [&stale, &theirs] {
        std::fs::File::options()
            .write(true)
            .open(p)
            .unwrap()
            .set_modified(two_hours_ago)
            .unwrap();
    }
    let r = annulus(&hvac, &["report", "survey.toml", "-o", "r.pdf"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(
        !stale.exists(),
        "an hour-old temporary file of ours is removed"
    );
    assert!(
        fresh.exists(),
        "a recent one may be another write in progress"
    );
    assert!(theirs.exists(), "other programs' files are not ours");
}

#[test]
fn init_writes_all_files_or_none() {
    let dir = tempfile::tempdir().unwrap();
    let job = dir.path().join("job");
    std::fs::create_dir(&job).unwrap();
    // run2.csv cannot be written (a folder is in its place): nothing else may appear
    std::fs::create_dir(job.join("run2.csv")).unwrap();
    let r = annulus(
        dir.path(),
        &["init", "job", "--round", "60in", "--date", "2026-10-14"],
    );
    assert_eq!(r.code, 1, "{}", r.err);
    assert_eq!(names(&job), vec!["run2.csv"]);
    // and a re-run after clearing the obstacle succeeds at once
    std::fs::remove_dir(job.join("run2.csv")).unwrap();
    let r = annulus(
        dir.path(),
        &["init", "job", "--round", "60in", "--date", "2026-10-14"],
    );
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(
        names(&job),
        vec!["run1.csv", "run2.csv", "run3.csv", "survey.toml"]
    );
    // a folder init created for a set it could not write is removed again
    let r = annulus(
        dir.path(),
        &[
            "init",
            "job/run1.csv/sub",
            "--round",
            "60in",
            "--date",
            "2026-10-14",
        ],
    );
    assert_ne!(r.code, 0);
    assert_eq!(
        names(&job),
        vec!["run1.csv", "run2.csv", "run3.csv", "survey.toml"]
    );
}

#[test]
fn init_force_replaces_blank_sheets_but_never_readings() {
    let dir = tempfile::tempdir().unwrap();
    let init = |force: bool| {
        let mut args = vec!["init", "job", "--round", "60in", "--date", "2026-10-14"];
        if force {
            args.push("--force");
        }
        annulus(dir.path(), &args)
    };
    assert_eq!(init(false).code, 0);
    let job = dir.path().join("job");
    // without --force nothing is replaced
    let r = init(false);
    assert_eq!(r.code, 1);
    assert!(r.err.contains("already exists"), "{}", r.err);
    // blank sheets may be replaced
    let r = init(true);
    assert_eq!(r.code, 0, "{}", r.err);
    // a sheet with one reading may not, and nothing else is touched either
    let blank = std::fs::read_to_string(job.join("run2.csv")).unwrap();
    let filled = blank.replacen("A,1,,", "A,1,0.52,", 1);
    assert_ne!(filled, blank);
    std::fs::write(job.join("run2.csv"), &filled).unwrap();
    std::fs::write(job.join("survey.toml"), "# edited\n").unwrap();
    let r = init(true);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.starts_with(&format!(
            "error: `{}` holds readings; --force replaces only blank sheets",
            Path::new("job").join("run2.csv").display()
        )),
        "{}",
        r.err
    );
    assert_eq!(
        std::fs::read_to_string(job.join("run2.csv")).unwrap(),
        filled
    );
    assert_eq!(
        std::fs::read_to_string(job.join("survey.toml")).unwrap(),
        "# edited\n"
    );
}

#[test]
fn calibrate_and_rata_never_write_over_their_inputs() {
    let s = samples();
    let cal = s.path().join("calibration");
    let before = read(&cal.join("ts-0417.csv"));
    let r = annulus(&cal, &["calibrate", "ts-0417.toml", "-o", "ts-0417.csv"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains("it is one of this command's inputs"),
        "{}",
        r.err
    );
    assert_eq!(read(&cal.join("ts-0417.csv")), before);
    let rata = s.path().join("rata");
    let before = read(&rata.join("run-02/traverse.csv"));
    let r = annulus(
        &rata,
        &["rata", "unit2-rata.toml", "-o", "run-02/traverse.csv"],
    );
    assert_eq!(r.code, 1, "{}", r.err);
    assert_eq!(read(&rata.join("run-02/traverse.csv")), before);
}

// ---- inputs -------------------------------------------------------------------------------------

#[cfg(unix)]
#[test]
fn a_fifo_as_readings_is_an_error_not_a_hang() {
    let s = samples();
    let hvac = s.path().join("hvac");
    mkfifo(&hvac.join("pipe.csv"));
    survey_reading(&hvac, "pipe.csv");
    let r = annulus_in(&hvac, &["compute", "hostile.toml"], &[], QUICK);
    assert_eq!(r.code, 1, "{}", r.err);
    // it used to wait forever for a writer
    assert!(r.took < Duration::from_secs(10), "{:?}", r.took);
    assert_eq!(
        r.err,
        format!(
            "error: cannot read the readings file `pipe.csv` (resolved to `pipe.csv`): it is a FIFO (named pipe), not a regular file\n --> {}\n   = hint: give the path of a readings file saved on disk\n1 problem found; nothing was computed\n",
            readings_at(&hvac)
        )
    );
    assert!(is_fifo(&hvac.join("pipe.csv")));
}

#[cfg(unix)]
#[test]
fn a_fifo_inside_a_review_is_one_error_row_and_the_review_finishes() {
    let s = samples();
    let hvac = s.path().join("hvac");
    mkfifo(&hvac.join("pipe.csv"));
    survey_reading(&hvac, "pipe.csv");
    let r = annulus_in(
        s.path(),
        &["review", "hvac", "--format", "csv"],
        &[],
        Duration::from_secs(60),
    );
    assert_eq!(r.code, 3, "{}", r.err);
    let out = r.out();
    let row = out
        .lines()
        .find(|l| l.contains("hostile.toml"))
        .unwrap_or_else(|| panic!("{out}"));
    assert!(row.contains("error"), "{row}");
    assert!(row.contains("FIFO"), "{row}");
    assert!(out.lines().any(|l| l.contains("hvac/survey.toml")), "{out}");
}

#[cfg(unix)]
#[test]
fn devices_and_folders_as_readings_are_errors() {
    let s = samples();
    let hvac = s.path().join("hvac");
    std::fs::create_dir(hvac.join("folder.csv")).unwrap();
    for (path, what) in [
        ("/dev/zero", "a character device"),
        ("/dev/null", "a character device"),
        ("folder.csv", "a folder"),
    ] {
        survey_reading(&hvac, path);
        let r = annulus_in(&hvac, &["compute", "hostile.toml"], &[], QUICK);
        assert_eq!(r.code, 1, "{}", r.err);
        assert!(
            r.err.starts_with(&format!(
                "error: cannot read the readings file `{path}` (resolved to `{path}`): it is {what}, not a regular file\n --> {}\n",
                readings_at(&hvac)
            )),
            "{}",
            r.err
        );
    }
}

#[test]
fn an_oversized_readings_file_is_refused_unread_and_the_limit_can_be_raised() {
    let s = samples();
    let hvac = s.path().join("hvac");
    // 2 GiB, sparse: refused from its size alone, at once and without the memory
    let huge = std::fs::File::create(hvac.join("huge.csv")).unwrap();
    huge.set_len(2 << 30).unwrap();
    survey_reading(&hvac, "huge.csv");
    let r = annulus_in(&hvac, &["compute", "hostile.toml"], &[], QUICK);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.starts_with(&format!(
            "error: cannot read the readings file `huge.csv` (resolved to `huge.csv`): it is 2.0 GiB; a readings file may be at most 1.0 MiB\n --> {}\n   = hint: check that the path names the right file; if it does, set ANNULUS_MAX_INPUT_MB",
            readings_at(&hvac)
        )),
        "{}",
        r.err
    );
    // a real readings file with 1.5 MiB of notes: refused by default, read with the override
    let mut text = std::fs::read_to_string(hvac.join("traverse.csv")).unwrap();
    while text.len() < 3 << 19 {
        text += "# field note: damper position checked, probe cleaned after the B line\n";
    }
    std::fs::write(hvac.join("noted.csv"), &text).unwrap();
    survey_reading(&hvac, "noted.csv");
    let r = annulus(&hvac, &["compute", "hostile.toml"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains("a readings file may be at most 1.0 MiB"),
        "{}",
        r.err
    );
    let r = annulus_in(
        &hvac,
        &["compute", "hostile.toml"],
        &[("ANNULUS_MAX_INPUT_MB", "2")],
        SLOW,
    );
    assert_eq!(r.code, 0, "{}", r.err);
}

#[test]
fn a_huge_rectangle_lays_out_at_once() {
    let s = samples();
    // used to count down from 1.7e11 (and overflow on the way)
    let r = annulus_in(s.path(), &["layout", "--rect", "1e12inx24in"], &[], QUICK);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err
            .contains("the width must be at most 100 m, found 2.54e10 m"),
        "{}",
        r.err
    );
    // the largest allowed rectangle lays out by the spacing rule
    let r = annulus_in(
        s.path(),
        &["layout", "--rect", "100mx0.6m", "--convention", "hvac-si"],
        &[],
        QUICK,
    );
    assert_eq!(r.code, 0, "{}", r.err);
}

#[test]
fn a_diameter_that_overflows_is_an_input_error() {
    let s = samples();
    let stack = s.path().join("stack");
    let text = std::fs::read_to_string(stack.join("survey.toml")).unwrap();
    let at = text.find("diameter = \"").unwrap();
    let end = at + text[at..].find('\n').unwrap();
    for (value, message) in [
        ("1e308 in", "0.005 m to 100 m"),
        ("1e400 in", "not a finite number"),
    ] {
        let edited = format!("{}diameter = \"{value}\"{}", &text[..at], &text[end..]);
        std::fs::write(stack.join("huge.toml"), edited).unwrap();
        let r = annulus_in(&stack, &["compute", "huge.toml"], &[], QUICK);
        assert_eq!(r.code, 1, "{value}: {}", r.err);
        assert!(r.err.contains(message), "{value}: {}", r.err);
        assert!(r.err.contains("huge.toml:"), "located: {}", r.err);
        assert!(!r.out().contains("inf") && !r.out().contains("NaN"));
    }
}

#[test]
fn a_readings_cell_that_overflows_in_si_is_an_input_error() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let text = std::fs::read_to_string(hvac.join("traverse.csv")).unwrap();
    std::fs::write(
        hvac.join("overflow.csv"),
        text.replacen("A,1,0.023,", "A,1,1e308,", 1),
    )
    .unwrap();
    survey_reading(&hvac, "overflow.csv");
    let r = annulus_in(&hvac, &["compute", "hostile.toml"], &[], QUICK);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.starts_with(
            "error: differential pressure is too large to be a reading: `1e308`\n --> overflow.csv:2:3"
        ),
        "{}",
        r.err
    );
}

/// A survey with `runs` runs, all reading `readings`.
fn many_runs(dir: &Path, runs: usize, readings: &str) -> PathBuf {
    let text = std::fs::read_to_string(dir.join("survey.toml")).unwrap();
    let head = &text[..text.find("[[run]]").unwrap()];
    let mut s = head.to_string();
    for i in 1..=runs {
        s += &format!(
            "\n[[run]]\nid = \"{i}\"\nreadings = \"{readings}\"\nstarted = \"2026-11-03T14:20\"\n"
        );
    }
    let p = dir.join(format!("runs-{runs}.toml"));
    std::fs::write(&p, s).unwrap();
    p
}

#[test]
fn three_thousand_runs_are_refused_quickly_and_fifty_are_computed() {
    let s = samples();
    let hvac = s.path().join("hvac");
    many_runs(&hvac, 3000, "traverse.csv");
    // took 45 s and 2.4 GB before the limit
    let r = annulus_in(
        &hvac,
        &["compute", "runs-3000.toml"],
        &[],
        Duration::from_secs(30),
    );
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(r.took < Duration::from_secs(10), "{:?}", r.took);
    assert!(
        r.err.starts_with(
            "error: `runs-3000.toml` has 3000 runs; annulus accepts at most 50\n --> runs-3000.toml\n"
        ),
        "{}",
        r.err
    );
    many_runs(&hvac, 50, "traverse.csv");
    let r = annulus_in(&hvac, &["compute", "runs-50.toml"], &[], SLOW);
    assert_eq!(r.code, 0, "{}", r.err);
}

#[test]
fn a_readings_file_with_too_many_rows_names_the_limit() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let mut text = String::from("line,point,dp[inH2O],temperature[F],time\n");
    for i in 0..100_000 {
        text += &format!("A,{},0.5,57,\"09:{:02}\"\n", i % 6 + 1, i % 60);
    }
    std::fs::write(hvac.join("long.csv"), text).unwrap();
    survey_reading(&hvac, "long.csv");
    let r = annulus_in(
        &hvac,
        &["compute", "hostile.toml"],
        &[("ANNULUS_MAX_INPUT_MB", "8")],
        QUICK,
    );
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.starts_with(
            "error: the readings file has more than 2000 rows; annulus accepts at most 2000\n --> long.csv:2002:1\n"
        ),
        "{}",
        r.err
    );
}

#[test]
fn a_readings_path_to_someone_elses_file_does_not_echo_it() {
    let s = samples();
    let hvac = s.path().join("hvac");
    let secret = "svc-backup:$6$rounds=5000$Qm9vbGVhbg$secret-hash:19000:0:99999:7:::";
    std::fs::write(hvac.join("accounts"), format!("{secret}\nroot:x:0:0\n")).unwrap();
    std::fs::write(hvac.join("blob.bin"), [0u8, 159, 146, 150, 0, 1, 2]).unwrap();
    for path in ["accounts", "blob.bin"] {
        survey_reading(&hvac, path);
        let r = annulus_in(&hvac, &["compute", "hostile.toml"], &[], QUICK);
        assert_eq!(r.code, 1, "{}", r.err);
        assert!(
            !r.err.contains("svc-backup") && !r.err.contains("root:x"),
            "{}",
            r.err
        );
        assert_eq!(r.err.matches("error:").count(), 1, "{}", r.err);
    }
    survey_reading(&hvac, "accounts");
    let r = annulus(&hvac, &["compute", "hostile.toml"]);
    assert!(
        r.err.starts_with(
            "error: this is not a readings file: its first line names none of the readings columns\n --> accounts:1:1\n"
        ),
        "{}",
        r.err
    );
    // a calibration whose readings path names it: the same
    let cal = s.path().join("calibration");
    std::fs::copy(hvac.join("accounts"), cal.join("accounts")).unwrap();
    let text = std::fs::read_to_string(cal.join("ts-0417.toml")).unwrap();
    std::fs::write(
        cal.join("hostile.toml"),
        text.replace("readings = \"ts-0417.csv\"", "readings = \"accounts\""),
    )
    .unwrap();
    let r = annulus_in(&cal, &["calibrate", "hostile.toml"], &[], QUICK);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(!r.err.contains("svc-backup"), "{}", r.err);
    assert!(
        r.err.contains("this is not a calibration readings file"),
        "{}",
        r.err
    );
}

// ---- paths --------------------------------------------------------------------------------------

#[test]
fn paths_outside_the_survey_folder_are_noted_and_absolute_ones_kept_out_of_reports() {
    let s = samples();
    let hvac = s.path().join("hvac");
    std::fs::create_dir(s.path().join("shared")).unwrap();
    std::fs::copy(hvac.join("traverse.csv"), s.path().join("shared/ahu3.csv")).unwrap();
    // `../`: accepted with a note, and the report records the relative path
    survey_reading(&hvac, "../shared/ahu3.csv");
    let r = annulus(&hvac, &["compute", "hostile.toml"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(
        r.err,
        "note: `../shared/ahu3.csv` (run 1 readings) is outside the survey's folder\n"
    );
    let r = annulus(&hvac, &["report", "hostile.toml", "-o", "rel.pdf"]);
    assert_eq!(r.code, 0, "{}", r.err);
    let files = annulus::report::embedded_files(&read(&hvac.join("rel.pdf"))).unwrap();
    let manifest = files
        .iter()
        .find(|f| f.name == annulus::archive::manifest::MANIFEST_NAME)
        .expect("manifest");
    let manifest = String::from_utf8_lossy(&manifest.bytes);
    assert!(
        manifest.contains("\"path\":\"../shared/ahu3.csv\""),
        "{manifest}"
    );
    let v = annulus(&hvac, &["verify", "rel.pdf"]);
    assert_eq!(v.code, 0, "{}{}", v.out(), v.err);

    // absolute: computed with a note, but no report carries this machine's folders
    let abs = s.path().join("shared/ahu3.csv");
    let abs = abs.to_str().unwrap();
    survey_reading(&hvac, abs);
    let r = annulus(&hvac, &["compute", "hostile.toml"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(
        r.err,
        format!("note: `{abs}` (run 1 readings) is an absolute path\n")
    );
    let r = annulus(&hvac, &["report", "hostile.toml", "-o", "abs.pdf"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains(&format!(
            "error: run 1 readings `{abs}` is an absolute path, which a report does not carry"
        )),
        "{}",
        r.err
    );
    assert!(!hvac.join("abs.pdf").exists());
}

#[test]
fn outside_references_are_classified_for_review() {
    use annulus::input::fs::{classify_reference, Place};
    assert_eq!(classify_reference("run1.csv"), Place::Inside);
    assert_eq!(classify_reference("runs/../run1.csv"), Place::Inside);
    assert_eq!(
        classify_reference("../calibration/ts-0417.toml"),
        Place::Above
    );
    assert_eq!(classify_reference("/srv/jobs/run1.csv"), Place::Absolute);
}

#[test]
fn review_reads_nothing_outside_the_reviewed_folder_unless_asked() {
    let s = samples();
    let hvac = s.path().join("hvac");
    std::fs::create_dir(s.path().join("shared")).unwrap();
    std::fs::copy(hvac.join("traverse.csv"), s.path().join("shared/ahu3.csv")).unwrap();
    survey_reading(&hvac, "../shared/ahu3.csv");
    // the reviewed folder is hvac/: `../shared` lies outside it
    let r = annulus(s.path(), &["review", "hvac", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_str(&r.out()).expect(&r.err);
    let row = hostile_row(&v);
    assert_eq!(row["status"], "error", "{row}");
    assert!(
        row.to_string()
            .contains("outside the reviewed folder `hvac` (review --allow-outside reads it)"),
        "{row}"
    );
    // asked: read and judged like any survey
    let r = annulus(
        s.path(),
        &["review", "hvac", "--allow-outside", "--format", "json"],
    );
    let v: serde_json::Value = serde_json::from_str(&r.out()).expect(&r.err);
    assert_ne!(hostile_row(&v)["status"], "error", "{}", hostile_row(&v));
    // a symbolic link inside the folder that leads out of it is outside too
    #[cfg(unix)]
    {
        std::os::unix::fs::symlink("../shared/ahu3.csv", hvac.join("link.csv")).unwrap();
        survey_reading(&hvac, "link.csv");
        let r = annulus(s.path(), &["review", "hvac", "--format", "json"]);
        let v: serde_json::Value = serde_json::from_str(&r.out()).expect(&r.err);
        assert_eq!(hostile_row(&v)["status"], "error", "{}", hostile_row(&v));
        // a link inside the folder that leads nowhere is missing, not outside
        std::os::unix::fs::symlink("gone.csv", hvac.join("dangling.csv")).unwrap();
        survey_reading(&hvac, "dangling.csv");
        let r = annulus(s.path(), &["review", "hvac", "--format", "json"]);
        let v: serde_json::Value = serde_json::from_str(&r.out()).expect(&r.err);
        let row = hostile_row(&v).to_string();
        assert!(
            row.contains("symbolic link whose target does not exist") && !row.contains("outside"),
            "{row}"
        );
        survey_reading(&hvac, "link.csv");
    }
    // reviewing the folder above takes `shared/` in: no flag needed
    let r = annulus(s.path(), &["review", ".", "--format", "json"]);
    let v: serde_json::Value = serde_json::from_str(&r.out()).expect(&r.err);
    let hostile = hostile_row(&v);
    assert_ne!(hostile["status"], "error", "{hostile}");
}

/// The review row of `hostile.toml`.
fn hostile_row(v: &serde_json::Value) -> &serde_json::Value {
    v["files"]
        .as_array()
        .unwrap()
        .iter()
        .find(|f| f["file"].as_str().unwrap().ends_with("hostile.toml"))
        .expect("the survey is reviewed")
}
