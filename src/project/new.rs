//! `figura new DIR`: a ready project that builds at once.
//!
//! The project holds a `figura.toml`, an invented demo dataset (basil plants grown under three
//! watering schedules, measured weekly), one spec with two figures, and a `.gitignore`.
//!
//! Guarantees: nothing that exists is overwritten (the folder must be new or empty); every file
//! is written atomically; the scaffold checks and builds without edits.

use std::fs;
use std::path::{Path, PathBuf};

use crate::build::{write_atomic, BuildError};

use super::FILE_NAME;

/// The files of a new project: (path relative to the project folder, content).
pub const FILES: [(&str, &str); 4] = [
    (FILE_NAME, PROJECT_FILE),
    ("data/basil.csv", DEMO_DATA),
    ("figures/basil.figura", DEMO_SPEC),
    (".gitignore", GITIGNORE),
];

const PROJECT_FILE: &str = r#"# A figura project: `figura build`, run in this folder or any folder below it,
# rebuilds every figure whose spec, included files or data changed.

[project]
specs = ["figures"]     # folders searched for *.figura
out = "figures/out"     # every output goes here

[defaults]              # for figures that do not set `formats` or `dpi` themselves
formats = ["svg", "png"]
dpi = 300
"#;

const DEMO_SPEC: &str = r#"# Invented demo data: twelve basil plants, four on each of three watering
# schedules, measured once a week for three weeks.

data basil "../data/basil.csv" {
  plant: id
  watering: nominal levels("daily", "alternate", "weekly") labels("Every day", "Every other day", "Once a week") label("Watering")
  week: ordinal levels(1, 2, 3) label("Week")
  height: ratio column("height_mm") label("Plant height") unit("mm")

  subject plant
  within week
  between watering
}

figure height_by_watering {
  from basil
  title "Plant height in week 3 by watering schedule"
  where week == 3
  x watering
  y height
  points jitter(0.2)
  box
}

figure growth_by_week {
  from basil
  title "Growth over three weeks"
  caption "Thin lines follow each plant; means with 95% within-plant intervals."
  x week
  y height
  colour watering
  lines by(plant)
  mean error(ci(0.95, within))
  size 120mm x 75mm
}
"#;

const GITIGNORE: &str = r#"# Temporary files of a build that was killed while writing (`figura build` never
# leaves them otherwise).
*.figura-tmp

# The outputs in figures/out, with their .figura-manifest.json, are meant to be committed:
# `figura build --check` then tells CI whether they are up to date.
"#;

const DEMO_DATA: &str = "plant,watering,week,height_mm
P01,daily,1,42.5
P01,daily,2,53.7
P01,daily,3,55.7
P02,daily,1,45.5
P02,daily,2,52.0
P02,daily,3,65.6
P03,daily,1,38.5
P03,daily,2,45.1
P03,daily,3,52.0
P04,daily,1,43.9
P04,daily,2,50.9
P04,daily,3,59.5
P05,alternate,1,46.8
P05,alternate,2,66.0
P05,alternate,3,83.0
P06,alternate,1,51.7
P06,alternate,2,74.2
P06,alternate,3,87.5
P07,alternate,1,40.0
P07,alternate,2,55.8
P07,alternate,3,81.7
P08,alternate,1,40.5
P08,alternate,2,59.4
P08,alternate,3,74.3
P09,weekly,1,45.7
P09,weekly,2,41.7
P09,weekly,3,41.5
P10,weekly,1,47.5
P10,weekly,2,44.8
P10,weekly,3,47.5
P11,weekly,1,44.3
P11,weekly,2,45.4
P11,weekly,3,46.9
P12,weekly,1,41.4
P12,weekly,2,41.3
P12,weekly,3,47.3
";

/// Why a project could not be created.
#[derive(Debug)]
pub enum NewError {
    /// The folder exists and holds files.
    NotEmpty(PathBuf),
    Io(BuildError),
}

impl std::fmt::Display for NewError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            NewError::NotEmpty(dir) => write!(
                f,
                "{} already exists and is not empty; `figura new` makes a project in a new or empty folder",
                dir.display()
            ),
            NewError::Io(e) => write!(f, "{e}"),
        }
    }
}

/// Creates a new project in `dir` (created if needed; it must be empty); returns the files
/// written.
pub fn create(dir: &Path) -> Result<Vec<PathBuf>, NewError> {
    if dir.exists() {
        let mut entries = fs::read_dir(dir).map_err(|e| NewError::Io(BuildError::io(dir, e)))?;
        if entries.next().is_some() {
            return Err(NewError::NotEmpty(dir.to_path_buf()));
        }
    }
    let mut written = Vec::new();
    for (name, text) in FILES {
        let path = dir.join(name);
        write_atomic(&path, text.as_bytes()).map_err(NewError::Io)?;
        written.push(path);
    }
    Ok(written)
}
