fn main() -> std::process::ExitCode {
    let args: Vec<String> = std::env::args().collect();
    let p = std::path::PathBuf::from(&args[2]);
    match lategame::playfile::load(&p, &Default::default()) {
        Ok(l) => { print!("{}", l.report.summary(false)); std::process::ExitCode::SUCCESS }
        Err(e) => { print!("{}", e.report.summary(false)); std::process::ExitCode::FAILURE }
    }
}
