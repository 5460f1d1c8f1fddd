//! A clean stop on Ctrl-C (SIGINT) and SIGTERM.
//!
//! The signal handler only writes the signal's number into a pipe (write(2) is
//! async-signal-safe: POSIX.1-2017, 2.4.3). A watcher thread reads it, stops every
//! [`OutputSet`](crate::output_set::OutputSet) of the run ([`crate::output_set::stop_all`]:
//! staging folders and lock files removed; a commit in progress is let finish, so a folder is
//! never left half moved), prints one line on standard error and exits with 128 + the signal's
//! number (130 for SIGINT, 143 for SIGTERM: the shells' convention, POSIX.1-2017 "Shell
//! Command Language", 2.8.2). The older outputs are untouched: nothing new was moved in.

/// Exit status of a run stopped by signal `sig` (128 + its number).
pub fn status_of(sig: i32) -> i32 {
    128 + sig
}

#[cfg(unix)]
mod imp {
    use std::sync::atomic::{AtomicI32, Ordering};

    /// The pipe's writing end, for the handler (-1 until installed).
    static PIPE_WRITE: AtomicI32 = AtomicI32::new(-1);

    extern "C" fn on_signal(sig: libc::c_int) {
        let fd = PIPE_WRITE.load(Ordering::Relaxed);
        if fd >= 0 {
            let byte = sig as u8;
            // SAFETY: write(2) of one byte from a local into a valid pipe descriptor; it is
            // async-signal-safe.
            unsafe {
                libc::write(fd, (&byte as *const u8).cast(), 1);
            }
        }
    }

    fn name(sig: i32) -> &'static str {
        match sig {
            libc::SIGINT => "SIGINT (Ctrl-C)",
            libc::SIGTERM => "SIGTERM",
            _ => "a signal",
        }
    }

    /// Install the handlers and start the watcher thread. Without a pipe or a thread, the
    /// signals keep their default action (the run dies; the next run clears its temporaries).
    pub fn install() {
        let mut fds = [0 as libc::c_int; 2];
        // SAFETY: pipe(2) fills the two descriptors of the array it is given.
        if unsafe { libc::pipe(fds.as_mut_ptr()) } != 0 {
            return;
        }
        let [read_end, write_end] = fds;
        let watcher = std::thread::Builder::new()
            .name("signals".into())
            .spawn(move || loop {
                let mut byte = 0u8;
                // SAFETY: read(2) of one byte into a local from the pipe's reading end.
                let n = unsafe { libc::read(read_end, (&mut byte as *mut u8).cast(), 1) };
                if n == 1 {
                    stop(i32::from(byte));
                }
                let again = n < 0
                    && std::io::Error::last_os_error().kind() == std::io::ErrorKind::Interrupted;
                if n == 0 || (n < 0 && !again) {
                    return;
                }
            });
        if watcher.is_err() {
            return;
        }
        PIPE_WRITE.store(write_end, Ordering::Relaxed);
        for sig in [libc::SIGINT, libc::SIGTERM] {
            // SAFETY: a zeroed sigaction with a plain handler, an empty mask and SA_RESTART
            // (interrupted reads and writes resume) is a valid argument to sigaction(2).
            unsafe {
                let mut action: libc::sigaction = std::mem::zeroed();
                action.sa_sigaction = on_signal as *const () as libc::sighandler_t;
                action.sa_flags = libc::SA_RESTART;
                libc::sigemptyset(&mut action.sa_mask);
                libc::sigaction(sig, &action, std::ptr::null_mut());
            }
        }
    }

    fn stop(sig: i32) {
        let unfinished = crate::output_set::stop_all();
        let what = if unfinished {
            "temporary files removed, nothing new moved in, earlier outputs unchanged"
        } else {
            "no output was being written"
        };
        eprintln!("neckline: stopped by {}: {what}", name(sig));
        std::process::exit(super::status_of(sig));
    }
}

#[cfg(unix)]
pub use imp::install;

/// Elsewhere Ctrl-C keeps its default action; the next run into the folder clears what was
/// left.
#[cfg(not(unix))]
pub fn install() {}
