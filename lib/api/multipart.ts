import busboy from 'busboy';
import { createHash, randomUUID } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { mkdir, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Readable } from 'node:stream';
import { AppError } from './errors';
import { assertNoNul } from './read-body';

export interface ReceivedFile {
  field: string;
  fileName: string;
  /** temporary file holding the bytes exactly as sent */
  tmpPath: string;
  size: number;
  sha256: string;
}

export interface ReceivedForm {
  files: ReceivedFile[];
  fields: Record<string, string>;
  /** removes the temporary files; call it in a finally */
  cleanup: () => Promise<void>;
}

const mb = (n: number) => `${Math.round(n / 1024 / 1024)} MB`;

/** Where uploads are streamed while they arrive: UPLOAD_TMP_DIR, else `<os tmp>/trenchbook-upload`. */
export function uploadTmpRoot(): string {
  return process.env.UPLOAD_TMP_DIR || path.join(os.tmpdir(), 'trenchbook-upload');
}

/**
 * Streams a multipart body to temporary files, hashing as it goes, and refuses it (413) as soon as the
 * running total passes `maxBytes`: the body is never buffered whole.
 */
export async function receiveMultipart(req: Request, maxBytes: number): Promise<ReceivedForm> {
  const type = req.headers.get('content-type') ?? '';
  if (!type.toLowerCase().startsWith('multipart/form-data')) {
    throw new AppError('unsupported_format', 'Send the file as multipart/form-data with a "file" part.');
  }
  const declared = Number(req.headers.get('content-length') ?? NaN);
  if (Number.isFinite(declared) && declared > maxBytes + 64 * 1024) {
    throw new AppError('too_large', `The upload is ${mb(declared)}; the limit is ${mb(maxBytes)}.`);
  }
  if (!req.body) throw new AppError('bad_request', 'The request has no body.');
  let bb: busboy.Busboy;
  try {
    // file names arrive as UTF-8 from browsers and curl; busboy would read them as Latin-1 by default
    bb = busboy({ headers: { 'content-type': type }, defParamCharset: 'utf8', limits: { files: 50, fields: 50, fieldSize: 1024 * 1024 } });
  } catch (err) {
    throw new AppError('bad_request', `The multipart body cannot be read: ${(err as Error).message}. Send "Content-Type: multipart/form-data; boundary=…" as a form upload does.`);
  }

  const dir = path.join(uploadTmpRoot(), randomUUID());
  await mkdir(dir, { recursive: true });
  const cleanup = () => rm(dir, { recursive: true, force: true });
  const files: ReceivedFile[] = [];
  const fields: Record<string, string> = {};

  try {
    await new Promise<void>((resolve, reject) => {
      let total = 0;
      let failed = false;
      const pending: Promise<void>[] = [];
      const source = Readable.fromWeb(req.body as import('node:stream/web').ReadableStream);
      const fail = (err: unknown) => {
        if (failed) return;
        failed = true;
        source.unpipe(bb);
        source.destroy();
        reject(err);
      };
      bb.on('file', (field, stream, info) => {
        const fileName = path.basename(info.filename || 'upload');
        if (fileName.includes('\u0000')) {
          stream.resume();
          fail(new AppError('invalid', 'A file name contains a NUL character (U+0000); rename the file.'));
          return;
        }
        const tmpPath = path.join(dir, `${files.length}`);
        const hash = createHash('sha256');
        let size = 0;
        const out = createWriteStream(tmpPath);
        const entry: ReceivedFile = { field, fileName, tmpPath, size: 0, sha256: '' };
        files.push(entry);
        stream.on('data', (chunk: Buffer) => {
          size += chunk.length;
          total += chunk.length;
          if (total > maxBytes) {
            stream.resume();
            fail(new AppError('too_large', `The upload is over the limit of ${mb(maxBytes)}; it was refused while it arrived.`));
            return;
          }
          hash.update(chunk);
        });
        pending.push(
          new Promise<void>((res, rej) => {
            out.on('finish', () => {
              entry.size = size;
              entry.sha256 = hash.digest('hex');
              res();
            });
            out.on('error', rej);
          }),
        );
        stream.pipe(out);
      });
      bb.on('field', (name, value) => {
        try {
          assertNoNul({ [name]: value }, 'form field');
        } catch (err) {
          fail(err);
          return;
        }
        fields[name] = value;
      });
      bb.on('error', (err) => fail(new AppError('bad_request', `The multipart body is malformed: ${(err as Error).message}`)));
      bb.on('filesLimit', () => fail(new AppError('bad_request', 'Too many files in one upload (at most 50).')));
      bb.on('close', () => {
        if (failed) return;
        Promise.all(pending).then(() => resolve(), fail);
      });
      source.on('error', (err) => fail(new AppError('bad_request', `The upload was interrupted: ${err.message}`)));
      source.pipe(bb);
    });
  } catch (err) {
    await cleanup();
    throw err;
  }
  return { files, fields, cleanup };
}
