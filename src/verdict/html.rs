//! The HTML report of `check`, `merge` and `grade`: one self-contained page (inline CSS and
//! SVG, no script, no fetch) that a person reads in a browser or as a CI artifact. The class
//! table sorts on a click without script (see [`SortKey`]).
//!
//! Built with maud's `html!` templates, which escape every interpolated value, so text from a
//! log or a spec (port names, log names, bad lines) can never become markup. Pure functions
//! from report data to a string; the caller writes the file. Stage 6: may import the earlier
//! stages; grade's figures come in as [`GradeSummary`], filled in by the command line, so this
//! module knows nothing of `crate::gates`.
//!
//! Colour is never the only signal: every status has a word and a symbol, failing heat-map
//! cells carry a cross, and the hit shading is a single-hue ramp whose lightness falls
//! monotonically, so it reads in grey print and for colour-blind readers.

use std::collections::BTreeMap;

use maud::{html, Markup, PreEscaped, DOCTYPE};

use crate::corners::classes::Catalogue;
use crate::spec::Spec;
use crate::verdict::bitmap::{bit_string, failing_bits};
use crate::verdict::check::{CheckReport, Failure, Verdict};
use crate::verdict::coverage::{ClassStatus, ClassSummary};
use crate::verdict::report::verdict_line;

/// Failing vectors the page lists in detail; the rest are counted.
pub const HTML_FAILURES: usize = 100;

/// One run of a merge: a row of the page's run table.
#[derive(Debug, Clone)]
pub struct HtmlRun {
    /// The report file the run came from.
    pub name: String,
    /// Logs the run checked.
    pub logs: Vec<String>,
    /// The seed in the run's spec.
    pub seed: Option<u64>,
    /// Rows checked, passed, failed and unknown.
    pub vectors: u64,
    /// Rows whose outputs were all right.
    pub passed: u64,
    /// Rows with a known bit wrong.
    pub failed: u64,
    /// Rows with x/z outputs and no known bit wrong.
    pub unknown: u64,
    /// The run's own verdict.
    pub verdict: Verdict,
}

/// What the check page needs besides the report and the catalogue.
#[derive(Debug, Clone, Default)]
pub struct HtmlContext {
    /// The random seed of the vector set (the manifest's when the set was given).
    pub seed: Option<u64>,
    /// Where the seed comes from, for example "manifest" or "spec; no --vectors given".
    pub seed_source: String,
    /// For `merge`: one row per run (empty for `check`).
    pub runs: Vec<HtmlRun>,
}

/// One undetected fault of a grade, as the page lists it.
#[derive(Debug, Clone)]
pub struct GradeFault {
    /// The net, such as `carry[5]`.
    pub net: String,
    /// 0 or 1.
    pub stuck_at: u8,
    /// Stem or branch.
    pub site: String,
    /// The driving cell and its type.
    pub driver: String,
    /// The redundancy verdict in words.
    pub redundancy: String,
}

/// The compacted set a grade wrote.
#[derive(Debug, Clone)]
pub struct CompactedSet {
    /// Vectors in the graded set.
    pub from: usize,
    /// Vectors kept.
    pub to: usize,
    /// Where the compacted set was written.
    pub dir: String,
}

/// The figures of `arithvec grade` the page shows.
#[derive(Debug, Clone)]
pub struct GradeSummary {
    /// The graded module.
    pub module: String,
    /// The vector set directory.
    pub vector_set: String,
    /// The vector set's seed.
    pub seed: u64,
    /// Vectors applied.
    pub vectors: usize,
    /// Faults before collapsing.
    pub faults: usize,
    /// Faults after collapsing.
    pub collapsed: usize,
    /// Collapsed faults detected.
    pub detected: usize,
    /// detected / collapsed x 100.
    pub coverage_percent: f64,
    /// detected / (collapsed - proven redundant) x 100.
    pub testable_coverage_percent: f64,
    /// Collapsed faults proven redundant.
    pub redundant: usize,
    /// Undetected, not proven redundant.
    pub undetected: Vec<GradeFault>,
    /// Outputs not observed.
    pub unchecked_outputs: Vec<String>,
    /// Gates feeding only unobserved outputs.
    pub ungraded_gates: usize,
    /// `--require`, in percent.
    pub require: Option<f64>,
    /// The compacted set, when `--compact` ran.
    pub compacted: Option<CompactedSet>,
    /// Set when the run graded against the netlist's own fault-free responses
    /// (`--reference netlist`) rather than the golden model.
    pub netlist_reference: Option<NetlistReference>,
    /// Test top-up's results, when `--top-up` ran.
    pub top_up: Option<TopUpSummary>,
}

/// What `grade --top-up` found, as the page shows it.
#[derive(Debug, Clone, PartialEq)]
pub struct TopUpSummary {
    /// Vectors in the graded set.
    pub vectors_before: usize,
    /// Collapsed faults.
    pub collapsed: usize,
    /// Collapsed faults the graded set detects.
    pub detected_by_set: usize,
    /// Collapsed faults detected only by a top-up vector.
    pub detected_by_top_up: usize,
    /// Proven redundant by exhaustive simulation.
    pub proven_redundant_exhaustive: usize,
    /// Proven redundant by SAT.
    pub proven_redundant_sat: usize,
    /// Undecided: the budget ran out.
    pub aborted: usize,
    /// Conflict budget per fault.
    pub conflict_budget: u64,
    /// Conflicts the solver spent in all.
    pub conflicts_spent: u64,
    /// Of those, on aborted faults.
    pub aborted_conflicts_spent: u64,
    /// detected / collapsed x 100, after top-up.
    pub coverage_percent: f64,
    /// detected / (collapsed - proven redundant) x 100, after top-up.
    pub testable_coverage_percent: f64,
    /// The added vectors: (index among the added, the fault it was made for, method).
    pub vectors: Vec<(usize, String, String)>,
    /// Where the set plus the added vectors was written, if anywhere.
    pub out: Option<String>,
}

/// What a page graded against the netlist's own responses shows about that choice.
#[derive(Debug, Clone, PartialEq)]
pub struct NetlistReference {
    /// Vectors on which the fault-free netlist disagrees with the golden model.
    pub disagreeing_vectors: usize,
    /// The first disagreements: (vector index, port, golden hex, netlist hex).
    pub listed: Vec<(u64, String, String, String)>,
}

