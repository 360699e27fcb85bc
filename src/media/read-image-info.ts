/**
 * What a scan needs to know of an image before decoding it: dimensions, format, orientation,
 * capture time and camera. EXIF through exifr (raw strings, no time-zone guessing); the time
 * falls back from DateTimeOriginal to DateTimeDigitized to IFD0 DateTime, then to the file time,
 * and the source is recorded either way.
 */
import exifr from 'exifr';
import sharp from 'sharp';
import { fileTime, parseExifDateTime, TimeSource, type CaptureTime } from './capture-time.js';
import { MediaErrorCode, mediaError, type MediaError } from './media-errors.js';

export interface Camera {
  make?: string;
  model?: string;
  serial?: string;
}

export interface ImageInfo {
  width: number;
  height: number;
  format: string;
  capture: CaptureTime;
  camera: Camera;
}

type Tags = Record<string, unknown>;

const text = (v: unknown): string | undefined => (typeof v === 'string' && v.trim() ? v.replace(/\0+$/, '').trim() : typeof v === 'number' ? String(v) : undefined);

export function captureFromTags(tags: Tags | undefined, mtimeMs: number): CaptureTime {
  if (tags) {
    const t =
      parseExifDateTime(tags.DateTimeOriginal, tags.SubSecTimeOriginal, tags.OffsetTimeOriginal, TimeSource.exifOriginal) ??
      parseExifDateTime(tags.CreateDate, tags.SubSecTimeDigitized, tags.OffsetTimeDigitized, TimeSource.exifDigitized) ??
      parseExifDateTime(tags.ModifyDate, tags.SubSecTime, tags.OffsetTime, TimeSource.exifModified);
    if (t) return t;
  }
  return fileTime(mtimeMs);
}

/** Maps a sharp/libvips failure to a stable code. */
export function decodeError(file: string, e: unknown): MediaError {
  const msg = String((e as Error)?.message ?? e);
  if (/premature end|truncated|unexpected end|end of (file|stream)|short read|not enough data|treated as error due to failOn/i.test(msg)) {
    return mediaError(MediaErrorCode.truncated, `${file}: the image is cut short or damaged (an interrupted copy or a full card); copy it again from the card if you still have it`);
  }
  if (/unsupported image format|input file contains unsupported|bad seek|not a known file format|is not in a known format/i.test(msg)) {
    return mediaError(MediaErrorCode.notMedia, `${file}: not a readable image despite its name`);
  }
  return mediaError(MediaErrorCode.decodeFailed, `${file}: could not be decoded (${msg.split('\n')[0]})`);
}

export async function readImageInfo(abs: string, display: string, mtimeMs: number): Promise<ImageInfo> {
  let meta;
  try {
    meta = await sharp(abs).metadata();
  } catch (e) {
    throw decodeError(display, e);
  }
  if (!meta.width || !meta.height) throw mediaError(MediaErrorCode.notMedia, `${display}: has no image dimensions`);
  let tags: Tags | undefined;
  try {
    tags = (await exifr.parse(abs, { tiff: true, exif: true, gps: false, xmp: false, icc: false, iptc: false, jfif: false, ihdr: false, reviveValues: false, translateValues: false, mergeOutput: true })) as Tags | undefined;
  } catch {
    tags = undefined; // unreadable EXIF is not a bad image: fall back to the file time
  }
  const swap = (meta.orientation ?? 1) >= 5;
  return {
    width: swap ? meta.height : meta.width,
    height: swap ? meta.width : meta.height,
    format: meta.format ?? 'unknown',
    capture: captureFromTags(tags, mtimeMs),
    camera: { make: text(tags?.Make), model: text(tags?.Model), serial: text(tags?.BodySerialNumber) ?? text(tags?.SerialNumber) },
  };
}
