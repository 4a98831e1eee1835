//! The `tancheck` program: arms the guard's watch, runs the command line
//! (`tancheck_cli::main_with_args`) and ends the process with its exit code.

fn main() {
    // Arm the guard's watch first: an exit() from a routine's thread or library constructor
    // is a reported fault, and routines cannot write to tancheck's standard output.
    tancheck_cli::survive::init();
    let code = std::panic::catch_unwind(|| tancheck_cli::main_with_args(std::env::args_os()));
    // tancheck's own end: a routine's thread exiting at the same moment cannot change it.
    tancheck_cli::survive::finish(code.unwrap_or(101));
}
