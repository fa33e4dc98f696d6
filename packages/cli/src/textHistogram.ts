/**
 * A sideways text histogram of a fixed-range histogram, cropped to centre +- half and regrouped
 * into `rows` rows, with the +-spec rows marked (only +spec for a one-sided figure). Plain ASCII so it survives any terminal or log.
 */
export function textHistogram(
  h: { lo: number; binWidth: number; counts: readonly number[] },
  half: number,
  spec: number,
  rows = 25,
  width = 50,
  label: (v: number) => string = (v) => `${(Math.abs(v) < 1e-15 ? 0 : v * 1e3).toFixed(3)} mV`,
  oneSided = false,
  centre = 0,
): string {
  const step = (2 * half) / rows;
  const from = centre - half;
  const sums = new Array<number>(rows).fill(0);
  h.counts.forEach((c, i) => {
    const mid = h.lo + (i + 0.5) * h.binWidth;
    const r = Math.floor((mid - from) / step);
    if (r >= 0 && r < rows) sums[r]! += c;
  });
  const max = Math.max(1, ...sums);
  const labels = sums.map((_, r) => label(from + (r + 0.5) * step));
  const lw = Math.max(...labels.map((l) => l.length));
  return sums
    .map((c, r) => {
      const lo = from + r * step;
      const hi = lo + step;
      const mark = (lo <= spec && spec < hi) || (!oneSided && lo <= -spec && -spec < hi) ? ' <- spec' : '';
      const bar = '#'.repeat(Math.round((c / max) * width));
      return `${labels[r]!.padStart(lw)} |${bar}${c > 0 && bar === '' ? '.' : ''}${mark}`;
    })
    .join('\n');
}
