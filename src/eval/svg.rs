//! Inline-SVG charts for the evaluation reports (no script, no external files): grouped
//! accuracy bars per attribute, accuracy against the public share, and reliability
//! diagrams. Also a data URI encoder so Markdown can embed them as images.

use std::fmt::Write;

use super::report::{AttrEval, Bin, EvalReport};

/// What the accuracy charts' percentages count, up their left edge.
const Y_ACCURACY: &str = "guesses right (accuracy)";

/// Series colours (readable on white, distinguishable in greyscale by order).
const COLOURS: [&str; 6] = [
    "#1b5e8c", "#c0622d", "#4d8c3a", "#7a4f9a", "#8c6d1b", "#555555",
];

pub fn escape(s: &str) -> String {
    s.replace('&', "&amp;")
        .replace('<', "&lt;")
        .replace('>', "&gt;")
        .replace('"', "&quot;")
}

struct Frame {
    w: f64,
    h: f64,
    left: f64,
    right: f64,
    top: f64,
    bottom: f64,
}

impl Frame {
    fn x(&self, t: f64) -> f64 {
        self.left + t * (self.w - self.left - self.right)
    }
    fn y(&self, v: f64) -> f64 {
        self.h - self.bottom - v * (self.h - self.top - self.bottom)
    }
}

/// Start a chart: the frame, its title, the horizontal grid with 0–100% labels, and
/// `y_label` written up the left edge saying what those percentages count.
fn open(out: &mut String, f: &Frame, title: &str, y_label: &str) {
    let _ = write!(
        out,
        r#"<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}" role="img" aria-label="{t}" font-family="sans-serif" font-size="12"><title>{t}</title><rect width="{w}" height="{h}" fill="white"/>"#,
        w = f.w,
        h = f.h,
        t = escape(title)
    );
    // Horizontal grid and labels at 0, 25, 50, 75, 100%.
    for k in 0..=4 {
        let v = k as f64 / 4.0;
        let y = f.y(v);
        let _ = write!(
            out,
            r##"<line x1="{x1:.1}" y1="{y:.1}" x2="{x2:.1}" y2="{y:.1}" stroke="#dddddd"/><text x="{tx:.1}" y="{ty:.1}" text-anchor="end">{p}%</text>"##,
            x1 = f.left,
            x2 = f.w - f.right,
            tx = f.left - 6.0,
            ty = y + 4.0,
            p = k * 25
        );
    }
    let _ = write!(
        out,
        r#"<text transform="translate(14,{cy:.1}) rotate(-90)" text-anchor="middle">{l}</text>"#,
        cy = (f.y(0.0) + f.y(1.0)) / 2.0,
        l = escape(y_label)
    );
}

fn legend(out: &mut String, f: &Frame, names: &[&str]) {
    for (k, name) in names.iter().enumerate() {
        let x = f.left + k as f64 * 150.0;
        let _ = write!(
            out,
            r#"<rect x="{x:.1}" y="6" width="12" height="12" fill="{c}"/><text x="{tx:.1}" y="16">{n}</text>"#,
            c = COLOURS[k % COLOURS.len()],
            tx = x + 16.0,
            n = escape(name)
        );
    }
}

/// Accuracy of the model beside the two baselines, per attribute.
pub fn accuracy_bars(attrs: &[AttrEval]) -> String {
    let f = Frame {
        w: 640.0,
        h: 300.0,
        left: 64.0,
        right: 12.0,
        top: 30.0,
        bottom: 40.0,
    };
    let mut out = String::new();
    open(
        &mut out,
        &f,
        "Accuracy per attribute: model, majority value, uniform guess",
        Y_ACCURACY,
    );
    legend(
        &mut out,
        &f,
        &["model", "most common value", "uniform guess"],
    );
    let groups = attrs.len().max(1) as f64;
    let gw = 1.0 / groups;
    for (g, a) in attrs.iter().enumerate() {
        let vals = [a.accuracy, a.majority_rate, a.uniform_rate];
        for (k, v) in vals.iter().enumerate() {
            let x0 = f.x(g as f64 * gw + gw * (0.15 + 0.23 * k as f64));
            let x1 = f.x(g as f64 * gw + gw * (0.15 + 0.23 * (k as f64 + 1.0)));
            let _ = write!(
                out,
                r#"<rect x="{x0:.1}" y="{y:.1}" width="{wd:.1}" height="{ht:.1}" fill="{c}"><title>{p:.1}%</title></rect>"#,
                y = f.y(*v),
                wd = (x1 - x0 - 2.0).max(1.0),
                ht = f.y(0.0) - f.y(*v),
                c = COLOURS[k],
                p = v * 100.0
            );
        }
        let _ = write!(
            out,
            r#"<text x="{x:.1}" y="{y:.1}" text-anchor="middle">{l}</text>"#,
            x = f.x(g as f64 * gw + gw / 2.0),
            y = f.h - f.bottom + 16.0,
            l = escape(&a.label)
        );
    }
    out.push_str("</svg>");
    out
}

