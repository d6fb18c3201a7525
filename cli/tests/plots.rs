//! End to end: `sprung response --format svg` and `sprung simulate --format svg` on the
//! examples and on small models. Each plot is parsed as XML (roxmltree) and its marks are
//! checked against values from outside the plot: `sprung modes --format json` for the natural
//! frequencies, unit conversion for the drive band (NIST SP 811: 1 rpm = 1/60 Hz), the
//! one-mass closed form F/k for the final value (standard vibration texts, from memory) and
//! `sprung simulate --format json` for the settling time. Pixel positions are mapped back to
//! values through the plot's own tick labels, so a mark drawn in the wrong place fails.

mod common;

use common::{code, json, repo, scratch, sprung, stderr, stdout, write};

/// One text element: its content (trimmed), position and anchor.
#[derive(Clone, Debug)]
struct Label {
    text: String,
    x: f64,
    y: f64,
    anchor: String,
    fill: String,
}

/// One filled rectangle.
#[derive(Clone, Copy, Debug)]
struct Rect {
    x: f64,
    y: f64,
    width: f64,
    height: f64,
    opacity: f64,
}

struct Svg {
    labels: Vec<Label>,
    rects: Vec<Rect>,
    /// Every polyline: its stroke colour and points.
    lines: Vec<(String, Vec<(f64, f64)>)>,
}

fn number(node: roxmltree::Node, name: &str) -> f64 {
    match node.attribute(name).map(str::parse::<f64>) {
        Some(Ok(v)) => v,
        _ => panic!("<{}> has no numeric `{name}`", node.tag_name().name()),
    }
}

fn parse(text: &str) -> Svg {
    let doc = match roxmltree::Document::parse(text) {
        Ok(doc) => doc,
        Err(err) => panic!("the SVG is not well-formed XML: {err}"),
    };
    let root = doc.root_element();
    assert_eq!(root.tag_name().name(), "svg");
    let mut svg = Svg {
        labels: Vec::new(),
        rects: Vec::new(),
        lines: Vec::new(),
    };
    for node in root.descendants().filter(|n| n.is_element()) {
        match node.tag_name().name() {
            "text" => svg.labels.push(Label {
                text: node.text().unwrap_or("").trim().to_string(),
                x: number(node, "x"),
                y: number(node, "y"),
                anchor: node.attribute("text-anchor").unwrap_or("").to_string(),
                fill: node.attribute("fill").unwrap_or("").to_string(),
            }),
            "rect" => svg.rects.push(Rect {
                x: number(node, "x"),
                y: number(node, "y"),
                width: number(node, "width"),
                height: number(node, "height"),
                opacity: number(node, "opacity"),
            }),
            "polyline" => svg.lines.push((
                node.attribute("stroke").unwrap_or("").to_string(),
                node.attribute("points")
                    .unwrap_or("")
                    .split_whitespace()
                    .filter_map(|p| {
                        let (x, y) = p.split_once(',')?;
                        Some((x.parse().ok()?, y.parse().ok()?))
                    })
                    .collect(),
            )),
            _ => {}
        }
    }
    svg
}

impl Svg {
    fn has(&self, text: &str) -> bool {
        self.labels.iter().any(|l| l.text == text)
    }

    fn starting(&self, prefix: &str) -> Vec<&Label> {
        self.labels
            .iter()
            .filter(|l| l.text.starts_with(prefix))
            .collect()
    }

    /// The translucent rectangles: the shaded bands.
    fn bands(&self) -> Vec<Rect> {
        self.rects
            .iter()
            .copied()
            .filter(|r| r.opacity < 1.0)
            .collect()
    }

