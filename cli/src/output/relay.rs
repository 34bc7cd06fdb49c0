//! The relay: the output of a run written on a thread of its own.
//!
//! The solver's thread keeps only what must see the borrowed state of a step (Ctrl-C, the
//! progress bar, the development-progress points, which read the slow state); a [`Relay`],
//! the [`StepObserver`] it is given, copies each step's [`StepValues`] (and the heads, for
//! the steps the consumer keeps a snapshot of), each [`CycleView`] and each [`JumpView`],
//! in the order the run reports them, into a batch. Full batches go over a bounded channel
//! to a worker thread that owns the [`Consumer`] (the run's `ResultSink`) and feeds it in
//! the same order; emptied batches come back over a second channel to be filled again, so
//! after the first few batches the time loop allocates nothing.
//!
//! The consumer may be made on the worker thread itself ([`Made`]): the time loop then
//! starts at once while the worker opens the output.
//!
//! When the caller marks the run complete ([`Relay::complete`]), the worker also writes out
//! what the consumer buffered ([`Consumer::end`]: the last chunks, the datasets shorter
//! than a chunk) while the caller goes on (the virtual tests on the well at the end); the
//! caller takes the consumer back with [`Fed::join`].
//!
//! An error of the consumer stops the run: the worker raises a flag that the relay reads at
//! every step, and stops taking batches. The run then ends within the batches in flight; the
//! consumer comes back with its error, and the caller drops it unfinished (nothing partial
//! is left on disk, `output/mod.rs`). A panic on the worker thread comes back as
//! [`RelayError`], never as a hang: the worker's ends of both channels are dropped with it,
//! so the relay's next send or wait fails and the run stops. [`Fed`] joins the worker when
//! dropped, so a consumer dropped unfinished has deleted its files before the caller
//! returns.

use super::sink::Snapshots;
use boreflux_solver::{CycleView, JumpView, StepObserver, StepValues, StepView};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{channel, sync_channel, Receiver, Sender, SyncSender, TryRecvError};
use std::sync::Arc;
use std::thread::JoinHandle;

/// Messages per batch: ~1 000 steps, ~0.3 MB of values, so a batch costs the solver's
/// thread one channel send per ~1 000 steps. Assumption: large enough that the channel's
/// cost vanishes, small enough that an error stops the run within milliseconds.
pub const BATCH_MESSAGES: usize = 1024;

/// Batches in flight at most (filled, queued, being written), allocated only when the worker
/// lags: up to ~9 MB, some 30 ms of a fast time loop. The worker's work comes in bursts —
/// opening the file at the start ([`Made`]), creating some eighty datasets when their first
/// chunk fills (measured: 25–33 ms for one batch on the 60 M cell-step case, during which
/// the time loop waited 16–30 ms for a free batch when there were 4) — and the queue lets
/// the time loop run on through them. Assumption: enough for the bursts seen, small enough
/// that a failing consumer still stops the run within a fraction of a second.
const BATCHES: usize = 32;

/// What the worker thread feeds: the run's output, from owned values only.
pub trait Consumer {
    /// A reported step; `heads` holds the cell heads when [`Consumer::snapshots`] wants
    /// them at this step, else nothing.
    fn step(&mut self, values: &StepValues, heads: &[f64]);
    /// The end of a cycle (reported before the step that ends it, as the run does).
    fn cycle(&mut self, cycle: &CycleView);
    /// A jump over whole cycles.
    fn jump(&mut self, jump: &JumpView);
    /// The run is complete (after its last message): write out what is buffered.
    fn end(&mut self);
    /// Whether it failed (the run is then stopped).
    fn failed(&self) -> bool;
    /// The steps whose heads it keeps.
    fn snapshots(&self) -> Snapshots;
    /// Called on the worker thread before the first message (see [`Made`]).
    fn start(&mut self) {}
}

/// How a [`Made`] consumer is made.
pub type Maker<C, E> = Box<dyn FnOnce() -> Result<C, E> + Send>;

/// A consumer made on the worker thread, before the first message: the solver's thread
/// starts stepping at once while the worker opens the output (creating an HDF5 file and its
/// groups takes milliseconds), the batches of the first steps waiting in the channel. A
/// consumer that cannot be made comes back as [`Made::Failed`] with its error, and stops
/// the run as a failing consumer does.
pub enum Made<C, E> {
    /// Not made yet: how to make it (taken when it is made), and the steps whose heads it
    /// will keep.
    Pending(Option<Maker<C, E>>, Snapshots),
    Ready(C),
    Failed(E),
}

