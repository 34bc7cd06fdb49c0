//! Generic HDF5 writer: groups, attributes, fixed datasets and growable series.
//!
//! Knows nothing of the solver; the run and sweep code decide the layout (docs/formats.md,
//! "HDF5 layout"). Every dataset gets `units` and `description` string attributes.
//! Series that grow while a run proceeds buffer one chunk in memory and write it out when
//! full, so memory stays flat however long the run is:
//!
//! ```text
//! let mut w = H5Writer::create("out/run.h5")?;
//! w.set_root_attr_str("tool_version", "0.1.0")?;
//! let mut t = w.growable_series("series/time", "s", "simulated time", 4096)?;
//! t.append(&[0.0, 0.1])?;
//! w.finish()?;            // flush, close, rename .run.h5.tmp-<pid> → run.h5
//! ```
//!
//! A growable dataset is created in the file when its first chunk is written: when the
//! first chunk fills (chunked, compressed as asked, resizable), or at
//! [`H5Writer::finish`], where a dataset that never filled one chunk is written whole in one
//! contiguous, uncompressed block (an empty one is created chunked, with no rows). A dataset
//! smaller than one chunk saves at most a chunk's bytes by compression, and its compression
//! would all fall in the run's closing time (on the 60 M cell-step case: the series written
//! at the close 42 → 26 ms, the file 1.16 → 2.01 MB). Values, names and attributes are the
//! same either way.
//!
//! HDF5 holds one global lock for every call: compute in parallel, write from one thread.
//! Paths are `/`-separated (`"series/power/cake"`; a leading `/` is optional); missing
//! parent groups are created.

use std::collections::HashSet;
use std::path::{Path, PathBuf};
use std::str::FromStr;
use std::sync::{Arc, Mutex, MutexGuard};

use hdf5::file::FileCloseDegree;
use hdf5::types::VarLenUnicode;
use hdf5::{Dataset, File, Group, H5Type, Location, LocationType};
use ndarray::{s, ArrayView2};

use super::{OutputError, TempTarget};

/// Upper bound on the bytes buffered for one growable matrix (one chunk).
pub(crate) const MATRIX_CHUNK_BYTES: usize = 64 * 1024;

/// Hash slots of a growable dataset's chunk cache, which holds no bytes (see
/// `Growable::create`); HDF5 wants at least one.
const CHUNK_CACHE_SLOTS: usize = 1;

type Result<T, E = OutputError> = std::result::Result<T, E>;

/// An HDF5 file being written; appears at its final path only after [`H5Writer::finish`].
pub struct H5Writer {
    file: Option<File>,
    target: TempTarget,
    growing: Vec<Arc<Mutex<dyn Pending>>>,
    /// Paths of growable datasets not created in the file yet (their names are taken).
    reserved: HashSet<String>,
    deflate: Option<u8>,
}

/// A 1-D dataset that grows at the end; see [`H5Writer::growable_series`].
pub struct SeriesHandle<T: H5Type + Copy = f64> {
    inner: Arc<Mutex<Growable<T>>>,
}

/// A 2-D dataset with a fixed number of columns that grows by rows; see
/// [`H5Writer::growable_matrix`].
pub struct MatrixHandle {
    inner: Arc<Mutex<Growable<f64>>>,
}

impl H5Writer {
    /// Starts a new file that will be renamed to `final_path` by [`finish`](Self::finish).
    /// Writes go to `.<name>.tmp-<pid>` in the same folder, which must exist.
    pub fn create(final_path: impl AsRef<Path>) -> Result<Self> {
        let target = TempTarget::new(final_path.as_ref())?;
        // Strong close: closing the file also closes any object handle still open, so the
        // file is complete on disk when it is renamed.
        let file = File::with_options()
            .with_fapl(|fapl| fapl.fclose_degree(FileCloseDegree::Strong))
            .create(target.tmp())
            .map_err(|source| OutputError::Hdf5File {
                path: target.tmp().to_path_buf(),
                source,
            })?;
        Ok(Self {
            file: Some(file),
            target,
            growing: Vec::new(),
            reserved: HashSet::new(),
            deflate: None,
        })
    }

    /// The path the file will have once finished.
    pub fn final_path(&self) -> &Path {
        self.target.dest()
    }

    /// Compresses growable series and matrices created from now on with shuffle + deflate
    /// at `level` (0–9), or not at all with `None`. Without a deflate filter in the HDF5
    /// library, datasets are written uncompressed.
    pub fn set_deflate(&mut self, level: Option<u8>) {
        self.deflate = level
            .map(|l| l.min(9))
            .filter(|_| hdf5::filters::deflate_available());
    }

    /// Creates the group at `path` and any missing parents; an existing group is reused.
    pub fn group(&self, path: &str) -> Result<Group> {
        let parts = components(path);
        self.group_of(&parts, path)
    }

    /// Sets a string attribute on the root group, replacing an earlier value.
    pub fn set_root_attr_str(&self, name: &str, value: &str) -> Result<()> {
        self.set_attr_str("/", name, value)
    }

    /// Sets a string attribute (variable-length UTF-8) on the group or dataset at `path`
    /// (`"/"` for the root), replacing an earlier value.
    pub fn set_attr_str(&self, path: &str, name: &str, value: &str) -> Result<()> {
        let v = unicode(path, value)?;
        self.with_object(path, |loc| {
            remove_attr(loc, name)?;
            loc.new_attr::<VarLenUnicode>()
                .create(name)?
                .write_scalar(&v)
        })
    }

