//! The page's style sheet: a plain scholarly page — serif text, numbered sections, generous
//! margins — with a print style for A4 and Letter. System fonts only (nothing fetched).

pub(super) const CSS: &str = r#":root { color-scheme: light; --ink: #1d1d1f; --muted: #5b5b60; --rule: #d8d4ca; --paper: #fffdf8; --accent: #1f3a68; }
* { box-sizing: border-box; }
html { background: #f3f1ea; }
body { margin: 0; color: var(--ink); font-family: "Iowan Old Style", "Palatino Linotype", Palatino, "Book Antiqua", Georgia, "Times New Roman", serif; font-size: 17px; line-height: 1.55; }
main { max-width: 50rem; margin: 2.5rem auto; padding: 3rem 4rem; background: var(--paper); border: 1px solid var(--rule); }
header { border-bottom: 2px solid var(--ink); margin-bottom: 1.5rem; padding-bottom: 0.8rem; }
.kicker { text-transform: uppercase; letter-spacing: 0.14em; font-size: 0.75rem; color: var(--muted); margin: 0; }
h1 { font-weight: normal; font-size: 1.9rem; margin: 0.2rem 0 0.4rem; overflow-wrap: anywhere; }
h2 { font-weight: normal; font-size: 1.35rem; margin: 2.2rem 0 0.6rem; border-bottom: 1px solid var(--rule); padding-bottom: 0.2rem; }
h2 .number { display: inline-block; min-width: 1.6rem; color: var(--accent); }
h3 { font-weight: normal; font-style: italic; font-size: 1.1rem; margin: 1.4rem 0 0.4rem; }
.meta { color: var(--muted); margin: 0; }
.note { border-left: 3px solid var(--accent); padding: 0.3rem 0.8rem; background: #f6f3ea; }
.warning { border-left: 3px solid #b03a2e; padding: 0.3rem 0.8rem; background: #fbefec; }
nav ol { columns: 2; margin: 0 0 1rem; padding-left: 1.4rem; color: var(--muted); }
nav a { color: var(--accent); text-decoration: none; }
math[display="block"] { margin: 0.7rem 0; overflow-x: auto; overflow-y: hidden; padding: 0.2rem 0; }
math { font-size: 1.08em; font-family: "STIX Two Math", "Cambria Math", "Latin Modern Math", "Libertinus Math", "DejaVu Math TeX Gyre", math; }
.formula-label { color: var(--muted); font-size: 0.9rem; margin: 0.6rem 0 0; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 0.25rem 1.2rem; margin: 0.6rem 0; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; overflow-wrap: anywhere; }
table { border-collapse: collapse; width: 100%; margin: 0.8rem 0; font-size: 0.92rem; }
th, td { text-align: left; vertical-align: top; padding: 0.3rem 0.6rem 0.3rem 0; border-bottom: 1px solid var(--rule); }
th { font-weight: normal; font-style: italic; color: var(--muted); border-bottom: 1px solid var(--ink); }
td.number, .value { font-family: "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 0.8rem; overflow-wrap: anywhere; }
table.evidence td.number { font-size: 0.72rem; }
tr.gap td { text-align: center; color: var(--muted); font-size: 0.8rem; padding: 0.05rem 0; }
table.evidence td:first-child { white-space: nowrap; }
tr.checked td:first-child::after { content: " ✓"; color: #3c7a3f; }
pre { background: #f6f3ea; border: 1px solid var(--rule); padding: 0.7rem 0.9rem; overflow-x: auto; font-size: 0.85rem; line-height: 1.45; white-space: pre-wrap; overflow-wrap: anywhere; }
figure { margin: 1.2rem 0; }
figure svg { width: 100%; height: auto; display: block; }
figcaption { color: var(--muted); font-size: 0.9rem; margin-top: 0.3rem; }
.status-holds { color: #2f6b33; }
.status-fails { color: #b03a2e; }
.status-undecided { color: #8a6d1a; }
footer { margin-top: 2.5rem; border-top: 1px solid var(--rule); color: var(--muted); font-size: 0.85rem; }
@media (max-width: 44rem) { main { padding: 1.2rem; margin: 0; border: 0; } nav ol { columns: 1; } }
@page { size: auto; margin: 18mm 16mm; }
@media print {
  html, body, main { background: #fff; }
  body { font-size: 10.5pt; }
  main { max-width: none; margin: 0; padding: 0; border: 0; }
  nav { display: none; }
  h2 { break-after: avoid; page-break-after: avoid; }
  figure, table, math[display="block"], dl.facts { break-inside: avoid; page-break-inside: avoid; }
  pre { white-space: pre-wrap; }
  a { color: inherit; text-decoration: none; }
}
"#;
