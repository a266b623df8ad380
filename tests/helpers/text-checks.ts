/** Checks on text that tests share. */
import { expect } from 'vitest';

/** Checks that the text holds each of the pieces; a failure names the first piece missing. */
export function expectToContainEach(text: string | undefined, pieces: readonly string[]): void {
  for (const piece of pieces) expect(text).toContain(piece);
}
