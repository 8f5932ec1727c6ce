//! The energy layer with a composition-dependent K-value model and a phase-enthalpy model
//! with an excess enthalpy, end to end: duty, duty-specified flash, adiabatic flash, curve,
//! `DutyCalculator`, and the sensitivities dβ/dT, dβ/dP and dQ/dT.
//!
//! The model is a two-suffix Margules liquid, G^E/RT = A(T) x₁x₂ with A = a₀ + a₁/T
//! (Margules' form as in Poling–Prausnitz–O'Connell, 5th ed., ch. 8, from memory), so
//! ln γ₁ = A x₂², ln γ₂ = A x₁² and, by Gibbs–Helmholtz, H^E = −RT² x₁x₂ dA/dT = R a₁ x₁x₂.
//! Its parameters are invented for the test: they are not a claim about benzene–toluene.
//! The checks are the ones the model makes of itself: the energy balance against the
//! model's own enthalpy evaluated here, the analytic slopes against central finite
//! differences, and the inversion of the duty.

use flashduty::energy::{
    DutyCalculator, DutyOptions, EnthalpyModel, PhaseEnthalpyModel, Stream, StreamState, heater_duty_with,
    heating_curve_with, outlet_for_duty_with,
};
use flashduty::equilibrium::{FlashResult, FlashSpec, KValueModel, KValues, Raoult, flash};
use flashduty::rachford_rice::Phase;
use flashduty::units::{MolarFlow, Power, Pressure, Temperature};

/// The molar gas constant, J/(mol·K) (CODATA 2018, exact).
const R: f64 = 8.314_462_618;
const ATM: f64 = 101_325.0;

/// Modified Raoult's law with two-suffix Margules activity coefficients, A = a₀ + a₁/T.
struct Margules {
    raoult: Raoult,
    a0: f64,
    a1: f64,
}

impl Margules {
    fn a(&self, t: f64) -> (f64, f64) {
        (self.a0 + self.a1 / t, -self.a1 / (t * t))
    }
}

impl KValueModel for Margules {
    fn component_count(&self) -> usize {
        2
    }
    fn k_values(&self, t: f64, p: f64, x: &[f64], y: &[f64], out: &mut KValues) {
        self.raoult.k_values(t, p, x, y, out);
        let (a, da) = self.a(t);
        let sq = [x[1] * x[1], x[0] * x[0]];
        for (i, sq) in sq.into_iter().enumerate() {
            out.k[i] *= (a * sq).exp();
            out.dln_k_dt[i] += da * sq;
        }
    }
    fn is_composition_dependent(&self) -> bool {
        true
    }
    fn temperature_hint(&self, p: f64) -> Option<(f64, f64)> {
        self.raoult.temperature_hint(p)
    }
}

/// The ideal-mixing enthalpy plus the Margules liquid's excess enthalpy R a₁ x₁x₂.
struct WithExcess {
    ideal: EnthalpyModel,
    a1: f64,
}

impl PhaseEnthalpyModel for WithExcess {
    fn component_count(&self) -> usize {
        2
    }
    fn phase_enthalpy(&self, phase: Phase, x: &[f64], t: f64, p: f64) -> (f64, f64) {
        let (h, slope) = PhaseEnthalpyModel::phase_enthalpy(&self.ideal, phase, x, t, p);
        if phase == Phase::Vapour {
            (h, slope)
        } else {
            (h + R * self.a1 * x[0] * x[1], slope)
        }
    }
    fn partial_molar_enthalpies(&self, phase: Phase, x: &[f64], t: f64, p: f64, out: &mut [f64]) {
        self.ideal.partial_molar_enthalpies(phase, x, t, p, out);
        if phase != Phase::Vapour {
            out[0] += R * self.a1 * x[1] * x[1];
            out[1] += R * self.a1 * x[0] * x[0];
        }
    }
    fn ideal_base(&self) -> Option<&EnthalpyModel> {
        Some(&self.ideal)
    }
}

