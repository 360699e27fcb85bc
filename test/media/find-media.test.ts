/** Discovery: what is media, what is skipped, symlink loops, relative paths. */
import { mkdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { execFileSync } from 'node:child_process';

const mkfifoSync = (p: string): void => void execFileSync('mkfifo', [p]);
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { findMedia } from '../../src/media/find-media.js';
import { tempDir } from '../helpers/cli.js';

describe('findMedia', () => {
  it('finds images and videos by extension, skips hidden and system files, survives link loops', async () => {
    const d = tempDir('movesift-find-');
    mkdirSync(path.join(d, 'cam/a'), { recursive: true });
    mkdirSync(path.join(d, '.Trashes'));
    mkdirSync(path.join(d, 'cache'));
    for (const f of ['cam/a/IMG_1.JPG', 'cam/a/b.jpeg', 'cam/c.PNG', 'cam/d.tif', 'cam/e.webp', 'v/clip.MP4', 'v/x.mov', 'v/y.avi', 'v/z.mkv', 'v/m.m4v', 'v/n.MTS', 'cam/notes.txt', 'cam/._IMG_1.JPG', 'cam/.hidden.jpg', 'cam/Thumbs.db', '.Trashes/t.jpg', 'cache/p.webp']) {
      mkdirSync(path.dirname(path.join(d, f)), { recursive: true });
      writeFileSync(path.join(d, f), 'x');
    }
    symlinkSync(d, path.join(d, 'cam/a/up')); // a loop back to the root
    symlinkSync(path.join(d, 'missing'), path.join(d, 'cam/dangling.jpg'));
    mkfifoSync(path.join(d, 'cam/pipe.JPG'));
    mkdirSync(path.join(d, 'cam/folder.JPG'));
    symlinkSync('loop2.jpg', path.join(d, 'cam/loop1.jpg'));
    symlinkSync('loop1.jpg', path.join(d, 'cam/loop2.jpg'));
    const { files: found, skipped } = await findMedia(d, [path.join(d, 'cache')]);
    expect(found.map((f) => `${f.kind}:${f.rel}`).sort()).toEqual(
      ['image:cam/a/IMG_1.JPG', 'image:cam/a/b.jpeg', 'image:cam/c.PNG', 'image:cam/d.tif', 'image:cam/e.webp', 'video:v/clip.MP4', 'video:v/m.m4v', 'video:v/n.MTS', 'video:v/x.mov', 'video:v/y.avi', 'video:v/z.mkv'].sort(),
    );
    expect(found.find((f) => f.rel === 'cam/a/b.jpeg')!.folder).toBe('cam/a');
    // Every other entry is accounted for once, with its reason.
    expect(skipped.map((x) => `${x.reason}:${x.rel}`).sort()).toEqual(
      [
        'hidden-or-system:.Trashes', 'hidden-or-system:cam/._IMG_1.JPG', 'hidden-or-system:cam/.hidden.jpg', 'hidden-or-system:cam/Thumbs.db',
        'ledger-files:cache', 'folder-already-scanned:cam/a/up', 'not-media:cam/notes.txt', 'broken-link:cam/dangling.jpg',
        'broken-link:cam/loop1.jpg', 'broken-link:cam/loop2.jpg', 'not-a-regular-file:cam/pipe.JPG',
      ].sort(),
    );
  });
  it('throws E_FOLDER_MISSING for a missing root or a file', async () => {
    await expect(findMedia('/no/such/place')).rejects.toMatchObject({ code: 'E_FOLDER_MISSING' });
    const d = tempDir();
    writeFileSync(path.join(d, 'f'), 'x');
    await expect(findMedia(path.join(d, 'f'))).rejects.toMatchObject({ code: 'E_FOLDER_MISSING' });
  });
});