/// Accuracy per attribute as the public share grows.
pub fn share_lines(r: &EvalReport) -> String {
    let f = Frame {
        w: 640.0,
        h: 300.0,
        left: 64.0,
        right: 12.0,
        top: 30.0,
        bottom: 40.0,
    };
    let mut out = String::new();
    open(
        &mut out,
        &f,
        "Accuracy as the share of members with public attributes grows",
        Y_ACCURACY,
    );
    let names: Vec<&str> = r.attributes.iter().map(|a| a.label.as_str()).collect();
    legend(&mut out, &f, &names);
    for k in 0..=10 {
        let s = k as f64 / 10.0;
        let _ = write!(
            out,
            r#"<text x="{x:.1}" y="{y:.1}" text-anchor="middle">{p}%</text>"#,
            x = f.x(s),
            y = f.h - f.bottom + 16.0,
            p = k * 10
        );
    }
    let _ = write!(
        out,
        r#"<text x="{x:.1}" y="{y:.1}" text-anchor="middle">share of members whose attributes are public</text>"#,
        x = f.x(0.5),
        y = f.h - 6.0
    );
    for (a, _) in r.attributes.iter().enumerate() {
        let c = COLOURS[a % COLOURS.len()];
        let pts: Vec<String> = r
            .public_share
            .iter()
            .map(|row| format!("{:.1},{:.1}", f.x(row.share), f.y(row.accuracy[a])))
            .collect();
        let _ = write!(
            out,
            r#"<polyline points="{}" fill="none" stroke="{c}" stroke-width="2"/>"#,
            pts.join(" ")
        );
        for row in &r.public_share {
            let _ = write!(
                out,
                r#"<circle cx="{x:.1}" cy="{y:.1}" r="3" fill="{c}"><title>{p:.1}%</title></circle>"#,
                x = f.x(row.share),
                y = f.y(row.accuracy[a]),
                p = row.accuracy[a] * 100.0
            );
        }
    }
    out.push_str("</svg>");
    out
}

/// Reliability diagram: accuracy against confidence per bin, before and after
/// calibration, with the diagonal a perfectly calibrated model would follow.
pub fn reliability(a: &AttrEval) -> String {
    let f = Frame {
        w: 320.0,
        h: 316.0,
        left: 64.0,
        right: 12.0,
        top: 46.0,
        bottom: 40.0,
    };
    let mut out = String::new();
    open(
        &mut out,
        &f,
        &format!(
            "{}: how often guesses at each confidence were right",
            a.label
        ),
        "guesses that were right",
    );
    legend(&mut out, &f, &["before calibration", "after"]);
    let _ = write!(
        out,
        r#"<text x="{x:.1}" y="36" font-weight="bold">{l}</text>"#,
        x = f.left,
        l = escape(&a.label)
    );
    let _ = write!(
        out,
        r##"<line x1="{:.1}" y1="{:.1}" x2="{:.1}" y2="{:.1}" stroke="#999999" stroke-dasharray="4 3"/>"##,
        f.x(0.0),
        f.y(0.0),
        f.x(1.0),
        f.y(1.0)
    );
    let _ = write!(
        out,
        r#"<text x="{x:.1}" y="{y:.1}" text-anchor="middle">confidence of the best guess</text>"#,
        x = f.x(0.5),
        y = f.h - 6.0
    );
    for (k, bins) in [&a.reliability_naive, &a.reliability_calibrated]
        .iter()
        .enumerate()
    {
        let c = COLOURS[k];
        let used: Vec<&Bin> = bins.iter().filter(|b| b.count > 0).collect();
        let pts: Vec<String> = used
            .iter()
            .map(|b| format!("{:.1},{:.1}", f.x(b.confidence), f.y(b.accuracy)))
            .collect();
        let _ = write!(
            out,
            r#"<polyline points="{}" fill="none" stroke="{c}" stroke-width="2"/>"#,
            pts.join(" ")
        );
        for b in used {
            let _ = write!(
                out,
                r#"<circle cx="{x:.1}" cy="{y:.1}" r="3" fill="{c}"><title>{n} guesses, {p:.0}% right</title></circle>"#,
                x = f.x(b.confidence),
                y = f.y(b.accuracy),
                n = b.count,
                p = b.accuracy * 100.0
            );
        }
    }
    out.push_str("</svg>");
    out
}

/// Base64 (RFC 4648, §4, with padding).
pub fn base64(bytes: &[u8]) -> String {
    const A: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for chunk in bytes.chunks(3) {
        let b = [
            chunk[0],
            *chunk.get(1).unwrap_or(&0),
            *chunk.get(2).unwrap_or(&0),
        ];
        let n = (u32::from(b[0]) << 16) | (u32::from(b[1]) << 8) | u32::from(b[2]);
        for k in 0..4 {
            if k <= chunk.len() {
                out.push(A[((n >> (18 - 6 * k)) & 63) as usize] as char);
            } else {
                out.push('=');
            }
        }
    }
    out
}

/// An SVG as a `data:` URI for a Markdown image.
pub fn data_uri(svg: &str) -> String {
    format!("data:image/svg+xml;base64,{}", base64(svg.as_bytes()))
}

#[cfg(test)]
mod tests {
    use super::*;

    // RFC 4648 §10 test vectors.
    #[test]
    fn base64_rfc4648_vectors() {
        let cases = [
            ("", ""),
            ("f", "Zg=="),
            ("fo", "Zm8="),
            ("foo", "Zm9v"),
            ("foob", "Zm9vYg=="),
            ("fooba", "Zm9vYmE="),
            ("foobar", "Zm9vYmFy"),
        ];
        for (plain, encoded) in cases {
            assert_eq!(base64(plain.as_bytes()), encoded);
        }
    }

    #[test]
    fn labels_are_escaped() {
        assert_eq!(escape("<a & \"b\">"), "&lt;a &amp; &quot;b&quot;&gt;");
    }
}
