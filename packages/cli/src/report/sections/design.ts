/** Section 1: the design, and how to make the page again. */
import { ZERO_CELSIUS_K, type ProcessParams } from '@twinfet/core';
import type { ReportData } from '../data.js';
import { esc, num, pairs, shellWord, table, type Section } from '../html.js';
import { micro, plain, q, um2 } from '../units.js';

function processRow(polarity: string, p: ProcessParams): string[] {
  return [
    polarity,
    q(p.vt0, 'V'),
    plain(p.slope),
    `${plain(p.kp * 1e6)} \u00b5A/V\u00b2`,
    `${plain(p.avt * 1e9)} mV\u00b7\u00b5m`,
    `${plain(p.abeta * 1e8)} %\u00b7\u00b5m`,
    plain(p.rho),
    p.cox === undefined ? '\u2013' : `${plain(p.cox * 1e3)} fF/\u00b5m\u00b2`,
    p.wmin === undefined ? '\u2013' : q(p.wmin, 'm'),
    p.lmin === undefined ? '\u2013' : q(p.lmin, 'm'),
  ];
}

export function designSection(d: ReportData): Section {
  const des = d.design;
  const r = d.run;
  const f = d.stage.figure;
  const devices = table(
    ['device', 'role', 'polarity', 'W', 'L', 'W\u00b7L', '\u03c3(dV<sub>T</sub>)', '\u03c3(d\u03b2/\u03b2)'],
    d.operatingPoint.map((o) => [o.device, o.role, o.polarity, q(o.w, 'm'), q(o.l, 'm'), um2(o.gateArea), q(o.sigmaVt, 'V'), q(o.sigmaBeta, '%')]),
    { numeric: [3, 4, 5, 6, 7], caption: 'Devices and geometry (per-device mismatch sigmas A/\u221a(2WL), so a pair differs by A/\u221a(WL))' },
  );
  const procRows = (['n', 'p'] as const).flatMap((pol) => {
    const p = des.process[pol];
    return p === undefined ? [] : [processRow(pol, p)];
  });
  const process = table(['polarity', 'V<sub>T0</sub>', 'n', 'KP', 'A<sub>VT</sub>', 'A<sub>\u03b2</sub>', '\u03c1', 'C<sub>ox</sub>', 'W<sub>min</sub>', 'L<sub>min</sub>'], procRows, {
    numeric: [1, 2, 3, 4, 5, 6, 7, 8, 9],
    caption: 'Process coefficients (as given in the design file)',
  });
  const limit = f.sides === 'both' ? `|${f.symbol}| \u2264 ` : `${f.symbol} \u2264 `;
  const m = d.meta;
  const command = m.command.map(shellWord).join(' ');
  const conditions = pairs([
    ['topology', esc(d.stage.topology)],
    ['temperature', `${plain(des.temperature, 5)} K (${plain(des.temperature - ZERO_CELSIUS_K, 4)} \u00b0C)`],
    ['tail current', q(des.tail, 'A')],
    ['spec', `${esc(limit)}${num(r.yield.spec, q(r.yield.spec, f.unit), { path: 'yield.spec', unit: f.unit })} ${d.specOverridden ? '(from --spec, replacing the design file\u2019s)' : '(from the design file)'}`],
    ['instances per chip', num(r.chip.instances, String(r.chip.instances), { path: 'chip.instances' })],
    ['chip-yield target', `${plain(d.area.target.chipYield)} (the area study of section 6; --chip-yield)`],
  ]);
  const reproduce = pairs([
    ['command', `<code class="command">${esc(command)}</code>`],
    ['design file', `${esc(m.source)} (SHA-256 <code>${m.sourceSha256}</code>)`],
    ['Monte Carlo', `${num(r.samples, String(r.samples), { path: 'samples' })} samples, seed ${num(r.seed, r.seed, { path: 'seed' })}, confidence ${num(r.yield.confidence, plain(r.yield.confidence), { path: 'yield.confidence' })} for every interval; the numbers depend on the seed and the sample count only, not on the number of workers`],
    ['versions', `twinfet ${esc(m.version)}, Node.js ${esc(m.node)} (${esc(m.platform)})`],
    ['generated', `${esc(m.generated)}, analyses in ${m.seconds.toFixed(2)} s`],
  ]);
  return {
    id: 'design',
    title: 'The design',
    html: `<p class="lead">${esc(des.name)}. ${d.stage.description === null ? `A ${esc(d.stage.topology)} stage (the report has no description of this stage type).` : esc(micro(d.stage.description))}</p>${conditions}${devices}${process}<h3>Reproduce this page</h3>${reproduce}`,
  };
}