    /// The tick labels of the first chart's x axis (`horizontal`: centred numbers sharing a
    /// y) or y axis (numbers ending at a shared x), as (value, pixel) pairs: the first run of
    /// such labels in document order, which is the upper panel's.
    fn ticks(&self, horizontal: bool) -> Vec<(f64, f64)> {
        let anchor = if horizontal { "middle" } else { "end" };
        let tick = |l: &Label| {
            (l.anchor == anchor)
                .then(|| l.text.parse::<f64>().ok())
                .flatten()
        };
        let start = self
            .labels
            .iter()
            .position(|l| tick(l).is_some())
            .expect("numeric tick labels");
        let first = &self.labels[start];
        self.labels[start..]
            .iter()
            .map_while(|l| {
                let same_row = if horizontal {
                    l.y == first.y
                } else {
                    l.x == first.x
                };
                let v = tick(l).filter(|_| same_row)?;
                Some((v, if horizontal { l.x } else { l.y }))
            })
            .collect()
    }

    /// Whether a vertical line of this colour runs at pixel `x` (within a pixel).
    fn vertical_at(&self, x: f64, stroke: &str) -> usize {
        self.lines
            .iter()
            .filter(|(s, l)| {
                s == stroke && l.len() == 2 && l[0].0 == l[1].0 && (l[0].0 - x).abs() <= 1.0
            })
            .count()
    }
}

/// A pixel ↔ value map fitted to an axis's tick labels through the first and last tick,
/// checked against every tick in between (so a wrong axis type fails here).
struct Axis {
    log: bool,
    a: f64,
    b: f64,
}

impl Axis {
    fn fit(ticks: &[(f64, f64)], log: bool) -> Axis {
        assert!(ticks.len() >= 3, "too few ticks: {ticks:?}");
        let t = |v: f64| if log { v.log10() } else { v };
        let (v0, p0) = ticks[0];
        let (v1, p1) = ticks[ticks.len() - 1];
        let b = (p1 - p0) / (t(v1) - t(v0));
        let axis = Axis {
            log,
            a: p0 - b * t(v0),
            b,
        };
        for &(v, p) in ticks {
            assert!(
                (axis.pixel(v) - p).abs() <= 1.0,
                "tick {v} at {p}, expected {}",
                axis.pixel(v)
            );
        }
        axis
    }

    fn pixel(&self, v: f64) -> f64 {
        self.a + self.b * if self.log { v.log10() } else { v }
    }
}

fn example(name: &str) -> String {
    repo()
        .join("examples")
        .join(name)
        .to_str()
        .expect("utf-8 path")
        .to_string()
}

fn svg_of(args: &[&str]) -> Svg {
    let out = sprung(args);
    assert_eq!(code(&out), 0, "{}", stderr(&out));
    let text = stdout(&out);
    let svg = parse(&text);
    assert!(
        svg.labels.iter().any(|l| l.text.starts_with("Caution:")),
        "no caution on the plot"
    );
    svg
}

/// The elastic natural frequencies (Hz) of the file's only system, from `sprung modes`.
fn natural_frequencies(file: &str) -> Vec<f64> {
    let out = sprung(["modes", file, "--format", "json"]);
    assert_eq!(code(&out), 0);
    json(&out)["systems"][0]["modes"]
        .as_array()
        .expect("modes")
        .iter()
        .filter_map(|m| m["natural_frequency_hz"].as_f64())
        .filter(|f| *f > 0.0)
        .collect()
}

/// `f3 108 Hz` → (3, 108.0).
fn mode_label(text: &str) -> Option<(usize, f64)> {
    let rest = text.strip_prefix('f')?.strip_suffix(" Hz")?;
    let (index, value) = rest.split_once(' ')?;
    Some((index.parse().ok()?, value.parse().ok()?))
}