    /// Sets an `f64` attribute on the group or dataset at `path`, replacing an earlier value.
    pub fn set_attr_f64(&self, path: &str, name: &str, value: f64) -> Result<()> {
        self.with_object(path, |loc| {
            remove_attr(loc, name)?;
            loc.new_attr::<f64>().create(name)?.write_scalar(&value)
        })
    }

    /// Sets several `f64` attributes on the group or dataset at `path` at once (the object
    /// opened and its attribute names listed once), replacing earlier values.
    pub fn set_attrs_f64(&self, path: &str, values: &[(String, f64)]) -> Result<()> {
        self.with_object(path, |loc| {
            let existing = loc.attr_names()?;
            for (name, value) in values {
                if existing.iter().any(|n| n == name) {
                    loc.delete_attr(name)?;
                }
                loc.new_attr::<f64>()
                    .create(name.as_str())?
                    .write_scalar(value)?;
            }
            Ok(())
        })
    }

    /// Writes a complete 1-D dataset (contiguous, not growable).
    pub fn write_vector<T: H5Type>(
        &self,
        path: &str,
        values: &[T],
        units: &str,
        description: &str,
    ) -> Result<()> {
        let (group, name) = self.parent_of(path)?;
        let ds = group
            .new_dataset_builder()
            .with_data(values)
            .create(name)
            .map_err(hdf5_err(path))?;
        describe(&ds, path, units, description)
    }

    /// Writes a scalar variable-length UTF-8 string dataset, e.g. the resolved case as JSON.
    /// Its `units` attribute is empty.
    pub fn write_scalar_string(&self, path: &str, value: &str, description: &str) -> Result<()> {
        let v = unicode(path, value)?;
        let (group, name) = self.parent_of(path)?;
        let ds = group
            .new_dataset::<VarLenUnicode>()
            .shape(())
            .create(name)
            .and_then(|ds| ds.write_scalar(&v).map(|()| ds))
            .map_err(hdf5_err(path))?;
        describe(&ds, path, "", description)
    }

    /// Creates an empty 1-D `f64` dataset of unlimited length, stored in chunks of `chunk`
    /// values, that the returned handle appends to.
    pub fn growable_series(
        &mut self,
        path: &str,
        units: &str,
        description: &str,
        chunk: usize,
    ) -> Result<SeriesHandle> {
        self.growable_series_of::<f64>(path, units, description, chunk)
    }

    /// As [`growable_series`](Self::growable_series) for any HDF5 element type (e.g. `u64`
    /// for a cycle index).
    pub fn growable_series_of<T: H5Type + Copy + Send + 'static>(
        &mut self,
        path: &str,
        units: &str,
        description: &str,
        chunk: usize,
    ) -> Result<SeriesHandle<T>> {
        if chunk == 0 {
            return Err(invalid(path, "chunk length must be at least 1"));
        }
        let plan = self.plan(path, units, description)?;
        let inner = Arc::new(Mutex::new(Growable::new(plan, path, 1, false, chunk)));
        self.growing.push(inner.clone());
        Ok(SeriesHandle { inner })
    }

    /// Creates an empty `f64` dataset of shape (0, `ncols`), growable by rows (e.g. head
    /// snapshots: time × cell). Chunks hold whole rows, at most 64 KiB each (one row when a
    /// row is larger).
    pub fn growable_matrix(
        &mut self,
        path: &str,
        ncols: usize,
        units: &str,
        description: &str,
    ) -> Result<MatrixHandle> {
        if ncols == 0 {
            return Err(invalid(path, "a matrix needs at least one column"));
        }
        let rows = (MATRIX_CHUNK_BYTES / (8 * ncols)).max(1);
        let plan = self.plan(path, units, description)?;
        let inner = Arc::new(Mutex::new(Growable::new(plan, path, ncols, true, rows)));
        self.growing.push(inner.clone());
        Ok(MatrixHandle { inner })
    }

    /// Where and how a growable dataset will be created; its name is taken from now on.
    fn plan(&mut self, path: &str, units: &str, description: &str) -> Result<Box<Plan>> {
        let (group, name) = self.parent_of(path)?;
        // The strings are checked now, so a bad one is refused where the dataset is asked for.
        unicode(path, units)?;
        unicode(path, description)?;
        let plan = Plan {
            group,
            name: name.to_owned(),
            units: units.to_owned(),
            description: description.to_owned(),
            deflate: self.deflate,
        };
        self.reserved.insert(absolute(path));
        Ok(Box::new(plan))
    }

    /// Writes out every buffered row of the growable datasets and closes them (those never
    /// filled are created now, see the module documentation). Their handles refuse further
    /// appends; fixed datasets and attributes can still be written.
    pub fn close_growables(&mut self) -> Result<()> {
        for g in &self.growing {
            let mut g = lock(g);
            g.flush_last()?;
            g.close();
        }
        Ok(())
    }

    /// Writes out every buffered row, closes the file and renames it to its final path.
    /// Handles still held afterwards refuse further appends.
    pub fn finish(mut self) -> Result<PathBuf> {
        self.close_growables()?;
        let file = self
            .file
            .take()
            .expect("file is present until finish or drop");
        file.flush().map_err(hdf5_err("/"))?;
        file.close().map_err(hdf5_err("/"))?;
        self.target.commit()?;
        Ok(self.target.dest().to_path_buf())
    }

    fn file(&self) -> &File {
        self.file
            .as_ref()
            .expect("file is present until finish or drop")
    }

    fn group_of(&self, parts: &[&str], path: &str) -> Result<Group> {
        let mut g: Group = (**self.file()).clone();
        for part in parts {
            g = if g.link_exists(part) {
                g.group(part)
            } else {
                g.create_group(part)
            }
            .map_err(hdf5_err(path))?;
        }
        Ok(g)
    }

    /// The parent group of a new dataset at `path` (created if missing) and the dataset's
    /// name in it, which must be free.
    fn parent_of<'p>(&self, path: &'p str) -> Result<(Group, &'p str)> {
        let parts = components(path);
        let (name, parents) = parts
            .split_last()
            .ok_or_else(|| invalid(path, "empty name"))?;
        let group = self.group_of(parents, path)?;
        if group.link_exists(name) || self.reserved.contains(&absolute(path)) {
            return Err(invalid(path, "already exists"));
        }
        Ok((group, name))
    }

    fn with_object(&self, path: &str, f: impl FnOnce(&Location) -> hdf5::Result<()>) -> Result<()> {
        let file = self.file();
        let parts = components(path);
        if parts.is_empty() {
            return f(file).map_err(hdf5_err("/"));
        }
        let p = parts.join("/");
        match file.loc_type_by_name(&p).map_err(hdf5_err(path))? {
            LocationType::Group => {
                let g = file.group(&p).map_err(hdf5_err(path))?;
                f(&g)
            }
            LocationType::Dataset => {
                let d = file.dataset(&p).map_err(hdf5_err(path))?;
                f(&d)
            }
            #[allow(unreachable_patterns)] // more variants with newer HDF5 features
            _ => return Err(invalid(path, "not a group or dataset")),
        }
        .map_err(hdf5_err(path))
    }
}