/// Invented: benzene–toluene 40/60, 2 mol/s, with a₀ = 0.2 and a₁ = 150 K.
fn setup() -> (Stream, Margules, WithExcess) {
    let raoult = Raoult::from_names(&["benzene", "toluene"]).unwrap();
    let stream = Stream::new(
        raoult.components().to_vec(),
        &[0.4, 0.6],
        MolarFlow::new("flow", 2.0).unwrap(),
    )
    .unwrap();
    let ideal = EnthalpyModel::from_options(raoult.components().to_vec(), DutyOptions::default());
    let k = Margules {
        raoult,
        a0: 0.2,
        a1: 150.0,
    };
    let h = WithExcess { ideal, a1: 150.0 };
    (stream, k, h)
}

fn tp(t: f64, p: f64) -> StreamState {
    StreamState::TemperaturePressure {
        temperature: Temperature::new("T", t).unwrap(),
        pressure: Pressure::new("P", p).unwrap(),
    }
}

fn tp_flash(k: &Margules, t: f64, p: f64) -> FlashResult {
    let spec = FlashSpec::TemperaturePressure {
        temperature: Temperature::new("T", t).unwrap(),
        pressure: Pressure::new("P", p).unwrap(),
    };
    flash(k, &[0.4, 0.6], spec).unwrap()
}

/// The stream's molar enthalpy at a flash result, from the model, evaluated here.
fn enthalpy_of(h: &WithExcess, r: &FlashResult) -> f64 {
    let (t, p, beta) = (r.temperature_k, r.pressure_pa, r.vapour_fraction);
    let z = [0.4, 0.6];
    match r.phase {
        Phase::Liquid => h.phase_enthalpy(Phase::Liquid, &z, t, p).0,
        Phase::Vapour => h.phase_enthalpy(Phase::Vapour, &z, t, p).0,
        Phase::TwoPhase => {
            let (x, y) = (r.liquid.as_ref().unwrap(), r.vapour.as_ref().unwrap());
            r.liquid_fraction * h.phase_enthalpy(Phase::Liquid, x, t, p).0
                + beta * h.phase_enthalpy(Phase::Vapour, y, t, p).0
        }
    }
}

fn bubble_dew(k: &Margules, p: f64) -> (f64, f64) {
    let pressure = Pressure::new("P", p).unwrap();
    let b = flash(k, &[0.4, 0.6], FlashSpec::BubbleTemperature { pressure }).unwrap();
    let d = flash(k, &[0.4, 0.6], FlashSpec::DewTemperature { pressure }).unwrap();
    (b.temperature_k, d.temperature_k)
}

#[test]
fn composition_dependent_sensitivities_match_finite_differences() {
    let (_, k, _) = setup();
    let (t_bub, t_dew) = bubble_dew(&k, ATM);
    assert!(t_dew - t_bub > 0.5, "{t_bub} {t_dew}");
    // Just inside either end the flash is two-phase: the outer loop evaluates the missing
    // phase's K at the incipient phase's composition, not at z.
    for t in [t_bub + 0.05, t_dew - 0.05] {
        assert_eq!(tp_flash(&k, t, ATM).phase, Phase::TwoPhase, "{t}");
    }
    for f in [0.2, 0.5, 0.8] {
        let t = t_bub + f * (t_dew - t_bub);
        let r = tp_flash(&k, t, ATM);
        assert_eq!(r.phase, Phase::TwoPhase);
        let s = r.sensitivity.unwrap();
        let (dt, dp) = (1e-4, 1e-2);
        let fd_t = (tp_flash(&k, t + dt, ATM).vapour_fraction - tp_flash(&k, t - dt, ATM).vapour_fraction) / (2.0 * dt);
        let fd_p = (tp_flash(&k, t, ATM + dp).vapour_fraction - tp_flash(&k, t, ATM - dp).vapour_fraction) / (2.0 * dp);
        assert!(
            (s.dvapour_fraction_dt_per_k / fd_t - 1.0).abs() < 1e-5,
            "dβ/dT {} vs {fd_t}",
            s.dvapour_fraction_dt_per_k
        );
        assert!(
            (s.dvapour_fraction_dp_per_pa / fd_p - 1.0).abs() < 1e-5,
            "dβ/dP {} vs {fd_p}",
            s.dvapour_fraction_dp_per_pa
        );
        // The composition-independent formula would be wrong here: the activity
        // coefficients move with x.
        let frozen = flashduty::rachford_rice::rachford_rice(&[0.4, 0.6], &r.k_values).unwrap();
        assert!((frozen.vapour_fraction - r.vapour_fraction).abs() < 1e-9);
    }
}

