//! Command handlers: turn parsed arguments into library calls and results into output.

use std::io::{IsTerminal, Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use anyhow::{Context, Result, bail};
use clap::CommandFactory;
use indicatif::{ProgressBar, ProgressStyle};

use phasewise::kb::identifier::{ListEntry, parse_analyte_list};
use phasewise::kb::resolve::{Resolution, Unresolved};
use phasewise::kb::user::{NewCompound, parse_property};
use phasewise::kb::{BuildPolicy, Kb, KbError, KbPaths, build};
use phasewise::property::{Analyte, Origin, PropertyKind};
use phasewise::report::Format;
use phasewise::report::lookup::LookupReport;

use crate::cli::{AnalyteInput, Cli, Command, KbCommand, OutputFormat};

/// Exit code: some analytes did not resolve, the rest were handled.
pub const EXIT_PARTIAL: u8 = 1;
/// Exit code: bad input or usage.
pub const EXIT_BAD_INPUT: u8 = 2;
/// Exit code: the knowledge base is missing, damaged, newer or locked.
pub const EXIT_KB: u8 = 3;

/// Map an error to its documented exit code.
pub fn exit_code_for(e: &anyhow::Error) -> u8 {
    for c in e.chain() {
        if let Some(k) = c.downcast_ref::<KbError>() {
            return match k {
                KbError::BadIdentifier { .. } | KbError::BadInput(_) => EXIT_BAD_INPUT,
                KbError::Io { .. } => EXIT_BAD_INPUT,
                _ => EXIT_KB,
            };
        }
    }
    EXIT_BAD_INPUT
}

fn format_of(f: OutputFormat) -> Format {
    match f {
        OutputFormat::Table => Format::Table,
        OutputFormat::Json => Format::Json,
        OutputFormat::Csv => Format::Csv,
        OutputFormat::Tsv => Format::Tsv,
    }
}

fn paths(cli: &Cli) -> Result<KbPaths> {
    let d = KbPaths::default_location();
    let shipped = match &cli.kb {
        Some(p) => p.clone(),
        None => d
            .as_ref()
            .map_err(|e| anyhow::anyhow!("{e}"))?
            .shipped
            .clone(),
    };
    let user = match &cli.user_kb {
        Some(p) => p.clone(),
        None => match &d {
            Ok(d) => d.user.clone(),
            // no home directory: keep the overlay beside the shipped base
            Err(_) => shipped.with_file_name("user.sqlite"),
        },
    };
    Ok(KbPaths { shipped, user })
}

fn progress_bar() -> ProgressBar {
    let pb = if std::io::stderr().is_terminal() {
        ProgressBar::new(1000)
    } else {
        ProgressBar::hidden()
    };
    pb.set_style(
        ProgressStyle::with_template("building knowledge base {bar:40} {percent:>3}% {msg}")
            .unwrap_or_else(|_| ProgressStyle::default_bar()),
    );
    pb
}

pub(crate) fn open_kb(cli: &Cli) -> Result<Kb> {
    let p = paths(cli)?;
    let pb = progress_bar();
    let policy = if cli.no_build {
        BuildPolicy::Never
    } else {
        BuildPolicy::IfNeeded
    };
    let kb = Kb::open(&p, policy, &mut |f, msg| {
        pb.set_position((f * 1000.0) as u64);
        pb.set_message(msg.to_string());
    })?;
    pb.finish_and_clear();
    Ok(kb)
}

fn write_out(s: &str) -> Result<()> {
    let mut out = std::io::stdout().lock();
    out.write_all(s.as_bytes())?;
    out.flush()?;
    Ok(())
}

/// The text behind `--input FILE` (or `-`), or stdin when nothing else was given and stdin is
/// not a terminal; `None` when there is none.
fn read_input_text(input: &AnalyteInput) -> Result<Option<String>> {
    let from_stdin = || -> Result<Option<String>> {
        let mut s = String::new();
        std::io::stdin()
            .read_to_string(&mut s)
            .context("reading analytes from stdin")?;
        Ok(Some(s))
    };
    match &input.input {
        Some(p) if p.as_os_str() == "-" => from_stdin(),
        Some(p) => {
            Ok(Some(std::fs::read_to_string(p).with_context(|| {
                format!("reading analyte list {}", p.display())
            })?))
        }
        None if input.analytes.is_empty() && !std::io::stdin().is_terminal() => from_stdin(),
        None => Ok(None),
    }
}

const NO_ANALYTES: &str =
    "no analytes given: name them as arguments, with --input FILE, or on stdin";

/// Render one roff page per command (`phasewise.1`, `phasewise-advise.1`, `phasewise-kb-add.1`,
/// …), all in memory first, then write each atomically; returns how many were written.
fn write_manpages(dir: &Path) -> Result<usize> {
    fn collect(cmd: &clap::Command, out: &mut Vec<(String, Vec<u8>)>) -> Result<()> {
        // after `build()`, a subcommand's display name is `phasewise-<command>`
        let man = clap_mangen::Man::new(cmd.clone());
        let mut bytes = Vec::new();
        man.render(&mut bytes)
            .with_context(|| format!("rendering the manual page {}", man.get_filename()))?;
        out.push((man.get_filename(), bytes));
        for sub in cmd.get_subcommands().filter(|s| !s.is_hide_set()) {
            collect(sub, out)?;
        }
        Ok(())
    }
    std::fs::create_dir_all(dir)
        .with_context(|| format!("creating the directory {}", dir.display()))?;
    let mut cmd = Cli::command().disable_help_subcommand(true);
    cmd.build();
    let mut pages = Vec::new();
    collect(&cmd, &mut pages)?;
    for (file, bytes) in &pages {
        phasewise::report::plan::write_atomically(&dir.join(file), bytes)?;
    }
    Ok(pages.len())
}

/// Read the analyte list: arguments, then `--input FILE` (or `-`), then stdin when nothing
/// else was given and stdin is not a terminal. A file may be a plain list or a tab-separated
/// table with `name`/`smiles` columns ([`parse_analyte_list`]).
pub fn read_analytes(input: &AnalyteInput) -> Result<Vec<ListEntry>> {
    let mut out: Vec<ListEntry> = input
        .analytes
        .iter()
        .map(|q| ListEntry {
            query: q.clone(),
            label: None,
            line: 0,
        })
        .collect();
    if let Some(text) = read_input_text(input)? {
        let what = match &input.input {
            Some(p) if p.as_os_str() != "-" => p.display().to_string(),
            _ => "stdin".to_string(),
        };
        out.extend(parse_analyte_list(&text).with_context(|| format!("reading {what}"))?);
    }
    if out.is_empty() {
        bail!(NO_ANALYTES);
    }
    Ok(out)
}

/// Read plain lines (for `describe`, whose lines are `SMILES[<TAB>name]`): arguments, then the
/// file or stdin; blank lines and `#` comment lines skipped.
fn read_lines(input: &AnalyteInput) -> Result<Vec<String>> {
    let mut out = input.analytes.clone();
    if let Some(text) = read_input_text(input)? {
        let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
        out.extend(
            text.lines()
                .map(str::trim)
                .filter(|l| !l.is_empty() && !l.starts_with('#'))
                .map(str::to_string),
        );
    }
    if out.is_empty() {
        bail!(NO_ANALYTES);
    }
    Ok(out)
}

/// Resolve every entry; structure-only SMILES become analytes with no stored properties
/// (named by the list's `name` cell when it has one).
pub fn resolve_all(kb: &Kb, entries: &[ListEntry]) -> Result<(Vec<Analyte>, Vec<Unresolved>)> {
    let mut found = Vec::new();
    let mut missing = Vec::new();
    for e in entries {
        match kb.resolve(&e.query)? {
            Resolution::Found(mut a) => {
                if let Some(l) = &e.label {
                    a.query = l.clone();
                }
                found.push(*a);
            }
            Resolution::StructureOnly { query, smiles } => found.push(Analyte {
                query: e.label.clone().unwrap_or_else(|| query.trim().to_string()),
                name: e.label.clone().unwrap_or_else(|| smiles.clone()),
                inchikey: None,
                smiles: Some(smiles),
                formula: None,
                molar_mass_g_mol: None,
                cid: None,
                cas: None,
                origin: Origin::Structure,
                matched_by: "smiles (not in knowledge base)".into(),
                properties: Vec::new(),
            }),
            Resolution::Unresolved(mut u) => {
                if let Some(l) = &e.label {
                    u.query = format!("{l} ({})", u.query);
                }
                missing.push(u)
            }
        }
    }
    Ok((found, missing))
}

fn advise_report(
    cli: &Cli,
    o: &crate::cli::AdviseOptions,
) -> Result<(phasewise::report::advice::AdviceReport, bool)> {
    advise_report_with(cli, o, None, None)
}

fn advise_report_with(
    cli: &Cli,
    o: &crate::cli::AdviseOptions,
    fixed: Option<phasewise::advisor::FixedLc>,
    phases_override: Option<Vec<String>>,
) -> Result<(phasewise::report::advice::AdviceReport, bool)> {
    advise_report_fixed(cli, o, fixed, None, phases_override)
}

fn advise_report_fixed(
    cli: &Cli,
    o: &crate::cli::AdviseOptions,
    fixed: Option<phasewise::advisor::FixedLc>,
    fixed_gc: Option<phasewise::advisor::FixedGc>,
    phases_override: Option<Vec<String>>,
) -> Result<(phasewise::report::advice::AdviceReport, bool)> {
    use phasewise::advisor::{AdviseRequest, Detector, advise, profile::AnalyteProfile};
    // cheap checks first, before the knowledge base is opened
    let detector = Detector::parse(&o.detector).map_err(|e| anyhow::anyhow!(e))?;
    let column_mm = o
        .column
        .as_deref()
        .map(crate::run_measured::parse_column)
        .transpose()?
        .map(|c| (c.length_mm, c.inner_diameter_mm));
    for (name, v) in [("--particle", o.particle), ("--flow", o.flow)] {
        if let Some(v) = v
            && !(v > 0.0 && v.is_finite())
        {
            bail!("{name} {v}: must be a positive number");
        }
    }
    if !(o.dwell >= 0.0 && o.dwell.is_finite()) {
        bail!("--dwell {}: must be zero or positive", o.dwell);
    }
    if !(0.0..=1.0).contains(&o.risk) {
        bail!("--risk {}: must be between 0 and 1", o.risk);
    }
    let mut modes = Vec::new();
    for m in &o.modes {
        modes.push(phasewise::phase::PhaseMode::parse(m.trim()).ok_or_else(|| {
            anyhow::anyhow!(
                "unknown mode `{m}`; use gc, rp, hilic, ic-anion, ic-cation or ion-exclusion"
            )
        })?);
    }
    let phases_available: Vec<String> = match &o.phases_available {
        Some(p) => {
            let ids: Vec<String> = std::fs::read_to_string(p)
                .with_context(|| format!("reading {}", p.display()))?
                .lines()
                .map(|l| l.split('#').next().unwrap_or("").trim().to_string())
                .filter(|l| !l.is_empty())
                .collect();
            // an empty list would otherwise mean "no restriction", the opposite of the intent
            if ids.is_empty() {
                bail!(
                    "--phases-available {}: the file lists no phase id (only blank or comment lines); put one id per line (`phasewise phases` lists them)",
                    p.display()
                );
            }
            ids
        }
        None => Vec::new(),
    };
    // `predict` names its one phase: it wants no back-up
    let predicting = phases_override.is_some();
    let phases_available = phases_override.unwrap_or(phases_available);
    let queries = read_analytes(&o.input)?;
    let kb = open_kb(cli)?;
    let (found, missing) = resolve_all(&kb, &queries)?;
    let partial = !missing.is_empty();
    let stored_fits = stored_fits(&kb, &found)?;
    let profiles: Vec<AnalyteProfile> = found.into_iter().map(AnalyteProfile::new).collect();
    if profiles.is_empty() {
        bail!(
            "none of the analytes resolved: {}",
            missing
                .iter()
                .map(|u| format!("`{}` ({})", u.query, u.reason))
                .collect::<Vec<_>>()
                .join(", ")
        );
    }
    let req = AdviseRequest {
        detector,
        column_mm,
        particle_um: o.particle,
        flow_ml_min: o.flow,
        dwell_ml: o.dwell,
        modes,
        phases_available,
        alternatives: o.alternatives.max(1),
        risk_threshold: o.risk,
        no_backup: predicting,
        fixed,
        fixed_gc,
        stored_fits,
    };
    let report = advise(&profiles, missing, &req)?;
    Ok((report, partial))
}

/// The user's stored scouting fits (`scout --store`) of the resolved analytes, as the model
/// reads them.
fn stored_fits(kb: &Kb, analytes: &[Analyte]) -> Result<Vec<phasewise::model::memory::StoredFit>> {
    let mut keys: Vec<&str> = analytes
        .iter()
        .filter_map(|a| a.inchikey.as_deref())
        .collect();
    keys.sort_unstable();
    keys.dedup();
    let mut out = Vec::new();
    for key in keys {
        for r in kb.retention_fits(key)? {
            out.push(stored_fit_from(&r).with_context(|| {
                format!(
                    "stored retention fit of `{}` in {} is unreadable",
                    r.analyte,
                    kb.user_path().display()
                )
            })?);
        }
    }
    Ok(out)
}

/// A stored row as the model reads it (see `StoredFit` for the fields not recorded).
pub(crate) fn stored_fit_from(
    r: &phasewise::kb::retention::RetentionFitRecord,
) -> Result<phasewise::model::memory::StoredFit> {
    use phasewise::model::regression::{
        Additive, ChemClass, GradientPoint, LcSystem, Mode, Modifier,
    };
    let mode = match r.mode.as_str() {
        "rp" => Mode::ReversedPhase,
        "hilic" => Mode::Hilic,
        m => bail!("mode `{m}` is neither rp nor hilic"),
    };
    let chem_class = ChemClass::parse(&r.chem_class)
        .ok_or_else(|| anyhow::anyhow!("unknown chemistry class `{}`", r.chem_class))?;
    let modifier = match r.modifier.as_str() {
        "acetonitrile" => Modifier::Acetonitrile,
        "methanol" => Modifier::Methanol,
        m => bail!("modifier `{m}` is neither acetonitrile nor methanol"),
    };
    let first = r
        .gradients
        .first()
        .ok_or_else(|| anyhow::anyhow!("no gradient program recorded"))?;
    let program = phasewise::model::gradient::GradientProgram::parse(first)
        .with_context(|| format!("gradient program `{first}`"))?;
    let (lss, log_kw_uncertainty, s_uncertainty, correlation) = strong_solvent_parameters(r)?;
    Ok(phasewise::model::memory::StoredFit {
        inchikey: r.inchikey.clone(),
        phase_id: r.phase_id.clone(),
        system: LcSystem {
            mode,
            chem_class,
            modifier,
            ph: Some(r.ph),
            additive: r
                .buffer
                .as_deref()
                .map_or(Additive::Other, Additive::from_buffer_text),
            gradient: program
                .points()
                .iter()
                .map(|p| GradientPoint {
                    time_min: p.time_min,
                    organic_pct: p.organic_pct,
                })
                .collect(),
            t0_min: r.t0_min,
            dwell_min: r.dwell_min,
            flow_ml_min: r.flow_ml_min.unwrap_or(1.0),
            temperature_c: r.temperature_c,
        },
        lss,
        log_kw_uncertainty,
        s_uncertainty,
        correlation,
        rms_residual_min: r.rms_residual_min,
        source: r.source.clone(),
        buffer: r.buffer.clone(),
    })
}

/// A stored row's log kw and S (with 1σ and correlation) in the strong-solvent fraction of its
/// mode, as `StoredFit` holds them. HILIC rows stored before the overlay's migration 3 were
/// fitted in the organic fraction φ (basis `organic`): log k = a − s φ with φ = 1 − ψ is
/// log k = (a − s) − (−s) ψ, so log kw = a − s and S = −s in the water fraction ψ, with
/// Var(log kw) = Var a + Var s − 2 Cov(a, s) and Cov(log kw, S) = Var s − Cov(a, s).
fn strong_solvent_parameters(
    r: &phasewise::kb::retention::RetentionFitRecord,
) -> Result<(phasewise::model::gradient::LssParameters, f64, f64, f64)> {
    let lss = |log_kw, s| phasewise::model::gradient::LssParameters { log_kw, s };
    match (r.mode.as_str(), r.basis.as_str()) {
        ("rp", "organic") | ("hilic", "water") => Ok((
            lss(r.log_kw, r.s),
            r.log_kw_uncertainty,
            r.s_uncertainty,
            r.correlation,
        )),
        ("hilic", "organic") => {
            let (sa, ss) = (r.log_kw_uncertainty, r.s_uncertainty);
            let cov = r.correlation * sa * ss;
            let sd_kw = (sa * sa + ss * ss - 2.0 * cov).max(0.0).sqrt();
            let cov_new = ss * ss - cov;
            let rho = if sd_kw > 0.0 && ss > 0.0 {
                (cov_new / (sd_kw * ss)).clamp(-1.0, 1.0)
            } else {
                0.0
            };
            Ok((lss(r.log_kw - r.s, -r.s), sd_kw, ss, rho))
        }
        (m, b) => bail!("mode `{m}` with composition basis `{b}` is not a known combination"),
    }
}

/// Run a parsed command line.
pub fn run(cli: Cli) -> Result<ExitCode> {
    match &cli.command {
        Command::Lookup(args) => {
            let queries = read_analytes(&args.input)?;
            let kb = open_kb(&cli)?;
            let (mut found, missing) = resolve_all(&kb, &queries)?;
            // a structure the base does not hold is shown with what phasewise computes from it
            for a in found.iter_mut().filter(|a| a.origin == Origin::Structure) {
                if let Some(e) = a
                    .smiles
                    .as_deref()
                    .and_then(|s| phasewise::property::estimate::estimate(s).ok())
                {
                    phasewise::property::estimate::attach_estimates(a, &e);
                }
            }
            let partial = !missing.is_empty();
            let report = LookupReport::new(found, missing);
            write_out(&report.render(format_of(args.format)))?;
            Ok(if partial {
                ExitCode::from(EXIT_PARTIAL)
            } else {
                ExitCode::SUCCESS
            })
        }
        Command::Advise(args) => {
            let (report, partial) = advise_report(&cli, &args.opts)?;
            let text = match args.format {
                OutputFormat::Json => format!("{}\n", serde_json::to_string_pretty(&report)?),
                OutputFormat::Table => report.render_table(),
                OutputFormat::Csv => report.render_delimited(','),
                OutputFormat::Tsv => report.render_delimited('\t'),
            };
            write_out(&text)?;
            Ok(if partial {
                ExitCode::from(EXIT_PARTIAL)
            } else {
                ExitCode::SUCCESS
            })
        }
        Command::Plan(args) => {
            // fail before any work when the report cannot be written
            phasewise::report::plan::check_writable(&args.output)?;
            let html = match args.report_format.as_deref() {
                Some("html") => true,
                Some(_) => false,
                None => match args.output.extension().and_then(|e| e.to_str()) {
                    Some("html") | Some("htm") => true,
                    Some("md") | Some("markdown") => false,
                    other => bail!(
                        "cannot tell the report format from the extension {:?} of {}; use .html or .md, or --report-format",
                        other.unwrap_or(""),
                        args.output.display()
                    ),
                },
            };
            let (report, partial) = advise_report(&cli, &args.opts)?;
            let opts = phasewise::report::plan::PlanOptions {
                title: "Method development plan".to_string(),
                date: args.date.clone(),
            };
            let text = if html {
                phasewise::report::plan::render_html(&report, &opts)
            } else {
                phasewise::report::plan::render_markdown(&report, &opts)
            };
            phasewise::report::plan::write_atomically(&args.output, &text)?;
            eprintln!("wrote {}", args.output.display());
            Ok(if partial {
                ExitCode::from(EXIT_PARTIAL)
            } else {
                ExitCode::SUCCESS
            })
        }
        Command::Predict(args) => run_predict(&cli, args),
        Command::Phases(args) => {
            let mode = match &args.mode {
                Some(m) => Some(phasewise::phase::PhaseMode::parse(m.trim()).ok_or_else(|| {
                    anyhow::anyhow!(
                        "unknown mode `{m}`; use rp, hilic, gc, ic-anion, ic-cation or ion-exclusion"
                    )
                })?),
                None => None,
            };
            let report = phasewise::report::phases::PhasesReport::new(
                phasewise::phase::Catalogue::builtin()?,
                mode,
            );
            write_out(&match args.format {
                crate::cli::ListFormat::Table => report.render_table(),
                crate::cli::ListFormat::Json => report.render_json()?,
            })?;
            Ok(ExitCode::SUCCESS)
        }
        Command::Describe(args) => {
            let input = AnalyteInput {
                analytes: args.smiles.clone(),
                input: args.input.clone(),
            };
            let lines = read_lines(&input)?;
            let report = phasewise::report::describe::DescribeReport::from_inputs(&lines);
            write_out(&report.render(format_of(args.format)))?;
            if report.molecules.is_empty() {
                bail!(
                    "no input could be described ({} failed)",
                    report.failures.len()
                );
            }
            Ok(if report.failures.is_empty() {
                ExitCode::SUCCESS
            } else {
                ExitCode::from(EXIT_PARTIAL)
            })
        }
        Command::Kb(k) => run_kb(&cli, k),
        Command::Suitability(a) => crate::run_measured::run_suitability(a),
        Command::Scout(a) => crate::run_measured::run_scout(&cli, a),
        Command::Transfer(a) => crate::run_measured::run_transfer(a),
        Command::Model(m) => crate::run_measured::run_model(m),
        Command::Completions(a) => {
            let mut out = Vec::new();
            clap_complete::generate(a.shell, &mut Cli::command(), "phasewise", &mut out);
            write_out(&String::from_utf8_lossy(&out))?;
            Ok(ExitCode::SUCCESS)
        }
        Command::Manpages(a) => {
            let written = write_manpages(&a.output_dir)?;
            eprintln!(
                "wrote {} manual pages to {}",
                written,
                a.output_dir.display()
            );
            Ok(ExitCode::SUCCESS)
        }
    }
}

fn run_kb(cli: &Cli, k: &KbCommand) -> Result<ExitCode> {
    match k {
        KbCommand::Build { force } => {
            let p = paths(cli)?;
            let status = build::shipped_status(&p.shipped)?;
            if status == build::Status::Current && !force {
                eprintln!(
                    "knowledge base {} is current (use --force to rebuild)",
                    p.shipped.display()
                );
                return Ok(ExitCode::SUCCESS);
            }
            let pb = progress_bar();
            let t = std::time::Instant::now();
            let counts = build::build_shipped(&p.shipped, &mut |f, msg| {
                pb.set_position((f * 1000.0) as u64);
                pb.set_message(msg.to_string());
            })?;
            pb.finish_and_clear();
            eprintln!(
                "built {}: {} compounds, {} names, {} property rows in {:.1} s",
                p.shipped.display(),
                counts.compounds,
                counts.names,
                counts.properties,
                t.elapsed().as_secs_f64()
            );
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Stats { format } => {
            let kb = open_kb(cli)?;
            let s = kb.stats()?;
            let text = match format {
                OutputFormat::Json => format!("{}\n", serde_json::to_string_pretty(&s)?),
                OutputFormat::Table => stats_table(&s),
                OutputFormat::Csv | OutputFormat::Tsv => {
                    let d = if *format == OutputFormat::Csv {
                        ','
                    } else {
                        '\t'
                    };
                    let cell = |x: &str| phasewise::report::csv_cell(x, d);
                    let mut t = ["database", "property", "kind", "source", "licence", "rows"]
                        .join(&d.to_string());
                    t.push('\n');
                    let dbs = std::iter::once(("shipped", &s.shipped))
                        .chain(s.user.iter().map(|u| ("user", u)));
                    for (db, stats) in dbs {
                        for p in &stats.properties_by_source {
                            t.push_str(&format!(
                                "{db}{d}{}{d}{}{d}{}{d}{}{d}{}\n",
                                cell(&p.property),
                                cell(&p.kind),
                                cell(&p.source),
                                cell(&p.licence),
                                p.count
                            ));
                        }
                    }
                    t
                }
            };
            write_out(&text)?;
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Add(a) => {
            let properties = a
                .properties
                .iter()
                .map(|p| parse_property(p))
                .collect::<Result<Vec<_>, _>>()?;
            let c = NewCompound {
                name: a.name.clone(),
                synonyms: a.synonyms.clone(),
                smiles: a.smiles.clone(),
                cas: a.cas.clone(),
                inchikey: a.inchikey.clone(),
                properties,
                source: a.source.clone(),
                kind: if a.estimated {
                    PropertyKind::Estimated
                } else {
                    PropertyKind::Experimental
                },
            };
            let mut kb = open_kb(cli)?;
            kb.add_compound(&c)?;
            eprintln!("added `{}` to {}", c.name, kb.user_path().display());
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Import {
            file,
            source,
            skip_bad,
        } => {
            let text = read_file_or_stdin(file)?;
            let mut kb = open_kb(cli)?;
            let r = kb
                .import(&text, source.as_deref(), *skip_bad)
                .with_context(|| format!("importing {}", file.display()))?;
            for s in &r.skipped {
                eprintln!("skipped line {}: {}", s.line, s.reason);
            }
            let plural = |n: usize, one: &str, many: &str| {
                format!("{n} {}", if n == 1 { one } else { many })
            };
            eprintln!(
                "imported {} into {}{}",
                plural(r.imported, "compound", "compounds"),
                kb.user_path().display(),
                if r.skipped.is_empty() {
                    String::new()
                } else {
                    format!(" ({} skipped)", plural(r.skipped.len(), "row", "rows"))
                }
            );
            Ok(if r.skipped.is_empty() {
                ExitCode::SUCCESS
            } else {
                ExitCode::from(EXIT_PARTIAL)
            })
        }
        KbCommand::Export => {
            let kb = open_kb(cli)?;
            write_out(&kb.export_user()?)?;
            Ok(ExitCode::SUCCESS)
        }
        KbCommand::Path => {
            let p = paths(cli)?;
            write_out(&format!(
                "shipped\t{}\nuser\t{}\n",
                p.shipped.display(),
                p.user.display()
            ))?;
            Ok(ExitCode::SUCCESS)
        }
    }
}

fn read_file_or_stdin(file: &Path) -> Result<String> {
    if file.as_os_str() == "-" {
        let mut s = String::new();
        std::io::stdin()
            .read_to_string(&mut s)
            .context("reading stdin")?;
        return Ok(s);
    }
    std::fs::read_to_string(file)
        .with_context(|| format!("reading {}", PathBuf::from(file).display()))
}

fn stats_table(s: &phasewise::kb::stats::KbStats) -> String {
    use phasewise::report::table::render;
    let mut out = format!(
        "Shipped base {} ({} compounds, {} names, {} property rows, {:.1} MB)\n",
        s.shipped.path,
        s.shipped.compounds,
        s.shipped.names,
        s.shipped.properties,
        s.shipped.size_bytes as f64 / 1.0e6
    );
    let rows: Vec<Vec<String>> = s
        .shipped
        .properties_by_source
        .iter()
        .chain(s.user.iter().flat_map(|u| u.properties_by_source.iter()))
        .map(|p| {
            vec![
                p.property.clone(),
                p.kind.clone(),
                p.source.clone(),
                p.licence.clone(),
                p.count.to_string(),
            ]
        })
        .collect();
    if let Some(u) = &s.user {
        out.push_str(&format!(
            "User overlay {} ({} compounds, {} property rows)\n",
            u.path, u.compounds, u.properties
        ));
    } else {
        out.push_str("User overlay: none yet\n");
    }
    out.push('\n');
    out.push_str(&render(
        &["property", "kind", "source or method", "licence", "rows"],
        &rows,
    ));
    out.push('\n');
    out
}

/// Parse a GC column `LENGTH_MxID_MMxFILM_UM`, e.g. `30x0.25x0.25`, at `velocity` cm/s.
fn parse_gc_column(text: &str, velocity_cm_s: f64) -> Result<phasewise::model::gc::GcColumn> {
    let parts: Vec<&str> = text.split(['x', 'X', '×']).map(str::trim).collect();
    let nums: Option<Vec<f64>> = parts.iter().map(|p| p.parse::<f64>().ok()).collect();
    match nums.as_deref() {
        Some(&[l, id, film]) => phasewise::model::gc::GcColumn::new(l, id, film, velocity_cm_s)
            .map_err(|e| anyhow::anyhow!("--column {text}: {e}")),
        _ => bail!(
            "--column {text}: a GC column is LENGTH_MxID_MMxFILM_UM, e.g. 30x0.25x0.25 (30 m x 0.25 mm, 0.25 µm film)"
        ),
    }
}

fn run_predict(cli: &Cli, a: &crate::cli::PredictArgs) -> Result<ExitCode> {
    use phasewise::phase::{Catalogue, PhaseMode};
    let mode = PhaseMode::parse(&a.mode).ok_or_else(|| {
        anyhow::anyhow!(
            "unknown mode `{}`; predict takes rp, hilic, gc, ic-anion or ic-cation",
            a.mode
        )
    })?;
    if mode == PhaseMode::IonExclusion {
        bail!(
            "predict has no retention model for `{}`; it takes rp, hilic, gc, ic-anion or ic-cation",
            a.mode
        );
    }
    let catalogue = Catalogue::builtin()?;
    let phase = catalogue.phase(&a.phase)?;
    if phase.mode() != mode {
        bail!(
            "phase `{}` is a {} phase, not {}",
            a.phase,
            phase.mode().as_str(),
            mode.as_str()
        );
    }
    let lc = matches!(mode, PhaseMode::Rp | PhaseMode::Hilic);
    // options that belong to another mode are refused rather than ignored
    let lc_only = [
        ("--gradient", a.gradient.is_some()),
        ("--ph", a.ph.is_some()),
        ("--modifier", a.modifier.is_some()),
        ("--t0", a.t0.is_some()),
        ("--flow", a.flow.is_some()),
        ("--particle", a.particle.is_some()),
        ("--dwell", a.dwell != 0.0),
        ("--temperature", a.temperature.is_some()),
    ];
    if !lc {
        if let Some((name, _)) = lc_only.iter().find(|(_, given)| *given) {
            bail!(
                "{name} is an LC option; for {} give {}",
                mode.as_str(),
                if mode == PhaseMode::Gc {
                    "--oven and --column LENGTH_MxID_MMxFILM_UM"
                } else {
                    "only the analytes, --phase and --risk"
                }
            );
        }
        if mode != PhaseMode::Gc && a.column.is_some() {
            bail!(
                "--column is not used for {}: the IC column is fixed (250 x 4 mm)",
                mode.as_str()
            );
        }
    } else if a.oven.is_some() {
        bail!(
            "--oven is a GC option; for {} give --gradient",
            mode.as_str()
        );
    }
    let mut opts = crate::cli::AdviseOptions {
        input: AnalyteInput {
            analytes: a.input.analytes.clone(),
            input: a.input.input.clone(),
        },
        detector: if lc {
            "uv:220"
        } else if mode == PhaseMode::Gc {
            "fid"
        } else {
            "conductivity"
        }
        .into(),
        column: None,
        particle: None,
        flow: None,
        dwell: 0.0,
        modes: vec![mode.as_str().to_string()],
        phases_available: None,
        alternatives: 1,
        risk: a.risk,
    };
    let (fixed, fixed_gc) = if lc {
        (Some(predict_lc_conditions(a, phase)?), None)
    } else if mode == PhaseMode::Gc {
        let oven = match &a.oven {
            Some(spec) => {
                let p = phasewise::model::gc::OvenProgram::parse(spec)
                    .with_context(|| format!("--oven `{spec}`"))?;
                if p.final_c() > phase.t_max_c() {
                    bail!(
                        "--oven {spec}: final temperature {} °C is above the maximum {} °C of phase `{}`",
                        p.final_c(),
                        phase.t_max_c(),
                        a.phase
                    );
                }
                Some(p)
            }
            None => None,
        };
        let column = a
            .column
            .as_deref()
            .map(|c| parse_gc_column(c, 35.0))
            .transpose()?;
        (None, Some(phasewise::advisor::FixedGc { column, oven }))
    } else {
        (None, None)
    };
    if lc {
        opts.column = a.column.clone();
        opts.particle = a.particle;
        opts.flow = a.flow;
        opts.dwell = a.dwell;
    }
    let (mut report, partial) =
        advise_report_fixed(cli, &opts, fixed, fixed_gc, Some(vec![a.phase.clone()]))?;
    let Some(rec) = report.recommendations.first().cloned() else {
        bail!("no prediction could be made");
    };
    report.recommendations = vec![rec.clone()];
    // what the user's conditions implied (buffer for the pH, flow from t0)
    let mut notes: Vec<String> = rec
        .reasons
        .iter()
        .filter(|r| r.source == "user")
        .map(|r| r.text.clone())
        .collect();
    // A time past the end of the program is the model's extrapolation of an endless final
    // hold, not a retention time the run will show: say so beside the number.
    let run_end = rec.conditions.run_time_min;
    if run_end > 0.0 {
        for p in rec
            .predictions
            .iter()
            .filter(|p| p.retention_time_min > run_end)
        {
            notes.push(format!(
                "{}: predicted at {} min, after the program ends at {} min; it does not elute in this run (the time assumes the final conditions are held); raise the final strength or extend the program",
                p.analyte,
                phasewise::report::num(p.retention_time_min, 1),
                phasewise::report::num(run_end, 1)
            ));
        }
    }
    let text = match a.format {
        OutputFormat::Json => format!(
            "{}\n",
            serde_json::to_string_pretty(&serde_json::json!({
                "schema_version": phasewise::report::SCHEMA_VERSION,
                "mode": rec.mode,
                "phase": rec.phase,
                "conditions": rec.conditions,
                "predictions": rec.predictions,
                "coelutions": rec.coelutions,
                "notes": notes,
                "unresolved": report.unresolved,
                "warnings": report.warnings,
            }))?
        ),
        OutputFormat::Table => {
            use phasewise::report::num;
            let mut t = format!("{} on {} [{}]\n", rec.mode, rec.phase.name, rec.phase.id);
            let c = &rec.conditions;
            if !lc {
                // GC and IC: the column and program used (the advisor's unless given)
                let steps: Vec<String> = c
                    .program
                    .iter()
                    .map(|p| format!("{} min {}", num(p.time_min, 1), num(p.value, 1)))
                    .collect();
                t.push_str(&format!(
                    "column {}{}; dead time {} min; program ({}): {}\n",
                    if mode == PhaseMode::Gc {
                        format!(
                            "{} m x {} mm",
                            num(c.column_length_mm / 1000.0, 1),
                            num(c.column_id_mm, 2)
                        )
                    } else {
                        format!(
                            "{} x {} mm",
                            num(c.column_length_mm, 0),
                            num(c.column_id_mm, 2)
                        )
                    },
                    c.film_um
                        .map(|f| format!(", film {} µm", num(f, 2)))
                        .unwrap_or_default(),
                    num(c.dead_time_min, 2),
                    c.program_unit,
                    steps.join(" -> ")
                ));
            }
            let coverage = rec.predictions.first().map_or(0.9, |p| p.interval_coverage);
            let interval_head = format!("{:.0} % interval (min)", coverage * 100.0);
            let extra_head = match mode {
                PhaseMode::Gc => Some("RI"),
                PhaseMode::IcAnion | PhaseMode::IcCation => Some("relative retention"),
                _ => None,
            };
            let rows: Vec<Vec<String>> = rec
                .predictions
                .iter()
                .map(|p| {
                    let mut row = vec![
                        p.analyte.clone(),
                        num(p.retention_time_min, 2),
                        format!(
                            "{}-{}",
                            num(p.interval_low_min, 2),
                            num(p.interval_high_min, 2)
                        ),
                        num(p.retention_factor, 2),
                    ];
                    match mode {
                        PhaseMode::Gc => {
                            row.push(p.retention_index.map_or("-".into(), |ri| num(ri, 0)))
                        }
                        PhaseMode::IcAnion | PhaseMode::IcCation => row.push(num(
                            p.retention_factor / phasewise::advisor::ic::K_REFERENCE,
                            2,
                        )),
                        _ => {}
                    }
                    row.push(p.path_label());
                    row
                })
                .collect();
            let mut head = vec!["analyte", "tR (min)", interval_head.as_str(), "k"];
            head.extend(extra_head);
            head.push("predicted by");
            t.push_str(&phasewise::report::table::render(&head, &rows));
            t.push('\n');
            for c in &rec.coelutions {
                t.push_str(&format!(
                    "flagged pair: {} / {}: co-elution probability {}, resolution {}\n",
                    c.a,
                    c.b,
                    phasewise::report::num(c.probability, 2),
                    phasewise::report::num(c.resolution, 2)
                ));
            }
            for n in &notes {
                t.push_str(&format!("note: {n}\n"));
            }
            for u in &report.unresolved {
                t.push_str(&format!("unresolved: {} ({})\n", u.query, u.reason));
            }
            for w in &report.warnings {
                t.push_str(&format!("warning: {w}\n"));
            }
            t
        }
        OutputFormat::Csv | OutputFormat::Tsv => {
            let d = if a.format == OutputFormat::Csv {
                ','
            } else {
                '\t'
            };
            let mut t = [
                "analyte",
                "retention_time_min",
                "interval_low_min",
                "interval_high_min",
                "retention_factor",
                "path",
            ]
            .join(&d.to_string());
            t.push('\n');
            for p in &rec.predictions {
                t.push_str(&format!(
                    "{}{d}{}{d}{}{d}{}{d}{}{d}{}\n",
                    phasewise::report::csv_cell(&p.analyte, d),
                    p.retention_time_min,
                    p.interval_low_min,
                    p.interval_high_min,
                    p.retention_factor,
                    p.path
                ));
            }
            t
        }
    };
    write_out(&text)?;
    Ok(if partial {
        ExitCode::from(EXIT_PARTIAL)
    } else {
        ExitCode::SUCCESS
    })
}

/// The fixed LC conditions of `predict --mode rp|hilic`, checked.
fn predict_lc_conditions(
    a: &crate::cli::PredictArgs,
    phase: &phasewise::phase::StationaryPhase,
) -> Result<phasewise::advisor::FixedLc> {
    let Some(gradient) = a.gradient.as_deref() else {
        bail!("give the gradient with --gradient, e.g. --gradient '0:5,20:95'");
    };
    if let Some(ph) = a.ph {
        let (lo, hi) = (
            phase.ph_min().unwrap_or(0.0),
            phase.ph_max().unwrap_or(14.0),
        );
        if !(lo..=hi).contains(&ph) {
            bail!(
                "--ph {ph} is outside the range {lo}-{hi} of phase `{}`",
                a.phase
            );
        }
    }
    if let Some(t) = a.temperature
        && !(t.is_finite() && (5.0..=phase.t_max_c()).contains(&t))
    {
        bail!(
            "--temperature {t}: must be between 5 °C and the maximum {} °C of phase `{}`",
            phase.t_max_c(),
            a.phase
        );
    }
    if let Some(m) = &a.modifier
        && m != "acetonitrile"
        && m != "methanol"
    {
        bail!("--modifier `{m}`: use acetonitrile or methanol");
    }
    let program = phasewise::model::gradient::GradientProgram::parse(gradient)?;
    if let Some(t0) = a.t0 {
        if !(t0 > 0.0 && t0.is_finite()) {
            bail!("--t0 {t0}: must be a positive number of minutes");
        }
    } else if a.flow.is_none() {
        bail!(
            "give the dead time with --t0 MIN, or the column with --column LxID and --flow ML_MIN"
        );
    }
    Ok(phasewise::advisor::FixedLc {
        gradient: program
            .points()
            .iter()
            .map(|p| (p.time_min, p.organic_pct))
            .collect(),
        ph: a.ph,
        modifier: a.modifier.clone(),
        t0_min: a.t0,
        temperature_c: a.temperature,
    })
}
