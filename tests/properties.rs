//! Property tests over the whole input domain of the gas and flow core.
//!
//! Each property states the relation it rests on beside the check:
//! "inverse" (a solver must give back the input of the forward call),
//! "closed form" (calorically perfect algebra), or "conservation" (mass,
//! momentum, energy across a jump, checked through an independent call).
#![allow(clippy::unwrap_used, clippy::expect_used, clippy::panic)]

use proptest::prelude::*;
use stationwise::flow::turbo::{self, Efficiency};
use stationwise::flow::{
    Branch, FlowError, FlowState, combustion, fanno, isentropic, rayleigh, shock,
};
use stationwise::gas::{
    Composition, Fuel, Gas, GasError, GasModel, Mixture, PerfectGas, Polynomial, Thermo, invert_h,
    invert_phi,
};

const R_AIR: f64 = 287.05;

fn relerr(a: f64, b: f64) -> f64 {
    (a - b).abs() / b.abs()
}

fn perfect(gamma: f64) -> Gas {
    Gas::Perfect(PerfectGas::new(gamma, R_AIR).unwrap())
}

/// Dry air (far 0) or lean kerosene products.
fn thermal(far: f64) -> Gas {
    let c = if far == 0.0 {
        Composition::dry_air()
    } else {
        Composition::dry_air().burnt(far, Fuel::KEROSENE).unwrap()
    };
    Gas::Thermal(c.mixture())
}

/// A thermally perfect mixture with constant cp (the NASA machinery on a
/// polynomial that makes it calorically perfect), valid 50 to 6000 K.
fn constant_cp(gamma: f64) -> (Gas, f64) {
    constant_cp_up_to(gamma, 6000.0)
}

fn constant_cp_up_to(gamma: f64, t_max: f64) -> (Gas, f64) {
    let cp = gamma * R_AIR / (gamma - 1.0);
    let poly = Polynomial::constant_cp(cp, 50.0, t_max);
    (
        Gas::Thermal(Mixture::from_polynomial(poly, R_AIR, "const")),
        cp,
    )
}

fn far_strategy() -> impl Strategy<Value = f64> {
    prop_oneof![Just(0.0), 0.0..0.05f64]
}

fn branch_of(m: f64) -> Branch {
    if m < 1.0 {
        Branch::Subsonic
    } else {
        Branch::Supersonic
    }
}

/// Mach number on the isentrope of `tt` where the static temperature reaches
/// the bottom of the gas data range (energy equation and frozen sound speed,
/// evaluated directly, no solver).
fn mach_at_range_floor(gas: &Gas, tt: f64) -> f64 {
    let (t_min, _) = gas.range();
    let v2 = 2.0 * (gas.h(tt).unwrap() - gas.h(t_min).unwrap());
    let a2 = gas.gamma(t_min).unwrap() * gas.r() * t_min;
    (v2.max(0.0) / a2).sqrt()
}

fn fields(s: &FlowState) -> [f64; 8] {
    [s.tt, s.pt, s.t, s.p, s.rho, s.v, s.a, s.mach]
}

fn finite_state(s: &FlowState) -> bool {
    fields(s).iter().all(|x| x.is_finite())
}

/// The module contract (src/flow/mod.rs): a request outside a relation's
/// domain is an error, never a NaN. (Overflow to infinity from inputs near
/// f64::MAX is not counted.)
fn no_nan(s: &FlowState) -> bool {
    fields(s).iter().all(|x| !x.is_nan())
}

/// Default case count, and no regression files written into the tree.
fn config(cases: u32) -> ProptestConfig {
    ProptestConfig {
        cases,
        failure_persistence: None,
        ..ProptestConfig::default()
    }
}