impl Drop for H5Writer {
    fn drop(&mut self) {
        // Not finished: close before the TempTarget field deletes the temporary file.
        for g in &self.growing {
            lock(g).close();
        }
        if let Some(file) = self.file.take() {
            let _ = file.close();
        }
    }
}

impl<T: H5Type + Copy> SeriesHandle<T> {
    /// Appends values; full chunks are written to the file as they fill.
    pub fn append(&mut self, values: &[T]) -> Result<()> {
        lock(&self.inner).push(values)
    }

    /// Appends one value (as [`append`](Self::append), without the slice's loop: the
    /// per-step path of a run).
    pub fn push(&mut self, value: T) -> Result<()> {
        lock(&self.inner).push_one(value)
    }

    /// Number of values appended so far (written or buffered).
    pub fn len(&self) -> usize {
        lock(&self.inner).len_rows()
    }

    /// True when nothing was appended yet.
    pub fn is_empty(&self) -> bool {
        self.len() == 0
    }

    /// Writes the buffered values now (the file stays open).
    pub fn flush(&mut self) -> Result<()> {
        lock(&self.inner).flush()
    }
}

impl MatrixHandle {
    /// Appends one row of exactly `ncols` values.
    pub fn append_row(&mut self, row: &[f64]) -> Result<()> {
        let mut g = lock(&self.inner);
        if row.len() != g.ncols {
            return Err(OutputError::RowLength {
                object: g.object.clone(),
                expected: g.ncols,
                got: row.len(),
            });
        }
        g.push(row)
    }

    /// Number of rows appended so far (written or buffered).
    pub fn rows(&self) -> usize {
        lock(&self.inner).len_rows()
    }

    /// Writes the buffered rows now (the file stays open).
    pub fn flush(&mut self) -> Result<()> {
        lock(&self.inner).flush()
    }
}

/// What the writer needs from every growable dataset at finish or drop.
trait Pending: Send {
    /// Writes what is buffered, creating the dataset first if it is not in the file yet
    /// (whole, contiguous and uncompressed when it never filled one chunk).
    fn flush_last(&mut self) -> Result<()>;
    fn close(&mut self);
}

/// Where and how a growable dataset is created when its first chunk is written.
struct Plan {
    group: Group,
    name: String,
    units: String,
    description: String,
    deflate: Option<u8>,
}

/// A growable dataset's place in the file.
enum Slot {
    /// Not created yet.
    Planned(Box<Plan>),
    Open(Dataset),
    /// Finished or dropped: appends are refused.
    Closed,
}

/// Buffer of one chunk in front of a growable dataset.
struct Growable<T> {
    slot: Slot,
    object: String,
    ncols: usize,
    matrix: bool,
    /// Rows of a chunk.
    chunk_rows: usize,
    /// Preallocated to one chunk (`chunk_rows × ncols`); never grows.
    buf: Vec<T>,
    /// Rows already in the dataset.
    rows: usize,
    /// Whether the dataset was created with the shuffle and deflate filters.
    filtered: bool,
}

/// The filter mask of a chunk stored without the shuffle and deflate filters (bits 0 and
/// 1: the first two filters of the pipeline skipped).
const BOTH_FILTERS_SKIPPED: u32 = 0b11;

