//! Human-readable reports: tidy tables with units, the warnings, and the caution line.

use crate::case::Command;
use crate::compute::{
    AzeotropeOutcome, CAUTION, CurveOutcome, DutyOutcome, FlashOutcome, Outcome, PhaseFlow, State, phase_flows,
};
use crate::output_units::{chosen, convert};
use flashduty::energy::VapourModel;
use flashduty::rachford_rice::Phase;
use flashduty::units::QuantityKind;
use flashduty::warnings::Warning;
use std::fmt::Write;

/// Column alignment.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Align {
    /// Left.
    Left,
    /// Right.
    Right,
}

/// A plain-text table: a header row, a rule, and rows; columns two spaces apart.
#[derive(Debug, Clone, Default)]
pub struct Table {
    headers: Vec<String>,
    align: Vec<Align>,
    rows: Vec<Vec<String>>,
}

impl Table {
    /// A table with these columns.
    pub fn new(columns: &[(&str, Align)]) -> Self {
        Self {
            headers: columns.iter().map(|c| c.0.to_string()).collect(),
            align: columns.iter().map(|c| c.1).collect(),
            rows: Vec::new(),
        }
    }

    /// Adds a row (missing cells are blank).
    pub fn row(&mut self, cells: Vec<String>) {
        self.rows.push(cells);
    }

    /// The table as text, each line indented by `indent` spaces.
    pub fn render(&self, indent: usize) -> String {
        let n = self.headers.len();
        let mut width: Vec<usize> = self.headers.iter().map(|h| h.chars().count()).collect();
        for r in &self.rows {
            for (i, c) in r.iter().enumerate().take(n) {
                width[i] = width[i].max(c.chars().count());
            }
        }
        let pad = " ".repeat(indent);
        let line = |cells: &[String]| -> String {
            let mut s = pad.clone();
            for (i, (&w, align)) in width.iter().zip(&self.align).enumerate() {
                let c = cells.get(i).map_or("", String::as_str);
                if i > 0 {
                    s.push_str("  ");
                }
                match align {
                    Align::Left => {
                        let _ = write!(s, "{c:<w$}");
                    }
                    Align::Right => {
                        let _ = write!(s, "{c:>w$}");
                    }
                }
            }
            s.trim_end().to_string()
        };
        let mut out = line(&self.headers);
        out.push('\n');
        let total: usize = width.iter().sum::<usize>() + 2 * n.saturating_sub(1);
        out.push_str(&pad);
        out.push_str(&"-".repeat(total));
        out.push('\n');
        for r in &self.rows {
            out.push_str(&line(r));
            out.push('\n');
        }
        out
    }
}

/// A number with `sig` significant digits, in plain notation unless very large or small.
pub fn num(x: f64, sig: usize) -> String {
    if !x.is_finite() {
        return x.to_string();
    }
    if x == 0.0 {
        return "0".to_string();
    }
    let mag = x.abs().log10().floor() as i32;
    if !(-4..=9).contains(&mag) {
        return format!("{:.*e}", sig.saturating_sub(1), x);
    }
    let decimals = (sig as i32 - 1 - mag).max(0) as usize;
    format!("{x:.decimals$}")
}

/// A number with a fixed number of decimals.
pub fn fixed(x: f64, decimals: usize) -> String {
    if x.is_finite() && x.abs() < 1e12 {
        let s = format!("{x:.decimals$}");
        // No "-0.000".
        if s.trim_start_matches('-').chars().all(|c| c == '0' || c == '.') {
            return s.trim_start_matches('-').to_string();
        }
        s
    } else {
        num(x, decimals.max(3))
    }
}

/// "341.88 K (68.73 °C)", or in the unit of `--output-units`.
pub fn temp(t_k: f64) -> String {
    if let Some(u) = chosen() {
        return format!(
            "{} {}",
            fixed(convert(QuantityKind::Temperature, t_k, &u.temperature), 2),
            u.temperature
        );
    }
    format!("{} K ({} °C)", fixed(t_k, 2), fixed(t_k - 273.15, 2))
}

