/** An internal fault: a number the tool was about to print is not finite. */
export class NonFiniteResultError extends Error {
  constructor(path: string, value: unknown) {
    super(`internal error: ${path} is ${String(value)}; nothing was printed. Please report this with the design file.`);
    this.name = 'NonFiniteResultError';
  }
}

/**
 * The last guard before a report is printed: every number in it must be finite. `null` is
 * allowed (it means "not available", and the text report says why); NaN and Infinity are not.
 */
export function assertFinite(value: unknown, path = 'report'): void {
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new NonFiniteResultError(path, value);
  } else if (Array.isArray(value)) {
    value.forEach((v, i) => assertFinite(v, `${path}[${i}]`));
  } else if (value instanceof Float64Array) {
    value.forEach((v, i) => assertFinite(v, `${path}[${i}]`));
  } else if (value !== null && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) assertFinite(v, `${path}.${k}`);
  }
}

/** Where a command writes: stdout for the report, stderr for notes and progress. */
export interface Io {
  out(text: string): void;
  err(text: string): void;
  /** True when stderr is a terminal (progress bars only then). */
  readonly errIsTty: boolean;
}

/** The process's own streams. */
export const processIo: Io = {
  out: (t) => void process.stdout.write(t.endsWith('\n') ? t : `${t}\n`),
  err: (t) => void process.stderr.write(t.endsWith('\n') ? t : `${t}\n`),
  errIsTty: process.stderr.isTTY === true,
};

/** Prints one JSON object (after the finite guard). */
export function printJson(io: Io, report: object): void {
  assertFinite(report);
  io.out(JSON.stringify(report, null, 2));
}
