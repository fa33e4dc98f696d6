/**
 * Reading a design file: the file system's part (missing, unreadable, oversized files). The text
 * itself is read by the library's `parseDesign`, which checks every field.
 */
import { readFile, stat } from 'node:fs/promises';
import { InputError, parseDesign, type Design } from '@twinfet/core';

/** Design files are a few hundred bytes; anything this large is the wrong file. */
const MAX_FILE_BYTES = 1 << 20;

/** The one-line reason a design file cannot be read, from a Node file-system error. */
function fileProblem(path: string, e: unknown): InputError {
  const code = typeof e === 'object' && e !== null && 'code' in e ? String(e.code) : '';
  switch (code) {
    case 'ENOENT':
    case 'ENOTDIR':
      return new InputError('', `${path}: no such file; check the path`);
    case 'EISDIR':
      return new InputError('', `${path}: is a directory; give the path of a design file (.yaml or .json)`);
    case 'EACCES':
    case 'EPERM':
      return new InputError('', `${path}: cannot read the file (permission denied)`);
    default: {
      const why = e instanceof Error ? e.message.split('\n', 1)[0] : String(e);
      return new InputError('', `${path}: cannot read the file (${why ?? code})`);
    }
  }
}

/**
 * Reads and checks a design file (YAML, or JSON for a .json file; UTF-8).
 *
 * @param path the file's path
 * @returns a deeply frozen design in SI units
 * @throws InputError for a missing, unreadable or oversized file, or any problem in its contents
 */
export async function loadDesign(path: string): Promise<Design> {
  if (path === '') throw new InputError('', 'no design file given; pass the path of a .yaml or .json file');
  let text: string;
  try {
    const info = await stat(path);
    if (info.isDirectory()) {
      throw new InputError('', `${path}: is a directory; give the path of a design file (.yaml or .json)`);
    }
    if (info.size > MAX_FILE_BYTES) {
      throw new InputError('', `${path}: ${info.size} bytes is too large for a design file (limit 1 MiB); check the path`);
    }
    text = await readFile(path, 'utf8');
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw fileProblem(path, e);
  }
  return parseDesign(text, { source: path });
}