#[test]
fn duty_closes_the_energy_balance_and_dq_dt_is_the_derivative() {
    let (stream, k, h) = setup();
    let (t_bub, t_dew) = bubble_dew(&k, ATM);
    let inlet = tp(300.0, ATM);
    for t_out in [
        t_bub - 5.0,
        t_bub + 0.3 * (t_dew - t_bub),
        t_bub + 0.7 * (t_dew - t_bub),
        t_dew + 10.0,
    ] {
        let r = heater_duty_with(&stream, &k, &h, inlet, tp(t_out, ATM)).unwrap();
        // The energy balance, against the model's own enthalpy at the two flashes.
        let by_hand = 2.0 * (enthalpy_of(&h, &r.outlet) - enthalpy_of(&h, &r.inlet));
        assert!(
            (r.duty_w - by_hand).abs() <= 1e-9 * by_hand.abs(),
            "{} vs {by_hand}",
            r.duty_w
        );
        // The enthalpy table still adds up to the duty (partial molar enthalpies; Euler).
        let table: f64 = r.table.iter().map(|row| row.sign() * row.enthalpy_flow_w).sum();
        assert!(
            (table - r.duty_w).abs() <= 1e-9 * r.duty_w.abs(),
            "{table} vs {}",
            r.duty_w
        );
        // The liquid rows carry the excess enthalpy R a₁ x_j².
        for row in r
            .table
            .iter()
            .filter(|row| row.phase == Phase::Liquid && row.state == "inlet")
        {
            let xj = if row.component == "benzene" { 0.6 } else { 0.4 };
            assert!((row.excess_j_per_mol - R * 150.0 * xj * xj).abs() < 1e-6, "{row:?}");
        }
        // dQ/dT against a central difference of the duty.
        let dt = 1e-3;
        let q = |t: f64| heater_duty_with(&stream, &k, &h, inlet, tp(t, ATM)).unwrap().duty_w;
        let fd = (q(t_out + dt) - q(t_out - dt)) / (2.0 * dt);
        let analytic = r.dduty_dt_out_w_per_k.unwrap();
        assert!(
            (analytic / fd - 1.0).abs() < 1e-5,
            "T_out {t_out}: dQ/dT {analytic} vs {fd}"
        );
        // The calculator gives the same numbers.
        let mut calc = DutyCalculator::with_models(&stream, &k, &h).unwrap();
        let s = calc.duty(inlet, tp(t_out, ATM)).unwrap();
        assert_eq!(s.duty_w, r.duty_w);
        assert_eq!(s.dduty_dt_out_w_per_k, r.dduty_dt_out_w_per_k);
    }
}

#[test]
fn duty_specified_and_adiabatic_flash_invert_the_duty() {
    let (stream, k, h) = setup();
    let (t_bub, t_dew) = bubble_dew(&k, ATM);
    let inlet = tp(300.0, ATM);
    for t_out in [t_bub - 5.0, t_bub + 0.4 * (t_dew - t_bub), t_dew + 10.0] {
        let q = heater_duty_with(&stream, &k, &h, inlet, tp(t_out, ATM)).unwrap().duty_w;
        let p = Pressure::new("P", ATM).unwrap();
        let r = outlet_for_duty_with(&stream, &k, &h, inlet, Power::new("duty", q).unwrap(), p).unwrap();
        assert!(
            (r.outlet.temperature_k - t_out).abs() < 1e-6,
            "{} vs {t_out}",
            r.outlet.temperature_k
        );
        let mut calc = DutyCalculator::with_models(&stream, &k, &h).unwrap();
        let s = calc.outlet_for_duty(inlet, Power::new("duty", q).unwrap(), p).unwrap();
        assert_eq!(s.outlet.temperature_k, r.outlet.temperature_k);
    }
    // Adiabatic let-down from 5 bar, hot, to 1 atm: the enthalpy is conserved.
    let hot = tp(t_dew + 20.0, 5e5);
    let r = outlet_for_duty_with(
        &stream,
        &k,
        &h,
        hot,
        Power::new("duty", 0.0).unwrap(),
        Pressure::new("P", ATM).unwrap(),
    )
    .unwrap();
    assert_eq!(r.inlet.phase, Phase::Liquid);
    assert_eq!(r.outlet.phase, Phase::TwoPhase);
    let (h_in, h_out) = (enthalpy_of(&h, &r.inlet), enthalpy_of(&h, &r.outlet));
    assert!((h_out - h_in).abs() < 1e-6, "{h_in} {h_out}");
}

