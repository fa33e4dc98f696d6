/**
 * The design-review page: one self-contained HTML file (inline CSS and SVG, no scripts, nothing
 * fetched: a content-security policy forbids every load) built from ReportData.
 */
import type { ConditionsData, ReportData } from './data.js';
import { linearisedEstimate } from '@twinfet/montecarlo';
import { esc, num, shellWord, type Section } from './html.js';
import { areaSection } from './sections/area.js';
import { budgetSection } from './sections/budget.js';
import { conditionsSection } from './sections/conditions.js';
import { designSection } from './sections/design.js';
import { distributionSection } from './sections/distribution.js';
import { operatingPointSection } from './sections/operatingPoint.js';
import { transferSection } from './sections/transfer.js';
import { yieldSection } from './sections/yield.js';
import { PAGE_CSS } from './style.js';
import { yieldText, yieldDigits } from '../commands/inspect.js';
import { figureUnit, plain, q, um2 } from './units.js';

/** The caution every page carries near its top. */
export const CAUTION =
  'Results are design aids. They come from a compact device model (EKV 1995) and the matching coefficients in the design file; they do not replace the foundry\u2019s own matching data, its statistical models and the sign-off checks of a real design flow.';

/** The sections of a report, in order; section 8 only when the design has conditions. */
export function reportSections(d: ReportData): Section[] {
  const sections = [designSection(d), operatingPointSection(d), distributionSection(d), budgetSection(d), yieldSection(d), areaSection(d), transferSection(d)];
  const c: ConditionsData | undefined = d.conditions;
  if (c !== undefined) sections.push(conditionsSection(d, c));
  return sections;
}

function summary(d: ReportData): string {
  const r = d.run;
  const u = figureUnit(d.stage.figure);
  const F = r.figure.name;
  const c = `${plain(r.yield.confidence * 100, 3)}%`;
  const yv = (path: string, y: number, lo: number): string => num(y, y === 1 ? '1' : yieldText(y, yieldDigits(lo)), { path });
  const items: [string, string][] = [
    [`sigma of the ${d.stage.figure.label}`, `${num(r.offset.sigma, q(r.offset.sigma, u), { path: `${F}.sigma`, unit: u })} <small>(${c} [${num(r.offset.sigmaInterval[0], q(r.offset.sigmaInterval[0], u), { path: `${F}.sigmaInterval.0`, unit: u })}, ${num(r.offset.sigmaInterval[1], q(r.offset.sigmaInterval[1], u), { path: `${F}.sigmaInterval.1`, unit: u })}])</small>`],
    ['spec', `${d.stage.figure.sided === 'two' ? '\u00b1' : '\u2264 '}${num(r.yield.spec, q(r.yield.spec, u), { path: 'yield.spec', unit: u })} <small>(${plain(linearisedEstimate(r.analytic).level, 3)} sigma)</small>`],
    [r.yield.over === undefined ? 'instance yield' : 'instance yield, all conditions', `${yv('yield.estimate', r.yield.estimate, r.yield.interval[0])} <small>(Monte Carlo, ${r.yield.failures} failures)</small>`],
    [`chip yield (${r.chip.instances})`, yv('chip.estimate', r.chip.estimate, r.chip.interval[0])],
  ];
  if (r.importance !== undefined) items.push(['high-sigma failure', `${num(r.importance.failureProbability, plain(r.importance.failureProbability, 4), { path: 'importance.failureProbability' })} <small>(importance sampling)</small>`]);
  const m = d.area.meets;
  items.push([`area for chip yield ${d.area.target.chipYield}`, m.reached ? `${um2(m.inputArea, 3)} <small>per input device (${plain(m.factor, 3)}\u00d7 today)</small>` : 'not reachable by the input pair alone']);
  return `<ul class="summary">${items.map(([k, v]) => `<li><span class="k">${esc(k)}</span><span class="v">${v}</span></li>`).join('')}</ul>`;
}

/** The whole page as HTML text. */
export function renderReport(d: ReportData): string {
  const sections = reportSections(d);
  const r = d.run;
  const toc = `<nav class="toc" aria-label="Sections"><ol>${sections.map((s) => `<li><a href="#${s.id}">${esc(s.title)}</a></li>`).join('')}</ol></nav>`;
  const warnings = d.warnings.length === 0 ? '' : `<div class="warnings" role="note"><strong>Model notes</strong><ul>${d.warnings.map((w) => `<li>${esc(w)}</li>`).join('')}</ul></div>`;
  const body = sections.map((s, i) => `<section id="${s.id}"><h2>${i + 1}. ${esc(s.title)}</h2>${s.html}</section>`).join('\n');
  const title = `Design review: ${d.design.name}`;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">
<meta name="generator" content="twinfet ${esc(d.meta.version)}">
<title>${esc(title)}</title>
<link rel="icon" href="data:,">
<style>${PAGE_CSS}</style>
</head>
<body>
<header>
<h1>${esc(title)}</h1>
<p class="subtitle">${esc(d.stage.topology)} stage \u00b7 ${r.evaluated} Monte Carlo samples, seed ${esc(r.seed)} \u00b7 generated ${esc(d.meta.generated.slice(0, 10))} by twinfet ${esc(d.meta.version)}</p>
<div class="caution" role="note"><strong>Caution</strong>${esc(CAUTION)}</div>
${summary(d)}
${warnings}
${toc}
</header>
<main>
${body}
</main>
<footer>Made by <code>${esc(d.meta.command.map(shellWord).join(' '))}</code> with twinfet ${esc(d.meta.version)} on Node.js ${esc(d.meta.node)}. ${esc(CAUTION)}</footer>
</body>
</html>
`;
}