/// Largest chunk, in bytes, whose last, partly filled chunk is stored without its filters
/// ([`Growable::write_last_unfiltered`]): the per-cycle datasets' chunks of 256 values
/// (2 KiB) and the event kinds' of 4096 bytes. Larger chunks (a series' 64 KiB) are compressed as the others: their bytes would
/// weigh in the file, where a small chunk's compression is mostly the fixed cost of setting
/// up the deflate stream. Assumption: 4 KiB separates the two kinds.
pub(crate) const UNFILTERED_LAST_CHUNK_BYTES: usize = 4 * 1024;

impl<T: H5Type + Copy> Growable<T> {
    fn new(plan: Box<Plan>, path: &str, ncols: usize, matrix: bool, chunk_rows: usize) -> Self {
        Self {
            slot: Slot::Planned(plan),
            object: absolute(path),
            ncols,
            matrix,
            chunk_rows,
            buf: Vec::with_capacity(chunk_rows * ncols),
            rows: 0,
            filtered: false,
        }
    }

    fn push(&mut self, mut values: &[T]) -> Result<()> {
        if matches!(self.slot, Slot::Closed) {
            return Err(OutputError::Finished {
                object: self.object.clone(),
            });
        }
        let cap = self.chunk_rows * self.ncols;
        while !values.is_empty() {
            let take = (cap - self.buf.len()).min(values.len());
            let (head, rest) = values.split_at(take);
            self.buf.extend_from_slice(head);
            values = rest;
            if self.buf.len() == cap {
                self.flush()?;
            }
        }
        Ok(())
    }

    /// Appends one value of a series (`ncols` is 1).
    fn push_one(&mut self, value: T) -> Result<()> {
        if matches!(self.slot, Slot::Closed) {
            return Err(OutputError::Finished {
                object: self.object.clone(),
            });
        }
        self.buf.push(value);
        if self.buf.len() == self.chunk_rows {
            self.flush()?;
        }
        Ok(())
    }

    fn len_rows(&self) -> usize {
        self.rows + self.buf.len() / self.ncols
    }

    /// Creates the planned dataset with chunks of `chunk_rows` rows.
    fn create(&mut self) -> Result<()> {
        let chunk_rows = self.chunk_rows;
        let Slot::Planned(plan) = &self.slot else {
            return Ok(());
        };
        let builder = plan.group.new_dataset::<T>();
        let mut builder = if self.matrix {
            builder
                .chunk((chunk_rows, self.ncols))
                .shape((0.., self.ncols))
        } else {
            builder.chunk(chunk_rows).shape(0..)
        };
        let filtered = plan.deflate.is_some();
        if let Some(level) = plan.deflate {
            builder = builder.shuffle().deflate(level);
        }
        // No chunk cache: the buffer in front of the dataset hands it whole chunks, so
        // each is filtered and written when appended (on the output thread, during the
        // run) rather than all at once when the dataset closes.
        builder = builder.chunk_cache(CHUNK_CACHE_SLOTS, 0, 1.0);
        let ds = builder
            .create(plan.name.as_str())
            .map_err(hdf5_err(&self.object))?;
        describe(&ds, &self.object, &plan.units, &plan.description)?;
        self.slot = Slot::Open(ds);
        self.filtered = filtered;
        Ok(())
    }

    /// Writes the buffer, fewer rows than a chunk, as the dataset's last chunk stored
    /// without its filters (HDF5's direct chunk write, the chunk's filter mask saying both
    /// were skipped; readers undo only the filters a chunk went through). The rows past the
    /// dataset's extent repeat its first buffered value and are never read. Only for chunks
    /// of at most [`UNFILTERED_LAST_CHUNK_BYTES`], whose compression at the finish would
    /// cost more time than their bytes are worth (docs/formats.md).
    fn write_last_unfiltered(&mut self) -> Result<()> {
        let Slot::Open(ds) = &self.slot else {
            return Err(OutputError::Finished {
                object: self.object.clone(),
            });
        };
        let (start, end) = (self.rows, self.len_rows());
        assert!(start % self.chunk_rows == 0 && end - start < self.chunk_rows);
        let resized = if self.matrix {
            ds.resize((end, self.ncols))
        } else {
            ds.resize(end)
        };
        resized.map_err(hdf5_err(&self.object))?;
        let first = self.buf[0];
        self.buf.resize(self.chunk_rows * self.ncols, first);
        let offset: [hdf5_sys::h5::hsize_t; 2] = [start as u64, 0];
        let bytes = std::mem::size_of_val(&self.buf[..]);
        let id = ds.id();
        let (data, at) = (self.buf.as_ptr().cast(), offset.as_ptr());
        // SAFETY: `id` is the open dataset's; `at` points to one offset per dimension of
        // its rank (1 or 2), chunk-aligned; `data` points to `bytes` bytes, one whole chunk
        // of the dataset's element type in its in-memory layout, which is the file's (the
        // dataset was created with the native type of `T`). The library's lock is held.
        let status = hdf5::sync::sync(|| unsafe {
            hdf5_sys::h5d::H5Dwrite_chunk(
                id,
                hdf5_sys::h5p::H5P_DEFAULT,
                BOTH_FILTERS_SKIPPED,
                at,
                bytes,
                data,
            )
        });
        self.buf.clear();
        if status < 0 {
            return Err(invalid(
                &self.object,
                "the library refused to write the last chunk",
            ));
        }
        self.rows = end;
        Ok(())
    }

