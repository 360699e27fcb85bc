/**
 * Serves the built renderer (Vite's output folder) for every path outside /api. Hashed assets
 * are cached for good; index.html never is, so a rebuilt app is picked up on reload. A path that
 * would leave the folder is answered 404, like any missing file.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { ApiErrorCode, errorResponse } from './api-errors.js';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8', '.svg': 'image/svg+xml',
  '.png': 'image/png', '.webp': 'image/webp', '.ico': 'image/x-icon', '.json': 'application/json', '.woff2': 'font/woff2', '.map': 'application/json',
};

export async function staticFile(dir: string | undefined, pathname: string): Promise<Response> {
  if (!dir) return errorResponse(404, ApiErrorCode.notFound, 'this server has no app to show (the renderer is not built: run `npm run build`)');
  const rel = pathname === '/' ? 'index.html' : pathname.replace(/^\/+/, '');
  const root = path.resolve(dir);
  const file = path.resolve(root, rel);
  if (file !== root && !file.startsWith(root + path.sep)) return errorResponse(404, ApiErrorCode.notFound, `no file ${pathname}`);
  let body: Buffer;
  try {
    body = await fs.readFile(file);
  } catch {
    return errorResponse(404, ApiErrorCode.notFound, `no file ${pathname}`);
  }
  const ext = path.extname(file).toLowerCase();
  const immutable = rel.startsWith('assets/') ? 'public, max-age=31536000, immutable' : 'no-cache';
  return new Response(new Uint8Array(body), { headers: { 'content-type': TYPES[ext] ?? 'application/octet-stream', 'cache-control': immutable, 'x-content-type-options': 'nosniff' } });
}
