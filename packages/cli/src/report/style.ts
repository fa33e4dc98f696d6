/**
 * The page's stylesheet: one column that narrows with the window, tables that scroll sideways
 * rather than squeeze, figures that scale, and a print stylesheet for A4 and Letter (margins
 * that fit both, no figure or table split across pages). Only fonts installed on the reader's
 * machine are named.
 */
import { FONT_FAMILY } from '../chart/style.js';

export const PAGE_CSS = `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 60rem; padding: 1.5rem 1.25rem 3rem; font-family: ${FONT_FAMILY}; font-size: 15px; line-height: 1.5; color: #1b1b1b; background: #ffffff; }
h1 { font-size: 1.6rem; line-height: 1.25; margin: 0 0 0.25rem; }
h2 { font-size: 1.25rem; margin: 2.25rem 0 0.75rem; padding-bottom: 0.25rem; border-bottom: 2px solid #1b1b1b; }
h3 { font-size: 1.05rem; margin: 1.5rem 0 0.5rem; }
p { margin: 0.5rem 0; }
p.subtitle { color: #555555; margin: 0 0 1rem; }
.caution { border: 1px solid #1b1b1b; border-left-width: 6px; background: #f2f2f2; padding: 0.6rem 0.9rem; margin: 1rem 0; }
.caution strong { display: block; }
.warnings { border-left: 4px dashed #7a7a7a; padding: 0.25rem 0.9rem; margin: 1rem 0; }
.summary { display: grid; grid-template-columns: repeat(auto-fit, minmax(13rem, 1fr)); gap: 0.5rem 1rem; margin: 1rem 0; padding: 0; list-style: none; }
.summary li { border-top: 1px solid #b5b5b5; padding-top: 0.3rem; }
.summary .k { display: block; font-size: 0.85rem; color: #555555; }
.summary .v { font-size: 1.05rem; font-variant-numeric: tabular-nums; }
nav.toc ol { margin: 0.25rem 0; padding-left: 1.5rem; columns: 2 16rem; }
nav.toc a { color: inherit; }
figure.plot { margin: 1.25rem 0; }
figure.plot svg { display: block; width: 100%; max-width: 46rem; height: auto; }
figcaption { margin-top: 0.35rem; max-width: 46rem; }
.fig-label, .fig-title { font-weight: 600; }
.table-wrap { overflow-x: auto; margin: 0.75rem 0; }
table { border-collapse: collapse; font-variant-numeric: tabular-nums; font-size: 0.92rem; }
th, td { padding: 0.2rem 0.6rem; border-bottom: 1px solid #d9d9d9; text-align: left; vertical-align: top; }
thead th { border-bottom: 1.5px solid #1b1b1b; white-space: nowrap; }
td.n, th.n { text-align: right; white-space: nowrap; }
table.pairs th { font-weight: 600; white-space: nowrap; padding-left: 0; }
table.compact td { padding: 0.1rem 0.6rem; }
code { font-family: ui-monospace, 'SFMono-Regular', Menlo, Consolas, 'Liberation Mono', 'DejaVu Sans Mono', monospace; font-size: 0.88em; }
code.command { display: block; white-space: pre-wrap; overflow-wrap: anywhere; background: #f2f2f2; padding: 0.35rem 0.5rem; }
p.note { color: #3a3a3a; font-size: 0.92rem; }
p.lead { font-size: 1.02rem; }
p.table-title { font-weight: 600; margin: 1rem 0 0.25rem; }
footer { margin-top: 3rem; padding-top: 0.5rem; border-top: 1px solid #b5b5b5; color: #555555; font-size: 0.85rem; }
@media (max-width: 40rem) {
  body { padding: 0.75rem 0.6rem 2rem; font-size: 14px; }
  h1 { font-size: 1.3rem; }
  nav.toc ol { columns: 1; }
}
@media print {
  @page { margin: 14mm 12mm; }
  body { max-width: none; padding: 0; font-size: 10pt; }
  h2 { break-after: avoid; page-break-after: avoid; margin-top: 1.25rem; }
  h3 { break-after: avoid; }
  figure.plot, .table-wrap, .caution, .summary { break-inside: avoid; page-break-inside: avoid; }
  p.table-title { break-after: avoid; }
  figure.plot svg { max-width: 100%; max-height: 120mm; }
  .table-wrap { overflow: visible; }
  table { font-size: 7.5pt; }
  table.pairs { font-size: 9pt; }
  th, td { padding: 0.1rem 0.25rem; }
  thead th { white-space: normal; }
  nav.toc { display: none; }
  a { color: inherit; text-decoration: none; }
  code.command { background: none; border: 1px solid #b5b5b5; }
}
`;
