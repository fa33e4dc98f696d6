/** Section 2: the operating point of every device at balance, without mismatch. */
import { chartSvg, type Layer } from '../../chart/chart.js';
import { categoryAxis, logAxis } from '../../chart/axis.js';
import { COLOR, DASH, OUTLINE } from '../../chart/style.js';
import type { ReportData } from '../data.js';
import { esc, figure, table, type Section } from '../html.js';
import { blockLabel } from './budget.js';
import { plain, q, um2 } from '../units.js';

/** Region bounds of the inversion coefficient (weak < 0.1 <= moderate <= 10 < strong; common practice, no source). */
const WEAK = 0.1;
const STRONG = 10;

export function operatingPointSection(d: ReportData): Section {
  const ops = d.operatingPoint;
  const hasCap = ops.some((o) => o.gateCapacitance !== undefined);
  const header = ['device', 'role', 'W', 'L', 'I<sub>D</sub>', 'IC', 'region', 'g<sub>m</sub>/I<sub>D</sub>', 'V<sub>GS</sub>\u2212V<sub>T0</sub>', 'W\u00b7L', '\u03c3(dV<sub>T</sub>)', '\u03c3(d\u03b2/\u03b2)'];
  if (hasCap) header.push('C<sub>gate</sub>');
  const rows = ops.map((o) => {
    const r = [`${o.device} (${o.polarity})`, o.role, q(o.w, 'm'), q(o.l, 'm'), q(o.current, 'A'), plain(o.ic, 3), o.region, `${plain(o.gmOverId, 4)} /V`, q(o.overdrive, 'V', 3), um2(o.gateArea), q(o.sigmaVt, 'V'), q(o.sigmaBeta, '%', 3)];
    if (hasCap) r.push(o.gateCapacitance === undefined ? '\u2013' : q(o.gateCapacitance, 'F', 3));
    return r;
  });
  const tbl = table(header, rows, { numeric: [2, 3, 4, 5, 7, 8, 9, 10, 11, 12] });
  const res = d.resistors ?? [];
  const resistors =
    res.length === 0
      ? ''
      : table(
          ['resistor', 'role', 'W', 'L', 'W\u00b7L', 'R', 'current', '\u03c3(dR/R)', 'gain g<sub>m</sub>R'],
          res.map((x) => [x.device, x.role, q(x.w, 'm'), q(x.l, 'm'), um2(x.area), x.resistance === undefined ? '\u2013' : q(x.resistance, 'ohm'), q(x.current, 'A'), q(x.sigmaR, '%', 3), x.voltageGain === undefined ? '\u2013' : `${plain(x.voltageGain, 4)} V/V`]),
          { numeric: [2, 3, 4, 5, 6, 7, 8] },
        );

  // One row per matched pair: both devices sit at the same point at balance.
  const pairsOf = new Map<string, typeof ops[number][]>();
  for (const o of ops) pairsOf.set(o.role, [...(pairsOf.get(o.role) ?? []), o]);
  const groups = [...pairsOf.values()];
  const names = groups.map((g) => `${g[0]!.role} ${g.map((o) => o.device).join('/')} (${g[0]!.polarity})`);
  const ics = groups.map((g) => g[0]!.ic);
  const axis = logAxis('inversion coefficient IC = I_D / I_S', ics, { include: [WEAK, STRONG], pad: 0.12 });
  const n = groups.length;
  const [x0, x1] = axis.domain;
  const band = (lo: number, hi: number, name: string, fill: string): Layer => ({ kind: 'band', name, x: [Math.max(lo, x0), Math.min(hi, x1)], lo: [-0.5, -0.5], hi: [n - 0.5, n - 0.5], fill });
  const layers: Layer[] = [
    band(WEAK, STRONG, 'moderate-region', COLOR.bandWide),
    { kind: 'rule', name: 'weak-bound', axis: 'x', value: WEAK, label: `weak | moderate (IC ${WEAK})`, stroke: COLOR.limit, dash: DASH.law, side: 'end' },
    { kind: 'rule', name: 'strong-bound', axis: 'x', value: STRONG, label: `moderate | strong (IC ${STRONG})`, stroke: COLOR.limit, dash: DASH.law, side: 'start' },
    { kind: 'points', name: 'devices', points: ics.map((ic, i) => ({ x: ic, y: i })), marker: 'diamond', fill: COLOR.main, stroke: OUTLINE, size: 5 },
    ...groups.map((g, i): Layer => ({ kind: 'label', name: `ic-${i}`, x: g[0]!.ic, y: i, text: `IC ${plain(g[0]!.ic, 3)}, gm/I_D ${plain(g[0]!.gmOverId, 4)} /V`, dy: 22, anchor: 'middle' })),
  ];
  const svg = chartSvg({
    id: 'fig-inversion',
    description: `Inversion coefficient of each matched pair on a log axis, with the weak (IC < ${WEAK}), moderate and strong (IC > ${STRONG}) regions.`,
    panels: [{ x: axis, y: categoryAxis('matched pair', names), layers, height: 20 + 60 * n, grid: 'x' }],
  });
  const reading = groups.map((g) => `the ${esc(blockLabel(d, g[0]!.role))} ${g.map((o) => o.device).join('/')} works in ${g[0]!.region} inversion (IC ${plain(g[0]!.ic, 3)}, g<sub>m</sub>/I<sub>D</sub> ${plain(g[0]!.gmOverId, 4)} /V, V<sub>GS</sub>\u2212V<sub>T0</sub> ${esc(q(g[0]!.overdrive, 'V', 3))})`).join('; ');
  return {
    id: 'operating-point',
    title: 'Operating point per device',
    html: `<p>At balance and without mismatch each device of a pair carries half the tail current; the table is the one <code>twinfet inspect</code> prints.</p>${tbl}${resistors}${figure('fig-inversion', 'Figure 2.1', 'Where the devices work', `${reading.charAt(0).toUpperCase()}${reading.slice(1)}.`, svg)}`,
  };
}
