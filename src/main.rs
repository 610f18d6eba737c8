//! The `quiddity` binary: parse arguments, run the library, turn the result into an exit code.

fn main() -> std::process::ExitCode {
    quiddity::cli::run(std::env::args_os())
}
