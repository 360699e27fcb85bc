/**
 * Error catalogue of the media layer: finding, reading and decoding files. Each code names what
 * a person can check; the message says which file and what to do.
 */
import { MovesiftError } from '../shared/errors.js';

export const MediaErrorCode = {
  emptyFile: 'E_MEDIA_EMPTY',
  truncated: 'E_MEDIA_TRUNCATED',
  notMedia: 'E_MEDIA_NOT_MEDIA',
  unreadable: 'E_MEDIA_UNREADABLE',
  vanished: 'E_MEDIA_VANISHED',
  decodeFailed: 'E_MEDIA_DECODE_FAILED',
  videoProbe: 'E_VIDEO_PROBE_FAILED',
  videoDecode: 'E_VIDEO_DECODE_FAILED',
  videoShort: 'E_VIDEO_SHORT',
  ffmpegMissing: 'E_FFMPEG_MISSING',
  folderMissing: 'E_FOLDER_MISSING',
} as const;

export type MediaErrorCodeValue = (typeof MediaErrorCode)[keyof typeof MediaErrorCode];

export type MediaError = MovesiftError<MediaErrorCodeValue>;

export const mediaError = (code: MediaErrorCodeValue, message: string): MediaError => new MovesiftError(code, message);

/** Maps a Node file-system error on `file` to a media error (ENOENT: vanished; EACCES: unreadable). */
export function fromFsError(file: string, e: unknown): MediaError {
  const code = (e as NodeJS.ErrnoException)?.code;
  if (code === 'ENOENT') return mediaError(MediaErrorCode.vanished, `${file}: the file disappeared during the scan (moved or deleted by something else)`);
  if (code === 'EACCES' || code === 'EPERM') return mediaError(MediaErrorCode.unreadable, `${file}: permission denied; give the scanning user read access`);
  if (code === 'EISDIR') return mediaError(MediaErrorCode.notMedia, `${file}: is a folder, not a media file`);
  return mediaError(MediaErrorCode.unreadable, `${file}: could not be read (${code ?? String(e)})`);
}
