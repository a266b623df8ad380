import { afterAll, describe, expect, it } from 'vitest';
import { fileDigest, fileDigests } from '../../adapters/file-digest.ts';
import { tempDir } from './invented-trial.ts';

const tmp = tempDir();
afterAll(() => tmp.remove());

describe('fileDigest', () => {
  it('gives the SHA-256 of the published examples', async () => {
    // NIST FIPS 180-2 (2002), Secure Hash Standard, Appendix B.1 ("abc") and B.2 (the 448-bit message).
    expect(await fileDigest(tmp.file('abc.txt', 'abc'))).toEqual({
      path: tmp.file('abc.txt', 'abc'),
      bytes: 3,
      sha256: 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad',
    });
    const b2 = 'abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq';
    expect((await fileDigest(tmp.file('b2.txt', b2))).sha256).toBe('248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1');
  });

  it('reads a file larger than one chunk as a stream, and says the bytes read', async () => {
    // FIPS 180-2 Appendix B.3: one million repetitions of "a".
    const d = await fileDigest(tmp.file('million.txt', 'a'.repeat(1_000_000)));
    expect(d.bytes).toBe(1_000_000);
    expect(d.sha256).toBe('cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0');
  });

  it('rejects for a file that cannot be read', async () => {
    await expect(fileDigests([tmp.file('here.txt', 'x'), `${tmp.dir}/missing.txt`])).rejects.toThrow(/ENOENT/);
  });
});
