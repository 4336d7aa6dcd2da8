//! The `figura` command: a thin shell over the library (see `figura::cli`).

fn main() {
    std::process::exit(figura::cli::run(std::env::args_os()));
}
