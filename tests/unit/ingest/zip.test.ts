import { readFileSync } from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { listZipNames, readZip } from '@/lib/ingest';
import { ingestErrorAsync as ingestError } from '../../helpers/ingest-errors';

const IN = path.join(__dirname, '../../fixtures/ingest/in');
const bytes = (name: string) => readFileSync(path.join(IN, name));
const limits = { maxInflatedBytes: 20 * 1024 * 1024, maxZipEntries: 1000 };


describe('readZip', () => {
  it('returns file entries, skipping directories', async () => {
    const entries = await readZip(bytes('kmz-doc.kmz'), limits);
    expect(entries.map((e) => [e.name, e.bytes.length])).toEqual([['doc.kml', 1635], ['files/icon.png', 8]]);
    expect(listZipNames(bytes('kmz-doc.kmz'))).toEqual(['doc.kml', 'files/', 'files/icon.png']);
  });

  it('inflates only the selected entries', async () => {
    const entries = await readZip(bytes('kmz-doc.kmz'), limits, (n) => n.endsWith('.kml'));
    expect(entries.map((e) => e.name)).toEqual(['doc.kml']);
  });

  it.each([
    ['zip-dotdot.kmz', "zip entry '../../evil.kml' contains a \".\" + \".\" segment"],
    ['zip-absolute.kmz', "zip entry '/etc/cron.d/doc.kml' is an absolute path; entries must be plain relative paths"],
    ['zip-backslash.kmz', "zip entry '..\\evil.kml' contains a backslash; entries must be plain relative paths"],
    ['zip-drive.kmz', "zip entry 'C:/temp/doc.kml' starts with a drive letter; entries must be plain relative paths"],
  ])('refuses the unsafe entry in %s, naming it', async (file, message) => {
    const e = await ingestError(() => readZip(bytes(file), limits));
    expect(e.code).toBe('unsafe_zip');
    expect(e.message).toBe(message.replace('"." + "."', '".."') + (file === 'zip-dotdot.kmz' ? '; entries must be plain relative paths' : ''));
  });

  it('stops a zip bomb whose headers understate the inflated size', async () => {
    // 40 MB of KML declared as 1 kB in both the local and the central header
    const e = await ingestError(() => readZip(bytes('zip-bomb-falsified.kmz'), limits));
    expect(e.code).toBe('zip_limits');
    expect(e.message).toMatch(/^zip entry 'doc.kml' does not inflate to the size its header declares \(too many bytes in the stream\. expected 1024\. got at least \d+\); the archive is corrupt or a zip bomb$/);
  });

  it('counts inflated bytes against the limit while inflating', async () => {
    const e = await ingestError(() => readZip(bytes('zip-big-honest.kmz'), { ...limits, maxInflatedBytes: 1024 * 1024 }));
    expect([e.code, e.message]).toEqual(['zip_limits', "the zip inflates to more than 1048576 bytes (stopped while inflating 'doc.kml'); send a smaller archive"]);
    expect((await readZip(bytes('zip-big-honest.kmz'), limits))[0].bytes.length).toBe(3 * 1024 * 1024);
  });

  it('counts the budget across entries, not per entry', async () => {
    const e = await ingestError(() => readZip(bytes('zip-big-honest.kmz'), { ...limits, maxInflatedBytes: 3 * 1024 * 1024 - 1 }));
    expect(e.code).toBe('zip_limits');
  });

  it('refuses more entries than allowed', async () => {
    const e = await ingestError(() => readZip(bytes('zip-many-entries.zip'), limits));
    expect([e.code, e.message]).toEqual(['zip_limits', 'the zip has 1001 entries; at most 1000 are accepted']);
  });

  it('refuses bytes that are not a zip', async () => {
    const e = await ingestError(() => readZip(Buffer.from('PK\u0003\u0004 not really'), limits));
    expect(e.code).toBe('malformed');
  });

  it('skips __MACOSX resource forks', async () => {
    const entry = (name: string, data: Buffer) => {
      const local = Buffer.alloc(30);
      local.writeUInt32LE(0x04034b50, 0);
      local.writeUInt16LE(20, 4);
      local.writeUInt32LE(zlib.crc32(data), 14);
      local.writeUInt32LE(data.length, 18);
      local.writeUInt32LE(data.length, 22);
      local.writeUInt16LE(name.length, 26);
      return { local: Buffer.concat([local, Buffer.from(name), data]), name, data };
    };
    const items = [entry('doc.kml', Buffer.from('<kml/>')), entry('__MACOSX/._doc.kml', Buffer.from('xx'))];
    let offset = 0;
    const central = items.map((it) => {
      const c = Buffer.alloc(46);
      c.writeUInt32LE(0x02014b50, 0);
      c.writeUInt16LE(20, 6);
      c.writeUInt32LE(zlib.crc32(it.data), 16);
      c.writeUInt32LE(it.data.length, 20);
      c.writeUInt32LE(it.data.length, 24);
      c.writeUInt16LE(it.name.length, 28);
      c.writeUInt32LE(offset, 42);
      offset += it.local.length;
      return Buffer.concat([c, Buffer.from(it.name)]);
    });
    const cd = Buffer.concat(central);
    const eocd = Buffer.alloc(22);
    eocd.writeUInt32LE(0x06054b50, 0);
    eocd.writeUInt16LE(2, 8);
    eocd.writeUInt16LE(2, 10);
    eocd.writeUInt32LE(cd.length, 12);
    eocd.writeUInt32LE(offset, 16);
    const zip = Buffer.concat([...items.map((i) => i.local), cd, eocd]);
    expect((await readZip(zip, limits)).map((e) => e.name)).toEqual(['doc.kml']);
  });
});