#[test]
fn response_plot_marks_every_natural_frequency_where_modes_puts_it() {
    for (name, at) in [
        ("centrifuge.sprung", "housing"),
        ("pump-drive.sprung", "impeller"),
        ("instrument-rack.sprung", "top_shelf"),
    ] {
        let file = example(name);
        let expected = natural_frequencies(&file);
        let svg = svg_of(&["response", &file, "--at", at, "--format", "svg"]);
        let mut marks: Vec<(usize, f64, &Label)> = svg
            .labels
            .iter()
            .filter_map(|l| mode_label(&l.text).map(|(i, f)| (i, f, l)))
            .collect();
        marks.sort_by_key(|m| m.0);
        assert_eq!(marks.len(), expected.len(), "{name}: {marks:?}");
        let x = Axis::fit(&svg.ticks(true), true);
        for ((index, shown, label), f) in marks.iter().zip(&expected) {
            // Three significant figures: within half of the last digit shown.
            let digit = 10f64.powf(f.log10().floor() - 2.0);
            assert!(
                (shown - f).abs() <= 0.5 * digit + 1e-12,
                "{name}: f{index} shown {shown}, modes says {f}"
            );
            // A vertical line at that frequency, and the label beside it.
            // In both panels, in the label's colour.
            let px = x.pixel(*f);
            assert_eq!(
                svg.vertical_at(px, &label.fill),
                2,
                "{name}: no line at f{index} ({px} px)"
            );
            assert!(
                (label.x - px).abs() <= 6.0,
                "{name}: f{index} label far from its line"
            );
        }
    }
}

#[test]
fn response_plot_has_titled_axes_with_units() {
    let file = example("centrifuge.sprung");
    let svg = svg_of(&["response", &file, "--at", "housing", "--format", "svg"]);
    assert!(svg.has("frequency (Hz)"));
    assert!(svg.has("amplitude (dB re 1 m)"));
    assert!(svg.has("phase (degrees)"));
    assert!(svg.has("Amplitude of `housing` under drive `unbalance`"));
    assert!(
        svg.labels
            .iter()
            .any(|l| l.text.contains("floor_centrifuge") && l.text.contains("centrifuge.sprung")),
        "the subtitle names the system and the file"
    );
    // A rotational coordinate's amplitude is in radians.
    let pump = example("pump-drive.sprung");
    let svg = svg_of(&["response", &pump, "--at", "impeller", "--format", "svg"]);
    assert!(svg.has("amplitude (dB re 1 rad)"));
}

#[test]
fn the_scale_flag_changes_the_magnitude_axis() {
    let file = example("fan-skid.sprung");
    let db = svg_of(&["response", &file, "--at", "skid", "--format", "svg"]);
    let linear = svg_of(&[
        "response", &file, "--at", "skid", "--format", "svg", "--scale", "linear",
    ]);
    assert!(db.has("amplitude (dB re 1 m)") && !db.has("amplitude (mm)"));
    assert!(linear.has("amplitude (mm)") && !linear.has("amplitude (dB re 1 m)"));
    // Linear ticks start at zero and stay positive; dB ticks of a sub-millimetre amplitude
    // are negative.
    let lin_ticks = linear.ticks(false);
    assert!(lin_ticks.iter().any(|t| t.0 == 0.0));
    assert!(lin_ticks.iter().all(|t| t.0 >= 0.0));
    assert!(db.ticks(false).iter().all(|t| t.0 <= 0.0));
    let transmitted = svg_of(&[
        "response",
        &file,
        "--at",
        "skid",
        "--transmitted",
        "--format",
        "svg",
    ]);
    assert!(transmitted.has("transmissibility (dB, 20·log10 of the ratio)"));
}

#[test]
fn the_drive_band_is_shaded_over_its_frequencies() {
    // 2400 rpm .. 3200 rpm; 1 rpm = 1/60 Hz (NIST SP 811, appendix B): 40 Hz .. 53.33 Hz.
    let (lo, hi) = (2400.0 / 60.0, 3200.0 / 60.0);
    let file = example("centrifuge.sprung");
    let svg = svg_of(&["response", &file, "--at", "housing", "--format", "svg"]);
    assert!(svg.has("drive band `unbalance` 40.0 .. 53.3 Hz"));
    let x = Axis::fit(&svg.ticks(true), true);
    let bands = svg.bands();
    // One in each panel.
    assert_eq!(bands.len(), 2, "{bands:?}");
    for band in bands {
        assert!((band.x - x.pixel(lo)).abs() <= 1.0, "{band:?}");
        assert!((band.x + band.width - x.pixel(hi)).abs() <= 1.0, "{band:?}");
        assert!(band.height > 100.0);
    }
}

