//! Reads one run file (the HDF5 layout written by `boreflux run`) into plain structs.
//!
//! The report knows runs only through these files. A dataset the report draws from must
//! exist with the documented shape and unit, or reading fails with a message naming the
//! object (`missing dataset /series/face_flux`); `/summary` values may be absent one by one
//! (the report then shows a dash). Series are read whole: one run of 10⁶ steps is about
//! 8 MB per series.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use crate::output::schema::{
    Cycle, EnvelopeStat, EventSeries, Figure, GridData, Group, JumpSeries, ProgressSeries,
    RootAttr, SnapshotData, Step, SummaryText, CYCLE_INDEX, ENVELOPES,
};
use crate::read_error::{FileKind, ReadError};
use boreflux_solver::grid::Zone;
use boreflux_solver::EventKind;
use hdf5::types::{TypeDescriptor, VarLenAscii, VarLenUnicode};
use hdf5::{Attribute, File, Location};

/// Zone code of filter-pack cells in `/grid/zone`.
pub const ZONE_CODE_PACK: i64 = 1;

/// One run file, read.
#[derive(Debug, Clone, PartialEq)]
pub struct Run {
    /// The file as given on the command line.
    pub path: PathBuf,
    /// Root attributes.
    pub meta: Meta,
    /// The radial grid.
    pub grid: Grid,
    /// Per-step series.
    pub series: Series,
    /// Per-cycle values (empty for drives that are not periodic).
    pub cycles: Cycles,
    /// Head profiles.
    pub snapshots: Snapshots,
    /// Development progress (`/progress`; empty when the file has none).
    pub progress: Progress,
    /// Per-cycle envelopes, when the file keeps them (then `series` holds only the detail
    /// windows).
    pub envelopes: Option<Envelopes>,
    /// The `/summary` group.
    pub summary: Summary,
}

/// Root string attributes; `None` when absent.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Meta {
    /// `tool_version`.
    pub tool_version: Option<String>,
    /// `created_utc` (RFC 3339).
    pub created_utc: Option<String>,
    /// `title`.
    pub title: Option<String>,
    /// `description`.
    pub description: Option<String>,
    /// `case_json`: the resolved case in SI.
    pub case_json: Option<String>,
    /// `case_file`: the case path as given to `run`.
    pub case_file: Option<String>,
}

/// `/grid`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Grid {
    /// Node radii, m.
    pub r_center: Vec<f64>,
    /// Face radii, m (one more than nodes).
    pub r_face: Vec<f64>,
    /// Zone code per cell.
    pub zone: Vec<i64>,
}

/// `/series`, all of the length of `time`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Series {
    /// Time, s.
    pub time: Vec<f64>,
    /// In-well head, m.
    pub well_head: Vec<f64>,
    /// Flow through the screen, m³/s, outward positive.
    pub screen_flow: Vec<f64>,
    /// Darcy flux at the borehole wall, m/s, outward positive.
    pub face_flux: Vec<f64>,
    /// Shear proxy on the pack side of the wall, Pa.
    pub shear_proxy: Vec<f64>,
    /// Cake thickness, m.
    pub cake_thickness: Vec<f64>,
    /// Skin, –.
    pub skin: Vec<f64>,
    /// Cumulative work per zone present in the file, J, inner to outer.
    pub work: Vec<(Zone, Vec<f64>)>,
    /// Jumps over whole cycles (`/jumps`, numerics.multiscale): (from, to) times, s. At
    /// each a row of NaN is put into every series (time: the middle of the jump), so the
    /// charts break their lines there rather than draw across what was not computed.
    pub gaps: Vec<(f64, f64)>,
    /// The first event of each kind (`/events`): time, s, and kind, in kind order; empty
    /// for a file without events.
    pub first_events: Vec<(f64, EventKind)>,
}