impl<C, E> Made<C, E> {
    /// A consumer that `make` makes on the worker thread, keeping the heads of `snapshots`.
    pub fn later(
        make: impl FnOnce() -> Result<C, E> + Send + 'static,
        snapshots: Snapshots,
    ) -> Self {
        Made::Pending(Some(Box::new(make)), snapshots)
    }

    /// The consumer, or the error that kept it from being made (None: never made, the
    /// worker never having started).
    pub fn into_result(self) -> Result<C, Option<E>> {
        match self {
            Made::Ready(c) => Ok(c),
            Made::Failed(e) => Err(Some(e)),
            Made::Pending(..) => Err(None),
        }
    }
}

impl<C: Consumer, E> Consumer for Made<C, E> {
    fn step(&mut self, values: &StepValues, heads: &[f64]) {
        if let Made::Ready(c) = self {
            c.step(values, heads);
        }
    }
    fn cycle(&mut self, cycle: &CycleView) {
        if let Made::Ready(c) = self {
            c.cycle(cycle);
        }
    }
    fn jump(&mut self, jump: &JumpView) {
        if let Made::Ready(c) = self {
            c.jump(jump);
        }
    }
    fn end(&mut self) {
        if let Made::Ready(c) = self {
            c.end();
        }
    }
    fn failed(&self) -> bool {
        match self {
            Made::Ready(c) => c.failed(),
            Made::Failed(_) => true,
            Made::Pending(..) => false,
        }
    }
    fn snapshots(&self) -> Snapshots {
        match self {
            Made::Ready(c) => c.snapshots(),
            Made::Pending(_, s) => *s,
            Made::Failed(_) => Snapshots::every(u64::MAX),
        }
    }
    fn start(&mut self) {
        if let Made::Pending(make, planned) = self {
            let planned = *planned;
            if let Some(make) = make.take() {
                *self = match make() {
                    Ok(mut c) => {
                        // The relay copied the heads of the steps planned: a consumer that
                        // keeps others would be given the wrong steps' heads.
                        assert_eq!(c.snapshots(), planned, "snapshot steps as planned");
                        c.start();
                        Made::Ready(c)
                    }
                    Err(e) => Made::Failed(e),
                };
            }
        }
    }
}

/// The worker thread could not start or panicked; the consumer and what it wrote are gone.
#[derive(Debug, thiserror::Error)]
#[error("the output thread failed: {0}")]
pub struct RelayError(String);

/// One message of a batch, in the order the run reported it.
#[derive(Debug, Clone, Copy)]
enum Message {
    /// A step's values and the number of its heads in the batch's `heads` (0 or N).
    Step(StepValues, usize),
    Cycle(CycleView),
    Jump(JumpView),
    /// The run is complete.
    End,
}

/// Messages and the heads of the snapshot steps among them, in order.
#[derive(Debug, Default)]
struct Batch {
    messages: Vec<Message>,
    heads: Vec<f64>,
}

/// The solver thread's end of the relay (a [`StepObserver`]).
pub struct Relay {
    batch: Batch,
    capacity: usize,
    /// None once closed or once the worker is gone.
    full: Option<SyncSender<Batch>>,
    free: Receiver<Batch>,
    allocated: usize,
    snapshots: Snapshots,
    failed: Arc<AtomicBool>,
}

/// The consumer after the run: still being fed on the worker thread, or at hand.
pub struct Fed<C> {
    worker: Option<JoinHandle<C>>,
    ready: Option<Result<C, RelayError>>,
    failed: Arc<AtomicBool>,
}

/// Runs `body` with a [`Relay`] that feeds `consumer` on a thread of its own; returns what
/// `body` returned and the consumer, fed with every message the relay took, in order.
pub fn relay<C: Consumer + Send + 'static, R>(
    consumer: C,
    body: impl FnOnce(&mut Relay) -> R,
) -> (R, Fed<C>) {
    relay_in_batches(consumer, BATCH_MESSAGES, body)
}

