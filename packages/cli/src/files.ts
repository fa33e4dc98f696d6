import { writeFile } from 'node:fs/promises';
import { InputError } from '@twinfet/core';

/** Writes a file the user asked for; a failure names the option and the reason. */
export async function writeOutputFile(path: string, option: string, text: string): Promise<void> {
  try {
    await writeFile(path, text);
  } catch (e) {
    const reason = e instanceof Error && 'code' in e ? String((e as NodeJS.ErrnoException).code) : String(e);
    throw new InputError(option, `cannot write "${path}" (${reason}); check the folder exists and is writable`);
  }
}
