/** Section 1: the design, and how to make the page again. */
import { stageDefinition, ZERO_CELSIUS_K, type ProcessParams } from '@twinfet/core';
import type { ReportData } from '../data.js';
import { esc, num, pairs, shellWord, table, type Section } from '../html.js';
import { figureUnit, micro, plain, q, um2 } from '../units.js';

function processRow(polarity: string, p: ProcessParams): string[] {
  return [
    polarity,
    q(p.vt0, 'V'),
    plain(p.slope),
    `${plain(p.kp * 1e6)} \u00b5A/V\u00b2`,
    `${plain(p.avt * 1e9)} mV\u00b7\u00b5m`,
    `${plain(p.abeta * 1e8)} %\u00b7\u00b5m`,
    plain(p.rho ?? 0),
    p.cox === undefined ? '\u2013' : `${plain(p.cox * 1e3)} fF/\u00b5m\u00b2`,
    p.minW === undefined ? '\u2013' : q(p.minW, 'm'),
    p.minL === undefined ? '\u2013' : q(p.minL, 'm'),
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
  const res = d.resistors ?? [];
  const resistors =
    res.length === 0
      ? ''
      : table(
          ['resistor', 'role', 'W', 'L', 'W\u00b7L', 'R', '\u03c3(dR/R)'],
          res.map((x) => [x.device, x.role, q(x.w, 'm'), q(x.l, 'm'), um2(x.area), x.resistance === undefined ? '\u2013 (not given: the offset depends on the ratio only)' : q(x.resistance, 'ohm'), q(x.sigmaR, '%')]),
          { numeric: [2, 3, 4, 6], caption: 'Resistors (per-resistor sigma A_R/\u221a(2WL))' },
        );
  const procRows = (['n', 'p'] as const).flatMap((pol) => {
    const p = des.process[pol];
    return p === undefined ? [] : [processRow(pol, p)];
  });
  const process = table(['polarity', 'V<sub>T0</sub>', 'n', 'KP', 'A<sub>VT</sub>', 'A<sub>\u03b2</sub>', '\u03c1', 'C<sub>ox</sub>', 'W<sub>min</sub>', 'L<sub>min</sub>'], procRows, {
    numeric: [1, 2, 3, 4, 5, 6, 7, 8, 9],
    caption: 'Process coefficients (as given in the design file)',
  });
  const ar = des.process.resistor?.ar;
  const resistorProcess = ar === undefined ? '' : pairs([['resistor matching A<sub>R</sub>', `${plain(ar * 1e8)} %\u00b7\u00b5m`]]);
  // The stage's own top-level fields (the tail current of the differential stages), as its definition names them.
  const own = stageDefinition(des.topology).fields.flatMap((fd): [string, string][] => {
    const v = des[fd.key];
    return typeof v === 'number' ? [[esc(fd.what), fd.integer === true ? String(v) : q(v, fd.unit)]] : [];
  });
  const limit = f.sided === 'two' ? `|${f.symbol}| \u2264 ` : `${f.symbol} \u2264 `;
  const m = d.meta;
  const command = m.command.map(shellWord).join(' ');
  const conditions = pairs([
    ['topology', esc(d.stage.topology)],
    ['temperature', `${plain(des.temperature, 5)} K (${plain(des.temperature - ZERO_CELSIUS_K, 4)} \u00b0C)`],
    ...own,
    ['spec', `${esc(limit)}${num(r.yield.spec, q(r.yield.spec, figureUnit(f)), { path: 'yield.spec', unit: figureUnit(f) })} ${d.specOverridden ? '(from --spec, replacing the design file\u2019s)' : '(from the design file)'}`],
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
    html: `<p class="lead">${esc(des.name)}. ${esc(micro(d.stage.description))}</p>${conditions}${devices}${resistors}${process}${resistorProcess}<h3>Reproduce this page</h3>${reproduce}`,
  };
}
