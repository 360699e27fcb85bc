/**
 * A server-sent event stream (the WHATWG HTML "text/event-stream" format: `data:` lines, a
 * blank line per event, `:` comments as keep-alives) fed by a subscription. Cancelling the body
 * (the client went away) unsubscribes.
 */
const KEEPALIVE_MS = 15_000;

export function eventStream<T>(first: T | null, subscribe: (send: (v: T) => void) => () => void): Response {
  const enc = new TextEncoder();
  let stop = (): void => {};
  const body = new ReadableStream<Uint8Array>({
    start(c) {
      const send = (v: T): void => {
        try {
          c.enqueue(enc.encode(`data: ${JSON.stringify(v)}\n\n`));
        } catch {
          stop();
        }
      };
      c.enqueue(enc.encode(': movesift scan progress\n\n'));
      if (first !== null) send(first);
      const unsubscribe = subscribe(send);
      const ping = setInterval(() => {
        try {
          c.enqueue(enc.encode(': keep-alive\n\n'));
        } catch {
          stop();
        }
      }, KEEPALIVE_MS);
      stop = () => {
        clearInterval(ping);
        unsubscribe();
      };
    },
    cancel() {
      stop();
    },
  });
  return new Response(body, { headers: { 'content-type': 'text/event-stream; charset=utf-8', 'cache-control': 'no-store', 'x-accel-buffering': 'no' } });
}
