/**
 * Browser mode's server: the request handler on 127.0.0.1 only (a random port unless given).
 * Other programs on this machine, and pages in the user's browser from other sites, can reach a
 * loopback port; what keeps them out:
 * - a Host check that refuses any name but the loopback address and port it bound (a
 *   DNS-rebinding page cannot pass it);
 * - a secret in the printed URL, good once: it is traded for a session cookie with another,
 *   random value (HttpOnly, SameSite=Strict), so the URL left in a shell's history or a browser's
 *   history opens nothing later;
 * - for every request that can change something (any method but GET and HEAD): an Origin, when
 *   sent, that is exactly this server's, a Sec-Fetch-Site, when sent, of same-origin; a JSON
 *   content type (an HTML form or a text/plain beacon cannot send one without a CORS preflight,
 *   which this server never grants); and the session's request key in the
 *   `x-movesift-key` header. A page on another port of 127.0.0.1 counts as the same *site* for
 *   SameSite cookies and can read this host's non-HttpOnly cookies (cookies ignore the port), so
 *   the key travels in a response header that only a same-origin script can read;
 * - request bodies counted as they stream and cut off past the limit;
 * - a strict Content-Security-Policy on every response.
 * The Electron shell needs none of this: its custom protocol is reachable only from its own window.
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { Readable } from 'node:stream';
import type { AddressInfo } from 'node:net';
import { errorResponse } from './api-errors.js';
import { MAX_BODY_BYTES } from './request-params.js';

export const CSP = "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' blob: data:; media-src 'self'; connect-src 'self'; object-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'";
const COOKIE = 'movesift_session';
/** The header a state-changing request carries its session's key in, and the one every
 *  response to a signed-in client hands it out in. The renderer's client (app/renderer/src/shared/api.ts)
 *  reads and sends it: change the two together. */
export const KEY_HEADER = 'x-movesift-key';

export const LoopbackCode = {
  forbiddenHost: 'E_FORBIDDEN_HOST',
  unauthorised: 'E_UNAUTHORISED',
  secretUsed: 'E_SECRET_USED',
  foreignOrigin: 'E_FOREIGN_ORIGIN',
  notJson: 'E_NOT_JSON',
  missingKey: 'E_REQUEST_KEY',
  bodyTooLarge: 'E_BODY_TOO_LARGE',
} as const;

export interface LoopbackServer {
  url: string;
  port: number;
  /** The one-use secret of the printed URL. */
  token: string;
  close(): Promise<void>;
}

const same = (a: string, b: string): boolean => a.length === b.length && timingSafeEqual(Buffer.from(a), Buffer.from(b));

function cookieValue(header: string | undefined): string | undefined {
  for (const part of (header ?? '').split(';')) {
    const [k, ...v] = part.trim().split('=');
    if (k === COOKIE) return v.join('=');
  }
  return undefined;
}

class Refusal extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** Reads a body, counting as it streams: past the limit the request is refused before the rest
 *  is read (and the connection closed), so a client cannot make the server hold gigabytes. */
async function readBody(req: IncomingMessage): Promise<Buffer<ArrayBuffer> | undefined> {
  const declared = Number(req.headers['content-length']);
  if (Number.isFinite(declared) && declared > MAX_BODY_BYTES) throw new Refusal(413, LoopbackCode.bodyTooLarge, `body: wanted at most ${MAX_BODY_BYTES >> 20} MiB, declared ${declared} bytes`);
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const c of req) {
    size += (c as Buffer).length;
    if (size > MAX_BODY_BYTES) throw new Refusal(413, LoopbackCode.bodyTooLarge, `body: wanted at most ${MAX_BODY_BYTES >> 20} MiB`);
    chunks.push(c as Buffer);
  }
  return chunks.length ? Buffer.concat(chunks) : undefined;
}

async function toRequest(req: IncomingMessage, origin: string): Promise<Request> {
  const body = req.method !== 'GET' && req.method !== 'HEAD' ? await readBody(req) : undefined;
  const headers = new Headers();
  for (const [k, v] of Object.entries(req.headers)) if (typeof v === 'string') headers.set(k, v);
  return new Request(new URL(req.url ?? '/', origin), { method: req.method, headers, body });
}

async function send(res: ServerResponse, r: Response, extra: Record<string, string>): Promise<void> {
  const headers: Record<string, string> = { ...extra };
  r.headers.forEach((v, k) => (headers[k] = v));
  res.writeHead(r.status, headers);
  if (!r.body) return void res.end();
  const body = Readable.fromWeb(r.body as import('node:stream/web').ReadableStream);
  // A client that goes away (a closed tab, a seek that abandons a range) cancels the body, so an
  // open event stream unsubscribes and a file stream closes its descriptor.
  res.on('close', () => body.destroy());
  await new Promise<void>((resolve) => {
    body.on('end', resolve).on('error', resolve).on('close', resolve).pipe(res);
  });
}

