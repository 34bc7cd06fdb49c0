//! Ctrl-C and SIGTERM: long commands (`run`, `sweep`) stop after the current step and
//! leave nothing partial behind.

use std::sync::atomic::{AtomicBool, Ordering};

/// Set by the SIGINT/SIGTERM handler; the run's observer stops the solver when it is set.
static INTERRUPTED: AtomicBool = AtomicBool::new(false);

/// Message of a run stopped by Ctrl-C or SIGTERM.
pub(crate) const INTERRUPTED_MESSAGE: &str = "interrupted by the user; no output written";

/// Clears the interrupt flag and installs the SIGINT/SIGTERM handler that sets it. The
/// handler stays for the life of the process (the `ctrlc` crate allows one), so a second
/// call finds it installed and only clears the flag. A repeated Ctrl-C sets the flag again
/// and changes nothing else: the run still stops after the current step and cleans up.
pub(crate) fn catch_interrupts() {
    INTERRUPTED.store(false, Ordering::SeqCst);
    match ctrlc::set_handler(|| INTERRUPTED.store(true, Ordering::SeqCst)) {
        Ok(()) | Err(ctrlc::Error::MultipleHandlers) => {}
        Err(e) => eprintln!(
            "warning: cannot catch Ctrl-C ({e}); an interrupted run may leave a hidden \
             temporary file beside the output"
        ),
    }
}

/// True once Ctrl-C or SIGTERM has been received.
pub(crate) fn interrupted() -> bool {
    INTERRUPTED.load(Ordering::SeqCst)
}
