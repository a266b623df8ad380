/**
 * The screen thread's memos (src/dashboard/frame-memo.ts) give what the libraries they stand in for
 * give: checked against string-width and @alcalzone/ansi-tokenize themselves (the general-purpose
 * reference), on arbitrary text with escape codes, block characters, wide characters and emoji; and a
 * whole run of dashboard frames drawn by Ink with and without the module hooks writes the same bytes.
 */
import { execFileSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import * as tokenizeLib from '@alcalzone/ansi-tokenize';
import fc from 'fast-check';
import stringWidth from 'string-width';
import { describe, expect, it } from 'vitest';
import { generationMemo, memoizeStyledString, memoizeTokens, memoizeWidth } from '../../src/dashboard/frame-memo.ts';
// @ts-expect-error a plain-JavaScript module of Node's module hooks, with no declarations
import { resolve } from '../../src/dashboard/frame-memo-hooks.js';

const REPO = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

/** Text as a terminal line may hold it: colour and style codes, ASCII, block and box characters, µ, °, CJK, emoji. */
const PIECES = ['\u001B[31m', '\u001B[39m', '\u001B[1m', '\u001B[22m', '\u001B[38;5;208m', '\u001B[48;2;10;20;30m', '\u001B[0m', 'SL 2.71 µm', '▁▂▃▄▅▆▇█', '┃', '◆', '°', '古', '😀', 'e\u0301', ' ', 'plateau'];
const line = fc.array(fc.oneof(fc.constantFrom(...PIECES), fc.string()), { maxLength: 12 }).map((parts) => parts.join(''));

describe('generationMemo', () => {
  it('computes a key in use every frame once, among a stream of keys seen once', () => {
    const computed = new Map<string, number>();
    const memo = generationMemo((key: string) => {
      computed.set(key, (computed.get(key) ?? 0) + 1);
      return key.length;
    }, 16);
    for (let frame = 0; frame < 200; frame++) {
      expect(memo('curve row')).toBe(9);
      expect(memo(`elapsed ${frame}`)).toBe(`elapsed ${frame}`.length);
    }
    expect(computed.get('curve row')).toBe(1);
  });

  it('forgets keys not asked for over two generations, so it stays bounded', () => {
    let computed = 0;
    const memo = generationMemo((key: number) => {
      computed++;
      return key * 2;
    }, 8);
    memo(1);
    for (let k = 100; k < 120; k++) memo(k);
    const before = computed;
    expect(memo(1)).toBe(2);
    expect(computed).toBe(before + 1);
  });

  it('handles empty, one and many keys, and values that are undefined (computed again, never wrong)', () => {
    const memo = generationMemo((key: string) => (key === '' ? undefined : key), 4);
    expect(memo('')).toBeUndefined();
    expect(memo('')).toBeUndefined();
    expect(memo('a')).toBe('a');
    for (let i = 0; i < 50; i++) expect(memo(String(i))).toBe(String(i));
  });
});

describe('memoizeWidth', () => {
  it('measures every string as string-width does, the first time and every time after', () => {
    const width = memoizeWidth(stringWidth, 32);
    fc.assert(
      fc.property(fc.array(line, { maxLength: 20 }), (lines) => {
        for (const text of [...lines, ...lines]) expect(width(text)).toBe(stringWidth(text));
      }),
    );
  });

  it('passes calls with options, and values that are not strings, straight through', () => {
    const width = memoizeWidth(stringWidth);
    expect(width('\u001B[31mab\u001B[39m', { countAnsiEscapeCodes: true })).toBe(stringWidth('\u001B[31mab\u001B[39m', { countAnsiEscapeCodes: true }));
    expect(width('±', { ambiguousIsNarrow: false })).toBe(stringWidth('±', { ambiguousIsNarrow: false }));
    expect(width(undefined as unknown as string)).toBe(0);
  });
});

describe('memoizeTokens', () => {
  it('tokenizes and styles every line as @alcalzone/ansi-tokenize does, sharing the result between frames', () => {
    const memo = memoizeTokens(tokenizeLib, 32);
    fc.assert(
      fc.property(fc.array(line, { maxLength: 20 }), (lines) => {
        for (const text of lines) {
          const tokens = memo.tokenize(text);
          expect(tokens).toEqual(tokenizeLib.tokenize(text));
          expect(memo.styledCharsFromTokens(tokens)).toEqual(tokenizeLib.styledCharsFromTokens(tokenizeLib.tokenize(text)));
          expect(memo.tokenize(text)).toBe(tokens);
          expect(memo.styledCharsFromTokens(tokens)).toBe(memo.styledCharsFromTokens(tokens));
        }
      }),
    );
  });

  it('leaves a tokenize call with an end character to the library', () => {
    const memo = memoizeTokens(tokenizeLib);
    const text = '\u001B[31m▁▂▃▄\u001B[39m';
    expect(memo.tokenize(text, 2)).toEqual(tokenizeLib.tokenize(text, 2));
  });
});

describe('memoizeStyledString', () => {
  /** A row of Ink's grid: the styled characters of some lines, with blank cells (a fresh empty style each) between. */
  const row = fc.array(fc.oneof(line, fc.integer({ min: 1, max: 6 })), { maxLength: 8 }).map((parts) =>
    parts.flatMap((part) =>
      typeof part === 'number'
        ? Array.from({ length: part }, () => ({ type: 'char' as const, value: ' ', fullWidth: false, styles: [] }))
        : tokenizeLib.styledCharsFromTokens(tokenizeLib.tokenize(part)),
    ),
  );

  it('turns every row back into the string @alcalzone/ansi-tokenize makes of it, the first time and every time after', () => {
    const toString = memoizeStyledString(tokenizeLib, 16);
    fc.assert(
      fc.property(fc.array(row, { maxLength: 10 }), (rows) => {
        for (const r of [...rows, ...rows]) expect(toString(r)).toBe(tokenizeLib.styledCharsToString(r));
      }),
    );
  });

  it('gives the empty string for an empty row and a lone character with its codes around it', () => {
    const toString = memoizeStyledString(tokenizeLib);
    expect(toString([])).toBe('');
    const one = tokenizeLib.styledCharsFromTokens(tokenizeLib.tokenize('\u001B[1m\u001B[31m█\u001B[39m\u001B[22m'));
    expect(toString(one)).toBe(tokenizeLib.styledCharsToString(one));
  });
});

describe('the screen thread module hooks', () => {
  const inside = pathToFileURL(join(REPO, 'node_modules', 'ink', 'build', 'output.js')).href;
  const real = (url: string) => async () => ({ url, format: 'module' });

  it('give a library inside node_modules the memoized module, told the real one it stands for', async () => {
    const width = await resolve('string-width', { parentURL: inside }, real('file:///somewhere/node_modules/string-width/index.js'));
    const url = new URL(width.url);
    expect(url.pathname.endsWith('/src/dashboard/frame-memo-width.js')).toBe(true);
    expect(url.searchParams.get('real')).toBe('file:///somewhere/node_modules/string-width/index.js');
    const tokens = await resolve('@alcalzone/ansi-tokenize', { parentURL: inside }, real('file:///x/node_modules/@alcalzone/ansi-tokenize/build/index.js'));
    expect(new URL(tokens.url).pathname.endsWith('/src/dashboard/frame-memo-tokenize.js')).toBe(true);
  });

  it('leave every other import, and the project\'s own, as Node resolves them', async () => {
    const own = pathToFileURL(join(REPO, 'src', 'dashboard', 'frame-memo-width.js')).href;
    expect(await resolve('react', { parentURL: inside }, real('file:///x/react.js'))).toEqual({ url: 'file:///x/react.js', format: 'module' });
    expect(await resolve('string-width', { parentURL: own }, real('file:///x/sw.js'))).toEqual({ url: 'file:///x/sw.js', format: 'module' });
    expect(await resolve('string-width', {}, real('file:///x/sw.js'))).toEqual({ url: 'file:///x/sw.js', format: 'module' });
  });

  it('change no byte of what Ink writes over a run of dashboard frames, and answer most calls from the memos', () => {
    const draw = (...args: string[]) =>
      JSON.parse(
        execFileSync(process.execPath, [join(REPO, 'bin', 'run-ts.js'), join(REPO, 'tests', 'dashboard', 'render-frames-child.tsx'), ...args], {
          encoding: 'utf8',
          // Ink shows the cursor on standard error as the child exits: not part of the frames.
          stdio: ['ignore', 'pipe', 'ignore'],
          env: { ...process.env, NO_COLOR: '' },
        })
          .trim()
          .split('\n')
          .pop() ?? '{}',
      ) as { digest: string; writes: number; counts: Record<'width' | 'tokens' | 'styles', { calls: number; computed: number }> };
    const plain = draw('30');
    const memo = draw('memo', '30');
    expect(plain.writes).toBeGreaterThan(30);
    expect(memo.digest).toBe(plain.digest);
    expect(memo.writes).toBe(plain.writes);
    expect(plain.counts.width.calls).toBe(0);
    expect(memo.counts.width.computed).toBeLessThan(memo.counts.width.calls / 4);
    expect(memo.counts.tokens.computed).toBeLessThan(memo.counts.tokens.calls / 2);
    expect(memo.counts.styles.computed).toBeLessThan(memo.counts.styles.calls / 100);
  });
});
