//! The `recoup` binary: parses the command line and maps failures to exit
//! codes (see `cli`).

mod cli;

fn main() {
    std::process::exit(cli::run());
}
