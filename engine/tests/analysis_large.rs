//! Large systems: the requirements of a system without tolerances are evaluated from the
//! nominal modes whatever its size (the corner-search budget counts only the corners beyond
//! nominal). Closed forms for a uniform fixed–free chain of N masses m on springs k (standard
//! closed form for the discrete chain, from memory): ωj = 2√(k/m)·sin((2j−1)π/(2(2N+1))); with
//! a damper c from every mass to ground, C = (c/m) M, so every mode has ζj = c / (2 m ωj)
//! (proportional damping, from memory).

use sprung_engine::analysis::{Config, analyze};
use sprung_engine::check;
use sprung_engine::requirements::Status;

/// The chain of lsp/tests/latency.rs with `n` masses of 2 kg, 50 kN/m, 3 N·s/m to ground.
fn chain(n: usize, require: &str) -> String {
    let mut s = String::from("system chain {\n");
    for i in 0..n {
        s.push_str(&format!("  mass m{i} = 2 kg\n"));
    }
    s.push_str("  spring s0 between m0 and ground = 50 kN/m\n");
    for i in 1..n {
        s.push_str(&format!(
            "  spring s{i} between m{} and m{i} = 50 kN/m\n",
            i - 1
        ));
    }
    for i in 0..n {
        s.push_str(&format!(
            "  damper d{i} between m{i} and ground = 3 N*s/m\n"
        ));
    }
    s.push_str(&format!("  {require}\n}}\n"));
    s
}

#[test]
fn a_large_chain_without_tolerances_has_its_requirements_evaluated() {
    // 400 masses: one 800-square state matrix is about 5e9 operations, the budget, so a
    // budget that charged the nominal point again would refuse this search.
    let n = 400;
    let (m, k, c) = (2.0_f64, 5e4_f64, 3.0_f64);
    let top = {
        let theta = (2 * n - 1) as f64 * std::f64::consts::PI / (2.0 * (2 * n + 1) as f64);
        2.0 * (k / m).sqrt() * theta.sin()
    };
    // The least damped mode is the highest.
    let least = c / (2.0 * m * top);
    for (limit, status) in [(0.5 * least, Status::Passed), (2.0 * least, Status::Failed)] {
        let text = chain(n, &format!("require damping >= {limit}"));
        let checked = check(&text);
        assert!(!checked.has_errors(), "{:#?}", checked.diagnostics);
        let a = analyze(&checked, &Config::default());
        assert!(
            a.diagnostics.iter().all(|d| d.code != "SP603"),
            "{:#?}",
            a.diagnostics
        );
        let v = &a.systems[0].verdicts[0];
        assert_eq!(v.status, status, "{}", v.message);
        let value = v.value.expect("measured");
        assert!(((value - least) / least).abs() < 1e-9, "{value} vs {least}");
        assert_eq!(v.mode, Some(n as u32));
    }
}
