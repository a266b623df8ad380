// @alcalzone/ansi-tokenize with tokenize, styledCharsFromTokens and styledCharsToString memoized (frame-memo.ts), in place of
// the real module, whose URL frame-memo-hooks.js gives in the query. The rest is passed through.
import { memoizeStyledString, memoizeTokens } from './frame-memo.ts';

const real = await import(new URL(import.meta.url).searchParams.get('real') ?? '@alcalzone/ansi-tokenize');
const memo = memoizeTokens(real);
export const { ansiCodesToString, diffAnsiCodes, reduceAnsiCodes, reduceAnsiCodesIncremental, undoAnsiCodes } = real;
export const tokenize = memo.tokenize;
export const styledCharsFromTokens = memo.styledCharsFromTokens;
export const styledCharsToString = memoizeStyledString(real);
