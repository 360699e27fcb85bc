/** `movesift decide`: scripted decisions go to the append-only log with source "command". */
import path from 'node:path';
import Database from 'better-sqlite3';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';
import type { Report } from '../../src/pipeline/report.js';

describe('movesift decide', () => {
  const ledger = path.join(tempDir('movesift-decide-'), 'd.ledger');
  let before: Report;
  beforeAll(() => {
    expect(runCli(['scan', 'sample-media/ridge-trail', '--ledger', ledger]).code).toBe(0);
    before = JSON.parse(runCli(['report', ledger]).stdout);
  });

  it('sets aside the events matching the filters and says nothing was moved', () => {
    const blanks = before.events.filter((e) => e.verdict === 'likely-blank');
    expect(blanks.length).toBeGreaterThan(0);
    const r = runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank', '--who', 'ci']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toContain(`Set aside ${blanks.length} event(s); ${blanks.length} changed decision. Nothing was moved`);
    const after = JSON.parse(runCli(['report', ledger]).stdout) as Report;
    for (const e of after.events) expect(e.decision).toBe(e.verdict === 'likely-blank' ? 'set-aside' : null);
  });

  it('combines filters, keeps one event by id, and logs source, who and the screener snapshot', () => {
    const target = before.events.find((e) => e.verdict === 'likely-blank')!;
    const r = runCli(['decide', ledger, '--keep', '--event', target.id, '--deployment', 'ridge-trail', '--who', 'ci']);
    expect(r.stdout).toContain('Kept 1 event(s); 1 changed decision.');
    const db = new Database(ledger, { readonly: true });
    const last = db.prepare('SELECT event_id, decision, source, who, verdict, score FROM decisions ORDER BY id DESC LIMIT 1').get();
    db.close();
    expect(last).toEqual({ event_id: target.id, decision: 'keep', source: 'command', who: 'ci', verdict: 'likely-blank', score: expect.closeTo(target.score, 3) });
    const noMatch = runCli(['decide', ledger, '--keep', '--score-below', '0']);
    expect(noMatch.stdout).toContain('No event matches; nothing recorded.');
  });

  it('refuses to decide without a filter or with both decisions (exit 2)', () => {
    expect(runCli(['decide', ledger, '--set-aside']).stderr).toMatch(/at least one filter/);
    expect(runCli(['decide', ledger, '--set-aside', '--keep', '--verdict', 'motion']).code).toBe(2);
    expect(runCli(['decide', ledger, '--keep', '--verdict', 'empty']).code).toBe(2);
    expect(runCli(['decide', '--help']).stdout).toMatch(/^Usage: movesift decide/);
  });
});
