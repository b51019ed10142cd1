//! The `lategame` command: parse the command line and hand over to the library.

fn main() -> std::process::ExitCode {
    lategame::cli::main()
}
