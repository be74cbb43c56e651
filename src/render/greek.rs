//! Greek parameter names: `rho` is written ρ in text and `\rho` in LaTeX.

const GREEK: &[(&str, &str, &str)] = &[
    ("alpha", "α", "\\alpha"),
    ("beta", "β", "\\beta"),
    ("gamma", "γ", "\\gamma"),
    ("delta", "δ", "\\delta"),
    ("epsilon", "ε", "\\varepsilon"),
    ("zeta", "ζ", "\\zeta"),
    ("eta", "η", "\\eta"),
    ("theta", "θ", "\\theta"),
    ("iota", "ι", "\\iota"),
    ("kappa", "κ", "\\kappa"),
    ("lambda", "λ", "\\lambda"),
    ("mu", "μ", "\\mu"),
    ("nu", "ν", "\\nu"),
    ("xi", "ξ", "\\xi"),
    ("pi", "π", "\\pi"),
    ("rho", "ρ", "\\rho"),
    ("sigma", "σ", "\\sigma"),
    ("tau", "τ", "\\tau"),
    ("upsilon", "υ", "\\upsilon"),
    ("phi", "φ", "\\phi"),
    ("chi", "χ", "\\chi"),
    ("psi", "ψ", "\\psi"),
    ("omega", "ω", "\\omega"),
    ("Delta", "Δ", "\\Delta"),
    ("Theta", "Θ", "\\Theta"),
    ("Lambda", "Λ", "\\Lambda"),
    ("Xi", "Ξ", "\\Xi"),
    ("Pi", "Π", "\\Pi"),
    ("Sigma", "Σ", "\\Sigma"),
    ("Upsilon", "Υ", "\\Upsilon"),
    ("Phi", "Φ", "\\Phi"),
    ("Psi", "Ψ", "\\Psi"),
    ("Omega", "Ω", "\\Omega"),
];

fn split_subscript(name: &str) -> (&str, Option<&str>) {
    match name.split_once('_') {
        Some((head, sub)) => (head, Some(sub)),
        None => (name, None),
    }
}

/// The name as Unicode text (`rho` → ρ, `lambda_0` → λ_0).
pub fn text_name(name: &str) -> String {
    let (head, sub) = split_subscript(name);
    let head = GREEK
        .iter()
        .find(|(ascii, _, _)| *ascii == head)
        .map(|(_, unicode, _)| unicode.to_string())
        .unwrap_or_else(|| head.to_string());
    match sub {
        Some(s) => format!("{head}_{s}"),
        None => head,
    }
}

/// The name as LaTeX (`rho` → `\rho`, `lambda_0` → `\lambda_{0}`, `rate` → `\mathit{rate}`).
pub fn latex_name(name: &str) -> String {
    let (head, sub) = split_subscript(name);
    let head = match GREEK.iter().find(|(ascii, _, _)| *ascii == head) {
        Some((_, _, latex)) => latex.to_string(),
        None if head.chars().count() == 1 => head.to_string(),
        None => format!("\\mathit{{{head}}}"),
    };
    match sub {
        Some(s) => format!("{head}_{{{s}}}"),
        None => head,
    }
}

/// Whether a name renders as a Greek letter.
pub fn is_greek(name: &str) -> bool {
    let (head, _) = split_subscript(name);
    GREEK.iter().any(|(ascii, _, _)| *ascii == head)
}
