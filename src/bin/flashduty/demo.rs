//! `demo`: the built-in example, an INVENTED scenario: a made-up hydrocarbon feed through a
//! preheater and a partial vaporiser. The feed, flows, temperatures and pressures are
//! invented for illustration; they describe no real plant.

use crate::case::{Command, parse_case};
use crate::compute::{self, CAUTION, Outcome};
use crate::error::{CliError, CliResult};
use crate::text::{self, fixed, num, power};
use flashduty::library::Library;
use serde_json::{Value, json};
use std::fmt::Write;

const SCENARIO: &str = "INVENTED SCENARIO, for illustration only: a made-up light hydrocarbon feed \
(n-pentane 12, n-hexane 30, n-heptane 28 and toluene 20 kmol/h) at 30 °C and 3.0 bar is heated in a \
preheater to 95 °C (2.8 bar after the preheater), then let down to 1.8 bar into a partial vaporiser \
that boils off 40 % of it (by moles). No real plant, feed or measurement is described.";

fn feed() -> Value {
    json!({
        "components": ["n-pentane", "n-hexane", "n-heptane", "toluene"],
        "flows": ["12 kmol/h", "30 kmol/h", "28 kmol/h", "20 kmol/h"],
    })
}

fn with_feed(extra: Value) -> Value {
    let mut v = feed();
    if let (Value::Object(m), Value::Object(e)) = (&mut v, extra) {
        m.extend(e);
    }
    v
}

/// The invented cases: (step title, command, case).
fn cases() -> Vec<(&'static str, Command, Value)> {
    vec![
        (
            "Step 1, preheater: 30 °C, 3.0 bar -> 95 °C, 2.8 bar",
            Command::Duty,
            with_feed(json!({
                "note": "invented demo: preheater",
                "inlet": {"T": "30 degC", "P": "3.0 bar"},
                "outlet": {"T": "95 degC", "P": "2.8 bar"},
            })),
        ),
        (
            "Step 2, partial vaporiser: 95 °C, 2.8 bar -> 1.8 bar, 40 % vaporised",
            Command::Duty,
            with_feed(json!({
                "note": "invented demo: partial vaporiser",
                "inlet": {"T": "95 degC", "P": "2.8 bar"},
                "outlet": {"P": "1.8 bar", "vapour_fraction": 0.40},
            })),
        ),
        (
            "Heating curve of step 2 at 1.8 bar",
            Command::Curve,
            with_feed(json!({
                "note": "invented demo: vaporiser heating curve",
                "inlet": {"T": "95 degC", "P": "2.8 bar"},
                "outlet": {"P": "1.8 bar", "vapour_fraction": 0.40},
                "points": 11,
            })),
        ),
    ]
}

fn run_all(lib: &Library) -> CliResult<Vec<(&'static str, Outcome)>> {
    cases()
        .into_iter()
        .map(|(title, command, value)| {
            let case = parse_case(&value, command)?;
            let outcome = compute::run(lib, command, &case, None).map_err(|e| e.context(format!("demo, {title}")))?;
            Ok((title, outcome))
        })
        .collect()
}

/// The demo as text.
pub fn text(lib: &Library) -> CliResult<String> {
    let results = run_all(lib)?;
    let mut out = String::new();
    let _ = writeln!(out, "flashduty demo\n");
    let _ = writeln!(out, "{SCENARIO}\n");
    let mut duties = Vec::new();
    let mut vapour = None;
    for (title, outcome) in &results {
        let rule = "=".repeat(title.chars().count());
        let _ = writeln!(out, "{title}\n{rule}");
        match outcome {
            Outcome::Duty(d) => {
                let o = &d.result.outlet;
                let _ = writeln!(
                    out,
                    "Phase split at the outlet: {}, vapour fraction {} at {} and {} kPa",
                    o.phase,
                    fixed(o.vapour_fraction, 4),
                    text::temp(o.temperature_k),
                    num(o.pressure_pa / 1e3, 5)
                );
                text::duty_body(&mut out, d);
                text::warnings(&mut out, &d.result.warnings);
                duties.push((*title, d.result.duty_w));
                vapour = Some(d.result.flow_mol_s * o.vapour_fraction);
            }
            other => {
                let body = text::report(other, None);
                // The report ends with the caution; the demo prints it once, at the end.
                out.push_str(body.trim_end().trim_end_matches(CAUTION).trim_end());
                out.push('\n');
            }
        }
        let _ = writeln!(out);
    }
    let _ = writeln!(out, "Summary (invented scenario)");
    let _ = writeln!(out, "===========================");
    let mut total = 0.0;
    for (title, w) in &duties {
        let short = title.split(':').next().unwrap_or(title);
        let _ = writeln!(out, "  {short}: {}", power(*w));
        total += w;
    }
    let _ = writeln!(out, "  total heat input: {}", power(total));
    if let Some(v) = vapour {
        let _ = writeln!(
            out,
            "  vapour product: {} mol/s ({} kmol/h)",
            num(v, 5),
            num(v * 3.6, 5)
        );
    }
    let _ = writeln!(out);
    let _ = writeln!(out, "{CAUTION}");
    Ok(out)
}

/// The demo as JSON.
pub fn json(lib: &Library) -> CliResult<Value> {
    let results = run_all(lib)?;
    let steps: Vec<Value> = results
        .iter()
        .map(|(title, o)| {
            let mut v = o.to_json();
            if let Value::Object(m) = &mut v {
                m.remove("caution");
            }
            json!({"step": title, "result": v})
        })
        .collect();
    if steps.is_empty() {
        return Err(CliError::new("demo: no steps"));
    }
    Ok(json!({
        "command": "demo",
        "invented": true,
        "scenario": SCENARIO,
        "steps": steps,
        "caution": CAUTION,
    }))
}
