/** `movesift review [<ledger>]`: the review app in a browser, served on 127.0.0.1 only. */
import { spawn } from 'node:child_process';
import { parse, numberFlag } from './args.js';
import { ExitCode } from './cli-errors.js';
import { ensureRenderer } from './renderer-build.js';
import { createHandler } from '../api/handler.js';
import { startLoopbackServer } from '../api/loopback-server.js';

export const REVIEW_HELP = `Usage: movesift review [<ledger>] [options]

Opens the review app in your browser: a keyboard-driven grid of the ledger's events, one event
at a time with its frames or its clip, and decisions recorded in the ledger. Without a ledger
it starts on the screen that opens one or scans folders. Press ? in the app for every key.

What the app can do to files: it records decisions in the ledger; it moves (or copies) the files
of set-aside events into a folder you name and puts them back (apply and undo, each asked for
with a button and a question first); it writes exports and clips into folders you name, never
over the ledger or a scanned file. It never deletes a photo or a clip.

The server listens on 127.0.0.1 only, on a random port, and answers only the address it prints.
That address carries a secret good once: the browser that opens it is signed in, and the address
opens nothing afterwards. Requests that change anything are taken only from the app's own page.

Options:
  --port <n>     port to listen on                       default: a free one
  --no-open      print the address but do not open a browser
  -h, --help     this text

Stop with Ctrl-C; a scan started from the app stops after its current event.`;

function openBrowser(url: string): void {
  const [cmd, args] = process.platform === 'darwin' ? ['open', [url]] : process.platform === 'win32' ? ['cmd', ['/c', 'start', '', url]] : ['xdg-open', [url]];
  const child = spawn(cmd, args as string[], { stdio: 'ignore', detached: true });
  child.on('error', () => console.error(`Could not open a browser (${cmd}); open the address above yourself.`));
  child.unref();
}

export async function reviewCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parse<{ port?: string; 'no-open'?: boolean }>(argv, { port: { type: 'string' }, 'no-open': { type: 'boolean' } }, 'review');
  if (values.help) {
    console.log(REVIEW_HELP);
    return ExitCode.done;
  }
  const port = numberFlag('port', values.port, 0, 65535, true);
  const rendererDir = ensureRenderer((s) => console.error(s));
  const handler = createHandler({ ledger: positionals[0], rendererDir });
  const server = await startLoopbackServer((r) => handler.handle(r), { port });
  console.log(`Movesift review is at ${server.url}`);
  console.log('Keep this address to yourself: it carries the secret that lets a browser in. Ctrl-C stops.');
  if (!values['no-open']) openBrowser(server.url);
  await new Promise<void>((resolve) => {
    const stop = (): void => {
      process.off('SIGINT', stop);
      process.off('SIGTERM', stop);
      resolve();
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
  console.error('Stopping...');
  await server.close();
  await handler.close();
  return ExitCode.done;
}