/// "101.325 kPa", or in the unit of `--output-units`.
pub fn pres(p_pa: f64) -> String {
    if let Some(u) = chosen() {
        return format!(
            "{} {}",
            num(convert(QuantityKind::Pressure, p_pa, &u.pressure), 6),
            u.pressure
        );
    }
    format!("{} kPa", num(p_pa / 1e3, 6))
}

/// "3.6 mol/s", or in the unit of `--output-units`.
pub fn molar_flow(mol_s: f64) -> String {
    if let Some(u) = chosen() {
        return format!(
            "{} {}",
            num(convert(QuantityKind::MolarFlow, mol_s, &u.molar_flow), 6),
            u.molar_flow
        );
    }
    format!("{} mol/s", num(mol_s, 6))
}

/// "12.345 kW", or in the unit of `--output-units`.
pub fn power(w: f64) -> String {
    if let Some(u) = chosen() {
        return format!("{} {}", num(convert(QuantityKind::Power, w, &u.power), 6), u.power);
    }
    if w.abs() >= 1e6 {
        format!("{} MW", num(w / 1e6, 6))
    } else {
        format!("{} kW", num(w / 1e3, 6))
    }
}

/// The warnings as text lines (or nothing).
pub fn warnings(out: &mut String, ws: &[Warning]) {
    if ws.is_empty() {
        let _ = writeln!(out, "Warnings: none");
        return;
    }
    let _ = writeln!(out, "Warnings:");
    for w in ws {
        let _ = writeln!(out, "  - {w}");
    }
}

/// The caution line.
pub fn caution(out: &mut String) {
    let _ = writeln!(out, "{CAUTION}");
}

/// How a report names the vapour model.
pub fn vapour_model_words(m: VapourModel) -> &'static str {
    m.description()
}

fn phase_word(p: Phase) -> &'static str {
    match p {
        Phase::Liquid => "liquid",
        Phase::Vapour => "vapour",
        Phase::TwoPhase => "two-phase",
    }
}

/// The composition table of a state: z, x, y, K per component.
pub fn composition(out: &mut String, names: Option<&[String]>, z: &[f64], s: &State, indent: usize) {
    let x_head = match (s.phase == Phase::Vapour && s.x.is_some(), s.water.is_some()) {
        (true, _) => "x (incipient)",
        (false, true) => "x organic",
        (false, false) => "x liquid",
    };
    let y_head = if s.phase == Phase::Liquid && s.y.is_some() {
        "y (incipient)"
    } else {
        "y vapour"
    };
    let aqueous = s.water.as_ref().map(|w| &w.aqueous);
    let mut heads = vec![
        ("component", Align::Left),
        ("z feed", Align::Right),
        (x_head, Align::Right),
    ];
    if aqueous.is_some() {
        heads.push(("x aqueous", Align::Right));
    }
    heads.extend([(y_head, Align::Right), ("K", Align::Right)]);
    let mut t = Table::new(&heads);
    for (i, zi) in z.iter().enumerate() {
        let name = names
            .and_then(|n| n.get(i))
            .cloned()
            .unwrap_or_else(|| format!("component {}", i + 1));
        let cell = |v: &Option<Vec<f64>>| {
            v.as_ref()
                .and_then(|v| v.get(i))
                .map_or("-".to_string(), |x| fixed(*x, 6))
        };
        let mut row = vec![name, fixed(*zi, 6), cell(&s.x)];
        if let Some(a) = aqueous {
            row.push(cell(a));
        }
        row.extend([cell(&s.y), s.k.get(i).map_or("-".to_string(), |k| num(*k, 6))]);
        t.row(row);
    }
    out.push_str(&t.render(indent));
}

