//! Calibration off the start-up path: the held-out refits run on a
//! background thread once the models are fitted and every snap scored, and
//! land in the model cache beside them. Pages ask the cell whether it is
//! ready and, until it is, how much is left.

use super::cache;
use super::calib::{calibrate_watched, CalibOptions, Calibration};
use super::Models;
use crate::plays::Plays;
use serde::ser::{Serialize, SerializeStruct, Serializer};
use std::path::PathBuf;
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::{Arc, Condvar, Mutex, MutexGuard};
use std::time::Instant;

/// Where the calibration stands, as a page reports it.
#[derive(Debug, Clone)]
pub enum CalibStatus {
    Ready(Arc<Calibration>),
    Computing {
        /// Held-out fits done and in all (0 in all: not yet counted).
        done: usize,
        folds: usize,
        /// Seconds since it started and the estimate of seconds left.
        elapsed: f64,
        left: f64,
    },
    Failed(String),
}

enum State {
    Ready(Arc<Calibration>),
    Computing { started: Instant, done: usize, folds: usize, guess_per_fold: f64 },
    Failed(String),
}

struct Inner {
    state: Mutex<State>,
    changed: Condvar,
    stop: AtomicBool,
}

/// Holds a calibration thread back until opened (`open`, or dropped: a
/// start-up that fails on the way still lets it run and end).
pub(super) struct Hold(Arc<(Mutex<bool>, Condvar)>);

impl Hold {
    pub(super) fn open(self) {}

    fn wait(gate: &(Mutex<bool>, Condvar)) {
        let mut open = gate.0.lock().unwrap_or_else(|p| p.into_inner());
        while !*open {
            open = gate.1.wait(open).unwrap_or_else(|p| p.into_inner());
        }
    }
}

impl Drop for Hold {
    fn drop(&mut self) {
        *self.0 .0.lock().unwrap_or_else(|p| p.into_inner()) = true;
        self.0 .1.notify_all();
    }
}

/// The calibration of one scored league: ready (from the cache) or being
/// computed on its own thread. Clones share the same calibration.
#[derive(Clone)]
pub struct CalibrationCell {
    inner: Arc<Inner>,
}

impl std::fmt::Debug for CalibrationCell {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "CalibrationCell({:?})", self.status().word())
    }
}

/// Where a finished calibration is written: the cache folder and the
/// data fingerprint.
pub type Store = Option<(PathBuf, String)>;

impl CalibrationCell {
    fn with(state: State) -> CalibrationCell {
        CalibrationCell { inner: Arc::new(Inner { state: Mutex::new(state), changed: Condvar::new(), stop: AtomicBool::new(false) }) }
    }

    /// A calibration already computed (read from the cache).
    pub fn ready(c: Calibration) -> CalibrationCell {
        CalibrationCell::with(State::Ready(Arc::new(c)))
    }

    /// Start calibrating `models` (fit on all of `plays`) on a background
    /// thread; when done, store models and calibration under `store`. The
    /// first guess of a refit's time is the full fit's.
    pub fn spawn(plays: Arc<Plays>, models: Models, store: Store) -> CalibrationCell {
        CalibrationCell::spawn_held(plays, models, store).0
    }

    /// `spawn`, with the refits held back until the `Hold` is opened or
    /// dropped: the rest of the start-up (the throw values) gets the cores
    /// first, so the first page comes sooner.
    pub(super) fn spawn_held(plays: Arc<Plays>, models: Models, store: Store) -> (CalibrationCell, Hold) {
        let guess = models.report.seconds.max(0.1);
        let cell = CalibrationCell::with(State::Computing { started: Instant::now(), done: 0, folds: 0, guess_per_fold: guess });
        let worker = cell.clone();
        let hold = Hold(Arc::new((Mutex::new(false), Condvar::new())));
        let gate = hold.0.clone();
        let job = move || {
            Hold::wait(&gate);
            worker.restart_clock();
            worker.run(&plays, &models, store)
        };
        if let Err(e) = std::thread::Builder::new().name("lategame-calibration".into()).spawn(job) {
            cell.set(State::Failed(format!("could not start the calibration thread: {e}")));
        }
        (cell, hold)
    }