/// [`relay`] with `capacity` messages per batch.
fn relay_in_batches<C: Consumer + Send + 'static, R>(
    consumer: C,
    capacity: usize,
    body: impl FnOnce(&mut Relay) -> R,
) -> (R, Fed<C>) {
    let failed = Arc::new(AtomicBool::new(false));
    let snapshots = consumer.snapshots();
    let (full_tx, full_rx) = sync_channel::<Batch>(BATCHES);
    let (free_tx, free_rx) = channel::<Batch>();
    let flag = Arc::clone(&failed);
    let worker = std::thread::Builder::new()
        .name("boreflux-output".to_owned())
        .spawn(move || {
            let _raise = RaiseOnPanic(&flag);
            feed(consumer, &full_rx, &free_tx, &flag)
        });
    let (full, fed) = match worker {
        Ok(handle) => (
            Some(full_tx),
            Fed {
                worker: Some(handle),
                ready: None,
                failed: Arc::clone(&failed),
            },
        ),
        // No thread: the consumer went with the failed spawn; the run stops at once.
        Err(e) => (
            None,
            Fed {
                worker: None,
                ready: Some(Err(RelayError(format!("cannot start it: {e}")))),
                failed: Arc::clone(&failed),
            },
        ),
    };
    let mut relay = Relay {
        batch: Batch::with_capacity(capacity),
        capacity,
        full,
        free: free_rx,
        allocated: 1,
        snapshots,
        failed,
    };
    let r = body(&mut relay);
    relay.close();
    (r, fed)
}

/// The worker: feeds every message of every batch to `consumer`, in order, and returns
/// the emptied batches; stops at the consumer's first failure.
fn feed<C: Consumer>(
    mut consumer: C,
    full: &Receiver<Batch>,
    free: &Sender<Batch>,
    failed: &AtomicBool,
) -> C {
    consumer.start();
    if consumer.failed() {
        failed.store(true, Ordering::Relaxed);
        return consumer;
    }
    while let Ok(mut batch) = full.recv() {
        let mut at = 0;
        for m in &batch.messages {
            match m {
                Message::Step(values, n) => {
                    consumer.step(values, &batch.heads[at..at + n]);
                    at += n;
                }
                Message::Cycle(c) => consumer.cycle(c),
                Message::Jump(j) => consumer.jump(j),
                Message::End => consumer.end(),
            }
            if consumer.failed() {
                failed.store(true, Ordering::Relaxed);
                return consumer;
            }
        }
        batch.messages.clear();
        batch.heads.clear();
        // The relay may be gone already (the run ended): the batch is then dropped.
        let _ = free.send(batch);
    }
    consumer
}

/// Raises the failure flag when the worker unwinds from a panic.
struct RaiseOnPanic<'a>(&'a AtomicBool);

impl Drop for RaiseOnPanic<'_> {
    fn drop(&mut self) {
        if std::thread::panicking() {
            self.0.store(true, Ordering::Relaxed);
        }
    }
}

impl<C> Fed<C> {
    /// The consumer fed directly, on the caller's thread.
    pub fn ready(consumer: C) -> Self {
        Fed {
            worker: None,
            ready: Some(Ok(consumer)),
            failed: Arc::new(AtomicBool::new(false)),
        }
    }

    /// Waits for the worker to feed the last message; the consumer, or the worker's panic.
    pub fn join(mut self) -> Result<C, RelayError> {
        if let Some(handle) = self.worker.take() {
            return handle.join().map_err(|panic| {
                let text = panic
                    .downcast_ref::<&str>()
                    .map(|s| (*s).to_owned())
                    .or_else(|| panic.downcast_ref::<String>().cloned())
                    .unwrap_or_else(|| "a panic".to_owned());
                RelayError(text)
            });
        }
        self.ready
            .take()
            .unwrap_or_else(|| Err(RelayError("already joined".to_owned())))
    }
}

impl<C: Consumer> Fed<C> {
    /// Whether the consumer failed: seen by the worker (or the worker could not start or
    /// panicked), or, at hand, its own word.
    pub fn failed(&self) -> bool {
        self.failed.load(Ordering::Relaxed)
            || match &self.ready {
                Some(Ok(c)) => c.failed(),
                Some(Err(_)) => true,
                None => false,
            }
    }
}

