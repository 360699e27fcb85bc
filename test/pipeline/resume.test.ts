/**
 * Crash safety: a scan killed with SIGKILL part-way through, then rerun, gives the same report
 * as one uninterrupted scan: nothing counted twice, nothing lost (DESIGN.md, "Non-negotiables").
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, startCli, tempDir } from '../helpers/cli.js';
import Database from 'better-sqlite3';

describe('a scan killed mid-way', () => {
  it('resumes to the same report as an uninterrupted scan', async () => {
    const d = tempDir('movesift-kill-');
    const whole = path.join(d, 'whole.ledger');
    const killed = path.join(d, 'killed.ledger');
    expect(runCli(['scan', 'sample-media', '--ledger', whole]).code).toBe(0);

    const child = startCli(['scan', 'sample-media', '--ledger', killed, '--json-progress']);
    let analysed = 0;
    await new Promise<void>((resolve) => {
      let buf = '';
      child.stdout.on('data', (c: Buffer) => {
        buf += c.toString();
        const lines = buf.split('\n');
        buf = lines.pop()!;
        for (const l of lines) {
          const p = JSON.parse(l);
          if (p.type === 'progress' && p.phase === 'analyse') analysed = p.done;
          if (analysed >= 6 && !child.killed) {
            child.kill('SIGKILL');
            resolve();
          }
        }
      });
      child.on('exit', () => resolve());
    });
    await new Promise((r) => child.once('exit', r).once('close', r));
    expect(child.signalCode).toBe('SIGKILL');
    // What the killed run committed is whole: some events screened, none twice.
    const db = new Database(killed, { readonly: true });
    const n = (db.prepare('SELECT count(*) AS n FROM analyses').get() as { n: number }).n;
    const dup = (db.prepare('SELECT count(*) AS n FROM (SELECT event_id FROM analyses GROUP BY event_id HAVING count(*) > 1)').get() as { n: number }).n;
    db.close();
    expect(n).toBeGreaterThanOrEqual(5);
    expect(n).toBeLessThan(25);
    expect(dup).toBe(0);

    const resumed = runCli(['scan', 'sample-media', '--ledger', killed]);
    expect(resumed.code).toBe(0);
    expect(resumed.stdout).toMatch(new RegExp(`\\(${25 - n} screened now, ${n} unchanged and skipped\\)`));
    expect(JSON.parse(runCli(['report', killed]).stdout)).toEqual(JSON.parse(runCli(['report', whole]).stdout));
  });

  it('stops cleanly on Ctrl-C (SIGINT) with exit 1, and a rerun completes', async () => {
    const ledger = path.join(tempDir('movesift-int-'), 'int.ledger');
    const child = startCli(['scan', 'sample-media', '--ledger', ledger, '--json-progress']);
    await new Promise<void>((resolve) => {
      child.stdout.on('data', (c: Buffer) => {
        if (c.toString().includes('"phase":"analyse","done":3')) {
          child.kill('SIGINT');
          resolve();
        }
      });
    });
    const code = await new Promise<number | null>((r) => child.once('exit', (c) => r(c)));
    expect(code).toBe(1);
    const db = new Database(ledger, { readonly: true });
    const status = (db.prepare('SELECT status FROM scans ORDER BY id DESC LIMIT 1').get() as { status: string }).status;
    const n = (db.prepare('SELECT count(*) AS n FROM analyses').get() as { n: number }).n;
    db.close();
    expect(status).toBe('stopped');
    expect(n).toBeGreaterThanOrEqual(3);
    expect(n).toBeLessThan(25);
    const again = runCli(['scan', 'sample-media', '--ledger', ledger]);
    expect(again.stdout).toContain(`(${25 - n} screened now, ${n} unchanged and skipped)`);
  });
});