fn state_line(s: &State) -> String {
    let t = s.t_k.map_or("T not given".to_string(), |t| format!("T = {}", temp(t)));
    let p = s.p_pa.map_or("P not given".to_string(), |p| format!("P = {}", pres(p)));
    format!("{t}   {p}")
}

fn flash_text(out: &mut String, f: &FlashOutcome) {
    let title = match f.command {
        Command::Bubble => "Bubble point",
        Command::Dew => "Dew point",
        _ if f.given_k => "Flash with given K-values",
        _ => "Flash",
    };
    let _ = writeln!(out, "{title} ({})", f.spec);
    let s = &f.state;
    let _ = writeln!(out, "  {}", state_line(s));
    let _ = writeln!(
        out,
        "  phase: {}   vapour fraction {}   liquid fraction {}",
        phase_word(s.phase),
        fixed(s.vapour_fraction, 6),
        fixed(s.liquid_fraction, 6)
    );
    if let Some(w) = &s.water {
        let _ = writeln!(
            out,
            "  water phase: {}   organic liquid fraction {}   aqueous fraction {}",
            w.phase_set,
            fixed(w.organic_fraction, 6),
            fixed(w.aqueous_fraction, 6)
        );
    }
    if let Some(flow) = f.feed.flow_mol_s {
        let _ = writeln!(
            out,
            "  flows: feed {}, liquid {}, vapour {}",
            molar_flow(flow),
            molar_flow(flow * s.liquid_fraction),
            molar_flow(flow * s.vapour_fraction)
        );
        if let Some(stream) = &f.feed.stream {
            phase_lines(out, &phase_flows(stream.components(), flow, s));
        }
    }
    let _ = writeln!(out);
    composition(out, f.feed.names.as_deref(), &f.feed.z, s, 2);
    let _ = writeln!(out);
    let mut extra = format!("  solver steps: {}", s.iterations);
    if let Some(d) = s.sensitivity {
        let _ = write!(
            extra,
            "   dβ/dT = {} 1/K   dβ/dP = {} 1/kPa",
            num(d.dvapour_fraction_dt_per_k, 4),
            num(d.dvapour_fraction_dp_per_pa * 1e3, 4)
        );
    }
    if f.given_k {
        extra.push_str("   (K-values as given: independent of T and P)");
    }
    let _ = writeln!(out, "{extra}");
    let _ = writeln!(out);
    warnings(out, &s.warnings);
}

/// One line per phase: molar and mass flow and molar mass.
fn phase_lines(out: &mut String, flows: &[PhaseFlow]) {
    for f in flows {
        let mass = match chosen() {
            Some(u) => format!(
                "{} {}",
                num(convert(QuantityKind::MassFlow, f.mass_flow_kg_s, &u.mass_flow), 6),
                u.mass_flow
            ),
            None => format!("{} kg/h", num(f.mass_flow_kg_s * 3600.0, 6)),
        };
        let _ = writeln!(
            out,
            "  {:<8} {}  {mass}  molar mass {} g/mol",
            f.phase,
            molar_flow(f.flow_mol_s),
            num(f.molar_mass_g_per_mol, 5)
        );
    }
}

