/**
 * Browser mode's server: the request handler on 127.0.0.1 only (a random port unless given),
 * guarded three ways. A per-run secret token, given once in the URL printed to the user and
 * then held in an HttpOnly, SameSite=Strict cookie; a Host check that refuses any name but the
 * loopback address and port it bound (a DNS-rebinding page cannot pass it); and a strict
 * Content-Security-Policy on every response (scripts, styles and media from this origin only).
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { Readable } from 'node:stream';
import type { AddressInfo } from 'node:net';
import { errorResponse } from './api-errors.js';

export const CSP = "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' blob: data:; media-src 'self'; connect-src 'self'; object-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'self'";
const COOKIE = 'movesift_token';

export interface LoopbackServer {
  url: string;
  port: number;
  token: string;
  close(): Promise<void>;
}

const same = (a: string, b: string): boolean => a.length === b.length && timingSafeEqual(Buffer.from(a), Buffer.from(b));

function cookieToken(header: string | undefined): string | undefined {
  for (const part of (header ?? '').split(';')) {
    const [k, ...v] = part.trim().split('=');
    if (k === COOKIE) return v.join('=');
  }
  return undefined;
}

async function toRequest(req: IncomingMessage, origin: string): Promise<Request> {
  const chunks: Buffer[] = [];
  if (req.method !== 'GET' && req.method !== 'HEAD') for await (const c of req) chunks.push(c as Buffer);
  const headers = new Headers();
  for (const [k, v] of Object.entries(req.headers)) if (typeof v === 'string') headers.set(k, v);
  return new Request(new URL(req.url ?? '/', origin), { method: req.method, headers, body: chunks.length ? Buffer.concat(chunks) : undefined });
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

export async function startLoopbackServer(handle: (r: Request) => Promise<Response>, o: { port?: number } = {}): Promise<LoopbackServer> {
  const token = randomBytes(24).toString('base64url');
  let port = 0;
  const server = createServer(async (req, res) => {
    const base = { 'content-security-policy': CSP, 'x-content-type-options': 'nosniff', 'referrer-policy': 'no-referrer', 'cross-origin-resource-policy': 'same-origin' };
    try {
      const host = req.headers.host ?? '';
      if (host !== `127.0.0.1:${port}` && host !== `localhost:${port}`) return await send(res, errorResponse(403, 'E_FORBIDDEN_HOST', 'this server answers only at its loopback address'), base);
      const url = new URL(req.url ?? '/', `http://${host}`);
      const given = url.searchParams.get('token');
      if (given !== null && req.method === 'GET') {
        if (!same(given, token)) return await send(res, errorResponse(401, 'E_UNAUTHORISED', 'wrong token: open the address that `movesift review` printed'), base);
        url.searchParams.delete('token');
        res.writeHead(303, { ...base, location: url.pathname + (url.search || ''), 'set-cookie': `${COOKIE}=${token}; HttpOnly; SameSite=Strict; Path=/` });
        return void res.end();
      }
      const c = cookieToken(req.headers.cookie);
      if (!c || !same(c, token)) return await send(res, errorResponse(401, 'E_UNAUTHORISED', 'not signed in: open the address that `movesift review` printed'), base);
      await send(res, await handle(await toRequest(req, `http://${host}`)), base);
    } catch (e) {
      if (!res.headersSent) await send(res, errorResponse(500, 'E_INTERNAL', (e as Error).message), base);
      else res.destroy();
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