/// `/envelopes` (files that keep per-cycle envelopes, `output.store`): each a [`Series`]
/// whose time is the middle of each complete cycle.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Envelopes {
    /// Lowest value of each cycle.
    pub min: Series,
    /// Highest value of each cycle.
    pub max: Series,
    /// Root mean square over each cycle.
    pub rms: Series,
}

/// `/cycles`, all of the length of `index`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Cycles {
    /// Cycle number.
    pub index: Vec<f64>,
    /// Start, s.
    pub start_time: Vec<f64>,
    /// End, s.
    pub end_time: Vec<f64>,
    /// Peak outward face flux, m/s.
    pub peak_outward_flux: Vec<f64>,
    /// Peak inward face flux (magnitude), m/s.
    pub peak_inward_flux: Vec<f64>,
    /// RMS face flux, m/s.
    pub rms_face_flux: Vec<f64>,
    /// Peak shear proxy, Pa.
    pub peak_shear: Vec<f64>,
    /// Work dissipated in the cake during the cycle, J.
    pub work_cake: Vec<f64>,
    /// Cake thickness removed during the cycle, m.
    pub cake_removed: Vec<f64>,
}

/// `/progress`: specific capacity and efficiency during the run (docs/physics.md §25.3).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Progress {
    /// Times, s.
    pub time: Vec<f64>,
    /// Specific capacity, m²/s.
    pub specific_capacity: Vec<f64>,
    /// Efficiency, –.
    pub efficiency: Vec<f64>,
}

/// `/snapshots`.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Snapshots {
    /// Times, s.
    pub time: Vec<f64>,
    /// Cell heads, one row per time, m.
    pub head: Vec<Vec<f64>>,
}

/// `/summary` attributes.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Summary {
    /// Numeric attributes by name (the schema's [`Figure`] names, and any others the file
    /// holds).
    pub values: BTreeMap<String, f64>,
    /// `warnings`, one per line, blank lines dropped.
    pub warnings: Vec<String>,
    /// `cautions`.
    pub cautions: Option<String>,
    /// `efficiency_definition`.
    pub efficiency_definition: Option<String>,
    /// `assumptions`: the damage-removal constants and their provenance, one per line.
    pub assumptions: Vec<String>,
    /// `notes`: the case's defaults and approximations, one per line.
    pub notes: Vec<String>,
}

impl Summary {
    /// A headline figure, when the file has it.
    pub fn get(&self, figure: Figure) -> Option<f64> {
        self.values.get(&figure.name()).copied()
    }

    /// A numeric attribute by name (for attributes the schema does not know).
    pub fn get_named(&self, name: &str) -> Option<f64> {
        self.values.get(name).copied()
    }
}

impl Run {
    /// Borehole wall radius r_b, m: the outer face of the last filter-pack cell.
    pub fn borehole_radius(&self) -> Option<f64> {
        let last_pack = self.grid.zone.iter().rposition(|&z| z == ZONE_CODE_PACK)?;
        self.grid.r_face.get(last_pack + 1).copied()
    }

    /// Screen radius r_s, m: the innermost face.
    pub fn screen_radius(&self) -> Option<f64> {
        self.grid.r_face.first().copied()
    }
}

/// Reads the run file at `path`. The error text does not repeat the path.
pub fn read_run(path: &Path) -> Result<Run, ReadError> {
    if !path.exists() {
        return Err(ReadError::Missing);
    }
    let file = File::open(path).map_err(|source| ReadError::NotHdf5 {
        kind: FileKind::Run,
        source,
    })?;
    let time = format!("{}/{}", Group::Series.name(), Step::Time.entry().name);
    if !file.link_exists(Group::Series.name()) || !file.link_exists(&time) {
        return Err(ReadError::NotOurs {
            kind: FileKind::Run,
            lacks: format!("no /{time}"),
        });
    }
    let series = read_series(&file)?;
    Ok(Run {
        path: path.to_path_buf(),
        meta: read_meta(&file)?,
        grid: read_grid(&file)?,
        cycles: read_cycles(&file)?,
        snapshots: read_snapshots(&file)?,
        progress: read_progress(&file)?,
        envelopes: read_envelopes(&file)?,
        summary: read_summary(&file)?,
        series,
    })
}

