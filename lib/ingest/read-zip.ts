import yauzl, { type Entry, type ZipFile } from 'yauzl';
import { IngestError, type IngestLimits } from './types';

export interface ZipEntry {
  name: string;
  bytes: Buffer;
}

/** Why a zip entry name is refused, or null when it is a plain relative path. */
export function unsafeEntryReason(name: string): string | null {
  if (name.includes('\\')) return 'contains a backslash';
  if (name.startsWith('/')) return 'is an absolute path';
  if (/^[A-Za-z]:/.test(name)) return 'starts with a drive letter';
  if (name.split('/').includes('..')) return 'contains a ".." segment';
  if (name.includes('\0')) return 'contains a NUL character';
  return null;
}

function isSkipped(name: string): boolean {
  return name.endsWith('/') || name.startsWith('__MACOSX/') || name.split('/').pop() === '.DS_Store';
}

function inflate(zip: ZipFile, entry: Entry, name: string, budget: { left: number; max: number }): Promise<Buffer> {
  return new Promise((resolve, reject) => {
    zip.openReadStream(entry, (err, stream) => {
      if (err) return reject(err);
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => {
        // counted as the bytes come out of the inflater: the sizes in the headers may lie
        budget.left -= chunk.length;
        if (budget.left < 0) {
          stream.destroy();
          reject(
            new IngestError('zip_limits', `the zip inflates to more than ${budget.max} bytes (stopped while inflating '${name}'); send a smaller archive`, {
              entry: name,
              maxInflatedBytes: budget.max,
            }),
          );
          return;
        }
        chunks.push(chunk);
      });
      stream.on('error', (e: Error) => {
        // yauzl's own check: an entry that inflates beyond the size its header declares
        if (/too many bytes|too few bytes/.test(e.message)) {
          reject(new IngestError('zip_limits', `zip entry '${name}' does not inflate to the size its header declares (${e.message}); the archive is corrupt or a zip bomb`, { entry: name }));
        } else reject(e);
      });
      stream.on('end', () => resolve(Buffer.concat(chunks)));
    });
  });
}

/**
 * Read every file entry of a zip held in memory, within limits.
 *
 * Refuses unsafe names ('unsafe_zip'), more entries than `maxZipEntries` and more inflated bytes
 * than `maxInflatedBytes` ('zip_limits'). Directories, `__MACOSX/` and `.DS_Store` are skipped.
 * `select` limits which entries are inflated; the others are still checked and counted.
 *
 * @example
 * const entries = await readZip(bytes, { maxInflatedBytes: 200e6, maxZipEntries: 1000 });
 * entries.map((e) => e.name); // ['doc.kml', 'files/icon.png']
 */
export async function readZip(bytes: Buffer, limits: IngestLimits, select?: (name: string) => boolean): Promise<ZipEntry[]> {
  let zip: ZipFile;
  try {
    zip = await yauzl.fromBufferPromise(bytes, { lazyEntries: true, decodeStrings: false, validateEntrySizes: true });
  } catch (e) {
    throw new IngestError('malformed', `the zip archive cannot be read: ${(e as Error).message}`);
  }
  if (zip.entryCount > limits.maxZipEntries) {
    zip.close();
    throw new IngestError('zip_limits', `the zip has ${zip.entryCount} entries; at most ${limits.maxZipEntries} are accepted`, {
      entries: zip.entryCount,
      maxZipEntries: limits.maxZipEntries,
    });
  }
  const budget = { left: limits.maxInflatedBytes, max: limits.maxInflatedBytes };
  const out: ZipEntry[] = [];
  let seen = 0;
  try {
    await new Promise<void>((resolve, reject) => {
      zip.on('error', reject);
      zip.on('end', () => resolve());
      zip.on('entry', (entry: Entry) => {
        seen += 1;
        // the central directory may understate the count it declares in the end record
        if (seen > limits.maxZipEntries) {
          return reject(new IngestError('zip_limits', `the zip has more than ${limits.maxZipEntries} entries`, { maxZipEntries: limits.maxZipEntries }));
        }
        // strict: keep backslashes so that they are seen and refused rather than silently turned into '/'
        const name = yauzl.getFileNameLowLevel(entry.generalPurposeBitFlag, entry.fileNameRaw, entry.extraFields, true);
        const reason = unsafeEntryReason(name);
        if (reason) return reject(new IngestError('unsafe_zip', `zip entry '${name}' ${reason}; entries must be plain relative paths`, { entry: name }));
        if (isSkipped(name) || (select && !select(name))) return zip.readEntry();
        inflate(zip, entry, name, budget).then((data) => {
          out.push({ name, bytes: data });
          zip.readEntry();
        }, reject);
      });
      zip.readEntry();
    });
  } catch (e) {
    if (e instanceof IngestError) throw e;
    throw new IngestError('malformed', `the zip archive cannot be read: ${(e as Error).message}`);
  } finally {
    zip.close();
  }
  return out;
}

/**
 * Names in a zip's central directory, read synchronously without inflating anything, so that
 * format detection can look inside. Returns null when the bytes are not a readable zip.
 *
 * @example
 * listZipNames(kmzBytes); // ['doc.kml']
 */
export function listZipNames(bytes: Buffer, max = 100_000): string[] | null {
  const minEocd = 22;
  if (bytes.length < minEocd) return null;
  const stop = Math.max(0, bytes.length - minEocd - 0xffff);
  let eocd = -1;
  for (let i = bytes.length - minEocd; i >= stop; i--) {
    if (bytes.readUInt32LE(i) === 0x06054b50) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) return null;
  const count = bytes.readUInt16LE(eocd + 10);
  let p = bytes.readUInt32LE(eocd + 16);
  const names: string[] = [];
  for (let n = 0; n < Math.min(count, max); n++) {
    if (p + 46 > bytes.length || bytes.readUInt32LE(p) !== 0x02014b50) break;
    const nameLen = bytes.readUInt16LE(p + 28);
    const extraLen = bytes.readUInt16LE(p + 30);
    const commentLen = bytes.readUInt16LE(p + 32);
    names.push(bytes.subarray(p + 46, p + 46 + nameLen).toString('utf8'));
    p += 46 + nameLen + extraLen + commentLen;
  }
  return names;
}
