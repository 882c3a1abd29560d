//! Reading a pilot file: a tidy (long) CSV with one row per animal × condition × stimulus
//! class × response category and a count, into one count table per animal and condition.
//!
//! Rows that repeat a cell are added together, so a file with one row per trial and a count
//! of 1 reads the same as its totals. Every refusal names the file, line and column (see
//! [`PilotError`]); nothing is guessed: a label the lists of [`super::labels`] do not hold
//! is an error, not a skipped row.

use super::error::PilotError;
use super::labels::{self, BadCount, ColumnRole, MAX_COUNT, Stimulus};
use crate::vocab::MAX_CATEGORIES;
use std::collections::HashMap;
use std::path::{Path, PathBuf};

/// One animal's counts in one condition: rows absent and present over the response
/// categories, lowest category first.
#[derive(Debug, Clone, PartialEq)]
pub struct CountTable {
    pub absent: Vec<u32>,
    pub present: Vec<u32>,
    /// Line of the first row that fed this table.
    pub first_line: u64,
}

impl CountTable {
    fn new(categories: usize, line: u64) -> Self {
        Self {
            absent: vec![0; categories],
            present: vec![0; categories],
            first_line: line,
        }
    }

    /// Total absent-stimulus trials.
    pub fn absent_total(&self) -> u32 {
        self.absent.iter().sum()
    }

    /// Total present-stimulus trials.
    pub fn present_total(&self) -> u32 {
        self.present.iter().sum()
    }
}

/// One pilot animal: its label and one table per condition (in the file's condition order).
#[derive(Debug, Clone, PartialEq)]
pub struct PilotAnimal {
    pub name: String,
    pub tables: Vec<CountTable>,
}

/// A whole pilot file, checked: every animal has present and absent trials in every condition.
#[derive(Debug, Clone, PartialEq)]
pub struct PilotData {
    pub file: PathBuf,
    /// Response categories K (2 = yes/no).
    pub categories: usize,
    /// Condition labels in order of first appearance; one empty label without a condition column.
    pub conditions: Vec<String>,
    /// Animals in order of first appearance.
    pub animals: Vec<PilotAnimal>,
}

impl PilotData {
    /// Whether the file had a condition column.
    pub fn has_conditions(&self) -> bool {
        !(self.conditions.len() == 1 && self.conditions[0].is_empty())
    }
}

/// Reads and checks `path` with a response scale of `categories` (2 … 12).
pub fn read(path: &Path, categories: usize) -> Result<PilotData, PilotError> {
    let bytes = std::fs::read(path).map_err(|e| {
        PilotError::file(
            path,
            format!("cannot read the file: {e}"),
            "a readable CSV file",
        )
    })?;
    parse(path, &bytes, categories)
}

/// Parses pilot CSV bytes; `path` is used only in messages.
pub fn parse(path: &Path, bytes: &[u8], categories: usize) -> Result<PilotData, PilotError> {
    if !(2..=MAX_CATEGORIES).contains(&categories) {
        return Err(PilotError::file(
            path,
            format!("a response scale of {categories} categories"),
            format!("2 … {MAX_CATEGORIES} categories"),
        ));
    }
    // A byte-order mark (spreadsheet exports) is not part of the first header name.
    let bytes = bytes.strip_prefix(b"\xEF\xBB\xBF").unwrap_or(bytes);
    if bytes.iter().all(|b| b.is_ascii_whitespace()) {
        return Err(PilotError::file(
            path,
            "the file is empty",
            "a header row naming the columns, then one row per animal × condition × stimulus × response with its count",
        ));
    }
    let mut reader = csv::ReaderBuilder::new()
        .has_headers(true)
        .trim(csv::Trim::All)
        .comment(Some(b'#'))
        .from_reader(bytes);
    let headers = reader.headers().map_err(|e| csv_error(path, &e))?.clone();
    let columns = Columns::find(path, &headers)?;
    let mut data = Builder::new(categories);
    let mut rows = 0u64;
    for record in reader.records() {
        let record = record.map_err(|e| csv_error(path, &e))?;
        let line = record.position().map_or(0, |p| p.line());
        if record.iter().all(str::is_empty) {
            continue; // a blank line at the end of a spreadsheet export
        }
        rows += 1;
        data.add(path, &columns, &headers, &record, line)?;
    }
    if rows == 0 {
        return Err(PilotError::file(
            path,
            "the file has a header but no data rows",
            "one row per animal × condition × stimulus × response with its count",
        ));
    }
    data.finish(path, &columns, &headers)
}