impl<C> Drop for Fed<C> {
    /// Waits for the worker: a consumer dropped unfinished there deletes its temporary
    /// files before the caller returns (and the process exits).
    fn drop(&mut self) {
        if let Some(handle) = self.worker.take() {
            let _ = handle.join();
        }
    }
}

impl Relay {
    /// Marks the run complete: after the messages so far, the worker calls
    /// [`Consumer::end`].
    pub fn complete(&mut self) {
        self.push(Message::End);
    }

    /// Appends a message; sends the batch when full. False when the worker is gone.
    fn push(&mut self, m: Message) -> bool {
        if self.full.is_none() {
            return false;
        }
        self.batch.messages.push(m);
        self.batch.messages.len() < self.capacity || self.send()
    }

    /// Sends the current batch and takes an empty one. False when the worker is gone.
    fn send(&mut self) -> bool {
        let Some(full) = self.full.as_ref() else {
            return false;
        };
        let batch = std::mem::take(&mut self.batch);
        if full.send(batch).is_err() {
            self.full = None;
            return false;
        }
        match self.empty_batch() {
            Some(b) => {
                self.batch = b;
                true
            }
            None => {
                self.full = None;
                false
            }
        }
    }

    /// A returned batch, a new one while fewer than [`BATCHES`] exist, else the next one
    /// the worker returns. None when the worker is gone.
    fn empty_batch(&mut self) -> Option<Batch> {
        match self.free.try_recv() {
            Ok(b) => return Some(b),
            Err(TryRecvError::Disconnected) => return None,
            Err(TryRecvError::Empty) => {}
        }
        if self.allocated < BATCHES {
            self.allocated += 1;
            return Some(Batch::with_capacity(self.capacity));
        }
        self.free.recv().ok()
    }

    /// Sends what is left and closes the channel: the worker ends after the last batch.
    fn close(&mut self) {
        if !self.batch.messages.is_empty() {
            if let Some(full) = self.full.as_ref() {
                let _ = full.send(std::mem::take(&mut self.batch));
            }
        }
        self.full = None;
    }
}

impl Batch {
    fn with_capacity(capacity: usize) -> Self {
        Batch {
            messages: Vec::with_capacity(capacity),
            heads: Vec::new(),
        }
    }
}

impl StepObserver for Relay {
    fn on_step(&mut self, s: &StepView<'_>) -> bool {
        if self.failed.load(Ordering::Relaxed) {
            return false;
        }
        let n = if self.snapshots.wants(s.step) {
            s.heads.len()
        } else {
            0
        };
        if self.full.is_some() {
            self.batch.heads.extend_from_slice(&s.heads[..n]);
        }
        self.push(Message::Step(s.values, n))
    }

    fn on_cycle(&mut self, c: &CycleView) {
        self.push(Message::Cycle(*c));
    }

    fn on_jump(&mut self, j: &JumpView) {
        self.push(Message::Jump(*j));
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use boreflux_solver::fixtures::demo_well;
    use boreflux_solver::grid::ZONE_COUNT;
    use boreflux_solver::slow::SlowState;
    use boreflux_solver::system::Discretization;
    use boreflux_solver::{EventKind, EventSet, JumpBound};

    /// What a consumer was given, in order.
    #[derive(Debug, Clone, PartialEq)]
    enum Seen {
        Step(StepValues, Vec<f64>),
        Cycle(CycleView),
        Jump(JumpView),
        End,
    }

    /// Records everything; fails at step `fail_at` or panics at step `panic_at`.
    struct Recorder {
        seen: Vec<Seen>,
        snapshots: Snapshots,
        fail_at: Option<u64>,
        panic_at: Option<u64>,
        failed: bool,
    }

    impl Recorder {
        fn new(every: u64) -> Self {
            Recorder {
                seen: Vec::new(),
                snapshots: Snapshots::every(every),
                fail_at: None,
                panic_at: None,
                failed: false,
            }
        }
    }

    impl Consumer for Recorder {
        fn step(&mut self, values: &StepValues, heads: &[f64]) {
            assert!(Some(values.step) != self.panic_at, "recorder told to panic");
            self.failed |= Some(values.step) == self.fail_at;
            self.seen.push(Seen::Step(*values, heads.to_vec()));
        }
        fn cycle(&mut self, cycle: &CycleView) {
            self.seen.push(Seen::Cycle(*cycle));
        }
        fn jump(&mut self, jump: &JumpView) {
            self.seen.push(Seen::Jump(*jump));
        }
        fn end(&mut self) {
            self.seen.push(Seen::End);
        }
        fn failed(&self) -> bool {
            self.failed
        }
        fn snapshots(&self) -> Snapshots {
            self.snapshots
        }
    }

    /// The recorder fed on the solver's thread, as the sink is on one core.
    struct Direct<'a>(&'a mut Recorder);