const CSS: &str = r#"
:root{--ink:#1a1a1a;--muted:#555;--line:#bbb;--pass:#0b5394;--fail:#b03000;--short:#7a5a00;
--pass-bg:#e4eef8;--fail-bg:#fbe3d6;--short-bg:#fbf1d3;--na-bg:#eeeeee}
*{box-sizing:border-box}
body{font:15px/1.45 system-ui,"DejaVu Sans",Arial,sans-serif;color:var(--ink);margin:0;
background:#fff;-webkit-print-color-adjust:exact;print-color-adjust:exact}
main{max-width:1240px;margin:0 auto;padding:0 20px 40px}
h1{font-size:28px;margin:0}h2{font-size:20px;margin:28px 0 8px;border-bottom:2px solid var(--ink);padding-bottom:2px}
h3{font-size:16px;margin:18px 0 6px}
.banner{padding:16px 20px;border:4px solid;margin:16px 0}
.banner.pass{border-color:var(--pass);background:var(--pass-bg)}
.banner.fail{border-color:var(--fail);background:var(--fail-bg);border-style:double;border-width:8px}
.banner.short{border-color:var(--short);background:var(--short-bg);border-style:dashed}
.banner .word{font-size:34px;font-weight:800;letter-spacing:.04em}
.banner .reason{font-family:"DejaVu Sans Mono",monospace;font-size:14px;margin:6px 0 0}
dl.meta{display:grid;grid-template-columns:max-content 1fr;gap:2px 16px;margin:0}
dl.meta dt{font-weight:600}dl.meta dd{margin:0;font-family:"DejaVu Sans Mono",monospace;overflow-wrap:anywhere}
table{border-collapse:collapse;margin:6px 0;font-size:14px}
th,td{border:1px solid var(--line);padding:3px 8px;text-align:left;vertical-align:top}
th{background:#f2f2f2}td.n,th.n{text-align:right;font-variant-numeric:tabular-nums}
tfoot td{font-weight:700;border-top:3px double var(--ink)}
td.st{white-space:nowrap}
tr.covered td.st{color:var(--pass)}tr.failing{background:var(--fail-bg)}tr.failing td.st{color:var(--fail);font-weight:700}
tr.missed{background:var(--short-bg)}tr.missed td.st{color:var(--short);font-weight:700}
tr.unreachable{color:var(--muted)}
.bar{display:inline-block;width:110px;height:12px;border:1px solid var(--ink);vertical-align:middle;background:#fff}
.bar span{display:block;height:100%;background:#2c4f7c}
code,pre,.mono{font-family:"DejaVu Sans Mono",monospace;font-size:13px}
pre{background:#f6f6f6;border:1px solid var(--line);padding:6px 8px;overflow-x:auto;margin:4px 0}
.failure{border:1px solid var(--line);border-left:6px solid var(--fail);padding:6px 12px;margin:12px 0}
.failure h3{margin:4px 0}
mark.diff{background:#ffd3bf;color:#000;font-weight:800;text-decoration:underline;text-decoration-thickness:2px}
td.bad{font-weight:700}
.legend{display:flex;flex-wrap:wrap;gap:4px 16px;align-items:center;font-size:13px;margin:4px 0}
.legend svg{vertical-align:middle}
.note{font-style:italic;color:var(--muted)}
.chart{overflow-x:auto}
footer{margin-top:32px;color:var(--muted);font-size:13px}
.sorted{display:none}.sorted.default,.sorted:target{display:block}.sorted:target~.sorted.default{display:none}
th a.sort{color:inherit;text-decoration:none;display:block}th a.sort:hover,th a.sort:focus{text-decoration:underline}
th[aria-sort]{background:#dde4ee}
@media print{.banner{break-inside:avoid}.failure{break-inside:avoid}}
"#;

/// The sequential hit ramp, light to dark (lightness falls monotonically), for levels 1..=5.
const RAMP: [&str; 5] = ["#ffffcc", "#a1dab4", "#41b6c4", "#2c7fb8", "#253494"];
const FAIL_INK: &str = "#b03000";

fn page(title: &str, body: Markup) -> String {
    html! {
        (DOCTYPE)
        html lang="en" {
            head {
                meta charset="utf-8";
                meta name="viewport" content="width=device-width, initial-scale=1";
                title { (title) }
                style { (PreEscaped(CSS)) }
            }
            body { main { (body) } }
        }
    }
    .into_string()
}

fn verdict_word(v: Verdict) -> (&'static str, &'static str, &'static str) {
    match v {
        Verdict::Pass => ("PASS", "pass", "\u{2714}"),
        Verdict::Fail => ("FAIL", "fail", "\u{2716}"),
        Verdict::CoverageShort => ("COVERAGE SHORT", "short", "\u{25D0}"),
    }
}

fn status_word(s: ClassStatus) -> (&'static str, &'static str, &'static str) {
    match s {
        ClassStatus::Covered => ("covered", "covered", "\u{2714}"),
        ClassStatus::Failing => ("FAILING", "failing", "\u{2716}"),
        ClassStatus::Missed => ("missed", "missed", "\u{25D0}"),
        ClassStatus::Unreachable => ("unreachable", "unreachable", "\u{2013}"),
    }
}

fn percent_bar(pct: f64) -> Markup {
    let w = pct.clamp(0.0, 100.0);
    html! { span.bar role="img" aria-label=(format!("{w:.2}%")) { span style=(format!("width:{w:.2}%")) {} } }
}

/// The page of a check or a merge.
pub fn render_check_html(
    report: &CheckReport,
    spec: &Spec,
    catalogue: &Catalogue,
    ctx: &HtmlContext,
) -> String {
    let (word, class, symbol) = verdict_word(report.verdict);
    let command = if ctx.runs.is_empty() {
        "check"
    } else {
        "merge"
    };
    let title = format!("arithvec {command} of {}: {word}", report.unit);
    let counts_fit = report.counts.bin_hits.len() == catalogue.bin_count()
        && report.counts.bin_failures.len() == catalogue.bin_count();
    let body = html! {
        header.banner.(class) role="status" {
            div.word { (symbol) " " (word) }
            div { "arithvec " (command) " of unit " strong { (report.unit) } }
            p.reason { (verdict_line(report)) }
        }
        (spec_section(report, spec, ctx))
        (summary_section(report))
        @if !ctx.runs.is_empty() { (runs_section(report, ctx)) }
        @if counts_fit {
            (heat_maps(report, catalogue))
            (chain_histograms(report, catalogue))
        } @else {
            h2 { "Per-bit heat map and chain lengths" }
            p.note { "Not drawn: the report's exact counts do not match this spec's catalogue of "
                (catalogue.bin_count()) " bins." }
        }
        (class_section(report))
        (failures_section(report))
        (log_problems_section(report))
        p.note { (report.note) }
        footer { (report.tool) " " (report.version) " \u{b7} spec " (report.spec_sha256) }
    };
    page(&title, body)
}

fn conventions(spec: &Spec) -> Vec<(String, String)> {
    let table: toml::Table = match spec.to_toml().parse() {
        Ok(t) => t,
        Err(_) => return Vec::new(),
    };
    match table.get("conventions").and_then(|c| c.as_table()) {
        Some(c) => c
            .iter()
            .map(|(k, v)| (k.clone(), v.as_str().unwrap_or_default().to_string()))
            .collect(),
        None => Vec::new(),
    }
}

fn spec_section(report: &CheckReport, spec: &Spec, ctx: &HtmlContext) -> Markup {
    let conv = conventions(spec);
    html! {
        h2 { "Unit and run" }
        dl.meta {
            dt { "unit" } dd { (report.unit) }
            dt { "operation" } dd { (spec.operation.name()) }
            dt { "width" } dd { (spec.width) " bits" }
            dt { "encoding" } dd { (spec.encoding.name()) }
            dt { "conventions" } dd {
                @if conv.is_empty() { "none apply to this unit" }
                @for (i, (k, v)) in conv.iter().enumerate() {
                    @if i > 0 { ", " } (k) " = " (v)
                }
            }
            dt { "seed" } dd {
                @match ctx.seed { Some(s) => { (s) }, None => { "unknown" } }
                @if !ctx.seed_source.is_empty() { " (" (ctx.seed_source) ")" }
            }
            dt { "vectors" } dd { (report.vectors) }
            dt { "logs" } dd { (report.logs.join(", ")) }
            dt { "tool version" } dd { (report.tool) " " (report.version) }
            dt { "spec SHA-256" } dd { (report.spec_sha256) }
        }
    }
}

fn summary_section(r: &CheckReport) -> Markup {
    let c = &r.coverage;
    html! {
        h2 { "Summary" }
        table {
            thead { tr {
                th.n { "vectors" } th.n { "passed" } th.n { "failed" } th.n { "unknown" }
                th { "classes covered" } th { "bins covered" } th { "gate" }
            } }
            tbody { tr {
                td.n { (r.vectors) } td.n { (r.passed) }
                td.n.bad[r.failed > 0] { (r.failed) } td.n.bad[r.unknown > 0] { (r.unknown) }
                td { (percent_bar(c.percent)) " " (c.covered) " / " (c.total) " (" (format!("{:.2}", c.percent)) "%)" }
                td { (percent_bar(c.bins_percent)) " " (c.bins_covered) " / " (c.bins_total) " (" (format!("{:.2}", c.bins_percent)) "%)" }
                td {
                    @match r.gate.require {
                        Some(req) => {
                            @if r.gate.met { "\u{2714} met: " } @else { "\u{2716} short: " }
                            (format!("{:.2}", c.percent)) "% against " (req) "%"
                        },
                        None => { "no --require given" },
                    }
                }
            } }
        }
        p { "A bin is covered at " (c.at_least) " hit" @if c.at_least != 1 { "s" } "; a class when all its reachable bins are." }
    }
}

fn runs_section(r: &CheckReport, ctx: &HtmlContext) -> Markup {
    let seeds: Vec<String> = {
        let mut s: Vec<u64> = ctx.runs.iter().filter_map(|x| x.seed).collect();
        s.sort_unstable();
        s.dedup();
        s.iter().map(u64::to_string).collect()
    };
    html! {
        h2 { "Runs merged" }
        table {
            thead { tr {
                th { "report" } th { "logs" } th.n { "seed" } th.n { "vectors" } th.n { "passed" }
                th.n { "failed" } th.n { "unknown" } th { "verdict" }
            } }
            tbody {
                @for run in &ctx.runs {
                    @let (w, _, sym) = verdict_word(run.verdict);
                    tr {
                        td.mono { (run.name) } td.mono { (run.logs.join(", ")) }
                        td.n { @if let Some(s) = run.seed { (s) } }
                        td.n { (run.vectors) } td.n { (run.passed) }
                        td.n.bad[run.failed > 0] { (run.failed) } td.n.bad[run.unknown > 0] { (run.unknown) }
                        td { (sym) " " (w) }
                    }
                }
            }
            tfoot {
                @let (w, _, sym) = verdict_word(r.verdict);
                tr {
                    td { "union of " (ctx.runs.len()) " runs" } td.mono { (r.logs.len()) " logs" }
                    td.n { (seeds.join(", ")) }
                    td.n { (r.vectors) } td.n { (r.passed) } td.n { (r.failed) } td.n { (r.unknown) }
                    td { (sym) " " (w) }
                }
            }
        }
    }
}

fn status_rank(s: ClassStatus) -> u8 {
    match s {
        ClassStatus::Failing => 0,
        ClassStatus::Missed => 1,
        ClassStatus::Covered => 2,
        ClassStatus::Unreachable => 3,
    }
}

/// A column the class table sorts by. Sorting needs no script: the page holds the table once
/// per (column, direction), each in a `div` with its own id; CSS shows the one the URL's
/// fragment names (`:target`), else the default (worst first). A column heading is a link to
/// the table sorted by that column, so a click sorts, the URL keeps the choice, and a page
/// read without CSS still shows every row.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum SortKey {
    /// Catalogue order (#).
    Catalogue,
    /// Worst first: failing (most failures first), missed, covered, unreachable.
    Status,
    /// The class id, alphabetical.
    Class,
    /// Hits.
    Hits,
    /// Failures.
    Failures,
    /// Share of bins covered.
    Bins,
}

impl SortKey {
    const ALL: [SortKey; 6] = [
        SortKey::Catalogue,
        SortKey::Status,
        SortKey::Class,
        SortKey::Hits,
        SortKey::Failures,
        SortKey::Bins,
    ];

    fn name(self) -> &'static str {
        match self {
            SortKey::Catalogue => "catalogue",
            SortKey::Status => "status",
            SortKey::Class => "class",
            SortKey::Hits => "hits",
            SortKey::Failures => "failures",
            SortKey::Bins => "bins",
        }
    }

    /// The direction a first click on the heading sorts in: most first for counts, A to Z
    /// for names, least covered first for bins, worst first for status.
    fn first_descending(self) -> bool {
        matches!(self, SortKey::Hits | SortKey::Failures)
    }
}

/// The id of the class table sorted by `key`, descending or not.
fn sort_id(key: SortKey, descending: bool) -> String {
    format!(
        "classes-by-{}-{}",
        key.name(),
        if descending { "desc" } else { "asc" }
    )
}

fn bins_share(k: &ClassSummary) -> f64 {
    if k.bins_total == 0 {
        0.0
    } else {
        k.bins_covered as f64 / k.bins_total as f64
    }
}

/// The class rows (catalogue position, class) in the order of `key`; ties keep catalogue order.
fn sorted_classes(r: &CheckReport, key: SortKey, descending: bool) -> Vec<(usize, &ClassSummary)> {
    let mut order: Vec<(usize, &ClassSummary)> = r.classes.iter().enumerate().collect();
    order.sort_by(|(i, x), (j, y)| {
        let primary = match key {
            SortKey::Catalogue => std::cmp::Ordering::Equal,
            SortKey::Status => status_rank(x.status)
                .cmp(&status_rank(y.status))
                .then(y.failures.cmp(&x.failures)),
            SortKey::Class => x.id.cmp(&y.id),
            SortKey::Hits => x.hits.cmp(&y.hits),
            SortKey::Failures => x.failures.cmp(&y.failures),
            SortKey::Bins => bins_share(x).total_cmp(&bins_share(y)),
        };
        let primary = if descending {
            primary.reverse()
        } else {
            primary
        };
        let tie = if key == SortKey::Catalogue && descending {
            j.cmp(i)
        } else {
            i.cmp(j)
        };
        primary.then(tie)
    });
    order
}

fn class_section(r: &CheckReport) -> Markup {
    let default = (SortKey::Status, false);
    html! {
        h2 { "Corner classes" }
        p { "Worst first: " strong { "\u{2716} FAILING" } ", " strong { "\u{25D0} missed" } ", "
            strong { "\u{2714} covered" } ", " strong { "\u{2013} unreachable" }
            " (no bin reachable at this width); # is the catalogue order. "
            "Click a column heading to sort by it (again to reverse); \u{25B2} / \u{25BC} marks the sorted column. "
            "Sorting needs no script: the page holds the table in each order." }
        div.sorts {
            @for key in SortKey::ALL {
                @for descending in [false, true] {
                    @if (key, descending) != default {
                        (class_table(r, key, descending, false))
                    }
                }
            }
            // The default last, so `.sorted:target ~ .default` can hide it.
            (class_table(r, default.0, default.1, true))
        }
    }
}

fn class_table(r: &CheckReport, key: SortKey, descending: bool, default: bool) -> Markup {
    let order = sorted_classes(r, key, descending);
    let heading = |column: SortKey, label: &'static str, numeric: bool| {
        let active = column == key;
        // A click on the active column reverses it; on another, sorts in its first direction.
        let next = if active {
            !descending
        } else {
            column.first_descending()
        };
        let aria = match (active, descending) {
            (false, _) => None,
            (true, false) => Some("ascending"),
            (true, true) => Some("descending"),
        };
        html! {
            th.n[numeric] aria-sort=[aria] {
                a.sort href=(format!("#{}", sort_id(column, next))) { (label)
                    @if active { @if descending { " \u{25BC}" } @else { " \u{25B2}" } } }
            }
        }
    };
    html! {
        div.sorted.default[default] id=(sort_id(key, descending)) {
            table id=[default.then_some("classes")] {
                thead { tr {
                    (heading(SortKey::Catalogue, "#", true))
                    (heading(SortKey::Status, "status", false))
                    (heading(SortKey::Class, "class", false))
                    (heading(SortKey::Hits, "hits", true))
                    (heading(SortKey::Failures, "failures", true))
                    (heading(SortKey::Bins, "bins covered", false))
                    th { "description" }
                } }
                tbody {
                    @for (i, k) in &order {
                        @let (w, cls, sym) = status_word(k.status);
                        @let pct = 100.0 * bins_share(k);
                        tr.(cls) {
                            td.n { (i + 1) }
                            td.st { (sym) " " (w) }
                            td.mono { (k.id) }
                            td.n { (k.hits) }
                            td.n.bad[k.failures > 0] { (k.failures) }
                            td { (percent_bar(pct)) " " (k.bins_covered) " / " (k.bins_total) }
                            td {
                                (k.description)
                                @if !k.missed_bins.is_empty() {
                                    br; span.mono { "missed: " (k.missed_bins.join(" "))
                                        @if k.bins_total - k.bins_covered > k.missed_bins.len() { " \u{2026}" } }
                                }
                                @if !k.failing_bins.is_empty() {
                                    br; span.mono { "failing (failures/hits): "
                                        @for (n, b) in k.failing_bins.iter().take(8).enumerate() {
                                            @if n > 0 { ", " } (b.bin) " (" (b.failures) "/" (b.hits) ")"
                                        }
                                    }
                                }
                            }
                        }
                    }
                }
            }
        }
    }
}

/// Shading level 0 (no hits) to 5 (the most hits), on a log scale relative to `max`.
fn level(hits: u64, max: u64) -> usize {
    if hits == 0 {
        return 0;
    }
    if max <= 1 {
        return 5;
    }
    let f = ((hits as f64).ln() / (max as f64).ln()).clamp(0.0, 1.0);
    1 + ((f * 4.0).round() as usize).min(4)
}

fn short_count(n: u64) -> String {
    match n {
        0..=999 => n.to_string(),
        1_000..=999_999 => format!("{}k", n / 1_000),
        _ => format!("{}M", n / 1_000_000),
    }
}

/// SVG `<defs>` shared by the charts: the hatch for unreachable bins.
fn hatch_defs(id: &str) -> Markup {
    html! {
        defs {
            pattern id=(id) width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)" {
                rect width="6" height="6" fill="#eeeeee" {}
                line x1="0" y1="0" x2="0" y2="6" stroke="#999" stroke-width="2" {}
            }
        }
    }
}

struct Cell {
    hits: u64,
    failures: u64,
    reachable: bool,
    label: String,
}

fn heat_maps(r: &CheckReport, catalogue: &Catalogue) -> Markup {
    let classes: Vec<_> = catalogue
        .classes()
        .iter()
        .filter(|c| c.id().ends_with("cell.rows"))
        .collect();
    html! {
        h2 { "Per-bit cell rows" }
        @if classes.is_empty() {
            p { "This unit has no ripple bit cells (no cell.rows class), so there is no heat map." }
        }
        @for class in &classes {
            (heat_map(r, catalogue, class.id(), class.first_bin(), class.bin_labels(), class.description()))
        }
    }
}

/// Parses `bitI.aXbYcZ` into (I, row), row = 4a + 2b + c.
fn cell_label(label: &str) -> Option<(u32, usize)> {
    let rest = label.strip_prefix("bit")?;
    let (bit, rows) = rest.split_once('.')?;
    let bit: u32 = bit.parse().ok()?;
    let b = rows.as_bytes();
    if b.len() != 6 || b[0] != b'a' || b[2] != b'b' || b[4] != b'c' {
        return None;
    }
    let d = |c: u8| match c {
        b'0' => Some(0),
        b'1' => Some(1),
        _ => None,
    };
    Some((bit, d(b[1])? * 4 + d(b[3])? * 2 + d(b[5])?))
}

fn heat_map(
    r: &CheckReport,
    catalogue: &Catalogue,
    id: &str,
    first: usize,
    labels: &[String],
    description: &str,
) -> Markup {
    let mut cells: BTreeMap<(u32, usize), Cell> = BTreeMap::new();
    for (j, label) in labels.iter().enumerate() {
        if let Some(key) = cell_label(label) {
            cells.insert(
                key,
                Cell {
                    hits: r.counts.bin_hits[first + j],
                    failures: r.counts.bin_failures[first + j],
                    reachable: catalogue.is_reachable(first + j),
                    label: label.clone(),
                },
            );
        }
    }
    let bits = cells.keys().map(|(b, _)| b + 1).max().unwrap_or(0);
    let max = cells.values().map(|c| c.hits).max().unwrap_or(0);
    let cw: u32 = (960 / bits.max(1)).clamp(7, 44);
    let ch: u32 = 24;
    let left: u32 = 92;
    let top: u32 = 34;
    let width = left + cw * bits + 10;
    let height = top + ch * 8 + 30;
    let numbers = cw >= 26;
    let label_every = if cw >= 18 {
        1
    } else if cw >= 10 {
        4
    } else {
        8
    };
    let cin = if id.contains("sub") || description.contains("borrow") {
        "bin"
    } else {
        "cin"
    };
    let failing_cells = cells.values().filter(|c| c.failures > 0).count();
    let all_failed = cells
        .values()
        .filter(|c| c.failures > 0 && c.failures == c.hits)
        .count();
    let hatch = format!("hatch-{}", id.replace('.', "-"));
    html! {
        h3 { (id) }
        p { (description) ". Bits run MSB left to LSB right; each row is one (a, b, " (cin) ") input of the bit's cell; shading is hits on a log scale; "
            strong { "\u{2716} a cross marks a cell where every hit failed" } " (" (all_failed) " cell" @if all_failed != 1 { "s" } "), "
            strong { "\u{2571} a slash one where some hits failed" } " (" (failing_cells - all_failed) "). A bug in one cell shows as crosses in its bit's rows "
            "while failures elsewhere, which only share vectors with it, get slashes." }
        div.chart {
            svg.heatmap xmlns="http://www.w3.org/2000/svg" width=(width) height=(height) viewBox=(format!("0 0 {width} {height}"))
                role="img" aria-label=(format!("heat map of {id}: {bits} bits by 8 cell rows, {all_failed} cells where every hit failed, {failing_cells} with failures")) {
                (hatch_defs(&hatch))
                text x="4" y=(top - 8) font-size="12" font-weight="700" { "a b " (cin) }
                text x=(left) y="12" font-size="12" { "bit" }
                @for bit in 0..bits {
                    @let x = left + cw * (bits - 1 - bit);
                    @if bit.is_multiple_of(label_every) || bit == bits - 1 {
                        text x=(x + cw / 2) y=(top - 8) font-size="11" text-anchor="middle" { (bit) }
                    }
                }
                @for row in 0..8usize {
                    @let y = top + ch * row as u32;
                    text x="4" y=(y + 16) font-size="12" font-family="DejaVu Sans Mono,monospace" {
                        ((row >> 2) & 1) " " ((row >> 1) & 1) " " (row & 1)
                    }
                    @for bit in 0..bits {
                        @let x = left + cw * (bits - 1 - bit);
                        @if let Some(c) = cells.get(&(bit, row)) {
                            @let lv = level(c.hits, max);
                            @let fill = if !c.reachable { format!("url(#{hatch})") } else if lv == 0 { "#ffffff".to_string() } else { RAMP[lv - 1].to_string() };
                            g {
                                title { (c.label) ": " (c.hits) " hits, " (c.failures) " failures"
                                    @if !c.reachable { " (unreachable)" } }
                                rect x=(x) y=(y) width=(cw) height=(ch) fill=(fill)
                                    stroke=(if c.failures > 0 && c.failures == c.hits { FAIL_INK } else { "#888" })
                                    stroke-width=(if c.failures > 0 && c.failures == c.hits { "3" } else { "0.5" })
                                    stroke-dasharray=(if c.reachable && c.hits == 0 { "3 2" } else { "none" }) {}
                                @let ink = if lv >= 4 { "#fff" } else { "#000" };
                                @if c.failures > 0 && c.failures == c.hits {
                                    path.allfail d=(format!("M{} {}L{} {}M{} {}L{} {}", x + 3, y + 3, x + cw - 3, y + ch - 3, x + cw - 3, y + 3, x + 3, y + ch - 3))
                                        stroke=(ink) stroke-width="2.5" {}
                                } @else if c.failures > 0 {
                                    path.somefail d=(format!("M{} {}L{} {}", x + 3, y + ch - 3, x + cw - 3, y + 3))
                                        stroke=(ink) stroke-width="1" {}
                                } @else if numbers && c.reachable {
                                    text x=(x + cw / 2) y=(y + 16) font-size="10" text-anchor="middle"
                                        fill=(if lv >= 4 { "#fff" } else { "#000" }) { (short_count(c.hits)) }
                                }
                            }
                        }
                    }
                }
                text x=(left) y=(top + ch * 8 + 20) font-size="11" fill="#555" { "max " (max) " hits per cell" }
            }
        }
        (heat_legend(max, &hatch))
    }
}

fn heat_legend(max: u64, hatch: &str) -> Markup {
    let swatch = |fill: &str, extra: Markup| -> Markup {
        html! {
            svg xmlns="http://www.w3.org/2000/svg" width="22" height="16" {
                (hatch_defs(hatch))
                rect x="1" y="1" width="20" height="14" fill=(fill) stroke="#888" {}
                (extra)
            }
        }
    };
    // The hit count at which each shading level starts, from `level`'s log scale.
    let bound = |lv: usize| -> u64 {
        if max <= 1 || lv <= 1 {
            return 1;
        }
        let f = (lv as f64 - 1.5) / 4.0;
        ((max as f64).powf(f).ceil() as u64).max(1)
    };
    html! {
        div.legend {
            span { "hits:" }
            span { (swatch("#ffffff", html! {})) " 0 (dashed)" }
            @for lv in 1..=5usize {
                span { (swatch(RAMP[lv - 1], html! {})) " \u{2265}" (bound(lv)) }
            }
            span { (swatch(&format!("url(#{hatch})"), html! {})) " unreachable" }
            span { (swatch("#ffffff", html! { path d="M4 4L18 12M18 4L4 12" stroke="#000" stroke-width="2" {} })) " \u{2716} every hit failed (red border)" }
            span { (swatch("#ffffff", html! { path d="M4 13L18 3" stroke="#000" stroke-width="1" {} })) " \u{2571} some hits failed" }
        }
    }
}

fn chain_histograms(r: &CheckReport, catalogue: &Catalogue) -> Markup {
    let classes: Vec<_> = catalogue
        .classes()
        .iter()
        .filter(|c| c.id().ends_with("chain.length") || c.id().ends_with("chain.carry_in"))
        .collect();
    html! {
        h2 { "Carry and borrow chain lengths" }
        @if classes.is_empty() {
            p { "This unit has no ripple chain classes." }
        }
        @for class in &classes {
            (histogram(r, catalogue, class.id(), class.first_bin(), class.bin_labels(), class.description()))
        }
    }
}

fn histogram(
    r: &CheckReport,
    catalogue: &Catalogue,
    id: &str,
    first: usize,
    labels: &[String],
    description: &str,
) -> Markup {
    let n = labels.len() as u32;
    let hits: Vec<u64> = (0..labels.len())
        .map(|j| r.counts.bin_hits[first + j])
        .collect();
    let fails: Vec<u64> = (0..labels.len())
        .map(|j| r.counts.bin_failures[first + j])
        .collect();
    let max = hits.iter().copied().max().unwrap_or(0);
    let bw: u32 = (960 / n.max(1)).clamp(5, 40);
    let left: u32 = 56;
    let plot_h: u32 = 160;
    let top: u32 = 16;
    let width = left + bw * n + 10;
    let height = top + plot_h + 44;
    let scale = |h: u64| -> u32 {
        if h == 0 || max == 0 {
            0
        } else {
            let f = (1.0 + h as f64).ln() / (1.0 + max as f64).ln();
            ((f * plot_h as f64).round() as u32).max(2)
        }
    };
    let mut ticks: Vec<u64> = vec![1];
    while ticks.last().is_some_and(|&t| t * 10 <= max) {
        ticks.push(ticks.last().unwrap() * 10);
    }
    let label_every = if bw >= 18 {
        1
    } else if bw >= 9 {
        4
    } else {
        8
    };
    let at_least = r.coverage.at_least;
    let missed = (0..labels.len())
        .filter(|&j| catalogue.is_reachable(first + j) && hits[j] < at_least)
        .count();
    let hatch = format!("hatch-{}", id.replace('.', "-"));
    html! {
        h3 { (id) }
        p { (description) ". Bars are hits per chain length k (log scale); "
            strong { "\u{25CB} a dashed outline is a bin short of " (at_least) " hit" @if at_least != 1 { "s" } }
            " (" (missed) " here), hatched is unreachable, "
            strong { "\u{2716} marks a bin where every hit failed" } " (filled red), "
            strong { "! one where some failed" } "." }
        div.chart {
            svg.histogram xmlns="http://www.w3.org/2000/svg" width=(width) height=(height) viewBox=(format!("0 0 {width} {height}"))
                role="img" aria-label=(format!("histogram of {id}: {n} bins, {missed} short")) {
                (hatch_defs(&hatch))
                @for t in &ticks {
                    @let y = top + plot_h - scale(*t);
                    line x1=(left - 4) y1=(y) x2=(left + bw * n) y2=(y) stroke="#ddd" {}
                    text x=(left - 6) y=(y + 4) font-size="10" text-anchor="end" { (short_count(*t)) }
                }
                line x1=(left) y1=(top) x2=(left) y2=(top + plot_h) stroke="#000" {}
                line x1=(left) y1=(top + plot_h) x2=(left + bw * n) y2=(top + plot_h) stroke="#000" {}
                @for j in 0..labels.len() {
                    @let x = left + bw * j as u32;
                    @let h = scale(hits[j]);
                    @let reachable = catalogue.is_reachable(first + j);
                    g {
                        title { (labels[j]) ": " (hits[j]) " hits, " (fails[j]) " failures" @if !reachable { " (unreachable)" } }
                        @if !reachable {
                            rect x=(x + 1) y=(top + plot_h - 20) width=(bw - 2) height="20" fill=(format!("url(#{hatch})")) {}
                        } @else if hits[j] < at_least {
                            rect x=(x + 1) y=(top + plot_h - h.max(12)) width=(bw - 2) height=(h.max(12)) fill="#fff" stroke="#000" stroke-dasharray="3 2" {}
                        } @else {
                            rect x=(x + 1) y=(top + plot_h - h) width=(bw - 2) height=(h) fill=(if fails[j] > 0 && fails[j] == hits[j] { FAIL_INK } else { RAMP[3] }) stroke="#000" stroke-width="0.5" {}
                        }
                        @if fails[j] > 0 {
                            text x=(x + bw / 2) y=(top + plot_h - h.max(12) - 3) font-size="11" text-anchor="middle" font-weight="700" {
                                @if fails[j] == hits[j] { "\u{2716}" } @else { "!" }
                            }
                        }
                    }
                    @if (j as u32).is_multiple_of(label_every) || j + 1 == labels.len() {
                        text x=(x + bw / 2) y=(top + plot_h + 14) font-size="10" text-anchor="middle" { (j) }
                    }
                }
                text x=(left) y=(height - 6) font-size="11" fill="#555" { "chain length k (bit positions); max " (max) " hits" }
            }
        }
    }
}

/// `bits` with the positions in `differ` (LSB = 0; string is MSB first) wrapped in `<mark>`.
fn marked_bits(bits: &str, differ: &[u32]) -> Markup {
    let w = bits.len();
    html! {
        @for (i, ch) in bits.chars().enumerate() {
            @let pos = (w - 1 - i) as u32;
            @if differ.contains(&pos) { mark.diff title=(format!("bit {pos}")) { (ch) } } @else { (ch) }
        }
    }
}

fn failure_block(f: &Failure) -> Markup {
    html! {
        div.failure {
            h3 { "\u{2716} " (f.kind) " at vector " (f.index) " (log line " (f.line) ")" }
            table {
                thead { tr { th { "input" } th { "hex" } th { "decoded" } } }
                tbody {
                    @for i in &f.inputs {
                        tr { td.mono { (i.port) } td.mono { "0x" (i.hex) } td.mono { (i.value) } }
                    }
                }
            }
            table {
                thead { tr { th { "output" } th { "status" } th { "expected" } th { "got" } th { "bits (expected / got, differing marked)" } } }
                tbody {
                    @for o in &f.outputs {
                        @let bad = o.status != "ok";
                        tr {
                            td.mono { (o.port) }
                            td.bad[bad] { @if bad { "\u{2716} " } @else { "\u{2714} " } (o.status) }
                            td.mono { "0x" (o.expected) " (" (o.expected_value) ")" }
                            td.mono.bad[bad] { "0x" (o.got)
                                @if !o.got_as.is_empty() {
                                    " ("
                                    @for (n, (e, v)) in o.got_as.iter().enumerate() { @if n > 0 { ", " } (e) " " (v) }
                                    ")"
                                }
                            }
                            td.mono {
                                @if let (Some(e), Some(g)) = (&o.expected_bin, &o.got_bin) {
                                    @if bad && e.len() > 1 {
                                        (e) br; (marked_bits(g, &o.differing_bits))
                                    } @else if bad { (e) " / " (marked_bits(g, &o.differing_bits)) }
                                } @else if !o.differing_bits.is_empty() {
                                    "differing bits: " (crate::verdict::report::list_numbers(&o.differing_bits))
                                }
                                @if !o.unknown_bits.is_empty() {
                                    br; "unknown (x/z) bits: " (crate::verdict::report::list_numbers(&o.unknown_bits))
                                }
                            }
                        }
                    }
                }
            }
            p { "classes: " span.mono { (f.classes.join(" ")) } }
            p { "reproduce: " code { (f.repro) } }
        }
    }
}

fn failures_section(r: &CheckReport) -> Markup {
    let listed = r.failures.len().min(HTML_FAILURES);
    let total = r.failed + r.unknown;
    let more = total.saturating_sub(listed as u64);
    let bits = failing_bits(r);
    html! {
        h2 { "Failing vectors" }
        @if total == 0 {
            p { "\u{2714} None: every checked vector matched the golden model." }
        } @else {
            p { (total) " failing vector" @if total != 1 { "s" } " (" (r.failed) " mismatched, " (r.unknown) " unknown); the first " (listed) " in log order:" }
            @if !bits.is_empty() {
                p { "Failing bits in the listed failures (MSB left, # = differs in at least one):" }
                pre { @for p in &bits {
                    (p.port) @if p.width > 1 { "[" (p.width - 1) ":0]" } "  " (bit_string(p))
                    "   bits " (bit_list(&p.counts)) "\n"
                } }
            }
            @for f in r.failures.iter().take(HTML_FAILURES) { (failure_block(f)) }
            @if more > 0 {
                p { strong { "\u{2026} and " (more) " more failing vector" @if more != 1 { "s" } } " not listed"
                    @if r.failures.len() < HTML_FAILURES { " (the report kept " (r.failures.len()) "; raise --max-failures to keep more)" } "." }
            }
        }
    }
}

fn bit_list(counts: &[u64]) -> String {
    let v: Vec<String> = counts
        .iter()
        .enumerate()
        .rev()
        .filter(|(_, &c)| c > 0)
        .map(|(i, c)| format!("{i} (\u{d7}{c})"))
        .collect();
    v.join(", ")
}

fn log_problems_section(r: &CheckReport) -> Markup {
    let p = &r.log_problems;
    let any = p.missing > 0
        || p.duplicate_count > 0
        || !p.out_of_range.is_empty()
        || p.out_of_step.is_some()
        || p.bad_line_count > 0;
    html! {
        h2 { "Log completeness" }
        @if !any {
            p { "\u{2714} Complete: every vector of the set appears once, in step, and every line parsed." }
        } @else {
            ul {
                @if p.missing > 0 {
                    li { strong { "\u{2716} missing: " } (p.missing) " vectors of the set are not in the log; first: " span.mono { (crate::verdict::report::list_numbers(&p.missing_first)) } }
                }
                @if p.duplicate_count > 0 {
                    li { strong { "\u{2716} duplicates: " } (p.duplicate_count) " repeated indices: " span.mono { (crate::verdict::report::list_lines(&p.duplicates)) } }
                }
                @if !p.out_of_range.is_empty() {
                    li { strong { "\u{2716} out of range: " } "indices outside the vector set: " span.mono { (crate::verdict::report::list_lines(&p.out_of_range)) } }
                }
                @if let Some(o) = &p.out_of_step {
                    li { strong { "\u{2716} out of step: " } (o.count) " rows carry operands that are not those of their index, starting at index " (o.first_index) " (log line " (o.first_line) ")" }
                }
                @if p.bad_line_count > 0 {
                    li { strong { (p.bad_line_count) " unparseable lines" } " skipped (--lenient):"
                        pre { @for l in &p.bad_lines { (l) "\n" } } }
                }
            }
        }
    }
}

/// The page of a fault grade.
pub fn render_grade_html(spec: &Spec, g: &GradeSummary) -> String {
    let short = g.require.is_some_and(|r| g.coverage_percent < r);
    let (word, class, symbol) = match g.require {
        Some(_) if short => ("COVERAGE SHORT", "short", "\u{25D0}"),
        Some(_) => ("PASS", "pass", "\u{2714}"),
        None => ("GRADED", "short", "\u{25CB}"),
    };
    // Against the netlist's own responses the verdict word says so, so no page reads as a
    // plain pass of a unit the golden model was not compared with.
    let word = match &g.netlist_reference {
        Some(_) => format!("{word} AGAINST THE NETLIST"),
        None => word.to_string(),
    };
    let reason = match g.require {
        Some(req) => format!(
            "fault coverage {:.2}% ({} of {} collapsed faults detected) against a requirement of {req}%",
            g.coverage_percent, g.detected, g.collapsed
        ),
        None => format!(
            "fault coverage {:.2}% ({} of {} collapsed faults detected); no --require given, so no gate",
            g.coverage_percent, g.detected, g.collapsed
        ),
    };
    let title = format!("arithvec grade of {}: {word}", spec.name);
    let conv = conventions(spec);
    // Undetected faults by net (the name before any [bit]) and by bit position.
    let mut by_net: BTreeMap<&str, (usize, usize)> = BTreeMap::new();
    let mut by_bit: BTreeMap<u32, usize> = BTreeMap::new();
    let mut no_bit = 0usize;
    for f in &g.undetected {
        let (base, bit) = split_net(&f.net);
        let e = by_net.entry(base).or_default();
        if f.stuck_at == 0 {
            e.0 += 1;
        } else {
            e.1 += 1;
        }
        match bit {
            Some(b) => *by_bit.entry(b).or_default() += 1,
            None => no_bit += 1,
        }
    }
    let mut nets: Vec<(&str, (usize, usize))> = by_net.into_iter().collect();
    nets.sort_by(|x, y| (y.1 .0 + y.1 .1).cmp(&(x.1 .0 + x.1 .1)).then(x.0.cmp(y.0)));
    let body = html! {
        header.banner.(class) role="status" {
            div.word { (symbol) " " (word) }
            div { "arithvec grade of unit " strong { (spec.name) } ", module " strong { (g.module) } }
            p.reason { "verdict: " (word) ": " (reason) }
        }
        @if let Some(r) = &g.netlist_reference {
            section.banner.fail role="alert" {
                div.word { "\u{26A0} GRADED AGAINST THE NETLIST, NOT THE GOLDEN MODEL" }
                p { "--reference netlist: a fault counts as detected when an output differs from the fault-free netlist's own response. "
                    @if r.disagreeing_vectors == 0 {
                        "The fault-free netlist agrees with the golden model on every vector."
                    } @else {
                        "The fault-free netlist disagrees with the golden model on " strong { (r.disagreeing_vectors) } " of " (g.vectors) " vectors: it does not implement the spec."
                    }
                }
                @if !r.listed.is_empty() {
                    table {
                        thead { tr { th.n { "vector" } th { "port" } th { "golden model" } th { "netlist" } } }
                        tbody { @for (index, port, want, got) in &r.listed {
                            tr { td.n { (index) } td.mono { (port) } td.mono { "0x" (want) } td.mono.bad { "0x" (got) } }
                        } }
                    }
                }
            }
        }
        h2 { "Unit and run" }
        dl.meta {
            dt { "unit" } dd { (spec.name) }
            dt { "operation" } dd { (spec.operation.name()) }
            dt { "width" } dd { (spec.width) " bits" }
            dt { "encoding" } dd { (spec.encoding.name()) }
            dt { "conventions" } dd {
                @if conv.is_empty() { "none apply to this unit" }
                @for (i, (k, v)) in conv.iter().enumerate() { @if i > 0 { ", " } (k) " = " (v) }
            }
            dt { "reference" } dd {
                @if g.netlist_reference.is_some() { "the netlist's own fault-free responses (--reference netlist)" }
                @else { "the golden model (the fault-free netlist reproduces it on every vector)" }
            }
            dt { "module" } dd { (g.module) }
            dt { "vector set" } dd { (g.vector_set) }
            dt { "seed" } dd { (g.seed) " (manifest)" }
            dt { "vectors" } dd { (g.vectors) }
            dt { "tool version" } dd { "arithvec " (env!("CARGO_PKG_VERSION")) }
            dt { "spec SHA-256" } dd { (crate::sets::vectorset::spec_identity(spec)) }
        }
        h2 { "Fault coverage" }
        table {
            thead { tr {
                th.n { "faults" } th.n { "collapsed" } th.n { "detected" } th.n { "undetected" }
                th.n { "proven redundant" } th { "coverage" } th { "testable coverage" }
            } }
            tbody { tr {
                td.n { (g.faults) } td.n { (g.collapsed) } td.n { (g.detected) }
                td.n.bad[!g.undetected.is_empty()] { (g.undetected.len()) } td.n { (g.redundant) }
                td { (percent_bar(g.coverage_percent)) " " (format!("{:.2}", g.coverage_percent)) "%" }
                td { (percent_bar(g.testable_coverage_percent)) " " (format!("{:.2}", g.testable_coverage_percent)) "%" }
            } }
        }
        p { "Coverage is detected / collapsed faults; faults proven redundant (no input can detect them) stay in the denominator. Testable coverage leaves them out." }
        @if !g.unchecked_outputs.is_empty() {
            p { "Not observed: " span.mono { (g.unchecked_outputs.join(", ")) } " (not in the spec's [ports], so no test compares them); "
                (g.ungraded_gates) " gates feeding only them are not graded." }
        }
        h2 { "Undetected faults" }
        @if g.undetected.is_empty() {
            p { "\u{2714} None: every collapsed fault that is not proven redundant is detected." }
        } @else {
            h3 { "By bit position" }
            (bit_chart(&by_bit, no_bit))
            h3 { "By net" }
            table {
                thead { tr { th { "net" } th.n { "stuck-at-0" } th.n { "stuck-at-1" } th.n { "total" } } }
                tbody { @for (net, (s0, s1)) in nets.iter().take(100) {
                    tr { td.mono { (net) } td.n { (s0) } td.n { (s1) } td.n { (s0 + s1) } }
                } }
            }
            @if nets.len() > 100 { p { "\u{2026} and " (nets.len() - 100) " more nets." } }
            h3 { "The faults" }
            table {
                thead { tr { th { "net" } th { "fault" } th { "site" } th { "driven by" } th { "redundancy" } } }
                tbody { @for f in g.undetected.iter().take(200) {
                    tr { td.mono { (f.net) } td { "stuck-at-" (f.stuck_at) } td.mono { (f.site) } td.mono { (f.driver) } td { (f.redundancy) } }
                } }
            }
            @if g.undetected.len() > 200 { p { "\u{2026} and " (g.undetected.len() - 200) " more (see --format json)." } }
        }
        h2 { "Test top-up" }
        @match &g.top_up {
            Some(t) => {
                p { "SAT fault miter per fault the set leaves undetected; budget " (t.conflict_budget)
                    " conflicts per fault; the solver stops at the first check past it; spent: "
                    (t.conflicts_spent) " conflicts in all, " (t.aborted_conflicts_spent) " on aborted faults." }
                table.topup {
                    thead { tr {
                        th.n { "collapsed" } th.n { "detected by set" } th.n { "detected by top-up vector" }
                        th.n { "proven redundant" } th.n { "aborted" } th { "coverage" } th { "testable coverage" }
                    } }
                    tbody { tr {
                        td.n { (t.collapsed) } td.n { (t.detected_by_set) } td.n { (t.detected_by_top_up) }
                        td.n { (t.proven_redundant_exhaustive + t.proven_redundant_sat) " ("
                            (t.proven_redundant_exhaustive) " exhaustive, " (t.proven_redundant_sat) " SAT)" }
                        td.n.bad[t.aborted > 0] { (t.aborted) }
                        td { (percent_bar(t.coverage_percent)) " " (format!("{:.2}", t.coverage_percent)) "%" }
                        td { (percent_bar(t.testable_coverage_percent)) " " (format!("{:.2}", t.testable_coverage_percent)) "%" }
                    } }
                }
                p { "Testable coverage is detected / (collapsed - proven redundant). An aborted fault is undecided: nothing is claimed about it." }
                h3 { "Top-up vectors" }
                @if t.vectors.is_empty() {
                    p { "None added." }
                } @else {
                    table.topup-vectors {
                        thead { tr { th.n { "index" } th { "fault" } th { "method" } } }
                        tbody { @for (i, fault, method) in t.vectors.iter().take(500) {
                            tr { td.n { (t.vectors_before + i) } td.mono { (fault) } td { (method) } }
                        } }
                    }
                    @if t.vectors.len() > 500 { p { "\u{2026} and " (t.vectors.len() - 500) " more (see --format json)." } }
                }
                @match &t.out {
                    Some(d) => { p { "Wrote the set plus " (t.vectors.len()) " top-up vectors to " span.mono { (d) } "." } },
                    None => { p { "No --out given: nothing written." } },
                }
            },
            None => { p { "Not run (pass --top-up)." } },
        }
        h2 { "Compacted set" }
        @match &g.compacted {
            Some(c) => {
                p { "Compacted " (c.from) " vectors to " strong { (c.to) } " ("
                    (format!("{:.1}", if c.from == 0 { 0.0 } else { 100.0 * c.to as f64 / c.from as f64 }))
                    "% of the set) in " span.mono { (c.dir) }
                    ": greedy set cover keeping every detected fault and every class bin the full set hits; small, not proven minimum." }
            },
            None => { p { "Not run (pass --compact --out DIR)." } },
        }
        p.note { "Fault coverage, like class coverage, is evidence, not proof; sign-off follows your team's own verification plan." }
        footer { "arithvec " (env!("CARGO_PKG_VERSION")) }
    };
    page(&title, body)
}

/// `carry[5]` -> ("carry", Some(5)); `n12` -> ("n12", None).
fn split_net(net: &str) -> (&str, Option<u32>) {
    if let Some(open) = net.rfind('[') {
        if let Some(inner) = net[open + 1..].strip_suffix(']') {
            if let Ok(b) = inner.parse() {
                return (&net[..open], Some(b));
            }
        }
    }
    (net, None)
}

fn bit_chart(by_bit: &BTreeMap<u32, usize>, no_bit: usize) -> Markup {
    let bits = by_bit.keys().max().map_or(0, |b| b + 1);
    let max = by_bit.values().copied().max().unwrap_or(0).max(1);
    let bw: u32 = (960 / bits.max(1)).clamp(5, 40);
    let left: u32 = 40;
    let plot_h: u32 = 120;
    let top: u32 = 14;
    let width = left + bw * bits + 10;
    let height = top + plot_h + 40;
    let label_every = if bw >= 18 { 1 } else { 4 };
    html! {
        @if bits == 0 {
            p { "No undetected fault sits on a net with a bit index." }
        } @else {
            div.chart {
                svg.faultbits xmlns="http://www.w3.org/2000/svg" width=(width) height=(height) viewBox=(format!("0 0 {width} {height}"))
                    role="img" aria-label="undetected faults by bit position" {
                    line x1=(left) y1=(top) x2=(left) y2=(top + plot_h) stroke="#000" {}
                    line x1=(left) y1=(top + plot_h) x2=(left + bw * bits) y2=(top + plot_h) stroke="#000" {}
                    text x=(left - 6) y=(top + 8) font-size="10" text-anchor="end" { (max) }
                    text x=(left - 6) y=(top + plot_h) font-size="10" text-anchor="end" { "0" }
                    @for bit in 0..bits {
                        @let x = left + bw * (bits - 1 - bit);
                        @let n = by_bit.get(&bit).copied().unwrap_or(0);
                        @let h = (n as u32 * plot_h) / max as u32;
                        g {
                            title { "bit " (bit) ": " (n) " undetected" }
                            @if n > 0 {
                                rect x=(x + 1) y=(top + plot_h - h) width=(bw - 2) height=(h) fill=(FAIL_INK) stroke="#000" stroke-width="0.5" {}
                                text x=(x + bw / 2) y=(top + plot_h - h - 3) font-size="10" text-anchor="middle" { (n) }
                            }
                        }
                        @if bit.is_multiple_of(label_every) || bit == bits - 1 {
                            text x=(x + bw / 2) y=(top + plot_h + 14) font-size="10" text-anchor="middle" { (bit) }
                        }
                    }
                    text x=(left) y=(height - 6) font-size="11" fill="#555" { "bit position of the net (MSB left)" }
                }
            }
        }
        @if no_bit > 0 { p { (no_bit) " undetected fault" @if no_bit != 1 { "s" } " on nets without a bit index (internal gate nets) are in the net table below." } }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cell_labels_parse() {
        assert_eq!(cell_label("bit8.a0b0c1"), Some((8, 1)));
        assert_eq!(cell_label("bit0.a1b1c0"), Some((0, 6)));
        assert_eq!(cell_label("k=3"), None);
    }

    #[test]
    fn levels_are_monotone() {
        let mut last = 0;
        for h in [0u64, 1, 2, 10, 100, 1000] {
            let l = level(h, 1000);
            assert!(l >= last, "{h}: {l} < {last}");
            last = l;
        }
        assert_eq!(level(0, 1000), 0);
        assert_eq!(level(1000, 1000), 5);
    }

    #[test]
    fn nets_split_at_their_bit() {
        assert_eq!(split_net("carry[5]"), ("carry", Some(5)));
        assert_eq!(split_net("$abc$12$n3"), ("$abc$12$n3", None));
    }
}
