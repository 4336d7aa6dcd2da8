//! Figura: a compiler for statistical figures.
//!
//! A `.figura` spec declares the data's variables with their level of measurement and the
//! study design, and asks for layers. The pipeline, one module per stage:
//!
//! `syntax` (text → tree) → `check` (tree → checked plan) → `data` (files → typed table) →
//! `compute` (plan + table → numbers) → `layout` (numbers → scene in mm) → `svg` (scene →
//! text) → `export` (scene → SVG, PNG, TIFF and PDF bytes); `build` drives them over many
//! files; `project` reads a `figura.toml`; `cli` is the command line and `report` prints
//! diagnostics. `trim` keeps marks within reach of the page before anything is drawn. `colour`
//! holds the colour science (spaces, CIEDE2000, colour-vision simulation, palettes) as pure
//! functions; `markup` reads label markup (raised, lowered, italic, bold, Greek letters) into
//! styled strings; `alt` writes a figure's alt text from its numbers; `files`
//! opens every input file (regular files only, size first).
//!
//! Dependencies point downstream only: no stage knows the stages after it.

pub mod alt;
pub mod build;
pub mod check;
pub mod cli;
pub mod colour;
pub mod compute;
pub mod data;
pub mod diag;
pub mod export;
pub mod files;
pub mod font;
pub mod format;
pub mod layout;
pub mod markup;
pub mod numbers;
pub mod project;
pub mod report;
pub mod review;
pub mod scene;
pub mod stats;
pub mod svg;
pub mod syntax;
pub mod trim;