/// The enthalpy table and duty of a duty result (used by the duty command and the demo).
pub fn duty_body(out: &mut String, d: &DutyOutcome) {
    let r = &d.result;
    let names = d.feed.names.as_deref();
    let how = if d.duty_given {
        "given; outlet found"
    } else {
        "from the inlet and outlet states"
    };
    let sense = if r.duty_w >= 0.0 {
        "heat into the stream"
    } else {
        "heat removed from the stream"
    };
    let _ = writeln!(
        out,
        "Duty: {} = {} W ({sense}; {how})",
        power(r.duty_w),
        num(r.duty_w, 8)
    );
    let _ = writeln!(
        out,
        "  stream flow {} ({} kmol/h)",
        molar_flow(r.flow_mol_s),
        num(r.flow_mol_s * 3.6, 6)
    );
    let phase = match r.options.reference.phase {
        flashduty::energy::ReferencePhase::Liquid => "liquid",
        flashduty::energy::ReferencePhase::Vapour => "ideal-gas vapour",
    };
    let _ = writeln!(
        out,
        "  reference state: pure {phase} at {}; vaporisation path: {}; vapour: {}",
        temp(r.options.reference.temperature_k),
        r.options.path.name(),
        vapour_model_words(r.options.vapour_model)
    );
    let _ = writeln!(out);
    let p_head = chosen().map_or("P [kPa]".to_string(), |u| format!("P [{}]", u.pressure));
    let mut t = Table::new(&[
        ("state", Align::Left),
        ("T", Align::Right),
        (p_head.as_str(), Align::Right),
        ("phase", Align::Left),
        ("vapour fraction", Align::Right),
        ("h [J/mol]", Align::Right),
    ]);
    for (label, f, h) in [
        ("inlet", &r.inlet, r.inlet_enthalpy_j_per_mol),
        ("outlet", &r.outlet, r.outlet_enthalpy_j_per_mol),
    ] {
        t.row(vec![
            label.into(),
            temp(f.temperature_k),
            chosen().map_or_else(
                || num(f.pressure_pa / 1e3, 6),
                |u| num(convert(QuantityKind::Pressure, f.pressure_pa, &u.pressure), 6),
            ),
            phase_word(f.phase).into(),
            fixed(f.vapour_fraction, 6),
            fixed(h, 1),
        ]);
    }
    out.push_str(&t.render(2));
    for (label, f) in [("inlet", &r.inlet), ("outlet", &r.outlet)] {
        let _ = writeln!(out, "\n  {label} composition:");
        let state = State::from(f);
        composition(out, names, &d.feed.z, &state, 4);
        if let Some(stream) = &d.feed.stream {
            phase_lines(out, &phase_flows(stream.components(), r.flow_mol_s, &state));
        }
    }
    let _ = writeln!(
        out,
        "\n  Enthalpy table (J/mol relative to the reference state; W = mol/s × J/mol):"
    );
    // The departure column appears only where the vapour model has one.
    let departure = r.options.vapour_model != VapourModel::IdealGas;
    // The component flows also in the unit the input's flow was given in, where it was.
    let unit = d
        .feed
        .flow_unit
        .clone()
        .filter(|u| crate::compute::flow_in_unit(1.0, Some(1.0), u).is_some() && u.as_str() != "mol/s");
    let unit_head = unit.as_ref().map(|u| format!("flow [{u}]"));
    let mut columns = vec![
        ("state", Align::Left),
        ("component", Align::Left),
        ("phase", Align::Left),
        ("flow [mol/s]", Align::Right),
        ("liq. sensible", Align::Right),
        ("latent", Align::Right),
        ("vap. sensible", Align::Right),
    ];
    if let Some(h) = &unit_head {
        columns.insert(4, (h.as_str(), Align::Right));
    }
    if departure {
        columns.push(("vap. departure", Align::Right));
    }
    // The excess column appears only where the liquid model adds an excess enthalpy.
    let excess = r.table.iter().any(|row| row.excess_j_per_mol != 0.0);
    if excess {
        columns.push(("excess", Align::Right));
    }
    columns.extend([("h [J/mol]", Align::Right), ("H flow [W]", Align::Right)]);
    let mut t = Table::new(&columns);
    let mut sums = [0.0f64; 2];
    for row in &r.table {
        sums[usize::from(row.state == "outlet")] += row.enthalpy_flow_w;
        let mut cells = vec![
            row.state.into(),
            row.component.clone(),
            phase_word(row.phase).into(),
            num(row.flow_mol_s, 6),
        ];
        if let Some(u) = &unit {
            cells.push(d.feed.row_flow_in_unit(row, u).map_or("-".into(), |x| num(x, 6)));
        }
        cells.extend([
            fixed(row.liquid_sensible_j_per_mol, 1),
            fixed(row.latent_j_per_mol, 1),
            fixed(row.vapour_sensible_j_per_mol, 1),
        ]);
        if departure {
            cells.push(fixed(row.vapour_departure_j_per_mol, 1));
        }
        if excess {
            cells.push(fixed(row.excess_j_per_mol, 1));
        }
        cells.extend([fixed(row.enthalpy_j_per_mol, 1), fixed(row.enthalpy_flow_w, 1)]);
        t.row(cells);
    }
    out.push_str(&t.render(4));
    let _ = writeln!(
        out,
        "    Σ outlet {} W − Σ inlet {} W = duty {} W",
        fixed(sums[1], 1),
        fixed(sums[0], 1),
        fixed(sums[1] - sums[0], 1)
    );
    let _ = writeln!(out);
    if let Some(dq) = r.dduty_dt_out_w_per_k {
        let _ = writeln!(out, "  dDuty/dT at the outlet: {} W/K", num(dq, 6));
    }
    let s = &r.path_spread;
    let _ = writeln!(
        out,
        "  same duty along each vaporisation path: boiling-point {}, stream-temperature {}, reference-temperature {}; spread {} ({} %)",
        power(s.boiling_point_w),
        power(s.stream_temperature_w),
        power(s.reference_temperature_w),
        power(s.spread_w),
        num(100.0 * s.relative, 3)
    );
}