    /// The time left is counted from when the refits start, not from the
    /// wait before them.
    fn restart_clock(&self) {
        if let State::Computing { started, .. } = &mut *self.lock() {
            *started = Instant::now();
        }
    }

    fn run(&self, plays: &Plays, models: &Models, store: Store) {
        let progress = |done: usize, folds: usize| {
            if let State::Computing { done: d, folds: f, .. } = &mut *self.lock() {
                (*d, *f) = (done, folds);
            }
            !self.inner.stop.load(Ordering::Relaxed)
        };
        let started = Instant::now();
        let state = match calibrate_watched(plays, &CalibOptions::default(), Some(models), &progress) {
            Ok(c) => {
                tracing::info!("calibration computed in {:.1} s", started.elapsed().as_secs_f64());
                if let Some((dir, fingerprint)) = &store {
                    match cache::store(dir, fingerprint, models, Some(&c)) {
                        Ok(p) => tracing::info!("calibration cached in {}", p.display()),
                        Err(e) => tracing::warn!("could not cache the calibration: {e:#}"),
                    }
                }
                State::Ready(Arc::new(c))
            }
            Err(e) => State::Failed(format!("{e:#}")),
        };
        self.set(state);
    }

    fn lock(&self) -> MutexGuard<'_, State> {
        self.inner.state.lock().unwrap_or_else(|p| p.into_inner())
    }

    fn set(&self, state: State) {
        *self.lock() = state;
        self.inner.changed.notify_all();
    }

    pub fn status(&self) -> CalibStatus {
        match &*self.lock() {
            State::Ready(c) => CalibStatus::Ready(c.clone()),
            State::Failed(e) => CalibStatus::Failed(e.clone()),
            &State::Computing { started, done, folds, guess_per_fold } => {
                let elapsed = started.elapsed().as_secs_f64();
                let per_fold = if done > 0 { elapsed / done as f64 } else { guess_per_fold };
                let left = if done > 0 { per_fold * (folds - done.min(folds)) as f64 } else { per_fold * folds.max(1) as f64 - elapsed };
                CalibStatus::Computing { done, folds, elapsed, left: left.max(1.0) }
            }
        }
    }

    /// The calibration if it is ready.
    pub fn get(&self) -> Option<Arc<Calibration>> {
        match &*self.lock() {
            State::Ready(c) => Some(c.clone()),
            _ => None,
        }
    }

    /// Block until the calibration is ready (or failed).
    pub fn wait(&self) -> Result<Arc<Calibration>, String> {
        let mut g = self.lock();
        loop {
            match &*g {
                State::Ready(c) => return Ok(c.clone()),
                State::Failed(e) => return Err(e.clone()),
                State::Computing { .. } => g = self.inner.changed.wait(g).unwrap_or_else(|p| p.into_inner()),
            }
        }
    }

    /// Ask the background thread to stop after its current refit (the
    /// league it calibrates is no longer served).
    pub fn cancel(&self) {
        self.inner.stop.store(true, Ordering::Relaxed);
    }
}

impl CalibStatus {
    /// "ready", "computing" or "failed".
    pub fn word(&self) -> &'static str {
        match self {
            CalibStatus::Ready(_) => "ready",
            CalibStatus::Computing { .. } => "computing",
            CalibStatus::Failed(_) => "failed",
        }
    }

    /// One sentence for a page while the calibration is not ready.
    pub fn sentence(&self) -> String {
        match self {
            CalibStatus::Ready(_) => "The calibration is ready.".into(),
            CalibStatus::Computing { done, folds, left, .. } => {
                let step = if *folds > 0 { format!(" ({done} of {folds} held-out refits done)") } else { String::new() };
                format!(
                    "The calibration is being computed{step}: ready in about {} s. The models are fitted and every snap is scored; only this check is still running.",
                    round_up(*left)
                )
            }
            CalibStatus::Failed(e) => format!("The calibration could not be computed: {e}"),
        }
    }
}