proptest! {
    #![proptest_config(config(256))]

    // ---------------------------------------------------------------
    // Calorically perfect gas: inverses.
    // ---------------------------------------------------------------

    #[test]
    fn perfect_inverses_return_mach(
        g in 1.1f64..1.67,
        m in 0.01f64..10.0,
        tt in 100.0f64..3000.0,
        pt in 1.0e3f64..1.0e7,
    ) {
        let gas = perfect(g);
        let s = isentropic::from_mach(&gas, tt, pt, m).unwrap();
        // Inverse: static pressure -> Mach.
        let bp = isentropic::from_pressure(&gas, tt, pt, s.p).unwrap();
        prop_assert!(relerr(bp.mach, m) <= 1e-9, "from_pressure {} vs {}", bp.mach, m);
        // Inverse: velocity -> Mach.
        let bv = isentropic::from_velocity(&gas, tt, pt, s.v).unwrap();
        prop_assert!(relerr(bv.mach, m) <= 1e-9, "from_velocity {} vs {}", bv.mach, m);
        // Inverse: A/A* -> Mach on the branch of the input.
        let ratio = isentropic::closed::area_ratio(m, g);
        let ma = isentropic::closed::mach_from_area_ratio(ratio, g, branch_of(m)).unwrap();
        let back_ratio = isentropic::closed::area_ratio(ma, g);
        prop_assert!(relerr(back_ratio, ratio) <= 1e-9, "A/A* residual {back_ratio} vs {ratio}");
        prop_assert_eq!(ma < 1.0, m < 1.0, "wrong branch: {} for {}", ma, m);
        if (m - 1.0).abs() > 0.05 {
            prop_assert!(relerr(ma, m) <= 1e-9, "area inverse {} vs {}", ma, m);
        }
        // Inverse: mass flow and area -> Mach (unit area, flux = w).
        let bf = isentropic::from_flow(&gas, tt, pt, s.flux(), 1.0, branch_of(m)).unwrap();
        prop_assert!(relerr(bf.flux(), s.flux()) <= 1e-9);
        if (m - 1.0).abs() > 0.05 {
            prop_assert!(relerr(bf.mach, m) <= 1e-9, "from_flow {} vs {}", bf.mach, m);
        }
    }

    // ---------------------------------------------------------------
    // Thermally perfect air and products: inverses, or a clean refusal.
    // ---------------------------------------------------------------

    #[test]
    fn thermal_inverses_return_mach_or_refuse_cleanly(
        far in far_strategy(),
        // Tt exactly 200 K is from_mach_at_the_floor_of_the_range_refuses.
        tt in 200.000_001f64..3000.0,
        m in 0.01f64..10.0,
        pt in 1.0e3f64..1.0e7,
    ) {
        let gas = thermal(far);
        let m_floor = mach_at_range_floor(&gas, tt);
        let s = match isentropic::from_mach(&gas, tt, pt, m) {
            Ok(s) => s,
            Err(e) => {
                // Refusal is right only when the static temperature would lie
                // below 200 K (inverse of the energy equation at the floor).
                prop_assert!(m >= m_floor * (1.0 - 1e-9),
                    "refused M {m} at Tt {tt} (floor M {m_floor}): {e}");
                prop_assert!(matches!(e,
                    FlowError::NoSolution { .. } | FlowError::Gas(GasError::OutOfRange { .. })),
                    "unexpected error kind {e:?}");
                return Ok(());
            }
        };
        prop_assert!(s.t >= 200.0 && s.t <= tt);
        prop_assert!(finite_state(&s));
        // Forward consistency: M = V/a (definition).
        prop_assert!(relerr(s.mach, m) <= 1e-9, "from_mach gave M {} for {}", s.mach, m);
        let bp = isentropic::from_pressure(&gas, tt, pt, s.p).unwrap();
        prop_assert!(relerr(bp.mach, m) <= 1e-9, "from_pressure {} vs {}", bp.mach, m);
        let bv = isentropic::from_velocity(&gas, tt, pt, s.v).unwrap();
        prop_assert!(relerr(bv.mach, m) <= 1e-9, "from_velocity {} vs {}", bv.mach, m);
        let area = 2.5;
        let bf = isentropic::from_flow(&gas, tt, pt, s.flux() * area, area, branch_of(m));
        if m_floor < 1.0 && bf.is_err() {
            // The sonic state lies below 200 K (Tt under about 240 K): see
            // from_flow_below_a_sonic_state_outside_the_range_still_solves.
            prop_assert!(m < 1.0 && matches!(bf, Err(FlowError::NoSolution { .. })), "{bf:?}");
            return Ok(());
        }
        let bf = bf.unwrap();
        prop_assert!(relerr(bf.flux(), s.flux()) <= 1e-9, "flux {} vs {}", bf.flux(), s.flux());
        prop_assert_eq!(bf.mach < 1.0, m < 1.0);
        if (m - 1.0).abs() > 0.05 {
            prop_assert!(relerr(bf.mach, m) <= 1e-9, "from_flow {} vs {}", bf.mach, m);
        }
    }

    #[test]
    fn h_and_phi_inversions_return_temperature(
        far in far_strategy(),
        t in 200.0f64..6000.0,
        guess in prop_oneof![200.0f64..6000.0, Just(f64::NAN), Just(-1.0)],
    ) {
        // Inverse of the gas's own h(T) and phi(T).
        let gas = thermal(far);
        let th = invert_h(&gas, gas.h(t).unwrap(), guess).unwrap();
        prop_assert!(relerr(th, t) <= 1e-9, "invert_h {th} vs {t}");
        let tp = invert_phi(&gas, gas.phi(t).unwrap(), guess).unwrap();
        prop_assert!(relerr(tp, t) <= 1e-9, "invert_phi {tp} vs {t}");
    }

    // ---------------------------------------------------------------
    // Constant-cp mixture through the thermally perfect code = closed forms.
    // ---------------------------------------------------------------

    #[test]
    fn constant_cp_mixture_reproduces_isentropic_closed_forms(
        g in 1.2f64..1.67,
        tt in 1000.0f64..5000.0,
        m in 0.01f64..5.0,
    ) {
        let (gas, _) = constant_cp(g);
        let s = isentropic::from_mach(&gas, tt, 2.0e5, m).unwrap();
        // Closed form: T/Tt = 1/(1 + (g-1)/2 M^2), p/pt = (T/Tt)^(g/(g-1)).
        let t_tt = isentropic::closed::t_tt(m, g);
        let p_pt = isentropic::closed::p_pt(m, g);
        prop_assert!(relerr(s.t / tt, t_tt) <= 1e-9, "T/Tt {} vs {}", s.t / tt, t_tt);
        prop_assert!(relerr(s.p / 2.0e5, p_pt) <= 1e-9, "p/pt {} vs {}", s.p / 2.0e5, p_pt);
    }

    #[test]
    fn constant_cp_mixture_reproduces_normal_shock_closed_forms(
        g in 1.2f64..1.67,
        tt in 1000.0f64..5000.0,
        m1 in 1.01f64..5.0,
    ) {
        // Range up to 1e5 K: the jump's bracket search evaluates h near the
        // Rayleigh-line temperature peak, above the downstream temperature
        // (the 6000 K case is shock_succeeds_whenever_the_totals_are_in_range).
        let (gas, _) = constant_cp_up_to(g, 1.0e5);
        let up = isentropic::from_mach(&gas, tt, 1.0e5, m1).unwrap();
        let dn = shock::normal(&gas, &up).unwrap();
        // Closed form (Rankine-Hugoniot).
        let m2 = shock::closed::m2(m1, g);
        let pr = shock::closed::pt2_pt1(m1, g);
        prop_assert!(relerr(dn.mach, m2) <= 1e-9, "M2 {} vs {}", dn.mach, m2);
        prop_assert!(relerr(dn.pt / up.pt, pr) <= 1e-9, "pt2/pt1 {} vs {}", dn.pt / up.pt, pr);
    }

    #[test]
    fn constant_cp_mixture_reproduces_compression_closed_forms(
        g in 1.2f64..1.67,
        tt_in in 200.0f64..800.0,
        pr in 1.0f64..20.0,
        eta in 0.7f64..1.0,
    ) {
        let (gas, cp) = constant_cp(g);
        let k = (g - 1.0) / g;
        // Closed form: Tt2/Tt1 = 1 + (PR^k - 1)/eta_is, and the polytropic
        // efficiency of that machine is k ln PR / ln(Tt2/Tt1).
        let c = turbo::compress(&gas, tt_in, pr, Efficiency::Isentropic(eta)).unwrap();
        let tau = 1.0 + (pr.powf(k) - 1.0) / eta;
        prop_assert!(relerr(c.tt_out, tt_in * tau) <= 1e-9, "{} vs {}", c.tt_out, tt_in * tau);
        prop_assert!(relerr(c.tt_ideal, tt_in * pr.powf(k)) <= 1e-9);
        prop_assert!((c.work - cp * (c.tt_out - tt_in)).abs() <= 1e-9 * cp * c.tt_out);
        if pr > 1.01 {
            prop_assert!(relerr(c.eta_isentropic, eta) <= 1e-9);
            let eta_p = k * pr.ln() / tau.ln();
            prop_assert!(relerr(c.eta_polytropic, eta_p) <= 1e-9);
        }
        // Closed form: Tt2/Tt1 = PR^(k/eta_p).
        let p = turbo::compress(&gas, tt_in, pr, Efficiency::Polytropic(eta)).unwrap();
        let want = tt_in * pr.powf(k / eta);
        prop_assert!(relerr(p.tt_out, want) <= 1e-9, "{} vs {}", p.tt_out, want);
    }

    #[test]
    fn constant_cp_mixture_reproduces_expansion_closed_forms(
        g in 1.2f64..1.67,
        tt_in in 1000.0f64..3000.0,
        pr in 1.0f64..20.0,
        eta in 0.7f64..1.0,
    ) {
        let (gas, _) = constant_cp(g);
        let k = (g - 1.0) / g;
        // Closed form: Tt2/Tt1 = 1 - eta_is (1 - PR^-k); polytropic PR^(-k eta_p).
        let e = turbo::expand(&gas, tt_in, pr, Efficiency::Isentropic(eta)).unwrap();
        let want = tt_in * (1.0 - eta * (1.0 - pr.powf(-k)));
        prop_assert!(relerr(e.tt_out, want) <= 1e-9, "{} vs {}", e.tt_out, want);
        let p = turbo::expand(&gas, tt_in, pr, Efficiency::Polytropic(eta)).unwrap();
        let want = tt_in * pr.powf(-k * eta);
        prop_assert!(relerr(p.tt_out, want) <= 1e-9, "{} vs {}", p.tt_out, want);
    }

    // ---------------------------------------------------------------
    // Normal shock on both gas models.
    // ---------------------------------------------------------------

    #[test]
    fn perfect_normal_shock_is_a_compression_that_conserves_energy(
        g in 1.1f64..1.67,
        m1 in 1.01f64..10.0,
        tt in 200.0f64..3000.0,
    ) {
        let gas = perfect(g);
        let up = isentropic::from_mach(&gas, tt, 1.0e5, m1).unwrap();
        let dn = shock::normal(&gas, &up).unwrap();
        check_shock(&gas, &up, &dn)?;
    }

    #[test]
    fn thermal_normal_shock_is_a_compression_that_conserves_energy(
        far in far_strategy(),
        t1 in 200.0f64..1500.0,
        m1 in 1.01f64..10.0,
    ) {
        let gas = thermal(far);
        let u1 = m1 * (gas.gamma(t1).unwrap() * gas.r() * t1).sqrt();
        let up = match isentropic::totals(&gas, t1, 2.0e4, u1) {
            Ok(u) => u,
            // Total temperature above 6000 K: the data range ends there.
            Err(e) => {
                prop_assert!(matches!(e, FlowError::Gas(GasError::OutOfRange { .. })), "{e:?}");
                return Ok(());
            }
        };
        // T2 < Tt1 <= 6000 K: the shock must solve whenever the totals do.
        let dn = shock::normal(&gas, &up);
        prop_assert!(dn.is_ok(), "{dn:?}");
        if let Ok(dn) = dn {
            check_shock(&gas, &up, &dn)?;
        }
    }

    // ---------------------------------------------------------------
    // Rayleigh and Fanno lines.
    // ---------------------------------------------------------------

    #[test]
    fn perfect_rayleigh_heat_raises_tt_by_q_over_cp(
        g in 1.1f64..1.67,
        m in prop_oneof![0.05f64..0.95, 1.05f64..5.0],
        frac in 0.0f64..1.0,
    ) {
        let gas = perfect(g);
        let cp = g * R_AIR / (g - 1.0);
        let inlet = isentropic::from_mach(&gas, 500.0, 2.0e5, m).unwrap();
        // Target Tt/Tt* between the branch's lower limit and just below 1
        // (closed form limits: 0 at M -> 0, (g^2 - 1)/g^2 at M -> infinity).
        let r1 = rayleigh::closed::tt_ttstar(m, g);
        let floor = if m < 1.0 { 0.05 } else { (g * g - 1.0) / (g * g) + 0.01 };
        let r2 = floor + frac * (0.999 - floor);
        let tt_star = 500.0 / r1;
        let q = cp * tt_star * (r2 - r1);
        let out = rayleigh::heat(&gas, &inlet, q).unwrap();
        // Energy: Tt2 = Tt1 + q/cp.
        prop_assert!(relerr(out.tt, 500.0 + q / cp) <= 1e-9, "{} vs {}", out.tt, 500.0 + q / cp);
        prop_assert_eq!(out.mach < 1.0, m < 1.0, "branch changed");
        // Closed form: the exit Mach number has Tt/Tt* = r2.
        prop_assert!((rayleigh::closed::tt_ttstar(out.mach, g) - r2).abs() <= 1e-9);
        // Mass and momentum (Rayleigh line definition).
        prop_assert!(relerr(out.rho * out.v, inlet.rho * inlet.v) <= 1e-9);
        let i1 = inlet.p + inlet.rho * inlet.v * inlet.v;
        prop_assert!(relerr(out.p + out.rho * out.v * out.v, i1) <= 1e-9);
    }

    #[test]
    fn perfect_rayleigh_heat_past_the_sonic_point_chokes(
        g in 1.1f64..1.67,
        m in prop_oneof![0.05f64..0.95, 1.05f64..5.0],
        extra in 1.001f64..3.0,
    ) {
        let gas = perfect(g);
        let cp = g * R_AIR / (g - 1.0);
        let inlet = isentropic::from_mach(&gas, 500.0, 2.0e5, m).unwrap();
        // Closed form: q_max = cp Tt1 (1/(Tt/Tt*) - 1).
        let q_max = cp * 500.0 * (1.0 / rayleigh::closed::tt_ttstar(m, g) - 1.0);
        match rayleigh::heat(&gas, &inlet, q_max * extra) {
            Err(FlowError::ThermalChoke { max_heat, .. }) => {
                prop_assert!(relerr(max_heat, q_max) <= 1e-9, "{max_heat} vs {q_max}");
            }
            other => prop_assert!(false, "expected thermal choking, got {:?}", other),
        }
    }

    #[test]
    fn thermal_rayleigh_heat_raises_total_enthalpy_by_q(
        far in far_strategy(),
        tt in 300.0f64..2000.0,
        m in prop_oneof![0.05f64..0.95, 1.05f64..3.0],
        frac in 0.0f64..0.999,
    ) {
        let gas = thermal(far);
        let Ok(inlet) = isentropic::from_mach(&gas, tt, 2.0e5, m) else {
            return Ok(()); // static temperature below the data range
        };
        let star = match rayleigh::sonic_state(&gas, &inlet) {
            Ok(s) => s,
            Err(e) => {
                // The sonic state's total temperature above 6000 K.
                prop_assert!(matches!(e, FlowError::Gas(GasError::OutOfRange { .. })), "{e:?}");
                return Ok(());
            }
        };
        let q = frac * (gas.h(star.tt).unwrap() - gas.h(tt).unwrap());
        let out = rayleigh::heat(&gas, &inlet, q).unwrap();
        // Energy: h(Tt2) = h(Tt1) + q, checked by stagnating the exit statics.
        let t2 = isentropic::totals(&gas, out.t, out.p, out.v).unwrap();
        let dh = gas.h(t2.tt).unwrap() - gas.h(tt).unwrap();
        prop_assert!((dh - q).abs() <= 1e-9 * gas.h(t2.tt).unwrap().abs().max(1e5), "{dh} vs {q}");
        prop_assert_eq!(out.mach < 1.0, m < 1.0);
        prop_assert!(relerr(out.rho * out.v, inlet.rho * inlet.v) <= 1e-9);
    }

    #[test]
    fn perfect_fanno_keeps_tt_and_follows_the_closed_form(
        g in 1.1f64..1.67,
        m in prop_oneof![0.05f64..0.95, 1.05f64..5.0],
        frac in 0.0f64..1.0,
    ) {
        let gas = perfect(g);
        let inlet = isentropic::from_mach(&gas, 400.0, 1.0e5, m).unwrap();
        let fl_max = fanno::closed::friction(m, g);
        let out = fanno::friction(&gas, &inlet, frac * fl_max).unwrap();
        check_fanno(&gas, &inlet, &out)?;
        // Closed form: 4fL*/D(M2) = 4fL*/D(M1) - 4fL/D.
        let rest = fanno::closed::friction(out.mach, g);
        prop_assert!((rest - (1.0 - frac) * fl_max).abs() <= 1e-9 * fl_max.max(1e-3));
    }
}

