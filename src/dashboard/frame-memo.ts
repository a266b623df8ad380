/**
 * Memos that last from frame to frame for the pure text functions Ink runs on every line of every
 * frame: the display width of a string, and a line's tokens and styled characters. Ink keeps caches
 * for one frame only, yet most lines of the dashboard (the curve rows, the labels, the stride table)
 * are the same string frame after frame, and measuring the block characters of the curves takes the
 * slow, grapheme-by-grapheme path. The screen's thread loads these in place of the modules Ink imports
 * (frame-memo-hooks.js); the results are the same values, computed once.
 */

export interface GenerationCache<K, V> {
  get(key: K): V | undefined;
  set(key: K, value: V): void;
}

/**
 * A cache of at most about `limit` recent keys: when the young generation fills, it becomes the old one
 * and the oldest is dropped, so keys in use every frame stay (a hit in the old one moves it back to the
 * young), and a stream of keys seen once (changing numbers) cannot grow it without bound.
 */
export function generationCache<K, V>(limit: number): GenerationCache<K, V> {
  const half = Math.max(1, Math.floor(limit / 2));
  let young = new Map<K, V>();
  let old = new Map<K, V>();
  const set = (key: K, value: V): void => {
    young.set(key, value);
    if (young.size >= half) {
      old = young;
      young = new Map();
    }
  };
  return {
    get(key: K): V | undefined {
      const value = young.get(key);
      if (value !== undefined) return value;
      const kept = old.get(key);
      if (kept !== undefined) set(key, kept);
      return kept;
    },
    set,
  };
}

/** `compute` memoized over a generationCache of `limit` keys (a value undefined is computed again). */
export function generationMemo<K, V>(compute: (key: K) => V, limit: number): (key: K) => V {
  const cache = generationCache<K, V>(limit);
  return (key: K): V => {
    let value = cache.get(key);
    if (value === undefined) {
      value = compute(key);
      cache.set(key, value);
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
export const frameMemoCounts: { readonly width: MemoCounts; readonly tokens: MemoCounts; readonly styles: MemoCounts } = {
  width: { calls: 0, computed: 0 },
  tokens: { calls: 0, computed: 0 },
  styles: { calls: 0, computed: 0 },
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

interface Code {
  readonly code: string;
  readonly endCode: string;
}

interface StylesModule<C extends Code> {
  diffAnsiCodes(from: C[], to: C[]): C[];
  ansiCodesToString(codes: C[]): string;
}

/**
 * styledCharsToString (@alcalzone/ansi-tokenize), which Ink runs on every row of every frame, with the
 * escape codes between two neighbouring cells memoized by the two cells' styles. It is the library's
 * own loop, calling the library's diffAnsiCodes and ansiCodesToString; only their result for a pair of
 * styles already seen is reused. Styles are told apart by their codes, so an empty style (every blank
 * cell has a fresh one) is the same as any other.
 */
export function memoizeStyledString<C extends Code>(real: StylesModule<C>, limit = 4096): (chars: readonly { readonly value: string; readonly styles: C[] }[]) => string {
  const counts = frameMemoCounts.styles;
  const keys = new WeakMap<C[], string>();
  const keyOf = (styles: C[]): string => {
    if (styles.length === 0) return '';
    let key = keys.get(styles);
    if (key === undefined) {
      key = styles.map((c) => `${c.code}\u0000${c.endCode}`).join('\u0001');
      keys.set(styles, key);
    }
    return key;
  };
  const NONE: C[] = [];
  const cache = generationCache<string, string>(limit);
  const transition = (from: C[], to: C[]): string => {
    counts.calls++;
    const a = keyOf(from);
    const b = keyOf(to);
    // From a style to the same style takes no codes (diffAnsiCodes gives none): most neighbours.
    if (a === b) return '';
    const key = `${a}\u0002${b}`;
    let codes = cache.get(key);
    if (codes === undefined) {
      counts.computed++;
      codes = real.ansiCodesToString(real.diffAnsiCodes(from, to));
      cache.set(key, codes);
    }
    return codes;
  };
  const opening = (styles: C[]): string => {
    counts.calls++;
    const key = `\u0003${keyOf(styles)}`;
    let codes = cache.get(key);
    if (codes === undefined) {
      counts.computed++;
      codes = real.ansiCodesToString(styles);
      cache.set(key, codes);
    }
    return codes;
  };
  return (chars) => {
    let text = '';
    for (let i = 0; i < chars.length; i++) {
      const char = chars[i] as (typeof chars)[number];
      if (i === 0) {
        text += opening(char.styles);
      } else {
        text += transition((chars[i - 1] as (typeof chars)[number]).styles, char.styles);
      }
      text += char.value;
      if (i === chars.length - 1) text += transition(char.styles, NONE);
    }
    return text;
  };
}