    /// Creates the planned dataset holding the buffer's rows whole: contiguous,
    /// uncompressed (see the module documentation).
    fn write_whole(&mut self) -> Result<()> {
        let Slot::Planned(plan) = &self.slot else {
            return Ok(());
        };
        let rows = self.len_rows();
        let builder = plan.group.new_dataset_builder();
        let ds = if self.matrix {
            let block = ArrayView2::from_shape((rows, self.ncols), &self.buf)
                .expect("buffer holds whole rows");
            builder.with_data(block).create(plan.name.as_str())
        } else {
            builder.with_data(&self.buf[..]).create(plan.name.as_str())
        }
        .map_err(hdf5_err(&self.object))?;
        describe(&ds, &self.object, &plan.units, &plan.description)?;
        self.rows = rows;
        self.buf.clear();
        self.slot = Slot::Open(ds);
        Ok(())
    }

    fn flush(&mut self) -> Result<()> {
        if self.buf.is_empty() {
            return Ok(());
        }
        if matches!(self.slot, Slot::Planned(_)) {
            self.create()?;
        }
        let Slot::Open(ds) = &self.slot else {
            return Err(OutputError::Finished {
                object: self.object.clone(),
            });
        };
        let (start, end) = (self.rows, self.len_rows());
        let result = if self.matrix {
            let block = ArrayView2::from_shape((end - start, self.ncols), &self.buf)
                .expect("buffer holds whole rows");
            ds.resize((end, self.ncols))
                .and_then(|()| ds.write_slice(block, s![start..end, ..]))
        } else {
            ds.resize(end)
                .and_then(|()| ds.write_slice(&self.buf[..], start..end))
        };
        result.map_err(hdf5_err(&self.object))?;
        self.rows = end;
        self.buf.clear();
        Ok(())
    }
}

impl<T: H5Type + Copy + Send> Pending for Growable<T> {
    fn flush_last(&mut self) -> Result<()> {
        if matches!(self.slot, Slot::Planned(_)) {
            // Never flushed: everything is in the buffer, fewer rows than a chunk.
            return if self.buf.is_empty() {
                self.create()
            } else {
                self.write_whole()
            };
        }
        // A chunk of which rows were written before (`H5Writer::flush`) goes through the
        // filters again with the rows added.
        let chunk_bytes = self.chunk_rows * self.ncols * std::mem::size_of::<T>();
        if self.filtered
            && chunk_bytes <= UNFILTERED_LAST_CHUNK_BYTES
            && !self.buf.is_empty()
            && self.rows % self.chunk_rows == 0
        {
            return self.write_last_unfiltered();
        }
        Growable::flush(self)
    }

    fn close(&mut self) {
        self.slot = Slot::Closed;
    }
}

fn lock<G: ?Sized>(m: &Mutex<G>) -> MutexGuard<'_, G> {
    // A panic while appending leaves at worst a partly filled buffer; the file is then
    // either finished with what was written or dropped and deleted.
    m.lock().unwrap_or_else(|e| e.into_inner())
}

/// Sets the `units` and `description` attributes every dataset carries.
fn describe(ds: &Dataset, path: &str, units: &str, description: &str) -> Result<()> {
    for (name, value) in [("units", units), ("description", description)] {
        let v = unicode(path, value)?;
        ds.new_attr::<VarLenUnicode>()
            .create(name)
            .and_then(|a| a.write_scalar(&v))
            .map_err(hdf5_err(path))?;
    }
    Ok(())
}

fn remove_attr(loc: &Location, name: &str) -> hdf5::Result<()> {
    if loc.attr_names()?.iter().any(|n| n == name) {
        loc.delete_attr(name)?;
    }
    Ok(())
}

fn unicode(path: &str, value: &str) -> Result<VarLenUnicode> {
    VarLenUnicode::from_str(value)
        .map_err(|e| invalid(path, &format!("string cannot be stored in HDF5: {e}")))
}

fn components(path: &str) -> Vec<&str> {
    path.split('/').filter(|p| !p.is_empty()).collect()
}

fn absolute(path: &str) -> String {
    format!("/{}", components(path).join("/"))
}

fn hdf5_err(path: &str) -> impl Fn(hdf5::Error) -> OutputError + '_ {
    move |source| OutputError::Hdf5 {
        object: absolute(path),
        source,
    }
}