proptest! {
    // The thermally perfect Fanno line nests a quadrature in a root search:
    // fewer cases keep the debug-mode suite quick.
    #![proptest_config(config(24))]

    #[test]
    fn thermal_fanno_keeps_tt(
        far in far_strategy(),
        tt in 400.0f64..2000.0,
        m in prop_oneof![0.1f64..0.9, 1.1f64..2.0],
        frac in 0.0f64..1.0,
    ) {
        let gas = thermal(far);
        let Ok(inlet) = isentropic::from_mach(&gas, tt, 1.0e5, m) else {
            return Ok(()); // static temperature below the data range
        };
        let fl_max = fanno::friction_to_sonic(&gas, &inlet).unwrap();
        prop_assert!(fl_max > 0.0);
        let out = fanno::friction(&gas, &inlet, frac * fl_max).unwrap();
        check_fanno(&gas, &inlet, &out)?;
        // The remaining friction to choking is what the duct did not use.
        let rest = fanno::friction_to_sonic(&gas, &out).unwrap();
        prop_assert!((rest - (1.0 - frac) * fl_max).abs() <= 1e-8 * fl_max.max(1e-3),
            "{rest} vs {}", (1.0 - frac) * fl_max);
    }
}

/// Conservation across a normal shock, checked on the downstream statics:
/// mass, momentum, total temperature (stagnating the downstream state with
/// `totals`), and the second law (M2 < 1, pt2 < pt1).
fn check_shock(gas: &Gas, up: &FlowState, dn: &FlowState) -> Result<(), TestCaseError> {
    prop_assert!(dn.mach < 1.0, "M2 {} not subsonic", dn.mach);
    prop_assert!(dn.pt < up.pt, "pt2 {} >= pt1 {}", dn.pt, up.pt);
    prop_assert!(dn.p > up.p && dn.t > up.t && dn.rho > up.rho);
    prop_assert!(relerr(dn.rho * dn.v, up.rho * up.v) <= 1e-9, "mass");
    let i1 = up.p + up.rho * up.v * up.v;
    prop_assert!(relerr(dn.p + dn.rho * dn.v * dn.v, i1) <= 1e-9, "momentum");
    let back = isentropic::totals(gas, dn.t, dn.p, dn.v).unwrap();
    prop_assert!(
        relerr(back.tt, up.tt) <= 1e-9,
        "Tt2 {} vs Tt1 {}",
        back.tt,
        up.tt
    );
    prop_assert!(
        relerr(back.pt, dn.pt) <= 1e-9,
        "pt2 {} vs {}",
        back.pt,
        dn.pt
    );
    Ok(())
}

