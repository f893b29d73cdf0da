import { createHash, randomUUID } from 'node:crypto';
import { mkdir, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { ReceivedForm } from '@/lib/api/multipart';

/** A received multipart form as receiveMultipart would hand it over, built from in-memory files. */
export async function formOf(files: { name: string; bytes: Buffer | string }[], fields: Record<string, string> = {}): Promise<ReceivedForm> {
  const dir = path.join(os.tmpdir(), 'trenchbook-test-form', randomUUID());
  await mkdir(dir, { recursive: true });
  const out = [];
  for (const [i, f] of files.entries()) {
    const bytes = Buffer.isBuffer(f.bytes) ? f.bytes : Buffer.from(f.bytes, 'utf8');
    const tmpPath = path.join(dir, String(i));
    await writeFile(tmpPath, bytes);
    out.push({ field: 'file', fileName: f.name, tmpPath, size: bytes.length, sha256: createHash('sha256').update(bytes).digest('hex') });
  }
  return { files: out, fields, cleanup: () => rm(dir, { recursive: true, force: true }) };
}

/** A GPX 1.1 track along a line of latitude, `n` points, 1 s apart. */
export function gpxTrack(n: number, opts: { lat?: number; lon?: number; name?: string; seed?: number } = {}): string {
  const lat = opts.lat ?? 52.105;
  const lon = opts.lon ?? 9.105;
  const pts = Array.from({ length: n }, (_, i) => {
    const t = new Date(Date.UTC(2026, 10, 3, 8, 0, i + (opts.seed ?? 0))).toISOString();
    return `<trkpt lat="${(lat + i * 1e-5).toFixed(7)}" lon="${(lon + i * 2e-5).toFixed(7)}"><ele>${(50 + i * 0.01).toFixed(2)}</ele><time>${t}</time></trkpt>`;
  }).join('');
  return `<?xml version="1.0" encoding="UTF-8"?><gpx version="1.1" creator="trenchbook tests" xmlns="http://www.topografix.com/GPX/1/1"><trk><name>${opts.name ?? 'trace'}</name><trkseg>${pts}</trkseg></trk></gpx>`;
}
