import { createHash } from 'node:crypto';
import type { ReceivedFile } from '@/lib/api/multipart';
import { originalsStore } from '@/lib/storage/originals-store';

export interface StoredOriginal {
  fileName: string;
  storageKey: string;
  sha256: string;
  sizeBytes: number;
}

/** One file is known by its SHA-256; a set of files (loose shapefile parts) by its parts' hashes, in any order. */
export function combinedSha(parts: { sha256: string }[]): string {
  if (parts.length === 1) return parts[0].sha256;
  return createHash('sha256').update(parts.map((p) => p.sha256).sort().join('\n')).digest('hex');
}

const safeName = (n: string) => n.replace(/[^A-Za-z0-9._-]/g, '_').slice(-120) || 'file';

/** Keeps the original bytes under `prefix/` (e.g. `uploads/<project>/<upload>`); on failure removes what it wrote, folder and all. */
export async function storeOriginals(prefix: string, parts: ReceivedFile[], bytes: Buffer[]): Promise<StoredOriginal[]> {
  const stored: StoredOriginal[] = [];
  try {
    for (const [i, p] of parts.entries()) {
      const storageKey = `${prefix}/${i}-${safeName(p.fileName)}`;
      await originalsStore().put(storageKey, bytes[i]);
      stored.push({ fileName: p.fileName, storageKey, sha256: p.sha256, sizeBytes: p.size });
    }
    return stored;
  } catch (err) {
    await removeOriginals(stored);
    throw err;
  }
}

export async function removeOriginals(stored: StoredOriginal[]): Promise<void> {
  await Promise.all(stored.map((f) => originalsStore().remove(f.storageKey)));
}
