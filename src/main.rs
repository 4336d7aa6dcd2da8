//! The `figura` command: a thin shell over the library (see `figura::cli`).

fn main() {
    figura::build::report_figure_panics_as_failures();
    std::process::exit(figura::cli::run(std::env::args_os()));
}
