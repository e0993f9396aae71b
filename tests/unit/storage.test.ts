import { mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { Storage } from '../../server/src/services/storage.ts';

describe('content-addressed storage', () => {
  it('keys a file by the SHA-256 of its bytes (FIPS 180-4 test vector "abc")', () => {
    // FIPS 180-4 / NIST CSRC example: SHA-256("abc")
    expect(Storage.keyOf(Buffer.from('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('stores bytes once under a sharded path and reads them back', async () => {
    const root = mkdtempSync(join(tmpdir(), 'cartouche-storage-'));
    const storage = new Storage(root);
    const data = Buffer.from('a harbour plate');
    const key = await storage.put(data);
    expect(await storage.put(Buffer.from('a harbour plate'))).toBe(key);
    expect(storage.pathOf(key)).toBe(join(root, key.slice(0, 2), key.slice(2, 4), key));
    expect(readFileSync(storage.pathOf(key))).toEqual(data);
    expect(readdirSync(join(root, key.slice(0, 2), key.slice(2, 4)))).toEqual([key]);
    expect(await storage.has(key)).toBe(true);
    expect(await storage.has('0'.repeat(64))).toBe(false);
  });

  it('refuses anything that is not a key, so no path can escape the storage folder', () => {
    const storage = new Storage('/srv/cartouche');
    expect(() => storage.pathOf('../../etc/passwd')).toThrow(/not a storage key/);
    expect(() => storage.pathOf('A'.repeat(64))).toThrow(/not a storage key/);
  });
});