#[test]
fn a_single_drive_frequency_is_marked_not_shaded() {
    let file = example("instrument-rack.sprung");
    let svg = svg_of(&["response", &file, "--at", "top_shelf", "--format", "svg"]);
    assert!(svg.bands().is_empty());
    let label = svg.starting("drive `floor`");
    assert_eq!(label.len(), 1);
    assert_eq!(label[0].text, "drive `floor` 30.0 Hz");
    // The dashed line is drawn as short vertical segments at 30 Hz, in the label's colour.
    let px = Axis::fit(&svg.ticks(true), true).pixel(30.0);
    let dashes = svg.vertical_at(px, &label[0].fill);
    assert!(dashes > 10, "{dashes} dashes at {px}");
}

const SEAT: &str = "system seat {
  mass m = 95 kg
  spring k between m and ground = 18 kN/m
  damper c between m and ground = 785 N*s/m
  force load on m = step 150 N
  require settling of m within 5% <= 1.2 s
}
";

#[test]
fn simulate_plot_has_the_settling_band_and_marks() {
    let file = scratch("plots-seat").join("seat.sprung");
    write(&file, SEAT);
    let path = file.to_str().expect("utf-8 path");
    let base = ["simulate", path, "--at", "m", "--for", "2"];
    let measured = json(&sprung(base.iter().chain(&["--format", "json"])));
    let m = &measured["measures"];
    // The static deflection F/k (standard vibration texts, from memory): 150 N / 18 kN/m.
    let fin = 150.0 / 18e3;
    assert!((m["final_value"].as_f64().expect("final") - fin).abs() < 1e-12);
    assert_eq!(m["settling"]["within"], 0.05);
    assert_eq!(m["settling"]["source"], "requirement");
    let ts = m["settling"]["time_s"].as_f64().expect("settles");

    let svg = svg_of(
        &base
            .iter()
            .chain(&["--format", "svg"])
            .copied()
            .collect::<Vec<_>>(),
    );
    assert!(svg.has("time (s)"));
    assert!(svg.has("displacement of `m` (mm)"));
    assert!(svg.has("settling band ±5% (from the requirement)"));
    assert!(svg.has("final value 8.33 mm"));
    let settles = svg.starting("settles at ");
    assert_eq!(settles.len(), 1);
    let shown: f64 = settles[0]
        .text
        .trim_start_matches("settles at ")
        .split(' ')
        .next()
        .and_then(|v| v.parse().ok())
        .expect("a time");
    assert!((shown - ts).abs() <= 0.0005 + 1e-12, "{shown} vs {ts}");
    assert_eq!(svg.starting("peak ").len(), 1);

    // The band spans final ± 5% on the displacement axis (mm), and the whole time axis.
    let y = Axis::fit(&svg.ticks(false), false);
    let t = Axis::fit(&svg.ticks(true), false);
    let bands = svg.bands();
    assert_eq!(bands.len(), 1, "{bands:?}");
    let band = bands[0];
    let (top, bottom) = (y.pixel(fin * 1.05 * 1e3), y.pixel(fin * 0.95 * 1e3));
    assert!((band.y - top).abs() <= 1.0, "{band:?} vs {top}");
    assert!(
        (band.y + band.height - bottom).abs() <= 1.0,
        "{band:?} vs {bottom}"
    );
    assert!((band.x - t.pixel(0.0)).abs() <= 1.0);
    assert!((band.x + band.width - t.pixel(2.0)).abs() <= 1.0);
    // A vertical line at the settling time.
    assert_eq!(
        svg.vertical_at(t.pixel(ts), &settles[0].fill),
        1,
        "no line at the settling time"
    );

    // A band given on the command line wins over the requirement's.
    let given = svg_of(
        &base
            .iter()
            .chain(&["--format", "svg", "--within", "2"])
            .copied()
            .collect::<Vec<_>>(),
    );
    assert!(given.has("settling band ±2% (given)"));
    let out = sprung(base.iter().chain(&["--format", "svg", "--within", "0"]));
    assert_eq!(code(&out), 2);
    assert!(out.stdout.is_empty());
}