fn csv_error(path: &Path, e: &csv::Error) -> PilotError {
    let line = e.position().map(|p| p.line());
    let problem = match e.kind() {
        csv::ErrorKind::UnequalLengths {
            expected_len, len, ..
        } => {
            format!("this row has {len} fields but the header has {expected_len}")
        }
        csv::ErrorKind::Utf8 { .. } => "the row is not valid UTF-8 text".to_string(),
        _ => format!("cannot read the CSV: {e}"),
    };
    let err = PilotError::file(
        path,
        problem,
        "comma-separated UTF-8 text with the same number of fields on every row",
    );
    match line {
        Some(l) => err.at_line(l),
        None => err,
    }
}

/// Column index of each role.
struct Columns {
    index: HashMap<&'static str, usize>,
}

fn role_key(role: ColumnRole) -> &'static str {
    role.names()[0]
}

impl Columns {
    fn find(path: &Path, headers: &csv::StringRecord) -> Result<Self, PilotError> {
        let mut index = HashMap::new();
        for (i, h) in headers.iter().enumerate() {
            if labels::is_index_column(h) {
                continue;
            }
            if let Some(role) = labels::role_of(h) {
                if let Some(&j) = index.get(role_key(role)) {
                    return Err(PilotError::file(
                        path,
                        format!(
                            "two columns hold the {}: `{}` (column {}) and `{h}`",
                            role_key(role),
                            &headers[j],
                            j + 1
                        ),
                        "one column per role; rename or drop the other",
                    )
                    .at_line(1)
                    .at_column(i, h));
                }
                index.insert(role_key(role), i);
            }
        }
        for role in ColumnRole::ALL {
            if role.required() && !index.contains_key(role_key(role)) {
                let seen: Vec<String> = headers.iter().map(|h| format!("`{h}`")).collect();
                return Err(PilotError::file(
                    path,
                    format!(
                        "no {} column among the headers {}",
                        role_key(role),
                        seen.join(", ")
                    ),
                    format!(
                        "a column named {} (any case)",
                        role.names()
                            .iter()
                            .map(|n| format!("`{n}`"))
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                )
                .at_line(1));
            }
        }
        Ok(Self { index })
    }

    fn get(&self, role: ColumnRole) -> Option<usize> {
        self.index.get(role_key(role)).copied()
    }
}

/// Tables keyed by animal and condition while rows arrive.
struct Builder {
    categories: usize,
    animals: Vec<String>,
    animal_index: HashMap<String, usize>,
    conditions: Vec<String>,
    condition_index: HashMap<String, usize>,
    tables: HashMap<(usize, usize), CountTable>,
    first_line: Vec<u64>,
}

impl Builder {
    fn new(categories: usize) -> Self {
        Self {
            categories,
            animals: Vec::new(),
            animal_index: HashMap::new(),
            conditions: Vec::new(),
            condition_index: HashMap::new(),
            tables: HashMap::new(),
            first_line: Vec::new(),
        }
    }

