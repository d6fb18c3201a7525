//! Inputs at and past the limits must be diagnosed, never crash the process. Kept in its own
//! test binary: a stack overflow aborts the whole process, and must not take other tests along.

use sprung_engine::check;

#[test]
fn twenty_thousand_nested_parentheses_are_a_diagnostic() {
    let depth = 20_000;
    let text = format!(
        "system deep {{\n  mass m = {}1 kg{}\n  spring s between m and ground = 1 kN/m\n}}\n",
        "(".repeat(depth),
        ")".repeat(depth)
    );
    let checked = check(&text);
    let too_deep: Vec<_> = checked
        .diagnostics
        .iter()
        .filter(|d| d.code == "SP104")
        .collect();
    assert!(
        !too_deep.is_empty(),
        "expected SP104 (nested too deeply), got {:?}",
        checked.diagnostics
    );
    // The diagnostic points into the nested expression, on line 2.
    let offset = too_deep[0].span.start;
    let line_start = text.find('\n').map_or(0, |i| i + 1);
    assert!(
        offset >= line_start && offset < line_start + 2 * depth + 20,
        "{offset}"
    );
}
