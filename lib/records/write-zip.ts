import { ZipArchive } from 'archiver';
import { buffer } from 'node:stream/consumers';

export interface ZipEntry {
  name: string;
  data: Buffer | string;
}

/**
 * A small ZIP archive made in memory with archiver, for downloads of a few files such as a table and its
 * README, in the order given and with one modification time (so the same input gives the same bytes), e.g.
 * `await writeZip([{ name: 'README.txt', data: text }, { name: 'sections.csv', data: csv }], new Date())`.
 */
export async function writeZip(entries: ZipEntry[], modified: Date): Promise<Buffer> {
  const zip = new ZipArchive({ zlib: { level: 9 } });
  const out = buffer(zip);
  for (const e of entries) zip.append(typeof e.data === 'string' ? Buffer.from(e.data, 'utf8') : e.data, { name: e.name, date: modified, mode: 0o644 });
  await zip.finalize();
  return out;
}