fn read_meta(file: &File) -> Result<Meta, ReadError> {
    let s = |name: &str| string_attr(file, "/", name);
    let case_json_name = RootAttr::CaseJson.name();
    let mut case_json = s(case_json_name)?;
    if case_json.is_none() && file.link_exists(case_json_name) {
        // Older writers kept the case as a scalar string dataset.
        let object = format!("/{case_json_name}");
        let ds = file
            .dataset(case_json_name)
            .map_err(ReadError::hdf5(object.clone()))?;
        case_json = Some(
            ds.read_scalar::<VarLenUnicode>()
                .map_err(ReadError::hdf5(object))?
                .as_str()
                .to_owned(),
        );
    }
    Ok(Meta {
        tool_version: s(RootAttr::ToolVersion.name())?,
        created_utc: s(RootAttr::CreatedUtc.name())?,
        title: s(RootAttr::Title.name())?,
        description: s(RootAttr::Description.name())?,
        case_json,
        case_file: s(RootAttr::CaseFile.name())?,
    })
}

fn read_grid(file: &File) -> Result<Grid, ReadError> {
    let grid = |d: GridData| -> Result<Vec<f64>, ReadError> {
        // The zone index is read whatever its units attribute says.
        let unit = match d {
            GridData::Zone => "",
            GridData::RCenter | GridData::RFace => d.entry().unit.symbol(),
        };
        vector(file, d.path().trim_start_matches('/'), unit)
    };
    let r_center = grid(GridData::RCenter)?;
    let r_face = grid(GridData::RFace)?;
    let zone: Vec<i64> = grid(GridData::Zone)?
        .iter()
        .map(|&z| z.round() as i64)
        .collect();
    if r_face.len() != r_center.len() + 1 {
        return Err(ReadError::invalid(
            GridData::RFace.path(),
            format!(
                "{} values, expected {} (one more than {})",
                r_face.len(),
                r_center.len() + 1,
                GridData::RCenter.path()
            ),
        ));
    }
    same_length(
        &GridData::Zone.path(),
        zone.len(),
        &GridData::RCenter.path(),
        r_center.len(),
    )?;
    Ok(Grid {
        r_center,
        r_face,
        zone,
    })
}

fn read_series(file: &File) -> Result<Series, ReadError> {
    let time_path = format!("{}/{}", Group::Series.name(), Step::Time.entry().name);
    let time = vector(file, &time_path, Step::Time.entry().unit.symbol())?;
    read_columns(file, Group::Series.name(), time, &time_path)
}

/// The charted per-step columns under `prefix` (`series`, `envelopes/min`, …), each as
/// long as `time` (read from `time_path`).
fn read_columns(
    file: &File,
    prefix: &str,
    time: Vec<f64>,
    time_path: &str,
) -> Result<Series, ReadError> {
    let path = |step: Step| format!("{prefix}/{}", step.entry().name);
    let n = time.len();
    let column =
        |step: Step| vector_as_long_as(file, &path(step), step.entry().unit.symbol(), time_path, n);
    let mut work = Vec::new();
    for zone in Zone::ALL {
        let p = path(Step::Work(zone));
        let group = p.rsplit_once('/').map_or("", |(g, _)| g);
        if file.link_exists(group) && file.link_exists(&p) {
            work.push((zone, column(Step::Work(zone))?));
        }
    }
    let mut series = Series {
        well_head: column(Step::WellHead)?,
        screen_flow: column(Step::ScreenFlow)?,
        face_flux: column(Step::FaceFlux)?,
        shear_proxy: column(Step::ShearProxy)?,
        cake_thickness: column(Step::CakeThickness)?,
        skin: column(Step::Skin)?,
        work,
        time,
        gaps: read_gaps(file)?,
        first_events: read_first_events(file)?,
    };
    break_at_gaps(&mut series);
    Ok(series)
}

