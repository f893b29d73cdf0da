// The web server that `npm start` (and the end-to-end tests) run: Next.js behind a plain Node HTTP server,
// because only here is the socket's peer address known. Every request gets the client address it counts
// under (lib/auth/client-ip.ts) in a header clients cannot forge, forwarding headers are dropped unless the
// peer is a configured proxy, and a JSON or form body declared over JSON_MAX_BYTES is refused before any
// of it is read (multipart uploads have their own streaming limit, UPLOAD_MAX_BYTES).
//   node --import tsx scripts/server.ts [--dev]      (HOST, PORT; defaults 127.0.0.1:3000)
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import next from 'next';
import { env } from '../lib/env';
import { CLIENT_IP_HEADER, FORWARDING_HEADERS, isTrusted, parseProxyList, resolveClientIp } from '../lib/auth/client-ip';
import { errorBody } from '../lib/api/errors';

const dev = process.argv.includes('--dev');
const hostname = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);

function refuse(res: ServerResponse, status: number, body: object) {
  res.writeHead(status, { 'content-type': 'application/json', connection: 'close' });
  res.end(JSON.stringify(body));
}

/** A body this request declares that is over the limit for its kind (multipart is capped while streamed). */
function declaredTooLarge(req: IncomingMessage, maxJson: number): number | undefined {
  const length = Number(req.headers['content-length']);
  if (!Number.isFinite(length) || length <= maxJson) return undefined;
  const type = String(req.headers['content-type'] ?? '').toLowerCase();
  return type.startsWith('multipart/form-data') ? undefined : length;
}

// a database that goes away for a moment must not end the web server; requests meanwhile get a 500
process.on('unhandledRejection', (err) => console.error('[trenchbook] server: a background call failed', err instanceof Error ? err.message : err));

async function main() {
  const e = env();
  const trusted = parseProxyList(e.TRUSTED_PROXIES);
  const app = next({ dev, hostname, port });
  const handle = app.getRequestHandler();
  await app.prepare();

  const server = createServer((req, res) => {
    const ip = resolveClientIp(req.socket.remoteAddress, req.headers, trusted);
    if (!isTrusted(req.socket.remoteAddress ?? '', trusted)) for (const h of FORWARDING_HEADERS) delete req.headers[h];
    req.headers[CLIENT_IP_HEADER] = ip;
    // Next fills X-Forwarded-For only when it is missing: give it the address we resolved
    req.headers['x-forwarded-for'] ??= ip;

    // %00 decodes to NUL, which no page or route has a use for (and PostgreSQL cannot store in text)
    if (/%00/.test(req.url ?? '')) {
      refuse(res, 400, errorBody('bad_request', 'The address contains a NUL character (%00), which is not allowed.'));
      req.resume();
      return;
    }
    const tooLarge = declaredTooLarge(req, e.JSON_MAX_BYTES);
    if (tooLarge !== undefined) {
      refuse(res, 413, errorBody('too_large', `The request body is ${tooLarge} bytes; the limit is ${e.JSON_MAX_BYTES} bytes.`));
      req.resume();
      return;
    }
    handle(req, res).catch((err: unknown) => {
      console.error('[trenchbook] request failed', err);
      if (!res.headersSent) refuse(res, 500, errorBody('internal', 'Something went wrong on our side; it has been logged.'));
    });
  });
  server.listen(port, hostname, () => console.log(`trenchbook: serving http://${hostname}:${port}${dev ? ' (development)' : ''}`));

  const stop = () => {
    server.close();
    server.closeAllConnections();
    void app.close().finally(() => process.exit(0));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
