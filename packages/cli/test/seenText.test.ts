import { describe, expect, it } from 'vitest';
import { seenText } from '../src/describe.js';

// Wording of the sample-count note (this project's wording; exact strings, no tolerance).
describe('seenText', () => {
  it('says "no failures" for zero, singular for one, plural above', () => {
    expect(seenText(0)).toBe('no failures seen');
    expect(seenText(1)).toBe('only 1 failure seen');
    expect(seenText(7)).toBe('only 7 failures seen');
  });
});
