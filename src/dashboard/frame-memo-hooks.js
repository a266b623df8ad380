// Module hooks of the screen's thread (registered by dashboard-worker-entry.js before Ink loads): Ink's
// and its text helpers' imports of string-width and @alcalzone/ansi-tokenize get the memoized modules
// of frame-memo.ts instead. Each is told the real module's URL, so every installed copy (they differ
// in version) keeps its own behaviour.
const MEMO_MODULES = new Map([
  ['string-width', new URL('./frame-memo-width.js', import.meta.url)],
  ['@alcalzone/ansi-tokenize', new URL('./frame-memo-tokenize.js', import.meta.url)],
]);

export async function resolve(specifier, context, nextResolve) {
  const resolved = await nextResolve(specifier, context);
  const memo = MEMO_MODULES.get(specifier);
  if (memo === undefined || context.parentURL === undefined || !context.parentURL.includes('/node_modules/')) return resolved;
  const url = new URL(memo);
  url.searchParams.set('real', resolved.url);
  return { url: url.href, format: 'module' };
}