/// Fanno duct: same total temperature (stagnating the exit statics), same
/// mass flux, same branch, total pressure falls.
fn check_fanno(gas: &Gas, inlet: &FlowState, out: &FlowState) -> Result<(), TestCaseError> {
    let back = isentropic::totals(gas, out.t, out.p, out.v).unwrap();
    prop_assert!(
        relerr(back.tt, inlet.tt) <= 1e-9,
        "Tt {} vs {}",
        back.tt,
        inlet.tt
    );
    prop_assert!(relerr(back.pt, out.pt) <= 1e-9);
    prop_assert!(
        relerr(out.rho * out.v, inlet.rho * inlet.v) <= 1e-9,
        "mass flux"
    );
    prop_assert_eq!(out.mach < 1.0, inlet.mach < 1.0, "branch changed");
    prop_assert!(out.pt <= inlet.pt * (1.0 + 1e-12));
    Ok(())
}

// -------------------------------------------------------------------
// Robustness: arbitrary f64 inputs give Ok or Err, never a panic, and an
// Ok result holds finite numbers.
// -------------------------------------------------------------------

fn wild() -> impl Strategy<Value = f64> {
    prop_oneof![
        proptest::num::f64::ANY,
        -1.0e4f64..1.0e4,
        0.0f64..10.0,
        100.0f64..4000.0,
        Just(0.0),
        Just(-0.0),
        Just(1.0),
        Just(f64::NAN),
        Just(f64::INFINITY),
        Just(f64::NEG_INFINITY),
        Just(f64::MAX),
        Just(f64::MIN_POSITIVE),
        Just(1.0e300),
    ]
}

