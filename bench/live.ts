/** Placeholder until the live measurement lands. */
export interface LiveResult {
  readonly lines: readonly string[];
}
export async function measureLive(_options: { readonly quick: boolean }): Promise<LiveResult> {
  return { lines: ['live: not measured yet'] };
}
