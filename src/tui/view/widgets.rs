//! Small drawing helpers shared by the screens: bars, word wrapping, fitted text.

use ratatui::style::Style;
use ratatui::text::{Line, Span};
use telltale::text::{display_width, pad_to_width, truncate_to_width};

use crate::tui::theme::Theme;

/// A bar `width` cells wide filled to `p`, with `|` at the population rate and `¦` at
/// the alert level (when given). The markers are characters, not colours, so the bar
/// reads without colour.
pub fn bar(
    p: f64,
    base: f64,
    target: Option<f64>,
    width: usize,
    theme: Theme,
) -> Vec<Span<'static>> {
    if width == 0 {
        return Vec::new();
    }
    let cell = |x: f64| ((x.clamp(0.0, 1.0) * width as f64).round() as usize).min(width - 1);
    let filled = (p.clamp(0.0, 1.0) * width as f64).round() as usize;
    let base_at = cell(base);
    let target_at = target.map(cell);
    let mut spans = Vec::new();
    let mut run = String::new();
    let flush = |run: &mut String, spans: &mut Vec<Span<'static>>| {
        if !run.is_empty() {
            spans.push(Span::styled(std::mem::take(run), theme.bar()));
        }
    };
    for i in 0..width {
        if i == base_at {
            flush(&mut run, &mut spans);
            spans.push(Span::styled("|", theme.base_mark()));
        } else if Some(i) == target_at {
            flush(&mut run, &mut spans);
            spans.push(Span::styled("¦", theme.title()));
        } else {
            run.push(if i < filled { '█' } else { '░' });
        }
    }
    flush(&mut run, &mut spans);
    spans
}

/// A plain two-tone bar (no markers), for charts of shares.
pub fn share_bar(p: f64, width: usize, fill: char) -> String {
    let filled = (p.clamp(0.0, 1.0) * width as f64).round() as usize;
    let mut s: String = std::iter::repeat_n(fill, filled.min(width)).collect();
    s.extend(std::iter::repeat_n(' ', width - filled.min(width)));
    s
}

/// Wrap words to lines of at most `width` cells (long words are cut by grapheme).
pub fn wrap(text: &str, width: usize) -> Vec<String> {
    let width = width.max(1);
    let mut lines = Vec::new();
    let mut line = String::new();
    for word in text.split_whitespace() {
        let word = if display_width(word) > width {
            truncate_to_width(word, width)
        } else {
            word.to_string()
        };
        let need = display_width(&line) + usize::from(!line.is_empty()) + display_width(&word);
        if !line.is_empty() && need > width {
            lines.push(std::mem::take(&mut line));
        }
        if !line.is_empty() {
            line.push(' ');
        }
        line.push_str(&word);
    }
    if !line.is_empty() {
        lines.push(line);
    }
    lines
}

/// A span padded or cut to exactly `width` cells.
pub fn cell(s: &str, width: usize, style: Style) -> Span<'static> {
    Span::styled(pad_to_width(s, width), style)
}

/// A span right-aligned in `width` cells.
pub fn cell_right(s: &str, width: usize, style: Style) -> Span<'static> {
    let t = truncate_to_width(s, width);
    let pad = width.saturating_sub(display_width(&t));
    Span::styled(format!("{}{t}", " ".repeat(pad)), style)
}

/// Cut a line's spans to `width` cells in total.
pub fn fit(line: Line<'static>, width: usize) -> Line<'static> {
    let mut used = 0;
    let mut spans = Vec::new();
    for span in line.spans {
        let w = display_width(&span.content);
        if used + w <= width {
            used += w;
            spans.push(span);
        } else {
            let room = width - used;
            if room > 0 {
                spans.push(Span::styled(
                    truncate_to_width(&span.content, room),
                    span.style,
                ));
            }
            break;
        }
    }
    Line::from(spans).style(line.style)
}

/// A date (Unix seconds) as YYYY-MM-DD.
pub fn date(t: i64) -> String {
    time::OffsetDateTime::from_unix_timestamp(t)
        .map(|d| format!("{:04}-{:02}-{:02}", d.year(), u8::from(d.month()), d.day()))
        .unwrap_or_else(|_| "?".into())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn bar_marks_base_and_target_without_colour() {
        let spans = bar(0.5, 0.2, Some(0.8), 10, Theme::plain());
        let s: String = spans.iter().map(|s| s.content.as_ref()).collect();
        assert_eq!(s, "██|██░░░¦░");
        assert_eq!(display_width(&s), 10);
    }

    #[test]
    fn wrap_respects_width_with_wide_characters() {
        let lines = wrap("北京读书会 meets every 星期三 evening", 12);
        assert!(lines.iter().all(|l| display_width(l) <= 12), "{lines:?}");
        assert_eq!(lines.join(" "), "北京读书会 meets every 星期三 evening");
    }
}