fn any_gas() -> impl Strategy<Value = Gas> {
    prop_oneof![
        Just(Gas::Perfect(PerfectGas::AIR)),
        (1.0f64..2.0)
            .prop_map(|g| Gas::Perfect(PerfectGas::new(g, R_AIR).unwrap_or(PerfectGas::AIR))),
        Just(thermal(0.0)),
        Just(thermal(0.03)),
    ]
}

fn any_branch() -> impl Strategy<Value = Branch> {
    prop_oneof![Just(Branch::Subsonic), Just(Branch::Supersonic)]
}

fn any_efficiency() -> impl Strategy<Value = Efficiency> {
    prop_oneof![
        wild().prop_map(Efficiency::Isentropic),
        wild().prop_map(Efficiency::Polytropic),
    ]
}

fn any_state() -> impl Strategy<Value = FlowState> {
    (
        wild(),
        wild(),
        wild(),
        wild(),
        wild(),
        wild(),
        wild(),
        wild(),
    )
        .prop_map(|(tt, pt, t, p, rho, v, a, mach)| FlowState {
            tt,
            pt,
            t,
            p,
            rho,
            v,
            a,
            mach,
        })
}

/// Inputs of ordinary magnitude (or NaN, which must be refused): for these
/// an Ok result must hold no NaN. Magnitudes near f64::MAX overflow to
/// infinity inside any formula and are only required not to panic.
fn ordinary(xs: &[f64]) -> bool {
    xs.iter().all(|x| x.is_nan() || x.abs() <= 1.0e12)
}

