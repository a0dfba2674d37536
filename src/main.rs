//! The `stillbench` command: parse arguments, call the library, print, pick the exit code.

mod cli;

fn main() -> std::process::ExitCode {
    cli::main()
}