#[test]
fn heating_curve_points_lie_on_the_model_enthalpy() {
    let (stream, k, h) = setup();
    let (t_bub, t_dew) = bubble_dew(&k, ATM);
    let (inlet, outlet) = (tp(300.0, ATM), tp(t_dew + 15.0, ATM));
    let c = heating_curve_with(&stream, &k, &h, inlet, outlet, 9).unwrap();
    assert_eq!(c.points.len(), 11);
    assert!((c.bubble_temperature_k - t_bub).abs() < 1e-9 && (c.dew_temperature_k.unwrap() - t_dew).abs() < 1e-9);
    let h_in = enthalpy_of(&h, &tp_flash(&k, 300.0, ATM));
    for w in c.points.windows(2) {
        assert!(w[1].temperature_k >= w[0].temperature_k && w[1].duty_w >= w[0].duty_w);
    }
    for pt in &c.points {
        let r = tp_flash(&k, pt.temperature_k, ATM);
        let q = 2.0 * (enthalpy_of(&h, &r) - h_in);
        assert!((q - pt.duty_w).abs() <= 1e-6 * c.duty_w.abs(), "{pt:?}: {q}");
    }
}

#[test]
fn default_partial_molar_enthalpies_match_the_analytic_ones() {
    /// The same model without its analytic partial molar enthalpies.
    struct Numeric<'a>(&'a WithExcess);
    impl PhaseEnthalpyModel for Numeric<'_> {
        fn component_count(&self) -> usize {
            2
        }
        fn phase_enthalpy(&self, phase: Phase, x: &[f64], t: f64, p: f64) -> (f64, f64) {
            self.0.phase_enthalpy(phase, x, t, p)
        }
    }
    let (stream, k, h) = setup();
    for x0 in [0.0, 1e-8, 0.3, 0.9, 1.0] {
        let x = [x0, 1.0 - x0];
        let (mut a, mut b) = ([0.0; 2], [0.0; 2]);
        h.partial_molar_enthalpies(Phase::Liquid, &x, 340.0, ATM, &mut a);
        Numeric(&h).partial_molar_enthalpies(Phase::Liquid, &x, 340.0, ATM, &mut b);
        for i in 0..2 {
            assert!(
                (a[i] - b[i]).abs() < 1e-5 * a[i].abs().max(1e3),
                "x0 {x0}: {a:?} vs {b:?}"
            );
        }
    }
    // With no ideal base, the duty is still right and the path spread is zero.
    let r = heater_duty_with(&stream, &k, &Numeric(&h), tp(300.0, ATM), tp(400.0, ATM)).unwrap();
    let with_base = heater_duty_with(&stream, &k, &h, tp(300.0, ATM), tp(400.0, ATM)).unwrap();
    assert!((r.duty_w / with_base.duty_w - 1.0).abs() < 1e-12);
    assert_eq!(r.path_spread.spread_w, 0.0);
    assert!(with_base.path_spread.spread_w > 0.0);
}

#[test]
fn models_with_another_component_count_are_refused() {
    let (stream, _, h) = setup();
    let three = Raoult::from_names(&["benzene", "toluene", "water"]).unwrap();
    let e = heater_duty_with(&stream, &three, &h, tp(300.0, ATM), tp(310.0, ATM)).unwrap_err();
    assert!(e.to_string().contains("3 components"), "{e}");
    assert!(DutyCalculator::with_models(&stream, &three, &h).is_err());
}