fn ok_has_no_nan(
    r: Result<FlowState, FlowError>,
    inputs: &[f64],
    what: &str,
) -> Result<(), TestCaseError> {
    if let (Ok(s), true) = (r, ordinary(inputs)) {
        prop_assert!(no_nan(&s), "{what} returned NaN in {s:?}");
    }
    Ok(())
}

proptest! {
    #![proptest_config(config(256))]

    #[test]
    fn isentropic_relations_never_panic(
        gas in any_gas(),
        tt in wild(), pt in wild(), x in wild(), w in wild(), area in wild(),
        branch in any_branch(),
    ) {
        let ins = [tt, pt, x];
        ok_has_no_nan(isentropic::from_mach(&gas, tt, pt, x), &ins, "from_mach")?;
        ok_has_no_nan(isentropic::from_pressure(&gas, tt, pt, x), &ins, "from_pressure")?;
        ok_has_no_nan(isentropic::from_velocity(&gas, tt, pt, x), &ins, "from_velocity")?;
        let flow = isentropic::from_flow(&gas, tt, pt, w, area, branch);
        ok_has_no_nan(flow, &[tt, pt, w, area], "from_flow")?;
        ok_has_no_nan(isentropic::totals(&gas, tt, pt, x), &ins, "totals")?;
        let _ = isentropic::area_ratio(&gas, tt, pt, x);
        let _ = isentropic::closed::mach_from_area_ratio(x, 1.4, branch);
    }

    #[test]
    fn shocks_never_panic_on_arbitrary_states(
        gas in any_gas(),
        up in any_state(),
        theta in wild(),
        strong in any::<bool>(),
    ) {
        let _ = shock::normal(&gas, &up);
        let s = if strong { shock::Strength::Strong } else { shock::Strength::Weak };
        let _ = shock::oblique(&gas, &up, theta, s);
    }

    #[test]
    fn shocks_never_panic_on_consistent_states(
        gas in any_gas(),
        tt in wild(), m in wild(), theta in wild(),
        strong in any::<bool>(),
    ) {
        // A consistent upstream state (when the isentrope allows one), then
        // an arbitrary deflection.
        if let Ok(up) = isentropic::from_mach(&gas, tt, 1.0e5, m) {
            ok_has_no_nan(shock::normal(&gas, &up), &[tt, m], "normal")?;
            let s = if strong { shock::Strength::Strong } else { shock::Strength::Weak };
            let ob = shock::oblique(&gas, &up, theta, s).map(|o| o.down);
            ok_has_no_nan(ob, &[tt, m, theta], "oblique")?;
        }
    }

    #[test]
    fn turbomachines_never_panic(
        gas in any_gas(),
        tt in wild(), pr in wild(), x in wild(),
        eff in any_efficiency(),
    ) {
        let _ = turbo::compress(&gas, tt, pr, eff);
        let _ = turbo::expand(&gas, tt, pr, eff);
        let _ = turbo::measured_compression(&gas, tt, x, pr);
        let _ = turbo::measured_expansion(&gas, tt, x, pr);
        let _ = turbo::expand_for_work(&gas, tt, x, eff);
        let _ = turbo::compress_for_work(&gas, tt, x, eff);
    }

    #[test]
    fn combustion_never_panics(
        thermal_model in any::<bool>(),
        far_in in wild(), war in wild(), hc in wild(),
        tt_in in wild(), x in wild(), lhv in wild(), eta in wild(),
    ) {
        let model = if thermal_model {
            GasModel::Thermal
        } else {
            GasModel::Perfect { cold: PerfectGas::AIR, hot: None }
        };
        let fuel = Fuel::new(hc).unwrap_or(Fuel::KEROSENE);
        // Composition fields are public: an unchecked one is a possible input.
        let inlet = Composition { far: far_in, war, fuel, ..Composition::dry_air() };
        let burner = combustion::Burner { fuel, lhv, efficiency: eta, fuel_sensible: x * 1e3 };
        let _ = combustion::exit_temperature(&model, &inlet, tt_in, x, &burner);
        let _ = combustion::far_for_temperature(&model, &inlet, tt_in, x, &burner);
        let _ = combustion::measured_efficiency(&model, &inlet, tt_in, x, far_in, &burner);
        let _ = combustion::sensible_energy(&model, &inlet, tt_in);
    }

    #[test]
    fn lines_never_panic(
        gas in any_gas(),
        inlet in any_state(),
        q in wild(),
    ) {
        let _ = rayleigh::heat(&gas, &inlet, q);
        let _ = rayleigh::ratios(&gas, &inlet);
        let _ = fanno::friction_to_sonic(&gas, &inlet);
    }
}

