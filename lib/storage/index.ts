import { createReadStream, createWriteStream } from 'node:fs';
import { mkdir, readdir, rename, rm, rmdir, stat } from 'node:fs/promises';
import path from 'node:path';
import { pipeline } from 'node:stream/promises';
import type { Readable } from 'node:stream';

export interface StoredObject {
  key: string;
  size: number;
  modifiedAt: Date;
}

/**
 * A small object store: keys like `exports/audit/<id>.csv`. The local implementation writes files under
 * one root folder; an S3-compatible store can implement the same calls (list is ListObjectsV2).
 */
export interface ObjectStore {
  put(key: string, body: Readable | Buffer): Promise<{ size: number }>;
  /** the object, or the bytes start..end (inclusive) of it */
  get(key: string, range?: { start: number; end: number }): Readable;
  size(key: string): Promise<number | undefined>;
  /** removes the object; a folder it leaves empty goes too */
  remove(key: string): Promise<void>;
  /** every object, half-written ones included (their keys end in `.part`) */
  list(): AsyncIterable<StoredObject>;
}

const KEY_SHAPE = /^[A-Za-z0-9][A-Za-z0-9._-]*(\/[A-Za-z0-9][A-Za-z0-9._-]*)*$/;

/** The suffix of a file still being written (LocalStore.put renames it when complete). */
export const PARTIAL_SUFFIX = '.part';

const isMissing = (err: unknown) => (err as NodeJS.ErrnoException).code === 'ENOENT';

export class LocalStore implements ObjectStore {
  constructor(private readonly root: string) {}

  private file(key: string): string {
    if (!KEY_SHAPE.test(key) || key.includes('..')) throw new Error(`bad storage key: ${key}`);
    return path.join(this.root, key);
  }

  async put(key: string, body: Readable | Buffer): Promise<{ size: number }> {
    const target = this.file(key);
    // write to a temporary name and rename, so a reader never sees half a file
    const tmp = `${target}.${process.pid}.${Date.now()}${PARTIAL_SUFFIX}`;
    const write = async () => {
      await mkdir(path.dirname(target), { recursive: true });
      if (Buffer.isBuffer(body)) await pipeline([body], createWriteStream(tmp));
      else await pipeline(body, createWriteStream(tmp));
    };
    try {
      try {
        await write();
      } catch (err) {
        // a sweep may have removed the (then empty) folder between mkdir and open: once more
        if (!isMissing(err) || !Buffer.isBuffer(body)) throw err;
        await write();
      }
      await rename(tmp, target);
    } catch (err) {
      await rm(tmp, { force: true });
      throw err;
    }
    return { size: (await stat(target)).size };
  }

  get(key: string, range?: { start: number; end: number }): Readable {
    return createReadStream(this.file(key), range);
  }

  async size(key: string): Promise<number | undefined> {
    try {
      return (await stat(this.file(key))).size;
    } catch {
      return undefined;
    }
  }

  async remove(key: string): Promise<void> {
    const file = this.file(key);
    await rm(file, { force: true });
    await this.prune(path.dirname(file));
  }

  /** Removes empty folders from `dir` up to (not including) the root. */
  private async prune(dir: string): Promise<void> {
    for (let d = dir; d.startsWith(this.root + path.sep); d = path.dirname(d)) {
      try {
        await rmdir(d);
      } catch {
        return; // not empty (or already gone): folders above it are not empty either
      }
    }
  }

  async *list(): AsyncIterable<StoredObject> {
    const walk = async function* (dir: string, root: string): AsyncGenerator<StoredObject> {
      let entries;
      try {
        entries = await readdir(dir, { withFileTypes: true });
      } catch (err) {
        if (isMissing(err)) return;
        throw err;
      }
      for (const e of entries) {
        const full = path.join(dir, e.name);
        if (e.isDirectory()) {
          yield* walk(full, root);
        } else if (e.isFile()) {
          const s = await stat(full).catch(() => undefined);
          if (s) yield { key: path.relative(root, full).split(path.sep).join('/'), size: s.size, modifiedAt: s.mtime };
        }
      }
    };
    yield* walk(this.root, this.root);
  }
}
