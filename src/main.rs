//! The `recoup` binary: the command line of the library's `cli` module
//! (see there for the exit codes).

fn main() {
    std::process::exit(recoup::cli::main());
}