/// The jumps of `/jumps` as (from, to) times; none when the file has no such group.
fn read_gaps(file: &File) -> Result<Vec<(f64, f64)>, ReadError> {
    if !file.link_exists(JumpSeries::GROUP) {
        return Ok(Vec::new());
    }
    let (from_path, to_path) = (JumpSeries::FromTime.path(), JumpSeries::ToTime.path());
    let unit = |series: JumpSeries| series.entry().unit.symbol();
    let from = vector(file, &from_path[1..], unit(JumpSeries::FromTime))?;
    let to = vector_as_long_as(
        file,
        &to_path[1..],
        unit(JumpSeries::ToTime),
        &from_path[1..],
        from.len(),
    )?;
    Ok(from.into_iter().zip(to).collect())
}

/// The time of the first event of each kind in `/events`; none without the group (files
/// of earlier versions).
fn read_first_events(file: &File) -> Result<Vec<(f64, EventKind)>, ReadError> {
    if !file.link_exists(EventSeries::GROUP) {
        return Ok(Vec::new());
    }
    let time_path = EventSeries::Time.path();
    let time = vector(
        file,
        &time_path[1..],
        EventSeries::Time.entry().unit.symbol(),
    )?;
    let kind_path = EventSeries::Kind.path();
    let kinds = file
        .dataset(&kind_path[1..])
        .and_then(|d| d.read_raw::<u8>())
        .map_err(ReadError::hdf5(kind_path.clone()))?;
    same_length(&kind_path, kinds.len(), &time_path, time.len())?;
    let names_path = EventSeries::Kinds.path();
    let names = file
        .dataset(&names_path[1..])
        .and_then(|d| d.read_raw::<VarLenUnicode>())
        .map_err(ReadError::hdf5(names_path))?;
    let mut first: Vec<(f64, EventKind)> = Vec::new();
    for (&t, &k) in time.iter().zip(&kinds) {
        // A kind this version does not know is left out.
        let known = names
            .get(usize::from(k))
            .and_then(|n| EventKind::from_name(n.as_str()));
        if let Some(k) = known {
            if !first.iter().any(|&(_, f)| f == k) {
                first.push((t, k));
            }
        }
    }
    first.sort_by_key(|&(_, k)| k);
    Ok(first)
}

/// Puts a row of NaN into every series at each gap (see [`Series::gaps`]).
fn break_at_gaps(s: &mut Series) {
    if s.gaps.is_empty() {
        return;
    }
    let mut rows = Vec::with_capacity(s.time.len() + s.gaps.len());
    let mut gaps = s.gaps.iter().peekable();
    for (i, &t) in s.time.iter().enumerate() {
        while let Some(&&(from, to)) = gaps.peek() {
            if t > from {
                rows.push(Err(0.5 * (from + to)));
                gaps.next();
            } else {
                break;
            }
        }
        rows.push(Ok(i));
    }
    let pick = |v: &[f64]| -> Vec<f64> {
        rows.iter()
            .map(|r| match r {
                Ok(i) => v[*i],
                Err(_) => f64::NAN,
            })
            .collect()
    };
    let time = rows
        .iter()
        .map(|r| match r {
            Ok(i) => s.time[*i],
            Err(t) => *t,
        })
        .collect();
    s.well_head = pick(&s.well_head);
    s.screen_flow = pick(&s.screen_flow);
    s.face_flux = pick(&s.face_flux);
    s.shear_proxy = pick(&s.shear_proxy);
    s.cake_thickness = pick(&s.cake_thickness);
    s.skin = pick(&s.skin);
    for (_, w) in &mut s.work {
        *w = pick(w);
    }
    s.time = time;
}