/// Seconds rounded up to a figure worth saying: whole seconds below 10,
/// else the next multiple of 5.
pub fn round_up(s: f64) -> u64 {
    let s = s.max(1.0).ceil() as u64;
    if s < 10 {
        s
    } else {
        s.div_ceil(5) * 5
    }
}

/// Ready: the calibration's own fields and `"status": "ready"`; otherwise
/// the status, the progress, the estimate and the sentence.
impl Serialize for CalibrationCell {
    fn serialize<S: Serializer>(&self, ser: S) -> Result<S::Ok, S::Error> {
        #[derive(serde::Serialize)]
        struct ReadyOut<'a> {
            status: &'static str,
            #[serde(flatten)]
            calibration: &'a Calibration,
        }
        let status = self.status();
        match &status {
            CalibStatus::Ready(c) => ReadyOut { status: "ready", calibration: c }.serialize(ser),
            CalibStatus::Computing { done, folds, left, .. } => {
                let mut s = ser.serialize_struct("CalibrationCell", 5)?;
                s.serialize_field("status", status.word())?;
                s.serialize_field("refits_done", done)?;
                s.serialize_field("refits", folds)?;
                s.serialize_field("ready_in_seconds", &round_up(*left))?;
                s.serialize_field("message", &status.sentence())?;
                s.end()
            }
            CalibStatus::Failed(_) => {
                let mut s = ser.serialize_struct("CalibrationCell", 2)?;
                s.serialize_field("status", status.word())?;
                s.serialize_field("message", &status.sentence())?;
                s.end()
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_held_thread_waits_until_the_hold_is_opened_or_dropped() {
        for dropped in [false, true] {
            let hold = Hold(Arc::new((Mutex::new(false), Condvar::new())));
            let gate = hold.0.clone();
            let (tx, rx) = std::sync::mpsc::channel();
            let waiter = std::thread::spawn(move || {
                Hold::wait(&gate);
                tx.send(()).ok();
            });
            assert!(rx.recv_timeout(std::time::Duration::from_millis(100)).is_err(), "ran before the hold opened");
            if dropped {
                drop(hold);
            } else {
                hold.open();
            }
            assert!(rx.recv_timeout(std::time::Duration::from_secs(10)).is_ok(), "still held after opening");
            waiter.join().expect("waiter");
        }
    }

    #[test]
    fn rounding_of_the_estimate() {
        assert_eq!(round_up(0.2), 1);
        assert_eq!(round_up(7.1), 8);
        assert_eq!(round_up(10.0), 10);
        assert_eq!(round_up(11.0), 15);
        assert_eq!(round_up(83.0), 85);
    }

    #[test]
    fn a_cell_still_computing_says_so_and_how_long() {
        let cell = CalibrationCell::with(State::Computing { started: Instant::now(), done: 0, folds: 6, guess_per_fold: 3.0 });
        let st = cell.status();
        let CalibStatus::Computing { left, .. } = st else { panic!("{st:?}") };
        assert!(left > 17.0 && left <= 18.0, "{left}");
        assert!(cell.get().is_none());
        assert!(st.sentence().contains("ready in about 20 s"), "{}", st.sentence());
        let json = serde_json::to_value(&cell).expect("json");
        assert_eq!(json["status"], "computing");
        assert_eq!(json["refits"], 6);
        assert_eq!(json["ready_in_seconds"], 20);
        cell.set(State::Failed("no games".into()));
        assert_eq!(cell.wait().unwrap_err(), "no games");
        assert_eq!(serde_json::to_value(&cell).expect("json")["status"], "failed");
    }
}
