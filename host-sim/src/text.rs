//! Number formatting for the readable reports.

/// A small or large quantity in scientific notation with four significant figures,
/// e.g. `1.040e-4`.
pub fn sci(x: f64) -> String {
    if x == 0.0 {
        return "0".to_string();
    }
    format!("{x:.3e}")
}

/// A value with its 1-sigma error in scientific notation: `1.23e-5 ± 4.0e-6`.
pub fn sci_pm(x: f64, s: f64) -> String {
    format!("{} ± {:.1e}", sci(x), s)
}

/// Hours and minutes from seconds: `16.9 h`.
pub fn hours(s: f64) -> String {
    format!("{:.1} h", s / 3600.0)
}

/// A labelled line, label padded to a column.
pub fn line(label: &str, value: impl std::fmt::Display) -> String {
    format!("  {label:<26} {value}\n")
}

/// A section heading.
pub fn heading(title: &str) -> String {
    format!("{title}\n{}\n", "-".repeat(title.chars().count()))
}
