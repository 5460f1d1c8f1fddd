//! Waiting for work handed to the thread pool.

use std::sync::mpsc::Receiver;
use std::time::Duration;

/// The next result on `rx`, sent by a job spawned on the pool. Off the pool, this thread
/// sleeps until one comes; on it (a worker that coordinates, as when several files are judged
/// at once, each on a worker, or on a pool of one thread) the worker runs other jobs meanwhile,
/// so that waiting workers can not stall the pool. Every job in flight must hold a sender
/// until it has sent (`what` names what it sends, for the message if one did not).
pub fn wait<T>(rx: &Receiver<T>, what: &str) -> T {
    loop {
        if let Ok(v) = rx.try_recv() {
            return v;
        }
        match rayon::yield_now() {
            Some(rayon::Yield::Executed) => {}
            Some(rayon::Yield::Idle) => {
                if let Ok(v) = rx.recv_timeout(Duration::from_micros(200)) {
                    return v;
                }
            }
            None => {
                return rx
                    .recv()
                    .unwrap_or_else(|_| panic!("a job in flight sends {what}"))
            }
        }
    }
}
