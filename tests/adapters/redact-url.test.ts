import { describe, expect, it } from 'vitest';
import { redactUrl } from '../../adapters/redact-url.ts';

describe('redactUrl', () => {
  it('hides a token in the query, in any letter case and wherever it stands', () => {
    expect(redactUrl('ws://127.0.0.1:8765/?token=lab-7')).toBe('ws://127.0.0.1:8765/?token=***');
    expect(redactUrl('wss://lab.invalid/stream?rate=100&Token=a%20b&x=1')).toBe('wss://lab.invalid/stream?rate=100&Token=***&x=1');
    expect(redactUrl('ws://h/?access_token=abc')).toBe('ws://h/?access_token=***');
    expect(redactUrl('ws://h/?token=a&token=b')).toBe('ws://h/?token=***');
  });

  it('hides a password in the address', () => {
    expect(redactUrl('ws://lab:pw-1@h:1/p')).toBe('ws://lab:***@h:1/p');
  });

  it('leaves an address with no secret exactly as given', () => {
    for (const url of ['ws://127.0.0.1:8765', 'ws://h:1/p?rate=100', 'wss://lab.invalid/a/b/', 'ws://user@h/']) expect(redactUrl(url)).toBe(url);
  });

  it('hides token=… in text that is not a URL', () => {
    expect(redactUrl('nowhere?token=abc&x=1')).toBe('nowhere?token=***&x=1');
    expect(redactUrl('not a url')).toBe('not a url');
  });
});
