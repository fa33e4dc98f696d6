/**
 * Turns design-file text (YAML 1.2, which includes JSON) into plain data, reporting syntax
 * errors as one-line `InputError`s with line and column.
 */
import { InputError } from '../errors.js';
import { parseDocument } from 'yaml';

/** Aliases a file may expand; far more than a design needs, far fewer than a "billion laughs". */
const MAX_ALIAS_COUNT = 100;

/** The first line of a parser message without the position the parser appended to it. */
function shortMessage(message: string): string {
  const firstLine = message.split('\n', 1)[0] ?? '';
  return firstLine.replace(/ at line \d+, column \d+:?\s*$/, '').trim();
}

/**
 * Parses YAML or JSON text into plain values (objects, arrays, strings, numbers, booleans,
 * null). Returns `undefined` when the text holds no document (empty or only comments).
 *
 * @param text the file's contents
 * @param source name used in messages (usually the file path)
 * @throws InputError (field `''`) `<source>:<line>:<col>: YAML syntax error: ...`, or any
 *   other failure of the parser, wrapped
 */
export function parseYamlText(text: string, source: string): unknown {
  const body = text.startsWith('\uFEFF') ? text.slice(1) : text;
  try {
    const doc = parseDocument(body, { uniqueKeys: true });
    const first = doc.errors[0];
    if (first !== undefined) {
      const at = first.linePos?.[0];
      const where = at === undefined ? source : `${source}:${at.line}:${at.col}`;
      throw new InputError('', `${where}: YAML syntax error: ${shortMessage(first.message)}`);
    }
    if (doc.contents === null) return undefined;
    return doc.toJS({ maxAliasCount: MAX_ALIAS_COUNT }) as unknown;
  } catch (e) {
    if (e instanceof InputError) throw e;
    const why = e instanceof Error ? shortMessage(e.message) : String(e);
    throw new InputError('', `${source}: cannot read the design file: ${why}`);
  }
}

/** Line and column (1-based) of a character offset in `text`. */
function lineColumn(text: string, offset: number): { line: number; col: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      start = i + 1;
    }
  }
  return { line, col: offset - start + 1 };
}

/**
 * Parses strict JSON text into plain values; `undefined` when it holds only white space.
 * @throws InputError (field `''`) `<source>:<line>:<col>: JSON syntax error: ...`
 */
export function parseJsonText(text: string, source: string): unknown {
  const body = text.startsWith('\uFEFF') ? text.slice(1) : text;
  if (body.trim() === '') return undefined;
  try {
    return JSON.parse(body) as unknown;
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    // V8 words it "... in JSON at position N" (sometimes followed by "(line L column C)").
    const pos = /at position (\d+)/.exec(why);
    const where = pos === null ? source : (() => { const at = lineColumn(body, Number(pos[1])); return `${source}:${at.line}:${at.col}`; })();
    const short = why.split('\n', 1)[0]!.replace(/\s*in JSON at position \d+.*$/, '').replace(/^JSON\.parse: /, '');
    throw new InputError('', `${where}: JSON syntax error: ${short}`);
  }
}
