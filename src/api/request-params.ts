/**
 * Validation of what a client sends: query filters, ids, JSON bodies and the two paths the
 * start screen may give (a ledger to open, a folder to scan). Messages name the parameter, what
 * was wanted and what came in.
 */
import os from 'node:os';
import path from 'node:path';
import type { EventFilter } from '../ledger/review-queries.js';
import { badRequest } from './api-errors.js';

export const EVENT_ID_RE = /^e[0-9a-f]{12}$/;
const VERDICTS = ['likely-blank', 'unsure', 'motion'] as const;
const FILTER_KEYS = new Set(['verdict', 'deployment', 'score_min', 'score_max', 'decision', 'light', 'sort', 'order', 'offset', 'limit', 'total']);

function num(q: URLSearchParams, name: string, lo: number, hi: number, integer = false): number | undefined {
  const v = q.get(name);
  if (v === null || v === '') return undefined;
  const x = Number(v);
  if (!Number.isFinite(x) || x < lo || x > hi || (integer && !Number.isInteger(x))) throw badRequest(`${name}: wanted ${integer ? 'integer' : 'number'} ${lo}-${hi}, got ${JSON.stringify(v)}`);
  return x;
}

function oneOf<T extends string>(q: URLSearchParams, name: string, allowed: readonly T[]): T | undefined {
  const v = q.get(name);
  if (v === null || v === '') return undefined;
  if (!allowed.includes(v as T)) throw badRequest(`${name}: wanted one of ${allowed.join(', ')}, got ${JSON.stringify(v)}`);
  return v as T;
}

export function parseFilter(q: URLSearchParams): EventFilter & { withTotal: boolean } {
  for (const k of q.keys()) if (!FILTER_KEYS.has(k)) throw badRequest(`unknown filter ${JSON.stringify(k)}`);
  const deployment = q.get('deployment') ?? undefined;
  if (deployment !== undefined && deployment.length > 500) throw badRequest('deployment: wanted at most 500 characters');
  return {
    verdict: oneOf(q, 'verdict', VERDICTS),
    deployment: deployment || undefined,
    scoreMin: num(q, 'score_min', 0, 1),
    scoreMax: num(q, 'score_max', 0, 1),
    decision: oneOf(q, 'decision', ['keep', 'set-aside', 'none'] as const),
    light: oneOf(q, 'light', ['colour', 'infrared'] as const),
    sort: oneOf(q, 'sort', ['time', 'score'] as const) ?? 'time',
    desc: (oneOf(q, 'order', ['asc', 'desc'] as const) ?? 'asc') === 'desc',
    offset: num(q, 'offset', 0, 1e9, true) ?? 0,
    limit: num(q, 'limit', 1, 1000, true) ?? 200,
    withTotal: (oneOf(q, 'total', ['0', '1'] as const) ?? '1') === '1',
  };
}

/** The largest request body taken; the loopback server refuses a longer one as it streams in. */
export const MAX_BODY_BYTES = 16 << 20;

export async function readJson(req: Request): Promise<Record<string, unknown>> {
  const text = await req.text();
  if (text.length > MAX_BODY_BYTES) throw badRequest('body: wanted at most 16 MiB');
  try {
    const v = text ? JSON.parse(text) : {};
    if (typeof v !== 'object' || v === null || Array.isArray(v)) throw new Error();
    return v as Record<string, unknown>;
  } catch {
    throw badRequest('body: wanted a JSON object');
  }
}

export function eventIds(v: unknown): string[] {
  if (!Array.isArray(v) || v.length === 0 || v.length > 1_000_000 || v.some((e) => typeof e !== 'string' || !EVENT_ID_RE.test(e))) throw badRequest('events: wanted a non-empty array of event ids');
  return v as string[];
}

export const who = (v: unknown): string | null => (typeof v === 'string' && v.trim() ? v.trim().slice(0, 200) : null);

/**
 * A path typed on the start screen (or returned by the desktop's native picker): absolute, or
 * starting with `~/`. It names a ledger to open or a folder to scan; no route ever returns a
 * file's content by path.
 */
export function userPath(name: string, v: unknown): string {
  if (typeof v !== 'string' || v.trim() === '' || v.length > 4096 || v.includes('\0')) throw badRequest(`${name}: wanted a path, got ${JSON.stringify(typeof v === 'string' ? v.slice(0, 80) : v)}`);
  const t = v.trim();
  const expanded = t === '~' || t.startsWith('~/') ? path.join(os.homedir(), t.slice(1)) : t;
  if (!path.isAbsolute(expanded)) throw badRequest(`${name}: wanted an absolute path (or one starting with ~/), got ${JSON.stringify(t)}`);
  return path.normalize(expanded);
}
