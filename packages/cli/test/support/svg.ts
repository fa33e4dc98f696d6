/** Readers for the SVG the charts write, for the tests: tag balance, texts, boxes and markers. */
import { expect } from 'vitest';

/** Null when every opened tag is closed in order, else a description of the first fault. */
export function tagBalanceFault(svg: string): string | null {
  const stack: string[] = [];
  const tag = /<(\/?)([A-Za-z][\w:.-]*)((?:"[^"]*"|'[^']*'|[^'">])*?)(\/?)>/g;
  let m: RegExpExecArray | null;
  let consumed = 0;
  while ((m = tag.exec(svg)) !== null) {
    const between = svg.slice(consumed, m.index);
    if (between.includes('<') || between.includes('>')) return `stray bracket before offset ${m.index}`;
    consumed = m.index + m[0].length;
    const [, close, name, , selfClose] = m;
    if (selfClose === '/') continue;
    if (close === '/') {
      const open = stack.pop();
      if (open !== name) return `</${name}> closes <${open ?? 'nothing'}>`;
    } else stack.push(name!);
  }
  if (svg.slice(consumed).trim() !== '') return 'text after the last tag';
  return stack.length === 0 ? null : `unclosed <${stack.join('>, <')}>`;
}

/** Every text element's content, entities undone. */
export function svgTexts(svg: string): string[] {
  return [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]!.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&amp;/g, '&'));
}

/** The texts of elements whose class attribute is exactly `cls`. */
export function textsOfClass(svg: string, cls: string): string[] {
  return [...svg.matchAll(new RegExp(`<text class="${cls}"[^>]*>([^<]*)</text>`, 'g'))].map((m) => m[1]!.replace(/&amp;/g, '&'));
}

/** A well-formed SVG with no NaN or infinite number anywhere in it. */
export function expectWellFormedSvg(svg: string): void {
  expect(svg.startsWith('<svg')).toBe(true);
  expect(svg.endsWith('</svg>')).toBe(true);
  expect(tagBalanceFault(svg)).toBeNull();
  expect(svg).not.toMatch(/NaN|Infinity/);
}

/** The plot area of panel `i`: its clip rectangle. */
export function plotBox(svg: string, id: string, i: number): { x0: number; y0: number; x1: number; y1: number } {
  const m = new RegExp(`<clipPath id="${id}-clip-${i}"><rect x="([\\d.]+)" y="([\\d.]+)" width="([\\d.]+)" height="([\\d.]+)"/></clipPath>`).exec(svg);
  expect(m, `clip rectangle of panel ${i}`).not.toBeNull();
  const [x, y, w, h] = m!.slice(1).map(Number) as [number, number, number, number];
  return { x0: x, y0: y, x1: x + w, y1: y + h };
}

/** The body of each panel group, in order. */
export function panels(svg: string): string[] {
  return svg.split('<g class="panel">').slice(1);
}

/** The group of the layer named `name` (its markup), or undefined. */
export function layerGroup(svg: string, name: string): string | undefined {
  const m = new RegExp(`<g class="layer [a-z]+" data-name="${name}"[^>]*>(.*?)</g>`, 's').exec(svg);
  return m?.[1];
}

/** Centres of the circle and square markers in a piece of SVG. */
export function markerCentres(svg: string): { x: number; y: number }[] {
  const circles = [...svg.matchAll(/<circle cx="([-\d.]+)" cy="([-\d.]+)"/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]) }));
  const squares = [...svg.matchAll(/<rect x="([-\d.]+)" y="([-\d.]+)" width="([\d.]+)" height="([\d.]+)" fill/g)].map((m) => ({ x: Number(m[1]) + Number(m[3]) / 2, y: Number(m[2]) + Number(m[4]) / 2 }));
  return [...circles, ...squares];
}