    impl StepObserver for Direct<'_> {
        fn on_step(&mut self, s: &StepView<'_>) -> bool {
            let heads = if self.0.snapshots.wants(s.step) {
                s.heads
            } else {
                &[]
            };
            self.0.step(&s.values, heads);
            !self.0.failed
        }
        fn on_cycle(&mut self, c: &CycleView) {
            self.0.cycle(c);
        }
        fn on_jump(&mut self, j: &JumpView) {
            self.0.jump(j);
        }
    }

    /// A made-up run of `steps` steps (every value differs from step to step): a cycle
    /// ends at every 13th step (reported before it, as `run` does), a jump follows every
    /// 101st. Returns the steps the observer took before it asked to stop.
    fn play(steps: u64, obs: &mut dyn StepObserver) -> u64 {
        let model = demo_well();
        let grid = Discretization::new(&model, None).grid;
        let slow = SlowState::new(&model);
        let mut heads = vec![0.0; grid.cells()];
        for k in 1..=steps {
            let x = k as f64;
            for (i, h) in heads.iter_mut().enumerate() {
                *h = x + i as f64 * 1e-3;
            }
            let mut events = EventSet::EMPTY;
            if k % 17 == 0 {
                events.insert(EventKind::Oscillation);
            }
            let values = StepValues {
                step: k,
                time_s: 0.5 * x,
                dt_s: 0.5,
                well_head_m: x.sin(),
                screen_outer_head_m: x.cos(),
                screen_flow_m3_s: 1e-3 * x,
                face_flux_m_s: -1e-4 * x,
                face_pore_velocity_m_s: 3e-4 * x,
                face_gradient: 0.1 * x,
                shear_proxy_pa: 2.0 * x,
                cake_thickness_m: 1.0 / x,
                cake_coverage: 1.0 / (1.0 + x),
                skin: 5.0 - 1e-3 * x,
                cake_pressure_pa: 7.0 * x,
                fines_removed_kg: 1e-6 * x,
                power_w: [x; ZONE_COUNT],
                work_j: [2.0 * x; ZONE_COUNT],
                screen_volume_m3: 1e-4 * x,
                device_volume_m3: 2e-4 * x,
                bypass_volume_m3: 3e-4 * x,
                mass_residual: 1e-12 * x,
                energy_residual: 2e-12 * x,
                newton_iterations: (k % 5) as usize,
                screen_inner_head_m: -x,
                events,
            };
            if k % 13 == 0 {
                obs.on_cycle(&CycleView {
                    index: k / 13,
                    start_s: x - 13.0,
                    end_s: x,
                    peak_outward_flux_m_s: x,
                    peak_inward_flux_m_s: -x,
                    rms_face_flux_m_s: 0.5 * x,
                    peak_shear_pa: 3.0 * x,
                    work_j: [x; ZONE_COUNT],
                    cake_removed_m: 1e-3 * x,
                });
            }
            let view = StepView {
                values,
                heads: &heads,
                grid: &grid,
                slow: &slow,
            };
            if !obs.on_step(&view) {
                return k;
            }
            if k % 101 == 0 {
                obs.on_jump(&JumpView {
                    from_s: x,
                    to_s: x + 10.0,
                    first_cycle: k,
                    cycles: 3,
                    error_estimate: 0.25,
                    bound: JumpBound::Move,
                });
            }
        }
        steps
    }

    /// The record of `play(steps)` fed directly to a recorder keeping every 9th step's
    /// heads, ended: what every relayed record is compared with.
    fn fed_directly(steps: u64) -> Recorder {
        let mut direct = Recorder::new(9);
        assert_eq!(play(steps, &mut Direct(&mut direct)), steps);
        direct.end();
        direct
    }

    /// Checks: through the relay, in batches of 7 messages (over 2 000 batches), the
    /// consumer gets every step, cycle and jump in the order the run reported them, with
    /// the heads of exactly the steps it keeps, and the end of the run last: the same
    /// record as fed directly.
    #[test]
    fn the_relay_keeps_every_message_in_order() {
        let steps = 12_000;
        let direct = fed_directly(steps);
        let (taken, fed) = relay_in_batches(Recorder::new(9), 7, |r| {
            let taken = play(steps, r);
            r.complete();
            taken
        });
        assert_eq!(taken, steps);
        assert_eq!(direct.seen.last(), Some(&Seen::End));
        let relayed = fed.join().expect("no panic");
        let count = |f: fn(&Seen) -> bool| direct.seen.iter().filter(|s| f(s)).count();
        assert_eq!(count(|s| matches!(s, Seen::Step(..))), steps as usize);
        assert!(count(|s| matches!(s, Seen::Cycle(_))) > 900);
        assert!(count(|s| matches!(s, Seen::Jump(_))) > 100);
        assert!(count(|s| matches!(s, Seen::Step(_, h) if !h.is_empty())) > 1000);
        assert_eq!(relayed.seen.len(), direct.seen.len());
        for (i, (a, b)) in relayed.seen.iter().zip(&direct.seen).enumerate() {
            assert_eq!(a, b, "message {i}");
        }
    }

    /// Checks: a consumer made on the worker thread ([`Made`]) is given the same messages
    /// as one made before, in order, although the run starts before it exists (the maker
    /// sleeps long enough for the time loop to fill several batches).
    #[test]
    fn a_consumer_made_on_the_worker_misses_nothing() {
        let steps = 5_000;
        let direct = fed_directly(steps);
        let made = Made::later(
            || {
                std::thread::sleep(std::time::Duration::from_millis(20));
                Ok::<_, String>(Recorder::new(9))
            },
            Snapshots::every(9),
        );
        let (taken, fed) = relay_in_batches(made, 7, |r| {
            let taken = play(steps, r);
            r.complete();
            taken
        });
        assert_eq!(taken, steps);
        let relayed = fed.join().expect("no panic").into_result().expect("made");
        assert_eq!(relayed.seen, direct.seen);
    }

    /// Checks: a consumer that cannot be made stops the run within the batches in flight
    /// and comes back as its error.
    #[test]
    fn a_consumer_that_cannot_be_made_stops_the_run() {
        let made = Made::<Recorder, String>::later(
            || Err("no such directory".to_owned()),
            Snapshots::every(1),
        );
        let (taken, fed) = relay_in_batches(made, 64, |r| play(1_000_000, r));
        assert!(fed.failed());
        assert!(
            taken <= (BATCHES as u64 + 1) * 64,
            "the run went on to step {taken}"
        );
        let made = fed.join().expect("no panic");
        assert!(matches!(made.into_result(), Err(Some(e)) if e == "no such directory"));
    }

    /// Checks: a consumer that fails at step 1 000 stops the run within the batches in
    /// flight ([`BATCHES`] + 1 of 64 messages), and comes back with its failure.
    #[test]
    fn a_failing_consumer_stops_the_run() {
        let mut rec = Recorder::new(1_000_000);
        rec.fail_at = Some(1_000);
        let (taken, fed) = relay_in_batches(rec, 64, |r| play(1_000_000, r));
        assert!(fed.failed());
        let rec = fed.join().expect("no panic");
        assert!(rec.failed);
        assert!(
            taken <= 1_000 + (BATCHES as u64 + 1) * 64,
            "the run went on to step {taken}"
        );
        assert!(matches!(rec.seen.last(), Some(Seen::Step(v, _)) if v.step == 1_000));
    }

    /// Checks: a panic on the worker thread stops the run and comes back as an error that
    /// says why; it does not hang the run.
    #[test]
    fn a_panic_of_the_consumer_is_an_error_not_a_hang() {
        let mut rec = Recorder::new(1);
        rec.panic_at = Some(500);
        let (taken, fed) = relay_in_batches(rec, 64, |r| play(1_000_000, r));
        assert!(fed.failed(), "the panic raised the flag");
        let e = fed.join().err().expect("the panic is an error");
        assert!(e.to_string().contains("recorder told to panic"), "{e}");
        assert!(taken <= 500 + (BATCHES as u64 + 1) * 64, "step {taken}");
    }
}
