/** HTML pieces of the page: escaping, tagged numbers, tables, figures. */
import { esc } from '../chart/svg.js';

export { esc };

/**
 * A number the page shows, tagged with its exact value: `path` names it in the run's JSON
 * (`twinfet run --json`), so a reader or a test can check the page against the run; `unit` is
 * the SI unit the text is written in (with a prefix). Numbers that are not in the run's JSON
 * carry `key` instead.
 */
export function num(value: number | string, text: string, tag: { path: string; unit?: string } | { key: string; unit?: string }): string {
  const id = 'path' in tag ? `data-path="${esc(tag.path)}"` : `data-key="${esc(tag.key)}"`;
  const unit = tag.unit === undefined ? '' : ` data-unit="${esc(tag.unit)}"`;
  return `<data value="${esc(String(value))}" ${id}${unit}>${esc(text)}</data>`;
}

/** A table: header cells and rows of trusted HTML cells; `numeric` columns align right. */
export function table(header: readonly string[], rows: readonly (readonly string[])[], options: { numeric?: readonly number[]; /** A title line above the table (trusted HTML). */ caption?: string; className?: string } = {}): string {
  const right = new Set(options.numeric ?? []);
  const cell = (tag: 'th' | 'td', c: string, i: number): string => `<${tag}${right.has(i) ? ' class="n"' : ''}>${c}</${tag}>`;
  const head = `<thead><tr>${header.map((h, i) => cell('th', h, i)).join('')}</tr></thead>`;
  const body = `<tbody>${rows.map((r) => `<tr>${r.map((c, i) => cell('td', c, i)).join('')}</tr>`).join('')}</tbody>`;
  const title = options.caption === undefined ? '' : `<p class="table-title">${options.caption}</p>`;
  return `${title}<div class="table-wrap"><table${options.className === undefined ? '' : ` class="${options.className}"`}>${head}${body}</table></div>`;
}

/** Label/value rows. */
export function pairs(rows: readonly (readonly [string, string])[]): string {
  return `<div class="table-wrap"><table class="pairs"><tbody>${rows.map(([k, v]) => `<tr><th scope="row">${k}</th><td>${v}</td></tr>`).join('')}</tbody></table></div>`;
}

/** A figure: the SVG and a caption with its title and one-line reading. */
export function figure(id: string, label: string, title: string, reading: string, svg: string): string {
  return `<figure class="plot" id="${esc(id)}">${svg}<figcaption><span class="fig-label">${esc(label)}.</span> <span class="fig-title">${esc(title)}.</span> <span class="reading">${reading}</span></figcaption></figure>`;
}

/** An argument quoted for a POSIX shell when it needs it. */
export function shellWord(a: string): string {
  return /^[\w@%+=:,./-]+$/.test(a) ? a : `'${a.replace(/'/g, `'\\''`)}'`;
}

/** One section of the page. */
export interface Section {
  readonly id: string;
  readonly title: string;
  readonly html: string;
}
