/**
 * Capture times. EXIF 2.32 (CIPA DC-008-2019, section 4.6.5) writes DateTimeOriginal as
 * "YYYY:MM:DD HH:MM:SS" in the camera's local clock, with the fraction of a second in
 * SubSecTimeOriginal (digits) and, since 2.31, the offset from UTC in OffsetTimeOriginal
 * ("+HH:MM"). Most trail cameras write no offset: their times are local wall-clock times, and
 * we keep them that way (ISO 8601 without an offset) rather than invent a time zone.
 *
 * `sortMs` orders times within one camera: the wall-clock reading as if it were UTC. It is
 * never shown; the ISO text is.
 */

export const TimeSource = {
  exifOriginal: 'exif-original',
  exifDigitized: 'exif-digitized',
  exifModified: 'exif-datetime',
  videoTag: 'video-creation-time',
  fileTime: 'file-time',
} as const;
export type TimeSourceName = (typeof TimeSource)[keyof typeof TimeSource];

export interface CaptureTime {
  /** ISO 8601: local wall-clock time, with an offset only when one is known. */
  iso: string;
  sortMs: number;
  source: TimeSourceName;
}

const EXIF_RE = /^(\d{4})[:\-](\d{2})[:\-](\d{2})[ T](\d{2}):(\d{2}):(\d{2})(?:\.(\d+))?/;
const OFFSET_RE = /^([+-])(\d{2}):?(\d{2})$/;
const pad = (n: number, w = 2): string => String(n).padStart(w, '0');

/** Parses an EXIF date-time (plus optional sub-second digits and offset); undefined when blank or impossible. */
export function parseExifDateTime(text: unknown, subSec?: unknown, offset?: unknown, source: TimeSourceName = TimeSource.exifOriginal): CaptureTime | undefined {
  if (typeof text !== 'string') return undefined;
  const m = EXIF_RE.exec(text.trim());
  if (!m) return undefined;
  const [Y, Mo, D, h, mi, s] = m.slice(1, 7).map(Number);
  if (Y < 1970 || Mo < 1 || Mo > 12 || D < 1 || D > 31 || h > 23 || mi > 59 || s > 60) return undefined;
  const base = Date.UTC(Y, Mo - 1, D, h, mi, s);
  const check = new Date(base);
  if (check.getUTCDate() !== D) return undefined; // 31 February and the like
  const digits = String(subSec ?? m[7] ?? '').trim().replace(/\D.*$/, '');
  const frac = digits ? Number(`0.${digits}`) : 0;
  const ms = Math.round(frac * 1000);
  let iso = `${Y}-${pad(Mo)}-${pad(D)}T${pad(h)}:${pad(mi)}:${pad(s)}${ms ? `.${pad(ms, 3)}` : ''}`;
  const off = typeof offset === 'string' ? OFFSET_RE.exec(offset.trim()) : null;
  if (off && Number(off[2]) <= 14 && Number(off[3]) < 60) iso += `${off[1]}${off[2]}:${off[3]}`;
  return { iso, sortMs: base + ms, source };
}

/** A file's modification time, as a local wall-clock time with this machine's offset. */
export function fileTime(mtimeMs: number): CaptureTime {
  const d = new Date(mtimeMs);
  const offMin = -d.getTimezoneOffset();
  const sign = offMin >= 0 ? '+' : '-';
  const a = Math.abs(offMin);
  const local = mtimeMs + offMin * 60000;
  const l = new Date(local);
  const iso = `${l.getUTCFullYear()}-${pad(l.getUTCMonth() + 1)}-${pad(l.getUTCDate())}T${pad(l.getUTCHours())}:${pad(l.getUTCMinutes())}:${pad(l.getUTCSeconds())}${sign}${pad(Math.floor(a / 60))}:${pad(a % 60)}`;
  return { iso, sortMs: Math.floor(local / 1000) * 1000, source: TimeSource.fileTime };
}

/** ffprobe's creation_time tag (UTC, "2024-05-01T10:00:00.000000Z"). */
export function parseVideoCreationTime(text: unknown): CaptureTime | undefined {
  if (typeof text !== 'string') return undefined;
  const t = Date.parse(text);
  if (!Number.isFinite(t) || t < Date.UTC(1971, 0, 1)) return undefined; // 1970 / 1904 epochs mean "unset"
  return { iso: new Date(Math.floor(t / 1000) * 1000).toISOString().replace('.000Z', 'Z'), sortMs: t, source: TimeSource.videoTag };
}

const ISO_RE = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2})(?:\.(\d+))?(Z|[+-]\d{2}:\d{2})?$/;

/**
 * A capture time `seconds` later, in the same form (the same offset, or none: a local wall-clock
 * reading stays one). What a clip's end is: its start plus its duration. Milliseconds are kept
 * when there are any. Undefined for text that is not such an ISO time.
 */
export function isoPlusSeconds(iso: string, seconds: number): string | undefined {
  const m = ISO_RE.exec(iso);
  if (!m || !Number.isFinite(seconds)) return undefined;
  const [Y, Mo, D, h, mi, s] = m.slice(1, 7).map(Number);
  const frac = m[7] ? Number(`0.${m[7]}`) : 0;
  const t = new Date(Date.UTC(Y, Mo - 1, D, h, mi, s) + Math.round((frac + seconds) * 1000));
  const ms = t.getUTCMilliseconds();
  return `${t.getUTCFullYear()}-${pad(t.getUTCMonth() + 1)}-${pad(t.getUTCDate())}T${pad(t.getUTCHours())}:${pad(t.getUTCMinutes())}:${pad(t.getUTCSeconds())}${ms ? `.${pad(ms, 3)}` : ''}${m[8] ?? ''}`;
}