#[test]
fn a_response_that_does_not_settle_says_so() {
    let file = scratch("plots-undamped").join("spring.sprung");
    write(
        &file,
        "system s {\n  mass m = 1 kg\n  spring k between m and ground = 1 kN/m\n  force f on m = step 1 N\n}\n",
    );
    let path = file.to_str().expect("utf-8 path");
    let svg = svg_of(&[
        "simulate", path, "--at", "m", "--for", "1", "--format", "svg",
    ]);
    assert!(svg.has("does not settle within ±2% in 1.00 s"));
    assert!(svg.has("settling band ±2% (default)"));
    // An impulse settles to zero: the band is a fraction of the peak instead.
    write(
        &file,
        "system s {\n  mass m = 12 kg\n  spring k between m and ground = 30 kN/m\n  damper c between m and ground = 60 N*s/m\n  force knock on m = impulse 3 N*s\n}\n",
    );
    let svg = svg_of(&[
        "simulate", path, "--at", "m", "--for", "3", "--format", "svg",
    ]);
    assert!(svg.has("settling band ±2% of the peak (default)"));
    assert!(svg.has("final value 0 mm"));
    assert_eq!(svg.starting("settles at ").len(), 1);
}

#[test]
fn output_goes_to_the_named_file() {
    let dir = scratch("plots-output");
    let target = dir.join("skid.svg");
    let file = example("fan-skid.sprung");
    let out = sprung([
        "response",
        &file,
        "--at",
        "skid",
        "--format",
        "svg",
        "--output",
        target.to_str().expect("utf-8 path"),
    ]);
    assert_eq!(code(&out), 0, "{}", stderr(&out));
    assert!(out.stdout.is_empty());
    let text = std::fs::read_to_string(&target).expect("the plot was written");
    assert!(parse(&text).has("frequency (Hz)"));
    // A folder that does not exist is a usage error.
    let missing = dir.join("no-such-folder").join("x.svg");
    let out = sprung([
        "response",
        &file,
        "--at",
        "skid",
        "--output",
        missing.to_str().expect("utf-8 path"),
    ]);
    assert_eq!(code(&out), 2);
    assert!(stderr(&out).contains("cannot write"));
}

/// A chain of 40 masses on springs: enough work that a terminal would get a progress bar.
fn long_chain() -> String {
    let mut text = String::from("system chain {\n");
    for i in 0..40 {
        text.push_str(&format!("  mass m{i} = 2 kg\n"));
        let to = if i == 0 {
            "ground".to_string()
        } else {
            format!("m{}", i - 1)
        };
        text.push_str(&format!("  spring k{i} between m{i} and {to} = 50 kN/m\n"));
        text.push_str(&format!("  damper c{i} between m{i} and {to} = 20 N*s/m\n"));
    }
    text.push_str("  force shake on m39 = 10 N at 5 Hz\n  force push on m39 = step 10 N\n}\n");
    text
}

#[test]
fn no_progress_bytes_when_stderr_is_not_a_terminal() {
    let file = scratch("plots-progress").join("chain.sprung");
    write(&file, long_chain());
    let path = file.to_str().expect("utf-8 path");
    let out = sprung([
        "response", path, "--at", "m20", "--points", "4000", "--format", "csv",
    ]);
    assert_eq!(code(&out), 0, "{}", stderr(&out));
    assert!(out.stderr.is_empty(), "stderr: {:?}", stderr(&out));
    assert_eq!(stdout(&out).lines().count(), 4_002);
    let out = sprung([
        "simulate", path, "--at", "m20", "--for", "2", "--format", "json",
    ]);
    assert_eq!(code(&out), 0, "{}", stderr(&out));
    assert!(out.stderr.is_empty(), "stderr: {:?}", stderr(&out));
}