proptest! {
    // Regression guard: a normal shock whose solution lies inside the data
    // range must not be refused (the bracket once strayed above 6000 K).
    #![proptest_config(config(256))]

    #[test]
    fn shock_succeeds_whenever_the_totals_are_in_range(
        far in far_strategy(),
        t1 in 200.0f64..1500.0,
        m1 in 1.01f64..10.0,
    ) {
        let gas = thermal(far);
        let u1 = m1 * (gas.gamma(t1).unwrap() * gas.r() * t1).sqrt();
        if let Ok(up) = isentropic::totals(&gas, t1, 2.0e4, u1) {
            // T2 < Tt1 <= 6000 K: the downstream state is inside the range.
            let dn = shock::normal(&gas, &up);
            prop_assert!(dn.is_ok(), "T1 {t1} M1 {m1} Tt {}: {:?}", up.tt, dn);
        }
    }
}

#[test]
fn from_mach_at_the_floor_of_the_range_refuses() {
    // Inverse of the energy equation: at Tt = 200 K (the bottom of the data
    // range) any M > 0 needs T < 200 K, so the request must be refused, not
    // answered with the stagnation state.
    let gas = thermal(0.0);
    for m in [0.01, 0.5, 2.0] {
        let r = isentropic::from_mach(&gas, 200.0, 1.0e5, m);
        assert!(r.is_err(), "M {m} at Tt 200 K: {r:?}");
    }
}

#[test]
fn from_flow_below_a_sonic_state_outside_the_range_still_solves() {
    // Inverse: flight at Mach 0.5 at 11 km (T 216.65 K, U.S. Standard
    // Atmosphere 1976, from memory) has Tt near 227 K; its subsonic state
    // exists (T > 200 K) although the sonic one (T* near 189 K) does not.
    let gas = thermal(0.0);
    let s = isentropic::from_mach(&gas, 227.0, 3.0e4, 0.5).unwrap();
    let back = isentropic::from_flow(&gas, 227.0, 3.0e4, s.flux(), 1.0, Branch::Subsonic);
    let back = back.unwrap_or_else(|e| panic!("from_flow refused: {e}"));
    assert!(relerr(back.mach, 0.5) <= 1e-9, "{}", back.mach);
}
