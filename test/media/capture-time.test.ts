/**
 * Capture times. Format per EXIF 2.32 / CIPA DC-008-2019 section 4.6.5 ("YYYY:MM:DD HH:MM:SS",
 * SubSecTimeOriginal digits, OffsetTimeOriginal "+HH:MM"). The files here have their EXIF
 * written by a general-purpose library (sharp, i.e. libvips/libexif), not by our own code.
 */
import sharp from 'sharp';
import { writeFileSync, utimesSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseExifDateTime, fileTime, isoPlusSeconds } from '../../src/media/capture-time.js';
import { readImageInfo } from '../../src/media/read-image-info.js';
import { tempDir } from '../helpers/cli.js';

describe('EXIF date-times', () => {
  it('parses the standard form with sub-seconds and offset', () => {
    expect(parseExifDateTime('2025:06:01 10:00:01', '25', '+02:00')).toMatchObject({ iso: '2025-06-01T10:00:01.250+02:00', source: 'exif-original' });
    expect(parseExifDateTime('2025:06:01 10:00:01')!.iso).toBe('2025-06-01T10:00:01');
    expect(parseExifDateTime('2025:06:01 10:00:01', '5')!.sortMs - parseExifDateTime('2025:06:01 10:00:01')!.sortMs).toBe(500);
  });
  it('rejects blank, impossible and malformed values', () => {
    for (const v of ['    :  :     :  :  ', '0000:00:00 00:00:00', '2025:02:31 10:00:00', '2025:13:01 10:00:00', 'yesterday', undefined, 42]) expect(parseExifDateTime(v)).toBeUndefined();
  });
  it('ignores an offset that is not one', () => {
    expect(parseExifDateTime('2025:06:01 10:00:01', undefined, '   :  ')!.iso).toBe('2025-06-01T10:00:01');
  });
  it('keeps the file time with its offset when there is no EXIF', () => {
    const t = fileTime(Date.UTC(2024, 4, 1, 12, 0, 0));
    expect(t.source).toBe('file-time');
    expect(t.iso).toMatch(/^2024-05-01T\d{2}:00:00[+-]\d{2}:\d{2}$/);
  });
});

describe('image info from files written by sharp', () => {
  const dir = tempDir('movesift-exif-');
  it('reads DateTimeOriginal, sub-seconds, offset and camera', async () => {
    const f = path.join(dir, 'with.jpg');
    await sharp({ create: { width: 64, height: 48, channels: 3, background: '#446644' } })
      .jpeg()
      .withExif({ IFD0: { Make: 'Acme Optics', Model: 'Trail 7', DateTime: '2025:06:01 09:59:00' }, IFD2: { DateTimeOriginal: '2025:06:01 10:00:01', SubSecTimeOriginal: '75', OffsetTimeOriginal: '-03:00', BodySerialNumber: 'SN-0042' } })
      .toFile(f);
    const info = await readImageInfo(f, 'with.jpg', 0);
    expect(info).toMatchObject({ width: 64, height: 48, format: 'jpeg', capture: { iso: '2025-06-01T10:00:01.750-03:00', source: 'exif-original' }, camera: { make: 'Acme Optics', model: 'Trail 7', serial: 'SN-0042' } });
  });
  it('falls back to IFD0 DateTime, then to the file time', async () => {
    const a = path.join(dir, 'ifd0.jpg');
    await sharp({ create: { width: 32, height: 32, channels: 3, background: '#000' } }).jpeg().withExif({ IFD0: { DateTime: '2021:04:11 20:43:09' } }).toFile(a);
    expect((await readImageInfo(a, 'ifd0.jpg', 0)).capture).toMatchObject({ iso: '2021-04-11T20:43:09', source: 'exif-datetime' });
    const b = path.join(dir, 'none.png');
    writeFileSync(b, await sharp({ create: { width: 32, height: 32, channels: 3, background: '#000' } }).png().toBuffer());
    const ms = Date.UTC(2023, 0, 2, 3, 4, 5);
    utimesSync(b, ms / 1000, ms / 1000);
    expect((await readImageInfo(b, 'none.png', ms)).capture.source).toBe('file-time');
  });
  it('swaps dimensions for a rotated orientation', async () => {
    const f = path.join(dir, 'rot.jpg');
    await sharp({ create: { width: 60, height: 40, channels: 3, background: '#888' } }).jpeg().withMetadata({ orientation: 6 }).toFile(f);
    expect(await readImageInfo(f, 'rot.jpg', 0)).toMatchObject({ width: 40, height: 60 });
  });
});

describe('isoPlusSeconds', () => {
  it('adds seconds in the same form: offset kept, a local reading stays local, milliseconds only when there are any', () => {
    expect(isoPlusSeconds('2025-06-02T09:30:00Z', 24)).toBe('2025-06-02T09:30:24Z');
    expect(isoPlusSeconds('2025-06-01T23:59:50', 12.5)).toBe('2025-06-02T00:00:02.500');
    expect(isoPlusSeconds('2024-02-28T23:59:59.250+02:00', 0.75)).toBe('2024-02-29T00:00:00+02:00');
    expect(isoPlusSeconds('2025:06:01 10:00:00', 1)).toBeUndefined();
  });
});
