/** Small helpers for writing SVG text: escaping, attributes, coordinates. */

/** Text made safe for an XML text node or a double-quoted attribute. */
export function esc(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** A coordinate rounded to 0.01 px: enough for any screen or printer, and short. */
export function px(v: number): string {
  if (!Number.isFinite(v)) throw new RangeError(`internal: a plot coordinate is ${v}`);
  const r = Math.round(v * 100) / 100;
  return String(r === 0 ? 0 : r);
}

/** Attributes as ` name="value"`, in the given order; undefined values are left out. */
export function attrs(a: Readonly<Record<string, string | number | undefined>>): string {
  let out = '';
  for (const [k, v] of Object.entries(a)) {
    if (v === undefined) continue;
    out += ` ${k}="${typeof v === 'number' ? px(v) : esc(v)}"`;
  }
  return out;
}

/** One element: `<name attrs>children</name>`, or self-closed when there are no children. */
export function el(name: string, a: Readonly<Record<string, string | number | undefined>>, children?: string): string {
  return children === undefined ? `<${name}${attrs(a)}/>` : `<${name}${attrs(a)}>${children}</${name}>`;
}

/** Approximate width of `text` at `size` px in a sans-serif face, for layout (no font metrics here). */
export function textWidth(text: string, size: number): number {
  let w = 0;
  for (const ch of text) w += /[il.,:;'|!() ]/.test(ch) ? 0.34 : /[mwMW%\u00b5]/.test(ch) ? 0.9 : /[A-Z]/.test(ch) ? 0.7 : 0.6;
  return w * size;
}
