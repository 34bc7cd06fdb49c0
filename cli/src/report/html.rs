//! Assembles the self-contained HTML page: inline CSS, the cautions box, warnings, run
//! descriptions, tables and inline SVG figures. No scripts, external styles or fonts; the
//! page prints on paper as it shows on screen.

use std::fmt::Write;

use boreflux_solver::safety::CAUTION;

use super::escape::esc;
use super::figures::{figures, run_style};
use super::read::Run;
use super::{headline, run_letter, run_title, tables};

pub(super) const STYLE: &str = "\
body{font-family:sans-serif;max-width:1000px;margin:1.5em auto;padding:0 1em;color:#111;line-height:1.4}
h1{font-size:1.6em;margin-bottom:.2em}
h2{font-size:1.25em;border-bottom:2px solid #444;padding-bottom:.15em;margin-top:1.8em}
h3{font-size:1.05em;margin:1.2em 0 .3em}
.lead{color:#333}
.caution{border:3px solid #a93226;background:#fdf2f0;padding:.4em 1em;margin:1em 0}
.caution h2{border:none;margin:.3em 0;color:#a93226}
.warnings{border-left:6px solid #ca6f1e;background:#fef5e7;padding:.3em 1em;margin:1em 0}
.warnings h2{border:none;margin:.3em 0}
.warnings li{margin:.2em 0}
table{border-collapse:collapse;width:100%;font-size:.9em;margin:.6em 0}
th,td{border:1px solid #bbb;padding:.25em .45em;text-align:left;vertical-align:top}
thead th{background:#e8e8e8}
tbody th{font-weight:normal;background:#fafafa}
tr.section th{background:#eef2f6;font-weight:bold}
.sub{font-weight:normal;font-size:.9em}
td.flag{background:#fdebd0;font-weight:bold}
td.alarm{background:#f5b7b1;font-weight:bold}
td.gap{text-align:center;color:#555}
figure{margin:1.2em 0;break-inside:avoid;page-break-inside:avoid}
figcaption{font-size:.9em;color:#333;margin-bottom:.3em}
svg.chart{display:block;width:100%;max-width:900px;height:auto;margin:.4em 0}
.swatch{display:inline-block;width:2.4em;vertical-align:middle}
code{font-size:.95em}
@media print{body{max-width:none;margin:0}h2,h3{break-after:avoid}.caution,.warnings,td.flag,td.alarm,tr.section th{-webkit-print-color-adjust:exact;print-color-adjust:exact}}
";

/// The whole page for the runs (already read), under `title` when given (else the default
/// heading, and the run titles in the browser's title).
pub fn page(runs: &[Run], title: Option<&str>) -> String {
    let titles: Vec<String> = runs.iter().map(run_title).collect();
    let head_title = match title {
        Some(t) => t.to_owned(),
        None => format!("Well development report: {}", titles.join("; ")),
    };
    let mut h = String::new();
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n\
         <meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n\
         <meta name=\"generator\" content=\"boreflux {}\">\n<title>{}</title>\n\
         <style>\n{STYLE}</style>\n</head>\n<body>\n",
        env!("CARGO_PKG_VERSION"),
        esc(&head_title)
    );
    let _ = writeln!(
        h,
        "<h1>{}</h1>",
        esc(title.unwrap_or("Well development simulation report"))
    );
    let _ = writeln!(
        h,
        r#"<p class="lead">{} from the result {} listed under “Runs”; every number and figure below is read from {}. Built by boreflux {}.</p>"#,
        if runs.len() == 1 {
            "One simulated run".to_owned()
        } else {
            format!("{} simulated runs compared side by side", runs.len())
        },
        if runs.len() == 1 { "file" } else { "files" },
        if runs.len() == 1 { "it" } else { "them" },
        env!("CARGO_PKG_VERSION")
    );
    cautions(&mut h, runs);
    warnings(&mut h, runs);
    assumptions(&mut h, runs);
    describe_runs(&mut h, runs);

    h.push_str("<h2>Headline results</h2>\n");
    let (table, used) = headline::headline(runs);
    h.push_str(&table);
    notes_below_headline(&mut h, runs);

    h.push_str("\n<h2>Figures</h2>\n");
    legend_key(&mut h, runs);
    for (k, fig) in figures(runs).iter().enumerate() {
        let _ = write!(
            h,
            "<figure>\n<h3>Figure {}. {}</h3>\n<figcaption>{}</figcaption>\n",
            k + 1,
            esc(&fig.title),
            esc(&fig.caption)
        );
        for svg in &fig.svgs {
            h.push_str(svg);
            h.push('\n');
        }
        h.push_str("</figure>\n");
    }

    let logs: Vec<(usize, String)> = runs
        .iter()
        .enumerate()
        .filter_map(|(i, r)| tables::cycle_log(r).map(|t| (i, t)))
        .collect();
    if !logs.is_empty() {
        h.push_str("<h2>Cycle log</h2>\n<p>Per complete cycle of the drive: flux at the borehole wall, shear, work in the cake and cake removed. Cycles are numbered from 1 here and in the progress bar; the run file's <code>/cycles/index</code> counts from 0 (cycle 1 is index 0).</p>\n");
        for (i, t) in logs {
            let _ = write!(
                h,
                "<h3>Run {}: {}</h3>\n{t}\n",
                run_letter(i),
                esc(&run_title(&runs[i]))
            );
        }
    }

    h.push_str("<h2>Inputs</h2>\n<p>The resolved case stored in each run file (<code>case_json</code>): every default filled in, values in SI with the common US unit in brackets.</p>\n");
    h.push_str(&tables::inputs(runs));
    if let Some(t) = headline::other_values(runs, &used) {
        h.push_str("\n<h2>Other summary values</h2>\n<p>Further values in <code>/summary</code>, with the unit named by the attribute's suffix.</p>\n");
        h.push_str(&t);
    }
    scope(&mut h);
    h.push_str("\n</body>\n</html>\n");
    h
}

fn cautions(h: &mut String, runs: &[Run]) {
    let _ = write!(
        h,
        "<section class=\"caution\">\n<h2>Cautions</h2>\n<p>{}</p>\n<p>Values called typical or rules of thumb in this report are typical, not required. \
         Before surging or swabbing, establish free flow through the screen, start gently, and compare the pressure differences below with the manufacturer's collapse rating.</p>\n",
        esc(CAUTION)
    );
    for (i, run) in runs.iter().enumerate() {
        if let Some(c) = run.summary.cautions.as_deref() {
            if c.trim() != CAUTION.trim() && !c.trim().is_empty() {
                let _ = writeln!(
                    h,
                    "<p>Cautions recorded in run {}: {}</p>",
                    run_letter(i),
                    esc(c)
                );
            }
        }
    }
    h.push_str("</section>\n");
}

fn warnings(h: &mut String, runs: &[Run]) {
    let total: usize = runs.iter().map(|r| r.summary.warnings.len()).sum();
    let _ = write!(
        h,
        "<section class=\"warnings\">\n<h2>Warnings ({total})</h2>\n"
    );
    for (i, run) in runs.iter().enumerate() {
        let w = &run.summary.warnings;
        if w.is_empty() {
            let _ = writeln!(h, "<p>Run {}: no warnings recorded.</p>", run_letter(i));
            continue;
        }
        let _ = writeln!(
            h,
            "<p><strong>Run {}</strong> ({}):</p>\n<ul>",
            run_letter(i),
            esc(&run_title(run))
        );
        for line in w {
            let _ = writeln!(h, "<li>{}</li>", esc(line));
        }
        h.push_str("</ul>\n");
    }
    h.push_str("</section>\n");
}

/// The damage-removal constants each run used, with their documented ranges.
/// The case's notes of each run: the defaults and approximations the model used (what
/// `check` prints), from `/summary` `notes`.
fn model_notes(h: &mut String, runs: &[Run]) {
    if runs.iter().all(|r| r.summary.notes.is_empty()) {
        return;
    }
    h.push_str(
        "<section>\n<h2>Model assumptions: defaults and approximations</h2>\n<p>What the \
         model assumed where the case gave no value, and the approximations it made (as \
         <code>boreflux check</code> lists them).</p>\n",
    );
    for (i, run) in runs.iter().enumerate() {
        if run.summary.notes.is_empty() {
            continue;
        }
        let _ = writeln!(h, "<p><strong>Run {}</strong>:</p>\n<ul>", run_letter(i));
        for line in &run.summary.notes {
            let _ = writeln!(h, "<li>{}</li>", esc(line));
        }
        h.push_str("</ul>\n");
    }
    h.push_str("</section>\n");
}

fn assumptions(h: &mut String, runs: &[Run]) {
    model_notes(h, runs);
    if runs.iter().all(|r| r.summary.assumptions.is_empty()) {
        return;
    }
    h.push_str(
        "<section>\n<h2>Model assumptions: damage removal</h2>\n<p>Removal times and final \
         skin rest on these constants (widest documented range first). They are literature \
         ranges to be calibrated against the well's own response, not measured values.</p>\n",
    );
    for (i, run) in runs.iter().enumerate() {
        if run.summary.assumptions.is_empty() {
            continue;
        }
        let _ = writeln!(h, "<p><strong>Run {}</strong>:</p>\n<ul>", run_letter(i));
        for line in &run.summary.assumptions {
            let _ = writeln!(h, "<li>{}</li>", esc(line));
        }
        h.push_str("</ul>\n");
    }
    h.push_str("</section>\n");
}

fn describe_runs(h: &mut String, runs: &[Run]) {
    h.push_str("<h2>Runs</h2>\n");
    for (i, run) in runs.iter().enumerate() {
        let m = &run.meta;
        let _ = writeln!(
            h,
            "<h3>Run {}: {}</h3>",
            run_letter(i),
            esc(&run_title(run))
        );
        if let Some(d) = m.description.as_deref().filter(|d| !d.trim().is_empty()) {
            let _ = writeln!(h, "<p>{}</p>", esc(d));
        }
        let or_dash = |v: &Option<String>| v.as_deref().map_or("—".to_owned(), esc);
        let _ = writeln!(
            h,
            "<table class=\"meta\"><tbody><tr><th scope=\"row\">Result file</th><td><code>{}</code></td></tr>\
             <tr><th scope=\"row\">Case file</th><td><code>{}</code></td></tr>\
             <tr><th scope=\"row\">Written by</th><td>boreflux {}</td></tr>\
             <tr><th scope=\"row\">Created (UTC)</th><td>{}</td></tr></tbody></table>",
            esc(&run.path.display().to_string()),
            or_dash(&m.case_file),
            or_dash(&m.tool_version),
            or_dash(&m.created_utc)
        );
    }
}

fn notes_below_headline(h: &mut String, runs: &[Run]) {
    h.push_str("<ul class=\"notes\">\n");
    let mut defs: Vec<String> = runs
        .iter()
        .filter_map(|r| r.summary.efficiency_definition.clone())
        .collect();
    defs.dedup();
    for d in defs {
        let _ = writeln!(h, "<li>Efficiency: {}.</li>", esc(d.trim_end_matches('.')));
    }
    h.push_str(
        "<li>Flux and velocity are at the borehole wall; positive flow is outward, from the well into the formation. \
         gpd/ft² is US gallons per day per square foot of wall.</li>\n\
         <li>The 0.03 m/s (0.1 ft/s) slot velocity is a widely quoted rule of thumb, not a limit; \
         the collapse check compares a model estimate with a rating and does not show that a screen is safe.</li>\n\
         <li>Specific capacity and efficiency are steady-state predictions from the skin at the start and the end of the run, \
         not a substitute for a step-drawdown or constant-rate test.</li>\n</ul>\n",
    );
}

fn legend_key(h: &mut String, runs: &[Run]) {
    if runs.len() < 2 {
        return;
    }
    h.push_str("<p>Runs in the figures: ");
    for (i, run) in runs.iter().enumerate() {
        let s = run_style(i);
        let _ = write!(
            h,
            "<span class=\"swatch\"><svg viewBox=\"0 0 40 10\" width=\"40\" height=\"10\"><line x1=\"0\" y1=\"5\" x2=\"40\" y2=\"5\" stroke=\"{}\" stroke-width=\"2\"{}/></svg></span> run {}: {}{}",
            s.color,
            if s.dash.is_empty() {
                String::new()
            } else {
                format!(" stroke-dasharray=\"{}\"", s.dash)
            },
            run_letter(i),
            esc(&run_title(run)),
            if i + 1 < runs.len() { "; " } else { "." }
        );
    }
    h.push_str("</p>\n");
}

fn scope(h: &mut String) {
    h.push_str(
        "\n<h2>Scope of this report</h2>\n<p>This report shows what a model predicts for the borehole face; nobody can observe it directly. \
         A development record also needs what only the well can tell: turbidity and sand content against time, \
         sediment in the screen before and after, water levels and specific capacity measured before, during and after development, \
         and step-drawdown or constant-rate test results. Whether development criteria are met is decided by the licensed driller or engineer \
         responsible for the well, under the local well construction code.</p>\n",
    );
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn esc_works() {
        assert_eq!(
            esc(r#"<a href="x">'&'</a>"#),
            "&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;"
        );
        assert_eq!(esc("Δp ≥ 1 m³/s"), "Δp ≥ 1 m³/s");
    }
}