/** The checks on a request that can change something; `key` is the session's request key. */
function checkWrite(req: IncomingMessage, host: string, key: string): void {
  const origin = req.headers.origin;
  // Browsers send Origin on every cross-origin request and on same-origin POSTs; a request
  // without one comes from a program, which the session cookie already had to get past.
  if (origin !== undefined && origin !== `http://${host}`) throw new Refusal(403, LoopbackCode.foreignOrigin, `requests that change something are taken only from this app's own page, not from ${origin}`);
  const site = req.headers['sec-fetch-site'];
  if (site !== undefined && site !== 'same-origin') throw new Refusal(403, LoopbackCode.foreignOrigin, `requests that change something are taken only from this app's own page (this one came ${site})`);
  const type = (req.headers['content-type'] ?? '').split(';')[0]!.trim().toLowerCase();
  if (type !== 'application/json') throw new Refusal(415, LoopbackCode.notJson, `requests that change something must send JSON (content-type application/json), not ${type || 'nothing'}`);
  const given = req.headers[KEY_HEADER];
  if (typeof given !== 'string' || !same(given, key)) throw new Refusal(403, LoopbackCode.missingKey, `a request that changes something must carry the session's key in ${KEY_HEADER}; reload the app's page`);
}

export async function startLoopbackServer(handle: (r: Request) => Promise<Response>, o: { port?: number } = {}): Promise<LoopbackServer> {
  const token = randomBytes(24).toString('base64url');
  let tokenUsed = false;
  /** Signed-in sessions: the cookie's value → that session's request key. */
  const sessions = new Map<string, string>();
  let port = 0;
  const server = createServer(async (req, res) => {
    const base: Record<string, string> = { 'content-security-policy': CSP, 'x-content-type-options': 'nosniff', 'referrer-policy': 'no-referrer', 'cross-origin-resource-policy': 'same-origin' };
    try {
      const host = req.headers.host ?? '';
      if (host !== `127.0.0.1:${port}` && host !== `localhost:${port}`) throw new Refusal(403, LoopbackCode.forbiddenHost, 'this server answers only at its loopback address');
      const url = new URL(req.url ?? '/', `http://${host}`);
      const cookie = cookieValue(req.headers.cookie);
      const key = cookie === undefined ? undefined : sessions.get(cookie);
      const given = url.searchParams.get('token');
      if (given !== null && req.method === 'GET') {
        if (!same(given, token)) throw new Refusal(401, LoopbackCode.unauthorised, 'wrong secret: open the address that `movesift review` printed');
        url.searchParams.delete('token');
        const location = url.pathname + (url.search || '');
        // The browser that signed in with it may open the address again (a reload, a bookmark).
        if (key !== undefined) return void res.writeHead(303, { ...base, location }).end();
        if (tokenUsed) throw new Refusal(401, LoopbackCode.secretUsed, 'this address has been used already, and its secret is good once; restart `movesift review` for a new one');
        tokenUsed = true;
        const id = randomBytes(24).toString('base64url');
        sessions.set(id, randomBytes(24).toString('base64url'));
        return void res.writeHead(303, { ...base, location, 'set-cookie': `${COOKIE}=${id}; HttpOnly; SameSite=Strict; Path=/` }).end();
      }
      if (key === undefined) throw new Refusal(401, LoopbackCode.unauthorised, 'not signed in: open the address that `movesift review` printed');
      base[KEY_HEADER] = key;
      if (req.method !== 'GET' && req.method !== 'HEAD') checkWrite(req, host, key);
      await send(res, await handle(await toRequest(req, `http://${host}`)), base);
    } catch (e) {
      if (res.headersSent) return void res.destroy();
      const r = e instanceof Refusal ? errorResponse(e.status, e.code, e.message) : errorResponse(500, 'E_INTERNAL', (e as Error).message);
      // A refused body is not read further: the connection closes after the answer.
      if (e instanceof Refusal && e.code === LoopbackCode.bodyTooLarge) base.connection = 'close';
      await send(res, r, base);
      if (e instanceof Refusal && e.code === LoopbackCode.bodyTooLarge) req.destroy();
    }
  });
  await new Promise<void>((resolve, reject) => server.once('error', reject).listen(o.port ?? 0, '127.0.0.1', () => resolve()));
  port = (server.address() as AddressInfo).port;
  return {
    url: `http://127.0.0.1:${port}/?token=${token}`,
    port,
    token,
    close: () =>
      new Promise((r) => {
        server.close(() => r());
        server.closeAllConnections();
      }),
  };
}
