package render

// CSS is the sheet's style: plain, dense and legible, thin black rules,
// a narrow gutter of source line numbers, nothing that needs colour to be
// understood (verdicts and errors are words).
const CSS = `:root { --rule: 0.6pt solid #222; --thin: 0.4pt solid #888; }
* { box-sizing: border-box; }
html { background: #f4f4f0; }
body { font: 10pt/1.35 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; color: #111; background: #fff;
  max-width: 200mm; margin: 6mm auto; padding: 8mm 10mm; border: var(--thin); }
math { font-size: 1.05em; }
mi.u { text-transform: none; padding-left: 0.25em; }
mtext.pfsense { padding-left: 0.3em; }
.row > div:not([class]) math { math-style: normal; }
h1, h2, h3, h4 { font-weight: bold; margin: 1.1em 0 0.4em; break-after: avoid; }
h1 { font-size: 13pt; border-bottom: var(--rule); padding-bottom: 2pt; }
h2 { font-size: 11.5pt; } h3, h4 { font-size: 10.5pt; }
p { margin: 0.45em 0; }
table { border-collapse: collapse; }
main.body table:not([class]) { margin: 0.5em 0; }
main.body table:not([class]) td, main.body table:not([class]) th { border: var(--thin); padding: 1.5pt 5pt; }
code, pre { font-family: "DejaVu Sans Mono", "Liberation Mono", monospace; font-size: 9pt; }
pre.code, pre.rawhtml { border-left: var(--rule); padding: 3pt 6pt; white-space: pre-wrap; }
code.rawhtml { background: none; }
.imgref { font-style: italic; }
header.tb { margin-bottom: 4mm; }
table.tb { width: 100%; border: 1.2pt solid #111; }
table.tb td { border: var(--rule); padding: 2pt 5pt; vertical-align: top; width: 25%; }
table.tb .lbl { display: block; font-size: 6.5pt; text-transform: uppercase; letter-spacing: 0.06em; color: #444; }
table.tb .val { display: block; min-height: 1.2em; }
table.tb .title { font-size: 13pt; font-weight: bold; }
table.revs { width: 100%; margin-top: 2mm; font-size: 8.5pt; }
table.revs caption { text-align: left; font-size: 6.5pt; text-transform: uppercase; letter-spacing: 0.06em; color: #444; }
table.revs th, table.revs td { border: var(--thin); padding: 1pt 4pt; text-align: left; }
section.summary { border: var(--thin); padding: 2pt 6pt; margin: 0 0 4mm; font-size: 9pt; }
ol.errlist, ul.warnlist { margin: 2pt 0 2pt 1.4em; padding: 0; }
.block { margin: 3mm 0; border-top: var(--rule); border-bottom: var(--rule); }
.block > .bhead { font-size: 7.5pt; text-transform: uppercase; letter-spacing: 0.05em; color: #444; padding: 1pt 0; border-bottom: var(--thin); }
.row { display: grid; grid-template-columns: 8mm minmax(0, 1fr) 52mm; column-gap: 3mm; padding: 2pt 0; border-bottom: var(--thin); break-inside: avoid; page-break-inside: avoid; }
.row:last-child { border-bottom: none; }
.row.wide { grid-template-columns: 8mm minmax(0, 1fr); }
.row.wide > div:not([class]) { overflow-x: auto; font-size: 0.92em; }
.row.wide .desc { grid-column: 2; }
.ln, .row[data-line]::before { font: 7.5pt "DejaVu Sans Mono", monospace; color: #555; text-align: right; padding-top: 2pt; border-right: var(--thin); padding-right: 2mm; }
.row[data-line]::before { content: attr(data-line); }
.row > div:not([class]) > div { margin: 1pt 0; }
.row > div:not([class]) .s, .row > div:not([class]) .r, .row > div:not([class]) > div[data-value] { padding-left: 6mm; }
.row > div:not([class]) .r, .row > div:not([class]) > div[data-value] { font-weight: bold; }
.row > div:not([class]) .brk { padding-left: 10mm; text-indent: -10mm; }
.row > div:not([class]) .brk > .t { display: inline-block; max-width: 100%; text-indent: 0; }
.row > div:not([class]) .brk > .kindtag { margin-right: 2mm; }
.row > div:not([class]) .s.brk { padding-left: 16mm; }
.desc { font-size: 8.5pt; color: #222; padding-top: 1pt; }
.row.note { grid-template-columns: 8mm minmax(0, 1fr); }
.row.note .txt { font-style: italic; }
.kindtag { font-size: 7pt; text-transform: uppercase; letter-spacing: 0.05em; border: var(--thin); padding: 0 2pt; margin-left: 2mm; }
.verdict { font-weight: bold; margin-left: 4mm; }
.verdict.fail { text-decoration: underline; }
.verdict.fail::before { content: "✗ "; }
.verdict.pass::before { content: "✓ "; }
.util { margin-left: 3mm; font-size: 8.5pt; }
.case { display: inline-block; min-width: 12mm; margin-right: 2mm; font-size: 8.5pt; font-weight: bold; border: 0.3pt solid #444; padding: 0 1mm; }
.case::before { content: "case "; font-weight: normal; }
.tol { font-size: 8pt; font-style: italic; }
.err, .na { border: 0.8pt dashed #111; padding: 1pt 4pt; margin: 2pt 0; font-size: 9pt; }
.err .tag, .na .tag { font-weight: bold; letter-spacing: 0.04em; }
.inl-err { border-bottom: 0.8pt dashed #111; font-weight: bold; }
.inl { white-space: nowrap; }
section.stamp { margin-top: 6mm; font-size: 8pt; break-inside: avoid; }
table.stamp th { text-align: left; padding: 1pt 6pt 1pt 0; font-weight: normal; color: #444; vertical-align: top; white-space: nowrap; }
table.stamp td { padding: 1pt 0; word-break: break-all; }
footer.caution { margin-top: 6mm; border-top: var(--rule); padding-top: 2pt; font-size: 8pt; break-inside: avoid; }
.marker { position: fixed; inset: 0; display: flex; align-items: center; justify-content: center; pointer-events: none; z-index: 10; }
.marker span { transform: rotate(-35deg); font: bold 30pt "DejaVu Sans", sans-serif; color: rgba(0,0,0,0.16); border: 3pt solid rgba(0,0,0,0.16); padding: 4pt 12pt; white-space: nowrap; }
.marker-text { font-weight: bold; border: 1pt solid #111; padding: 2pt 6pt; text-align: center; }
section.appendix { break-before: page; }
.grid { overflow-x: auto; }
table.mat td { padding: 0 4pt; text-align: right; font-size: 8.5pt; }
table.data { border-collapse: collapse; font-size: 8.5pt; margin: 2pt 0; }
table.data th, table.data td { border: var(--thin); padding: 1pt 4pt; text-align: right; }
table.data th { font-weight: bold; text-align: center; }
figure { margin: 3mm 0; break-inside: avoid; }
figcaption { font-size: 8.5pt; font-style: italic; }
figure svg { max-width: 100%; height: auto; }
.sweep .sweephead { font-size: 8.5pt; color: #222; padding: 1pt 0; border-bottom: var(--thin); }
.sweep .sweepnote { font-size: 8.5pt; }
.sweep td.gap, .sweep td.why { font-style: italic; }
@media print {
  html { background: none; }
  body { max-width: none; margin: 0; padding: 0; border: none; }
  a { color: inherit; text-decoration: none; }
  .err, .na { border-style: solid; }
  .row.wide > div:not([class]) { overflow: visible; font-size: 0.8em; }
}
`