/// `/envelopes`, when the file keeps them: the cycles' lowest and highest values, at the
/// middle of each cycle.
fn read_envelopes(file: &File) -> Result<Option<Envelopes>, ReadError> {
    if !file.link_exists(ENVELOPES) {
        return Ok(None);
    }
    let start_path = format!("{ENVELOPES}/start_time");
    let start = vector(file, &start_path, "s")?;
    let end_path = format!("{ENVELOPES}/end_time");
    let end = vector_as_long_as(file, &end_path, "s", &start_path, start.len())?;
    let mid: Vec<f64> = start.iter().zip(&end).map(|(a, b)| 0.5 * (a + b)).collect();
    let stat = |st: EnvelopeStat| {
        read_columns(
            file,
            &format!("{ENVELOPES}/{}", st.name()),
            mid.clone(),
            &start_path,
        )
    };
    Ok(Some(Envelopes {
        min: stat(EnvelopeStat::Min)?,
        max: stat(EnvelopeStat::Max)?,
        rms: stat(EnvelopeStat::Rms)?,
    }))
}

fn read_cycles(file: &File) -> Result<Cycles, ReadError> {
    let index_path = format!("{}/{CYCLE_INDEX}", Group::Cycles.name());
    let index = vector(file, &index_path, "1")?;
    let n = index.len();
    let column = |cycle: Cycle| {
        let e = cycle.entry();
        let path = format!("{}/{}", Group::Cycles.name(), e.name);
        vector_as_long_as(file, &path, e.unit.symbol(), &index_path, n)
    };
    Ok(Cycles {
        start_time: column(Cycle::StartTime)?,
        end_time: column(Cycle::EndTime)?,
        peak_outward_flux: column(Cycle::PeakOutwardFlux)?,
        peak_inward_flux: column(Cycle::PeakInwardFlux)?,
        rms_face_flux: column(Cycle::RmsFaceFlux)?,
        peak_shear: column(Cycle::PeakShear)?,
        work_cake: column(Cycle::Work(Zone::Cake))?,
        cake_removed: column(Cycle::CakeRemoved)?,
        index,
    })
}

/// `/progress`, optional: files written before it existed, or whose virtual tests failed,
/// have none.
fn read_progress(file: &File) -> Result<Progress, ReadError> {
    if !file.link_exists(ProgressSeries::GROUP) {
        return Ok(Progress::default());
    }
    let time_path = ProgressSeries::Time.path();
    let time = vector(
        file,
        &time_path[1..],
        ProgressSeries::Time.entry().unit.symbol(),
    )?;
    let column = |series: ProgressSeries| {
        let path = series.path();
        let unit = series.entry().unit.symbol();
        vector_as_long_as(file, &path[1..], unit, &time_path[1..], time.len())
    };
    Ok(Progress {
        specific_capacity: column(ProgressSeries::SpecificCapacity)?,
        efficiency: column(ProgressSeries::Efficiency)?,
        time,
    })
}

fn read_snapshots(file: &File) -> Result<Snapshots, ReadError> {
    let (time_path, head_path) = (SnapshotData::Time.path(), SnapshotData::Head.path());
    let time = vector(
        file,
        time_path.trim_start_matches('/'),
        SnapshotData::Time.entry().unit.symbol(),
    )?;
    let path = head_path.trim_start_matches('/');
    if !file.link_exists(path) {
        return Err(ReadError::MissingDataset {
            object: format!("/{path}"),
        });
    }
    let ds = file
        .dataset(path)
        .map_err(ReadError::hdf5(format!("/{path}")))?;
    let shape = ds.shape();
    if shape.len() != 2 {
        return Err(ReadError::invalid(
            format!("/{path}"),
            format!("expected 2-D (time × cell), found shape {shape:?}"),
        ));
    }
    same_length(
        &format!("{head_path} rows"),
        shape[0],
        &time_path,
        time.len(),
    )?;
    check_units(&ds, path, SnapshotData::Head.entry().unit.symbol())?;
    bounded(
        path,
        shape
            .iter()
            .try_fold(1usize, |a, &b| a.checked_mul(b))
            .unwrap_or(usize::MAX),
    )?;
    let head = if shape[0] == 0 {
        Vec::new()
    } else {
        let m = ds
            .read_2d::<f64>()
            .map_err(ReadError::hdf5(format!("/{path}")))?;
        m.outer_iter().map(|row| row.to_vec()).collect()
    };
    Ok(Snapshots { time, head })
}

