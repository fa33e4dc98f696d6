/**
 * A sideways text histogram of a fixed-range histogram, cropped to [-half, half] and regrouped
 * into `rows` rows, with the +-spec rows marked. Plain ASCII so it survives any terminal or log.
 */
export function textHistogram(
  h: { lo: number; binWidth: number; counts: readonly number[] },
  half: number,
  spec: number,
  rows = 25,
  width = 50,
  label: (v: number) => string = (v) => `${(Math.abs(v) < 1e-15 ? 0 : v * 1e3).toFixed(3)} mV`,
): string {
  const step = (2 * half) / rows;
  const sums = new Array<number>(rows).fill(0);
  h.counts.forEach((c, i) => {
    const centre = h.lo + (i + 0.5) * h.binWidth;
    const r = Math.floor((centre + half) / step);
    if (r >= 0 && r < rows) sums[r]! += c;
  });
  const max = Math.max(1, ...sums);
  const labels = sums.map((_, r) => label(-half + (r + 0.5) * step));
  const lw = Math.max(...labels.map((l) => l.length));
  return sums
    .map((c, r) => {
      const lo = -half + r * step;
      const hi = lo + step;
      const mark = (lo <= spec && spec < hi) || (lo <= -spec && -spec < hi) ? ' <- spec' : '';
      const bar = '#'.repeat(Math.round((c / max) * width));
      return `${labels[r]!.padStart(lw)} |${bar}${c > 0 && bar === '' ? '.' : ''}${mark}`;
    })
    .join('\n');
}
