import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, rename, rm, stat } from 'node:fs/promises';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Readable } from 'node:stream';

/**
 * A small object store: keys like `exports/audit/<id>.csv`. The local implementation writes files under
 * one root folder; an S3-compatible store can implement the same four calls.
 */
export interface ObjectStore {
  put(key: string, body: Readable | Buffer): Promise<{ size: number }>;
  get(key: string): Readable;
  size(key: string): Promise<number | undefined>;
  remove(key: string): Promise<void>;
}

const KEY_SHAPE = /^[A-Za-z0-9][A-Za-z0-9._-]*(\/[A-Za-z0-9][A-Za-z0-9._-]*)*$/;

export class LocalStore implements ObjectStore {
  constructor(private readonly root: string) {}

  private file(key: string): string {
    if (!KEY_SHAPE.test(key) || key.includes('..')) throw new Error(`bad storage key: ${key}`);
    return path.join(this.root, key);
  }

  async put(key: string, body: Readable | Buffer): Promise<{ size: number }> {
    const target = this.file(key);
    await mkdir(path.dirname(target), { recursive: true });
    // write to a temporary name and rename, so a reader never sees half a file
    const tmp = `${target}.${process.pid}.${Date.now()}.part`;
    try {
      if (Buffer.isBuffer(body)) await pipeline([body], createWriteStream(tmp));
      else await pipeline(body, createWriteStream(tmp));
      await rename(tmp, target);
    } catch (err) {
      await rm(tmp, { force: true });
      throw err;
    }
    return { size: (await stat(target)).size };
  }

  get(key: string): Readable {
    return createReadStream(this.file(key));
  }

  async size(key: string): Promise<number | undefined> {
    try {
      return (await stat(this.file(key))).size;
    } catch {
      return undefined;
    }
  }

  async remove(key: string): Promise<void> {
    await rm(this.file(key), { force: true });
  }
}