    fn add(
        &mut self,
        path: &Path,
        columns: &Columns,
        headers: &csv::StringRecord,
        record: &csv::StringRecord,
        line: u64,
    ) -> Result<(), PilotError> {
        let field = |role: ColumnRole| -> (usize, &str) {
            let i = columns.get(role).expect("required column");
            (i, record.get(i).unwrap_or(""))
        };
        let at = |e: PilotError, i: usize| e.at_line(line).at_column(i, &headers[i]);

        let (ai, animal) = field(ColumnRole::Animal);
        if animal.is_empty() {
            return Err(at(
                PilotError::file(
                    path,
                    "the animal label is empty",
                    "a label naming the animal",
                ),
                ai,
            ));
        }
        let condition = match columns.get(ColumnRole::Condition) {
            Some(ci) => {
                let c = record.get(ci).unwrap_or("");
                if c.is_empty() {
                    return Err(at(
                        PilotError::file(
                            path,
                            "the condition label is empty",
                            "a label naming the condition",
                        ),
                        ci,
                    ));
                }
                c
            }
            None => "",
        };
        let (si, stim) = field(ColumnRole::Stimulus);
        let stimulus = labels::stimulus(stim).ok_or_else(|| {
            at(
                PilotError::file(
                    path,
                    format!("unknown stimulus label `{stim}`"),
                    labels::STIMULUS_ALLOWED,
                ),
                si,
            )
        })?;
        let (ri, resp) = field(ColumnRole::Response);
        let category = labels::response(resp, self.categories).ok_or_else(|| {
            at(
                PilotError::file(
                    path,
                    format!("the response `{resp}` is not a category of the scale"),
                    labels::response_allowed(self.categories),
                ),
                ri,
            )
        })?;
        let (ni, n) = field(ColumnRole::Count);
        let count = labels::count(n).map_err(|bad| {
            let problem = match bad {
                BadCount::Missing => "the count is missing".to_string(),
                BadCount::NotANumber => format!("the count `{n}` is not a number"),
                BadCount::Negative => format!("the count {n} is negative"),
                BadCount::NotWhole => format!("the count {n} is not a whole number"),
                BadCount::TooLarge => format!("the count {n} is larger than {MAX_COUNT}"),
            };
            at(
                PilotError::file(path, problem, format!("a whole number 0 … {MAX_COUNT}")),
                ni,
            )
        })?;

        let a = *self
            .animal_index
            .entry(animal.to_string())
            .or_insert_with(|| {
                self.animals.push(animal.to_string());
                self.first_line.push(line);
                self.animals.len() - 1
            });
        let c = *self
            .condition_index
            .entry(condition.to_string())
            .or_insert_with(|| {
                self.conditions.push(condition.to_string());
                self.conditions.len() - 1
            });
        let k = self.categories;
        let table = self
            .tables
            .entry((a, c))
            .or_insert_with(|| CountTable::new(k, line));
        let cell = match stimulus {
            Stimulus::Absent => &mut table.absent[category],
            Stimulus::Present => &mut table.present[category],
        };
        *cell = cell.saturating_add(count);
        let total = match stimulus {
            Stimulus::Absent => table.absent_total(),
            Stimulus::Present => table.present_total(),
        };
        if total > MAX_COUNT {
            return Err(at(
                PilotError::file(
                    path,
                    format!(
                        "animal `{animal}` has more than {MAX_COUNT} trials of one stimulus class"
                    ),
                    format!("at most {MAX_COUNT} trials per animal, condition and stimulus class"),
                ),
                ni,
            ));
        }
        Ok(())
    }

    fn finish(
        mut self,
        path: &Path,
        columns: &Columns,
        headers: &csv::StringRecord,
    ) -> Result<PilotData, PilotError> {
        let stim_col = columns.get(ColumnRole::Stimulus).expect("required column");
        let mut animals = Vec::with_capacity(self.animals.len());
        for (a, name) in self.animals.iter().enumerate() {
            let mut tables = Vec::with_capacity(self.conditions.len());
            for (c, cond) in self.conditions.iter().enumerate() {
                let in_cond = if cond.is_empty() {
                    String::new()
                } else {
                    format!(" in condition `{cond}`")
                };
                let Some(table) = self.tables.remove(&(a, c)) else {
                    let ci = columns
                        .get(ColumnRole::Condition)
                        .expect("several conditions");
                    return Err(PilotError::file(
                        path,
                        format!(
                            "animal `{name}` (first row here) has no rows for condition `{cond}`"
                        ),
                        "every animal tested in every condition (the plan's animals are)",
                    )
                    .at_line(self.first_line[a])
                    .at_column(ci, &headers[ci]));
                };
                for (total, class) in [
                    (table.absent_total(), "absent"),
                    (table.present_total(), "present"),
                ] {
                    if total == 0 {
                        return Err(PilotError::file(
                            path,
                            format!(
                                "animal `{name}`{in_cond} (first row here) has no {class}-stimulus trials"
                            ),
                            "at least one present and one absent trial per animal and condition (d′ and c need both)",
                        )
                        .at_line(table.first_line)
                        .at_column(stim_col, &headers[stim_col]));
                    }
                }
                tables.push(table);
            }
            animals.push(PilotAnimal {
                name: name.clone(),
                tables,
            });
        }
        Ok(PilotData {
            file: path.to_path_buf(),
            categories: self.categories,
            conditions: self.conditions,
            animals,
        })
    }
}
