/**
 * Memos that last from frame to frame for the pure text functions Ink runs on every line of every
 * frame: the display width of a string, and a line's tokens and styled characters. Ink keeps caches
 * for one frame only, yet most lines of the dashboard (the curve rows, the labels, the stride table)
 * are the same string frame after frame, and measuring the block characters of the curves takes the
 * slow, grapheme-by-grapheme path. The screen's thread loads these in place of the modules Ink imports
 * (frame-memo-hooks.js); the results are the same values, computed once.
 */

/**
 * `compute` memoized over at most about `limit` recent keys: when the young generation fills, it becomes
 * the old one and the oldest is dropped, so keys in use every frame stay, and a stream of keys seen
 * once (changing numbers) cannot grow it without bound.
 */
export function generationMemo<K, V>(compute: (key: K) => V, limit: number): (key: K) => V {
  const half = Math.max(1, Math.floor(limit / 2));
  let young = new Map<K, V>();
  let old = new Map<K, V>();
  return (key: K): V => {
    if (young.has(key)) return young.get(key) as V;
    const value = old.has(key) ? (old.get(key) as V) : compute(key);
    young.set(key, value);
    if (young.size >= half) {
      old = young;
      young = new Map();
    }
    return value;
  };
}

type StringWidth = (text: string, options?: object) => number;

export interface MemoCounts {
  /** Calls answered by a memo. */
  calls: number;
  /** Of those, the ones that had to compute. */
  computed: number;
}

/** How the memos of this thread have done (diagnostics: tests and the benchmark read them). */
export const frameMemoCounts: { readonly width: MemoCounts; readonly tokens: MemoCounts } = {
  width: { calls: 0, computed: 0 },
  tokens: { calls: 0, computed: 0 },
};

function counted<K, V>(counts: MemoCounts, compute: (key: K) => V): (key: K) => V {
  return (key: K): V => {
    counts.computed++;
    return compute(key);
  };
}

/** string-width, memoized for calls without options (all that Ink and its text helpers make). */
export function memoizeWidth(stringWidth: StringWidth, limit = 8192): StringWidth {
  const counts = frameMemoCounts.width;
  const width = generationMemo(counted(counts, (text: string) => stringWidth(text)), limit);
  return (text: string, options?: object): number => {
    if (options !== undefined || typeof text !== 'string') return stringWidth(text, options);
    counts.calls++;
    return width(text);
  };
}

interface TokenizeModule<Token, StyledChar> {
  tokenize(text: string, endChar?: number): Token[];
  styledCharsFromTokens(tokens: Token[]): StyledChar[];
}

/**
 * tokenize and styledCharsFromTokens (@alcalzone/ansi-tokenize), memoized: a line's tokens by its
 * text, its styled characters by its (memoized) tokens. Ink only reads what they return, which lets
 * frames share them.
 */
export function memoizeTokens<Token, StyledChar>(real: TokenizeModule<Token, StyledChar>, limit = 4096): TokenizeModule<Token, StyledChar> {
  const counts = frameMemoCounts.tokens;
  const tokens = generationMemo(counted(counts, (text: string) => real.tokenize(text)), limit);
  const styled = new WeakMap<Token[], StyledChar[]>();
  return {
    tokenize(text: string, endChar?: number): Token[] {
      if (endChar !== undefined || typeof text !== 'string') return real.tokenize(text, endChar);
      counts.calls++;
      return tokens(text);
    },
    styledCharsFromTokens(list: Token[]): StyledChar[] {
      let chars = styled.get(list);
      if (chars === undefined) {
        chars = real.styledCharsFromTokens(list);
        styled.set(list, chars);
      }
      return chars;
    },
  };
}
