/** Starts the real `movesift review` command on a ledger and hands back the address it prints. */
import type { ChildProcess } from 'node:child_process';
import { startCli } from './cli.js';

export interface RunningReview {
  url: string;
  origin: string;
  child: ChildProcess;
  stop(): Promise<void>;
}

export function startReview(args: string[]): Promise<RunningReview> {
  const child = startCli(['review', ...args, '--no-open']);
  let out = '';
  let err = '';
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`movesift review printed no address: ${out} ${err}`)), 90_000);
    child.stderr!.on('data', (d) => (err += d));
    child.stdout!.on('data', (d) => {
      out += d;
      const m = /(http:\/\/127\.0\.0\.1:\d+\/\?token=[\w-]+)/.exec(out);
      if (!m) return;
      clearTimeout(timer);
      resolve({
        url: m[1],
        origin: new URL(m[1]).origin,
        child,
        stop: () =>
          new Promise((done) => {
            if (child.exitCode !== null) return done();
            child.once('exit', () => done());
            child.kill('SIGINT');
          }),
      });
    });
    child.once('exit', (code) => reject(new Error(`movesift review exited ${code}: ${err}`)));
  });
}
