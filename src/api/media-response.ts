/**
 * Serves a file with HTTP range support (RFC 9110 section 14: `bytes=a-b`, `bytes=a-`,
 * `bytes=-n`; one range; 206 with Content-Range, 416 when unsatisfiable), so a video element
 * can seek in a long clip without loading it whole.
 */
import { createReadStream, promises as fs } from 'node:fs';
import { Readable } from 'node:stream';
import { ApiErrorCode, errorResponse } from './api-errors.js';

const TYPES: Record<string, string> = {
  jpg: 'image/jpeg', jpeg: 'image/jpeg', png: 'image/png', tif: 'image/tiff', tiff: 'image/tiff', webp: 'image/webp',
  mp4: 'video/mp4', m4v: 'video/mp4', mov: 'video/quicktime', avi: 'video/x-msvideo', mkv: 'video/x-matroska', mts: 'video/mp2t',
};

export function contentTypeOf(file: string): string {
  return TYPES[file.split('.').pop()!.toLowerCase()] ?? 'application/octet-stream';
}

export function parseRange(header: string, size: number): { start: number; end: number } | 'invalid' | undefined {
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim());
  if (!m || (m[1] === '' && m[2] === '')) return 'invalid';
  let start: number, end: number;
  if (m[1] === '') {
    const n = Number(m[2]);
    if (n === 0) return 'invalid';
    start = Math.max(0, size - n);
    end = size - 1;
  } else {
    start = Number(m[1]);
    end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1);
  }
  if (start > end || start >= size) return 'invalid';
  return { start, end };
}

export async function fileResponse(file: string, request: Request, cache = 'private, max-age=3600'): Promise<Response> {
  let size: number;
  try {
    size = (await fs.stat(file)).size;
  } catch {
    return errorResponse(404, ApiErrorCode.mediaMissing, 'the file is no longer where the scan found it (moved, renamed or on a disk that is not connected)');
  }
  const type = contentTypeOf(file);
  const base = { 'content-type': type, 'accept-ranges': 'bytes', 'cache-control': cache, 'x-content-type-options': 'nosniff' };
  const range = request.headers.get('range');
  if (range) {
    const r = parseRange(range, size);
    if (r === 'invalid') return new Response(null, { status: 416, headers: { ...base, 'content-range': `bytes */${size}` } });
    if (r) {
      const body = Readable.toWeb(createReadStream(file, { start: r.start, end: r.end })) as ReadableStream;
      return new Response(body, { status: 206, headers: { ...base, 'content-range': `bytes ${r.start}-${r.end}/${size}`, 'content-length': String(r.end - r.start + 1) } });
    }
  }
  const body = Readable.toWeb(createReadStream(file)) as ReadableStream;
  return new Response(body, { status: 200, headers: { ...base, 'content-length': String(size) } });
}