fn invalid(path: &str, message: &str) -> OutputError {
    OutputError::Invalid {
        object: absolute(path),
        message: message.to_owned(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn str_attr(loc: &Location, name: &str) -> String {
        loc.attr(name)
            .unwrap()
            .read_scalar::<VarLenUnicode>()
            .unwrap()
            .as_str()
            .to_owned()
    }

    fn dir_names(dir: &Path) -> Vec<String> {
        let mut v: Vec<String> = std::fs::read_dir(dir)
            .unwrap()
            .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
            .collect();
        v.sort();
        v
    }

    /// The build script linked HDF5's archive (`cli/build.rs`): the library then runs
    /// from this binary, and no shared `libhdf5` is mapped once it has started. Fails if a
    /// change of the linker's search order brought the shared library back.
    #[cfg(all(hdf5_static, target_os = "linux"))]
    #[test]
    fn hdf5_runs_from_the_binary_when_its_archive_is_linked() {
        let (major, minor, _) = hdf5::library_version();
        assert!(major >= 1 && minor >= 8);
        let maps = std::fs::read_to_string("/proc/self/maps").unwrap();
        let shared: Vec<&str> = maps.lines().filter(|l| l.contains("libhdf5")).collect();
        assert!(shared.is_empty(), "shared HDF5 mapped: {shared:?}");
    }

    #[test]
    fn write_and_read_back_works() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("run.h5");
        let mut w = H5Writer::create(&path).unwrap();
        w.set_root_attr_str("tool_version", "0.1.0").unwrap();
        w.set_root_attr_str("tool_version", "0.1.1").unwrap(); // replaced, not an error
        w.set_attr_f64("/", "duration_s", 600.0).unwrap();
        w.set_attrs_f64("/", &[("a".into(), 1.0), ("duration_s".into(), 700.0)])
            .unwrap(); // replaced, not an error
        w.group("summary").unwrap();
        w.set_attr_str("/summary", "warning", "débit élevé")
            .unwrap();
        w.write_vector("/grid/r_face", &[0.1, 0.15, 0.2], "m", "face radii")
            .unwrap();
        w.write_vector("grid/zone", &[0u8, 1, 1], "1", "zone index")
            .unwrap();
        w.write_vector::<f64>("summary/warnings_at", &[], "s", "none yet")
            .unwrap();
        w.set_attr_f64("grid/r_face", "scale", 2.0).unwrap();
        w.write_scalar_string("case_json", r#"{"title":"t"}"#, "resolved case")
            .unwrap();

        let mut t = w
            .growable_series("series/time", "s", "simulated time", 4)
            .unwrap();
        let mut cycle = w
            .growable_series_of::<u64>("cycles/index", "1", "cycle", 3)
            .unwrap();
        let mut snap = w
            .growable_matrix("snapshots/head", 3, "m", "head by cell")
            .unwrap();
        let times: Vec<f64> = (0..11).map(|i| f64::from(i) * 0.5).collect();
        t.append(&times[..3]).unwrap();
        t.append(&times[3..]).unwrap(); // spans two chunk boundaries
        cycle.append(&[1, 2, 3, 4]).unwrap();
        for i in 0..5 {
            let x = f64::from(i);
            snap.append_row(&[x, x + 0.25, x + 0.5]).unwrap();
        }
        assert_eq!((t.len(), cycle.len(), snap.rows()), (11, 4, 5));
        drop(cycle); // a dropped handle is still flushed by finish
        assert_eq!(w.finish().unwrap(), path);
        assert_eq!(dir_names(dir.path()), ["run.h5"]);

        let f = File::open(&path).unwrap();
        assert_eq!(str_attr(&f, "tool_version"), "0.1.1");
        assert_eq!(
            f.attr("duration_s").unwrap().read_scalar::<f64>().unwrap(),
            700.0
        );
        assert_eq!(f.attr("a").unwrap().read_scalar::<f64>().unwrap(), 1.0);
        assert_eq!(
            str_attr(&f.group("summary").unwrap(), "warning"),
            "débit élevé"
        );

        let r = f.dataset("grid/r_face").unwrap();
        assert_eq!(r.read_raw::<f64>().unwrap(), [0.1, 0.15, 0.2]);
        assert_eq!(str_attr(&r, "units"), "m");
        assert_eq!(str_attr(&r, "description"), "face radii");
        assert_eq!(r.attr("scale").unwrap().read_scalar::<f64>().unwrap(), 2.0);
        assert_eq!(
            f.dataset("grid/zone").unwrap().read_raw::<u8>().unwrap(),
            [0, 1, 1]
        );
        assert_eq!(f.dataset("summary/warnings_at").unwrap().shape(), [0]);

        let j = f.dataset("case_json").unwrap();
        assert_eq!(j.shape(), Vec::<usize>::new());
        assert_eq!(
            j.read_scalar::<VarLenUnicode>().unwrap().as_str(),
            r#"{"title":"t"}"#
        );
        assert_eq!(str_attr(&j, "units"), "");

        let ts = f.dataset("series/time").unwrap();
        assert_eq!(ts.shape(), [11]);
        assert_eq!(ts.chunk(), Some(vec![4]));
        assert!(ts.is_resizable());
        assert_eq!(ts.read_raw::<f64>().unwrap(), times);
        assert_eq!(str_attr(&ts, "units"), "s");
        assert_eq!(str_attr(&ts, "description"), "simulated time");

        let c = f.dataset("cycles/index").unwrap();
        assert_eq!(c.read_raw::<u64>().unwrap(), [1, 2, 3, 4]);

        let h = f.dataset("snapshots/head").unwrap();
        assert_eq!(h.shape(), [5, 3]);
        let m = h.read_2d::<f64>().unwrap();
        assert_eq!(m[[4, 2]], 4.5);
        assert_eq!(m[[2, 1]], 2.25);
        assert_eq!(str_attr(&h, "units"), "m");
    }

    #[test]
    fn deflate_is_applied_and_reads_back() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("z.h5");
        let mut w = H5Writer::create(&path).unwrap();
        w.set_deflate(Some(4));
        let mut s = w.growable_series("s", "m", "ramp", 256).unwrap();
        let values: Vec<f64> = (0..1000).map(f64::from).collect();
        s.append(&values).unwrap();
        w.finish().unwrap();
        let ds = File::open(&path).unwrap().dataset("s").unwrap();
        assert_eq!(ds.read_raw::<f64>().unwrap(), values);
        if hdf5::filters::deflate_available() {
            assert!(
                ds.filters().contains(&hdf5::filters::Filter::Deflate(4)),
                "{:?}",
                ds.filters()
            );
        }
    }

    /// The last, partly filled chunk of a dataset with small chunks is stored without its
    /// filters (its filter mask says both were skipped) and reads back as written; the full
    /// chunks before it, a large-chunk dataset's last chunk and a chunk that was partly
    /// written before (`flush`) go through the filters.
    #[test]
    fn small_last_chunks_are_stored_unfiltered() {
        if !hdf5::filters::deflate_available() {
            return;
        }
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("u.h5");
        let mut w = H5Writer::create(&path).unwrap();
        w.set_deflate(Some(1));
        let mut small = w.growable_series("small", "m", "", 256).unwrap();
        let mut index = w.growable_series_of::<u64>("index", "1", "", 256).unwrap();
        let mut large = w.growable_series("large", "m", "", 8192).unwrap();
        let mut flushed = w.growable_series("flushed", "m", "", 256).unwrap();
        // One byte a value: a chunk of 4096 is 4 KiB, the largest stored unfiltered.
        let mut kinds = w.growable_series_of::<u8>("kinds", "1", "", 4096).unwrap();
        let bytes: Vec<u8> = (0..5000u32).map(|i| (i % 7) as u8).collect();
        kinds.append(&bytes).unwrap();
        let values: Vec<f64> = (0..1000).map(|i| (f64::from(i) * 0.37).sin()).collect();
        let counts: Vec<u64> = (0..1000).collect();
        small.append(&values).unwrap();
        index.append(&counts).unwrap();
        let long: Vec<f64> = (0..10_000).map(|i| f64::from(i) * 1e-3).collect();
        large.append(&long).unwrap();
        flushed.append(&values[..900]).unwrap();
        flushed.flush().unwrap();
        flushed.append(&values[900..]).unwrap();
        w.finish().unwrap();
        let f = File::open(&path).unwrap();
        let masks = |name: &str| {
            let ds = f.dataset(name).unwrap();
            (0..ds.num_chunks().unwrap())
                .map(|i| ds.chunk_info(i).unwrap().filter_mask)
                .collect::<Vec<_>>()
        };
        assert_eq!(masks("small"), [0, 0, 0, BOTH_FILTERS_SKIPPED]);
        assert_eq!(masks("index"), [0, 0, 0, BOTH_FILTERS_SKIPPED]);
        assert_eq!(masks("large"), [0, 0]);
        assert_eq!(masks("flushed"), [0, 0, 0, 0]);
        assert_eq!(masks("kinds"), [0, BOTH_FILTERS_SKIPPED]);
        assert_eq!(f.dataset("kinds").unwrap().read_raw::<u8>().unwrap(), bytes);
        let read = |name: &str| f.dataset(name).unwrap().read_raw::<f64>().unwrap();
        let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
        assert_eq!(bits(&read("small")), bits(&values));
        assert_eq!(bits(&read("flushed")), bits(&values));
        assert_eq!(read("large"), long);
        let ds = f.dataset("index").unwrap();
        assert_eq!(ds.shape(), [1000]);
        assert_eq!(ds.read_raw::<u64>().unwrap(), counts);
    }

    /// A series or matrix that never filled its chunk is written whole at the finish,
    /// contiguous and uncompressed; one that filled a chunk keeps it and its compression;
    /// an empty one has its asked chunk and no rows. Values and attributes are as asked
    /// either way, and a planned name is taken.
    #[test]
    fn short_series_are_written_whole_and_uncompressed() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("c.h5");
        let mut w = H5Writer::create(&path).unwrap();
        w.set_deflate(Some(4));
        let mut short = w.growable_series("g/short", "m", "short", 1024).unwrap();
        let mut long = w.growable_series("g/long", "m", "long", 16).unwrap();
        let _empty = w.growable_series("g/empty", "s", "empty", 64).unwrap();
        let mut m = w.growable_matrix("g/m", 3, "m", "rows").unwrap();
        assert_eq!(
            w.growable_series("g/short", "m", "", 8)
                .err()
                .unwrap()
                .to_string(),
            "/g/short: already exists"
        );
        assert!(w.write_vector("g/long", &[1.0], "m", "").is_err());
        let values: Vec<f64> = (0..40).map(|i| f64::from(i) * 0.25).collect();
        short.append(&values).unwrap();
        long.append(&values).unwrap();
        m.append_row(&[1.0, 2.0, 3.0]).unwrap();
        m.append_row(&[4.0, 5.0, 6.0]).unwrap();
        w.finish().unwrap();
        let f = File::open(&path).unwrap();
        let chunk = |name: &str| f.dataset(name).unwrap().chunk();
        assert_eq!(chunk("g/short"), None);
        assert_eq!(chunk("g/long"), Some(vec![16]));
        assert_eq!(chunk("g/empty"), Some(vec![64]));
        assert_eq!(chunk("g/m"), None);
        for name in ["g/short", "g/long"] {
            let ds = f.dataset(name).unwrap();
            assert_eq!(ds.read_raw::<f64>().unwrap(), values);
            assert_eq!(str_attr(&ds, "units"), "m");
        }
        let long = f.dataset("g/long").unwrap();
        assert!(long.is_resizable());
        if hdf5::filters::deflate_available() {
            assert!(long.filters().contains(&hdf5::filters::Filter::Deflate(4)));
        }
        for name in ["g/short", "g/m"] {
            assert!(f.dataset(name).unwrap().filters().is_empty(), "{name}");
        }
        assert_eq!(str_attr(&f.dataset("g/m").unwrap(), "units"), "m");
        let e = f.dataset("g/empty").unwrap();
        assert_eq!(e.shape(), [0]);
        assert_eq!(str_attr(&e, "description"), "empty");
        assert_eq!(
            f.dataset("g/m").unwrap().read_raw::<f64>().unwrap(),
            [1.0, 2.0, 3.0, 4.0, 5.0, 6.0]
        );
    }

    /// One value at a time across chunk boundaries gives the series `append` gives; a
    /// finished writer's handle refuses a value too.
    #[test]
    fn push_writes_what_append_writes() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("p.h5");
        let mut w = H5Writer::create(&path).unwrap();
        let mut a = w.growable_series("a", "m", "", 7).unwrap();
        let mut b = w.growable_series("b", "m", "", 7).unwrap();
        let values: Vec<f64> = (0..30).map(|i| f64::from(i).sqrt()).collect();
        a.append(&values).unwrap();
        for &x in &values {
            b.push(x).unwrap();
        }
        assert_eq!(b.len(), 30);
        w.finish().unwrap();
        assert!(matches!(b.push(1.0), Err(OutputError::Finished { .. })));
        let f = File::open(&path).unwrap();
        let read = |n: &str| f.dataset(n).unwrap().read_raw::<f64>().unwrap();
        assert_eq!(read("a"), values);
        assert_eq!(read("b"), values);
    }

    #[test]
    fn buffer_stays_one_chunk_long() {
        let dir = tempfile::tempdir().unwrap();
        let mut w = H5Writer::create(dir.path().join("b.h5")).unwrap();
        let mut s = w.growable_series("s", "m", "", 64).unwrap();
        let block = [1.0; 1000];
        for _ in 0..50 {
            s.append(&block).unwrap();
        }
        let g = lock(&s.inner);
        assert_eq!(g.buf.capacity(), 64);
        assert_eq!(g.rows, 50_000 / 64 * 64);
        drop(g);
        w.finish().unwrap();
    }

    #[test]
    fn drop_without_finish_leaves_nothing() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("run.h5");
        let mut w = H5Writer::create(&path).unwrap();
        let mut s = w.growable_series("series/time", "s", "t", 8).unwrap();
        s.append(&[1.0; 20]).unwrap();
        assert_eq!(
            dir_names(dir.path()).len(),
            1,
            "temporary file exists while writing"
        );
        drop(w);
        assert!(dir_names(dir.path()).is_empty());
        // The handle outlives the writer and refuses to append.
        assert!(matches!(
            s.append(&[1.0; 20]),
            Err(OutputError::Finished { .. })
        ));
    }

    #[test]
    fn finish_replaces_existing_file() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("run.h5");
        std::fs::write(&path, "old").unwrap();
        let w = H5Writer::create(&path).unwrap();
        w.write_vector("x", &[1.0], "m", "x").unwrap();
        w.finish().unwrap();
        assert_eq!(
            File::open(&path)
                .unwrap()
                .dataset("x")
                .unwrap()
                .read_raw::<f64>()
                .unwrap(),
            [1.0]
        );
    }

    #[test]
    fn writer_captures_errors() {
        let dir = tempfile::tempdir().unwrap();
        assert!(matches!(
            H5Writer::create(dir.path().join("missing/run.h5")),
            Err(OutputError::Hdf5File { .. })
        ));
        let mut w = H5Writer::create(dir.path().join("e.h5")).unwrap();
        let mut m = w.growable_matrix("m", 3, "m", "").unwrap();
        assert_eq!(
            m.append_row(&[1.0, 2.0]).unwrap_err().to_string(),
            "/m: a row needs 3 values, got 2"
        );
        assert_eq!(
            w.growable_series("s", "", "", 0).err().unwrap().to_string(),
            "/s: chunk length must be at least 1"
        );
        assert!(matches!(
            w.growable_matrix("m0", 0, "", ""),
            Err(OutputError::Invalid { .. })
        ));
        assert!(matches!(
            w.write_vector("/", &[1.0], "", ""),
            Err(OutputError::Invalid { .. })
        ));
        assert!(matches!(
            w.set_attr_str("/", "a", "nul\0byte"),
            Err(OutputError::Invalid { .. })
        ));
        w.write_vector("v", &[1.0], "m", "").unwrap();
        let e = w.write_vector("v", &[1.0], "m", "").unwrap_err();
        assert_eq!(e.to_string(), "/v: already exists");
        let e = w.growable_series("v", "m", "", 8).err().unwrap();
        assert_eq!(e.to_string(), "/v: already exists");
        // An attribute on a missing object is an HDF5 error naming the path.
        let e = w.set_attr_f64("nowhere", "a", 1.0).unwrap_err();
        assert!(e.to_string().starts_with("HDF5 object /nowhere: "), "{e}");
    }
}
