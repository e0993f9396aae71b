import { createHash, randomBytes } from 'node:crypto';
import { mkdir, rename, stat, writeFile } from 'node:fs/promises';
import { join } from 'node:path';

const KEY = /^[0-9a-f]{64}$/;

/** Content-addressed file storage: a file's key is the SHA-256 of its bytes; the database keeps only keys. */
export class Storage {
  constructor(readonly root: string) {}

  static keyOf(data: Buffer): string {
    return createHash('sha256').update(data).digest('hex');
  }

  pathOf(key: string): string {
    if (!KEY.test(key)) throw new Error(`not a storage key: ${JSON.stringify(key)}`);
    return join(this.root, key.slice(0, 2), key.slice(2, 4), key);
  }

  /** Stores the bytes once (a second put of the same bytes writes nothing) and returns their key. */
  async put(data: Buffer): Promise<string> {
    const key = Storage.keyOf(data);
    const target = this.pathOf(key);
    if (await this.has(key)) return key;
    await mkdir(join(target, '..'), { recursive: true });
    const tmp = `${target}.${randomBytes(6).toString('hex')}.tmp`;
    await writeFile(tmp, data);
    await rename(tmp, target);
    return key;
  }

  async has(key: string): Promise<boolean> {
    try {
      return (await stat(this.pathOf(key))).isFile();
    } catch {
      return false;
    }
  }
}
