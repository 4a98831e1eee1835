fn main() {
    // Arm the guard's watch first: an exit() from a routine's thread or library constructor
    // is a reported fault, and routines cannot write to tancheck's standard output.
    tancheck_cli::survive::init();
    let code = std::panic::catch_unwind(|| tancheck_cli::main_with_args(std::env::args_os()));
    // From here on, exiting is tancheck's own doing.
    tancheck_cli::survive::finish();
    std::process::exit(code.unwrap_or(101));
}
