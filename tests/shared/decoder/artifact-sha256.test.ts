import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { sha256Hex, utf8Bytes } from '../../../shared/decoder/sha256';
import { createRng } from '../../../shared/linalg/random';

describe('sha256', () => {
  it('hashes the FIPS 180-4 one-block example "abc"', () => {
    // Source: NIST FIPS 180-4 / CSRC "SHA256.pdf" example 1 (message "abc").
    expect(sha256Hex(utf8Bytes('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('hashes the FIPS 180-4 two-block 448-bit example', () => {
    // Source: NIST FIPS 180-4 / CSRC "SHA256.pdf" example 2 (448-bit message abcdbcde...nopq).
    expect(sha256Hex(utf8Bytes('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')))
      .toBe('248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1');
  });

  it('hashes the empty message', () => {
    // Source: NIST CSRC SHA-256 test vectors (zero-length message), widely quoted.
    expect(sha256Hex(new Uint8Array(0))).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
  });

  it('agrees with node:crypto at every padding boundary and on longer random messages', () => {
    const rng = createRng(7);
    const lengths = [1, 54, 55, 56, 57, 63, 64, 65, 119, 120, 127, 128, 129, 1000, 4096 + 3];
    for (const len of lengths) {
      const bytes = Uint8Array.from({ length: len }, () => rng.nextInt(256));
      // Source: node:crypto createHash('sha256') (OpenSSL), an independent implementation.
      expect(sha256Hex(bytes), `length ${len}`).toBe(createHash('sha256').update(bytes).digest('hex'));
    }
  });

  it('hashes UTF-8 text as node:crypto does', () => {
    const text = 'µV, λ_max, Müller — 脑电';
    // Source: node:crypto createHash('sha256') on the same UTF-8 string.
    expect(sha256Hex(utf8Bytes(text))).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
  });
});