fn curve_text(out: &mut String, c: &CurveOutcome) {
    let cv = &c.curve;
    let kind = if cv.duty_w >= 0.0 {
        "Heating curve"
    } else {
        "Cooling curve"
    };
    let _ = writeln!(out, "{kind} at P = {}", pres(cv.pressure_pa));
    if let Some(names) = &c.feed.names {
        let parts: Vec<String> = names
            .iter()
            .zip(&c.feed.z)
            .map(|(n, z)| format!("{n} {}", fixed(*z, 4)))
            .collect();
        let _ = writeln!(out, "  feed (mole fractions): {}", parts.join(", "));
    }
    let _ = writeln!(out, "  bubble point {}", temp(cv.bubble_temperature_k));
    match cv.dew_temperature_k {
        Some(t) => {
            let _ = writeln!(out, "  dew point    {}", temp(t));
        }
        None => {
            let _ = writeln!(out, "  dew point    none (a component does not vaporise)");
        }
    }
    let _ = writeln!(out, "  total duty   {}", power(cv.duty_w));
    let _ = writeln!(out, "  vapour       {}", vapour_model_words(c.vapour_model));
    if c.inlet
        .p_pa
        .is_some_and(|p| (p - cv.pressure_pa).abs() > 1e-9 * cv.pressure_pa)
    {
        let _ = writeln!(
            out,
            "  the inlet ({}) is first let down to the curve pressure without heat, so the curve starts at that state",
            pres(c.inlet.p_pa.unwrap_or_default())
        );
    }
    let _ = writeln!(out);
    // In the units of --output-units where chosen: duty and temperature (twice, as K and °C are).
    let (duty_head, t_head, t2_head) = match chosen() {
        Some(u) => (
            format!("duty [{}]", u.power),
            format!("T [{}]", u.temperature),
            "T [K]".to_string(),
        ),
        None => ("duty [kW]".to_string(), "T [K]".to_string(), "T [°C]".to_string()),
    };
    let mut t = Table::new(&[
        ("#", Align::Right),
        (duty_head.as_str(), Align::Right),
        (t_head.as_str(), Align::Right),
        (t2_head.as_str(), Align::Right),
        ("vapour fraction", Align::Right),
        ("", Align::Left),
    ]);
    for (i, p) in cv.points.iter().enumerate() {
        let (d, t1, t2) = match chosen() {
            Some(u) => (
                convert(QuantityKind::Power, p.duty_w, &u.power),
                convert(QuantityKind::Temperature, p.temperature_k, &u.temperature),
                p.temperature_k,
            ),
            None => (p.duty_w / 1e3, p.temperature_k, p.temperature_k - 273.15),
        };
        t.row(vec![
            (i + 1).to_string(),
            fixed(d, 4),
            fixed(t1, 3),
            fixed(t2, 3),
            fixed(p.vapour_fraction, 5),
            match p.breakpoint {
                "bubble" => "bubble point".to_string(),
                "dew" => "dew point".to_string(),
                other => other.to_string(),
            },
        ]);
    }
    out.push_str(&t.render(2));
    let _ = writeln!(out);
    warnings(out, &cv.warnings);
}