fn read_summary(file: &File) -> Result<Summary, ReadError> {
    let group_path = Group::Summary.path();
    if !file.link_exists(Group::Summary.name()) {
        return Err(ReadError::MissingGroup {
            object: group_path.clone(),
            hint: " (the run may not have finished)",
        });
    }
    let group = file
        .group(Group::Summary.name())
        .map_err(ReadError::hdf5(group_path.clone()))?;
    let names = group
        .attr_names()
        .map_err(ReadError::hdf5(group_path.clone()))?;
    let mut summary = Summary::default();
    for name in names {
        let object = format!("{group_path} attribute {name}");
        let attr = group.attr(&name).map_err(ReadError::hdf5(&object))?;
        let what = |e: hdf5::Error| ReadError::Hdf5 {
            object: object.clone(),
            source: e,
        };
        match attr.dtype().and_then(|t| t.to_descriptor()).map_err(what)? {
            TypeDescriptor::Float(_) | TypeDescriptor::Integer(_) | TypeDescriptor::Unsigned(_) => {
                let v = attr.read_scalar::<f64>().map_err(what)?;
                summary.values.insert(name, v);
            }
            TypeDescriptor::VarLenUnicode | TypeDescriptor::VarLenAscii => {
                let text = read_string(&attr).map_err(what)?;
                // Text attributes the schema does not list are not shown.
                match SummaryText::from_name(&name) {
                    Some(SummaryText::Warnings) => {
                        summary.warnings = lines(&text);
                    }
                    Some(SummaryText::Cautions) => summary.cautions = Some(text),
                    Some(SummaryText::Notes) => {
                        summary.notes = lines(&text);
                    }
                    Some(SummaryText::Assumptions) => {
                        summary.assumptions = lines(&text);
                    }
                    Some(SummaryText::EfficiencyDefinition) => {
                        summary.efficiency_definition = Some(text)
                    }
                    None => {}
                }
            }
            _ => {}
        }
    }
    Ok(summary)
}

/// The non-blank lines of a text attribute, trimmed.
fn lines(text: &str) -> Vec<String> {
    text.lines()
        .map(str::trim)
        .filter(|l| !l.is_empty())
        .map(str::to_owned)
        .collect()
}

/// Most values read from one dataset: 5e7 (400 MB of floats), beyond the largest output a
/// run writes without `--allow-large` (2 GB in all, about 1e7 values per series). A crafted
/// file declaring more is refused before anything is allocated.
pub(crate) const MAX_VALUES: usize = 50_000_000;

/// Refuses a dataset of more than [`MAX_VALUES`] values.
pub(crate) fn bounded(path: &str, n: usize) -> Result<(), ReadError> {
    if n > MAX_VALUES {
        return Err(ReadError::TooLarge {
            object: format!("/{}", path.trim_start_matches('/')),
            values: n,
            max: MAX_VALUES,
            kind: FileKind::Run,
        });
    }
    Ok(())
}

/// A 1-D dataset as `f64`, with its `units` attribute checked against `units` ("" for a
/// dimensionless quantity, which accepts "", "1" and "-").
fn vector(file: &File, path: &str, units: &str) -> Result<Vec<f64>, ReadError> {
    let (group, _) = path.split_once('/').unwrap_or(("", path));
    if (!group.is_empty() && !file.link_exists(group)) || !file.link_exists(path) {
        return Err(ReadError::MissingDataset {
            object: format!("/{path}"),
        });
    }
    let ds = file
        .dataset(path)
        .map_err(ReadError::hdf5(format!("/{path}")))?;
    let shape = ds.shape();
    if shape.len() != 1 {
        return Err(ReadError::invalid(
            format!("/{path}"),
            format!("expected a 1-D dataset, found shape {shape:?}"),
        ));
    }
    check_units(&ds, path, units)?;
    bounded(path, ds.size())?;
    ds.read_raw::<f64>()
        .map_err(ReadError::hdf5(format!("/{path}")))
}

