//! Where a command's output goes, the same for every command (docs/output.md): standard
//! output or `--out FILE` (written whole, then renamed into place), and for CSV the one table
//! `--table NAME` picks — or every table as `DIR/NAME.csv` with `--table all --out DIR`.

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::Context;
use stillbench::design::{DesignErrors, DesignIssue};
use stillbench::output::table::{self, Table, TableChoice, TableSpec};

/// `--table`, `--out`, `--force`: flattened into every command that writes JSON or CSV.
#[derive(Debug, Clone, Default, clap::Args)]
pub struct ExportArgs {
    /// With --format csv: the table to write. `--table list` names this command's tables
    /// (the first is the default); `--table all --out DIR` writes each as DIR/NAME.csv.
    #[arg(long, value_name = "NAME")]
    pub table: Option<String>,
    /// Write to this file instead of standard output (written whole, then renamed into
    /// place); with `--table all`, the folder that receives one CSV file per table.
    #[arg(long, value_name = "PATH")]
    pub out: Option<PathBuf>,
    /// Allow --out to replace existing files.
    #[arg(long)]
    pub force: bool,
}

/// What to write, settled before anything is computed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Plan {
    /// `--table list` was asked for and has been printed: nothing more to do.
    Listed,
    /// Write text or JSON (one document).
    Document,
    /// Write CSV: this table, or all of them.
    Csv(TableChoice),
}

fn bad_option(file: &Path, option: &str, message: String) -> anyhow::Error {
    stillbench::Error::Design(DesignErrors(vec![DesignIssue {
        file: file.to_path_buf(),
        line_col: None,
        path: option.into(),
        message,
    }]))
    .into()
}

fn refuse_existing(path: &Path) -> anyhow::Error {
    stillbench::Error::Refused {
        path: path.display().to_string(),
        reason: "it already exists; pass --force to replace it".into(),
    }
    .into()
}

impl ExportArgs {
    /// Check the options against the format and the command's tables before running: a
    /// wrong table name, `--table` without CSV, `--table all` without `--out`, or an `--out`
    /// file that exists without `--force` are refused now, not after a long run. `--table
    /// list` prints the tables and returns [`Plan::Listed`].
    pub fn plan(&self, file: &Path, csv: bool, specs: &[TableSpec]) -> anyhow::Result<Plan> {
        if !csv {
            if let Some(t) = &self.table {
                return Err(bad_option(
                    file,
                    "--table",
                    format!("`--table {t}` chooses a CSV table; add `--format csv`"),
                ));
            }
            if let Some(out) = &self.out
                && out.exists()
                && !self.force
            {
                return Err(refuse_existing(out));
            }
            return Ok(Plan::Document);
        }
        let choice = table::choose_table(specs, self.table.as_deref())
            .map_err(|m| bad_option(file, "--table", m))?;
        match &choice {
            TableChoice::List => {
                let mut out = std::io::stdout().lock();
                table::write_table_list(&mut out, specs).context("writing to standard output")?;
                return Ok(Plan::Listed);
            }
            TableChoice::All => match &self.out {
                None => {
                    return Err(bad_option(
                        file,
                        "--table",
                        "`--table all` writes one file per table: give the folder with --out DIR"
                            .into(),
                    ));
                }
                Some(dir) => {
                    if dir.exists() && !dir.is_dir() {
                        return Err(bad_option(
                            file,
                            "--out",
                            format!(
                                "with `--table all`, --out names a folder, and {} is a file",
                                dir.display()
                            ),
                        ));
                    }
                    if !self.force
                        && let Some(p) = specs
                            .iter()
                            .map(|s| dir.join(format!("{}.csv", s.name)))
                            .find(|p| p.exists())
                    {
                        return Err(refuse_existing(&p));
                    }
                }
            },
            TableChoice::One(_) => {
                if let Some(out) = &self.out
                    && out.exists()
                    && !self.force
                {
                    return Err(refuse_existing(out));
                }
            }
        }
        Ok(Plan::Csv(choice))
    }

    /// Whether the plan needs the table `name` (chosen, or all of them).
    pub fn wants(plan: &Plan, name: &str) -> bool {
        match plan {
            Plan::Csv(TableChoice::All) => true,
            Plan::Csv(TableChoice::One(n)) => *n == name,
            _ => false,
        }
    }

    /// Write a text or JSON document to `--out` or standard output.
    pub fn write_document(&self, bytes: &[u8]) -> anyhow::Result<()> {
        match &self.out {
            Some(path) => {
                stillbench::output::write_atomic(path, self.force, |w| w.write_all(bytes))?;
                eprintln!("wrote {}", path.display());
            }
            None => {
                let mut out = std::io::stdout().lock();
                out.write_all(bytes).context("writing to standard output")?;
                out.flush().context("writing to standard output")?;
            }
        }
        Ok(())
    }

    /// Write the planned CSV table(s).
    pub fn write_tables(&self, plan: &Plan, tables: &[Table]) -> anyhow::Result<()> {
        match plan {
            Plan::Csv(TableChoice::All) => {
                let dir = self
                    .out
                    .as_deref()
                    .context("`--table all` needs --out DIR")?;
                for p in table::write_tables_to_dir(dir, self.force, tables)? {
                    eprintln!("wrote {}", p.display());
                }
                Ok(())
            }
            Plan::Csv(TableChoice::One(name)) => {
                let t = tables
                    .iter()
                    .find(|t| t.name == *name)
                    .with_context(|| format!("the `{name}` table was not produced"))?;
                let mut buf = Vec::new();
                t.write_csv(&mut buf).context("formatting CSV")?;
                self.write_document(&buf)
            }
            Plan::Listed | Plan::Csv(TableChoice::List) => Ok(()),
            Plan::Document => anyhow::bail!("internal: a document plan was given tables"),
        }
    }
}
