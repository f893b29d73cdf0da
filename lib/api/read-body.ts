import { AppError } from './errors';

const JSON_TYPE = /^application\/([a-z0-9.+-]+\+)?json\s*(;|$)/i;

/**
 * Reads a request body as UTF-8 text of at most `maxBytes`: refused with 413 `too_large` when the
 * declared length is over the limit, before a byte is read, and as soon as a body without a declared
 * length passes it, so a large body is never held whole.
 */
export async function readBodyText(req: Request, maxBytes: number): Promise<string> {
  const declared = Number(req.headers.get('content-length') ?? NaN);
  const tooLarge = (size: string) => new AppError('too_large', `The request body is ${size}; the limit is ${maxBytes} bytes.`);
  if (Number.isFinite(declared) && declared > maxBytes) throw tooLarge(`${declared} bytes`);
  if (!req.body) return '';
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(`over ${maxBytes} bytes`);
    }
    chunks.push(value);
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(Buffer.concat(chunks));
  } catch {
    throw new AppError('bad_json', 'The request body is not valid UTF-8 text.');
  }
}

/**
 * Reads and parses a JSON request body: `Content-Type: application/json` (or `…+json`) is required (415
 * otherwise), the size is capped (413), the text must parse (400 `bad_json`) and no string in it may hold a
 * NUL character (422, with the path of the first one).
 */
export async function readJsonBody(req: Request, maxBytes: number): Promise<unknown> {
  const type = req.headers.get('content-type') ?? '';
  if (!JSON_TYPE.test(type)) {
    throw new AppError('unsupported_format', `Send the body as JSON with "Content-Type: application/json"${type ? `, not "${type.slice(0, 80)}"` : ''}.`);
  }
  const text = await readBodyText(req, maxBytes);
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (err) {
    throw new AppError('bad_json', `The request body is not valid JSON: ${(err as Error).message}`);
  }
  assertNoNul(json, 'body');
  return json;
}

/** The path of the first string (or key) holding U+0000 in a parsed JSON value, or undefined. */
export function findNul(value: unknown, path = ''): string | undefined {
  if (typeof value === 'string') return value.includes('\u0000') ? path || '(value)' : undefined;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const hit = findNul(value[i], path ? `${path}.${i}` : String(i));
      if (hit) return hit;
    }
    return undefined;
  }
  if (value && typeof value === 'object') {
    for (const [k, v] of Object.entries(value)) {
      const p = path ? `${path}.${k}` : k;
      if (k.includes('\u0000')) return p;
      const hit = findNul(v, p);
      if (hit) return hit;
    }
  }
  return undefined;
}

/**
 * Refuses text holding a NUL character (U+0000): PostgreSQL cannot store it in text, and no field of ours
 * has a use for it. `where` names the part of the request ("body", "query", "form field").
 */
export function assertNoNul(value: unknown, where: string): void {
  const path = findNul(value);
  if (path === undefined) return;
  const message = `${where} ${path}: the text contains a NUL character (U+0000), which is not allowed.`;
  throw new AppError('invalid', message, [{ path, message: 'Contains a NUL character (U+0000).' }]);
}