/// Fails when the dataset's `units` attribute names another unit than the layout says
/// (a wrong unit would scale every figure wrongly). A missing attribute is accepted.
fn check_units(loc: &Location, path: &str, expected: &str) -> Result<(), ReadError> {
    let Some(found) = string_attr(loc, &format!("/{path}"), "units")? else {
        return Ok(());
    };
    let norm = |u: &str| {
        let u: String = u
            .chars()
            .filter(|c| !c.is_whitespace() && *c != '^')
            .map(|c| match c {
                '³' => '3',
                '²' => '2',
                c => c,
            })
            .collect();
        if u == "1" || u == "-" {
            String::new()
        } else {
            u
        }
    };
    if norm(&found) == norm(expected) {
        Ok(())
    } else {
        Err(ReadError::WrongUnits {
            object: format!("/{path}"),
            found,
            expected: expected.to_owned(),
        })
    }
}

/// [`vector`] at `path`, which must hold as many values as `reference` (`n`); both paths
/// without the leading `/`.
fn vector_as_long_as(
    file: &File,
    path: &str,
    units: &str,
    reference: &str,
    n: usize,
) -> Result<Vec<f64>, ReadError> {
    let v = vector(file, path, units)?;
    same_length(&format!("/{path}"), v.len(), &format!("/{reference}"), n)?;
    Ok(v)
}

fn same_length(what: &str, n: usize, reference: &str, expected: usize) -> Result<(), ReadError> {
    if n == expected {
        Ok(())
    } else {
        Err(ReadError::Length {
            object: what.to_owned(),
            found: n,
            reference: reference.to_owned(),
            expected,
        })
    }
}

/// A string attribute of `loc`, or `None` when it does not exist.
fn string_attr(loc: &Location, object: &str, name: &str) -> Result<Option<String>, ReadError> {
    let names = loc.attr_names().map_err(ReadError::hdf5(object))?;
    if !names.iter().any(|n| n == name) {
        return Ok(None);
    }
    let object = format!("{object} attribute {name}");
    let attr = loc.attr(name).map_err(ReadError::hdf5(&object))?;
    read_string(&attr)
        .map(Some)
        .map_err(ReadError::hdf5(object))
}

fn read_string(attr: &Attribute) -> hdf5::Result<String> {
    match attr.dtype()?.to_descriptor()? {
        TypeDescriptor::VarLenUnicode => Ok(attr.read_scalar::<VarLenUnicode>()?.as_str().into()),
        TypeDescriptor::VarLenAscii => Ok(attr.read_scalar::<VarLenAscii>()?.as_str().into()),
        other => Err(format!("expected a string, found {other}").into()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_jump_breaks_every_series_between_its_ends() {
        let mut s = Series {
            time: vec![1.0, 2.0, 10.0, 11.0],
            well_head: vec![0.1, 0.2, 0.3, 0.4],
            work: vec![(Zone::Pack, vec![1.0, 2.0, 3.0, 4.0])],
            gaps: vec![(2.0, 10.0)],
            ..Series::default()
        };
        for v in [
            &mut s.screen_flow,
            &mut s.face_flux,
            &mut s.shear_proxy,
            &mut s.cake_thickness,
            &mut s.skin,
        ] {
            *v = vec![0.0; 4];
        }
        break_at_gaps(&mut s);
        assert_eq!(s.time, [1.0, 2.0, 6.0, 10.0, 11.0]);
        assert!(s.well_head[2].is_nan() && s.work[0].1[2].is_nan() && s.skin[2].is_nan());
        assert_eq!(s.well_head[3], 0.3);
        assert_eq!(s.face_flux.len(), 5);
    }
}
