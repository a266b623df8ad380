// string-width with a memo that outlasts a frame (frame-memo.ts), in place of the real module, whose URL
// frame-memo-hooks.js gives in the query.
import { memoizeWidth } from './frame-memo.ts';

const real = await import(new URL(import.meta.url).searchParams.get('real') ?? 'string-width');
export default memoizeWidth(real.default);
