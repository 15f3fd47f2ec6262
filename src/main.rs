//! The `retidose` command line: parses arguments, calls the library, renders the result.

mod cli;

use std::io::Write;
use std::process::ExitCode;

fn main() -> ExitCode {
    let args = <cli::Cli as clap::Parser>::parse();
    match cli::run(args) {
        Ok(output) => {
            let mut out = std::io::stdout().lock();
            match out.write_all(output.text.as_bytes()).and_then(|()| out.flush()) {
                Ok(()) => ExitCode::from(output.status),
                // A closed pipe (`retidose … | head`) is not an error.
                Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => ExitCode::from(output.status),
                Err(e) => {
                    eprintln!("retidose: error: cannot write the output: {e}");
                    ExitCode::from(2)
                }
            }
        }
        Err(e) => {
            eprintln!("retidose: error: {e:#}");
            ExitCode::from(2)
        }
    }
}