/// The human-readable report of an outcome, ending with the caution line.
fn azeotrope_text(out: &mut String, a: &AzeotropeOutcome) {
    let names = a.feed.names.clone().unwrap_or_default();
    let (first, second) = (
        names.first().map_or("component 1", String::as_str),
        names.get(1).map_or("component 2", String::as_str),
    );
    let at_pressure = a.given.0 == "P_Pa";
    let given = if at_pressure {
        format!("P = {}", pres(a.given.1))
    } else {
        format!("T = {}", temp(a.given.1))
    };
    let _ = writeln!(out, "Azeotropes of {first}–{second} at {given}");
    for (name, v) in names.iter().zip(&a.pure) {
        let value = if at_pressure {
            format!("boils at {}", temp(*v))
        } else {
            format!("vapour pressure {}", pres(*v))
        };
        let _ = writeln!(out, "  pure {name} {value}");
    }
    if a.azeotropes.is_empty() {
        let _ = writeln!(out, "  none found (x of {first} scanned from 0.0025 to 0.9975)");
    } else {
        let x_head = format!("x {first}");
        let mut t = Table::new(&[
            (x_head.as_str(), Align::Right),
            ("T", Align::Right),
            ("P", Align::Right),
            ("kind", Align::Left),
        ]);
        for az in &a.azeotropes {
            t.row(vec![
                fixed(az.x[0], 4),
                temp(az.temperature_k),
                pres(az.pressure_pa),
                if az.maximum_boiling {
                    "maximum-boiling"
                } else {
                    "minimum-boiling"
                }
                .to_string(),
            ]);
        }
        let _ = writeln!(out);
        out.push_str(&t.render(2));
    }
    let _ = writeln!(out);
    warnings(out, &a.warnings);
}

pub fn report(o: &Outcome, source: Option<&str>) -> String {
    let mut out = String::new();
    if let Some(s) = source {
        let _ = writeln!(out, "flashduty {}: {s}", o.command().name());
    }
    match o {
        Outcome::Flash(f) => flash_text(&mut out, f),
        Outcome::Duty(d) => {
            duty_body(&mut out, d);
            let _ = writeln!(out);
            warnings(&mut out, &d.result.warnings);
        }
        Outcome::Curve(c) => curve_text(&mut out, c),
        Outcome::Azeotropes(a) => azeotrope_text(&mut out, a),
    }
    let liquid = o.feed().liquid_model;
    if liquid != flashduty::activity::LiquidModel::Ideal {
        let _ = writeln!(out, "Liquid: {}", liquid.description());
    }
    let _ = writeln!(out);
    caution(&mut out);
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers() {
        assert_eq!(num(101.325, 6), "101.325");
        assert_eq!(num(0.000123456, 3), "0.000123");
        assert_eq!(num(1.5e-7, 3), "1.50e-7");
        assert_eq!(fixed(-0.00001, 3), "0.000");
        assert_eq!(num(0.0, 3), "0");
    }

    #[test]
    fn table_aligns() {
        let mut t = Table::new(&[("a", Align::Left), ("bb", Align::Right)]);
        t.row(vec!["xyz".into(), "1".into()]);
        let s = t.render(0);
        assert_eq!(s, "a    bb\n-------\nxyz   1\n");
    }
}
