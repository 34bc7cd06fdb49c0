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
//! An error of the consumer stops the run: the worker raises a flag that the relay reads at
//! every step, and stops taking batches. The run then ends a batch or two later; the
//! consumer comes back with its error, and the caller drops it unfinished (nothing partial
//! is left on disk, `output/mod.rs`). A panic on the worker thread comes back as
//! [`RelayError`], never as a hang: the worker's ends of both channels are dropped with it,
//! so the relay's next send or wait fails and the run stops.

use super::sink::Snapshots;
use boreflux_solver::{CycleView, JumpView, StepObserver, StepValues, StepView};
use std::sync::atomic::{AtomicBool, Ordering};
use std::sync::mpsc::{channel, sync_channel, Receiver, Sender, SyncSender, TryRecvError};

/// Messages per batch: ~1 000 steps, ~0.3 MB of values, so a batch costs the solver's
/// thread one channel send per ~1 000 steps. Assumption: large enough that the channel's
/// cost vanishes, small enough that an error stops the run within milliseconds.
pub const BATCH_MESSAGES: usize = 1024;

/// Batches in flight at most (filled, queued, being written). Assumption: two let the two
/// threads work at once; two more absorb the jitter of either thread.
const BATCHES: usize = 4;

/// What the worker thread feeds: the run's output, from owned values only.
pub trait Consumer {
    /// A reported step; `heads` holds the cell heads when [`Consumer::snapshots`] wants
    /// them at this step, else nothing.
    fn step(&mut self, values: &StepValues, heads: &[f64]);
    /// The end of a cycle (reported before the step that ends it, as the run does).
    fn cycle(&mut self, cycle: &CycleView);
    /// A jump over whole cycles.
    fn jump(&mut self, jump: &JumpView);
    /// Whether it failed (the run is then stopped).
    fn failed(&self) -> bool;
    /// The steps whose heads it keeps.
    fn snapshots(&self) -> Snapshots;
}

/// The worker thread panicked; the consumer and what it wrote are gone.
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
}

/// Messages and the heads of the snapshot steps among them, in order.
#[derive(Debug, Default)]
struct Batch {
    messages: Vec<Message>,
    heads: Vec<f64>,
}

/// The solver thread's end of the relay (a [`StepObserver`]).
pub struct Relay<'a> {
    batch: Batch,
    capacity: usize,
    /// None once closed or once the worker is gone.
    full: Option<SyncSender<Batch>>,
    free: Receiver<Batch>,
    allocated: usize,
    snapshots: Snapshots,
    failed: &'a AtomicBool,
}

/// Runs `body` with a [`Relay`] that feeds `consumer` on a scoped thread; returns what
/// `body` returned and the consumer, fed with every message the relay took, in order (or
/// the worker's panic).
pub fn relay<C: Consumer + Send, R>(
    consumer: C,
    body: impl FnOnce(&mut Relay<'_>) -> R,
) -> (R, Result<C, RelayError>) {
    relay_in_batches(consumer, BATCH_MESSAGES, body)
}

/// [`relay`] with `capacity` messages per batch.
fn relay_in_batches<C: Consumer + Send, R>(
    consumer: C,
    capacity: usize,
    body: impl FnOnce(&mut Relay<'_>) -> R,
) -> (R, Result<C, RelayError>) {
    let failed = AtomicBool::new(false);
    let snapshots = consumer.snapshots();
    std::thread::scope(|scope| {
        let (full_tx, full_rx) = sync_channel::<Batch>(BATCHES);
        let (free_tx, free_rx) = channel::<Batch>();
        let failed = &failed;
        let worker = std::thread::Builder::new()
            .name("boreflux-output".to_owned())
            .spawn_scoped(scope, move || feed(consumer, &full_rx, &free_tx, failed));
        let worker = match worker {
            Ok(w) => w,
            Err(e) => {
                // No thread: the consumer went with the failed spawn; nothing ran.
                let mut dead = Relay::new(capacity, None, free_rx, snapshots, failed);
                let r = body(&mut dead);
                return (r, Err(RelayError(format!("cannot start it: {e}"))));
            }
        };
        let mut relay = Relay::new(capacity, Some(full_tx), free_rx, snapshots, failed);
        let r = body(&mut relay);
        relay.close();
        drop(relay);
        let fed = worker.join().map_err(|panic| {
            let text = panic
                .downcast_ref::<&str>()
                .map(|s| (*s).to_owned())
                .or_else(|| panic.downcast_ref::<String>().cloned())
                .unwrap_or_else(|| "a panic".to_owned());
            RelayError(text)
        });
        (r, fed)
    })
}

/// The worker: feeds every message of every batch to `consumer`, in order, and returns
/// the emptied batches; stops at the consumer's first failure.
fn feed<C: Consumer>(
    mut consumer: C,
    full: &Receiver<Batch>,
    free: &Sender<Batch>,
    failed: &AtomicBool,
) -> C {
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

impl<'a> Relay<'a> {
    fn new(
        capacity: usize,
        full: Option<SyncSender<Batch>>,
        free: Receiver<Batch>,
        snapshots: Snapshots,
        failed: &'a AtomicBool,
    ) -> Self {
        Relay {
            batch: Batch::with_capacity(capacity),
            capacity,
            full,
            free,
            allocated: 1,
            snapshots,
            failed,
        }
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

impl StepObserver for Relay<'_> {
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
