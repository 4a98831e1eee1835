fn main() {
    std::process::exit(tancheck_cli::main_with_args(std::env::args_os()));
}
