import { createHash, randomBytes } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { copyFile, mkdir, open, rename, rm } from 'node:fs/promises';
import { dirname } from 'node:path';
import type { Storage } from '../storage.ts';

/** The SHA-256 of a file's bytes, read as a stream (a 200 MB scan never sits in memory whole). */
export async function sha256OfFile(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/** The first `n` bytes of a file (fewer when it is shorter). */
export async function readHead(path: string, n: number): Promise<Buffer> {
  const handle = await open(path, 'r');
  try {
    const buf = Buffer.alloc(n);
    const { bytesRead } = await handle.read(buf, 0, n, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
}

/**
 * Puts a file into content-addressed storage under the key it was hashed to, copying it (the source stays
 * where it is: a drop-folder job moves it aside itself). Same layout and same write-then-rename as Storage.put.
 * The copy is hashed again before it takes its place, so a file that changed while it was read (a scanner
 * still writing into a drop folder) never lands under the wrong key.
 */
export async function putFile(storage: Storage, path: string, key: string): Promise<void> {
  if (await storage.has(key)) return;
  const target = storage.pathOf(key);
  await mkdir(dirname(target), { recursive: true });
  const tmp = `${target}.${randomBytes(6).toString('hex')}.tmp`;
  try {
    await copyFile(path, tmp);
    const copied = await sha256OfFile(tmp);
    if (copied !== key) throw new Error(`${path} changed while it was being read (hash ${key.slice(0, 12)}…, then ${copied.slice(0, 12)}…)`);
    await rename(tmp, target);
  } catch (err) {
    await rm(tmp, { force: true });
    throw err;
  }
}
