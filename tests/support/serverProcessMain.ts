/**
 * The child side of startServerProcess (tests/support/serverProcess.ts): the test app served on
 * loopback in a process of its own, started with --expose-gc, sampling its own memory on request.
 */
import { buildTestApp, listenOnLoopback } from './app';
import { connectTestDb } from './db';

interface Sample {
  rss: number;
  heap: number;
}
type Ask = { do: 'sample-start' } | { do: 'sample-stop' } | { do: 'close' };

async function main() {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (!gc) throw new Error('start this process with --expose-gc');
  const db = await connectTestDb();
  const trimout = buildTestApp(db);
  const listening = await listenOnLoopback(trimout.app);
  const send = (message: object) => process.send?.(message);
  const samples: Sample[] = [];
  let timer: NodeJS.Timeout | undefined;
  // A full collection first, so a sample is memory still held, not garbage not yet collected.
  const sample = () => {
    gc();
    const m = process.memoryUsage();
    samples.push({ rss: m.rss, heap: m.heapUsed });
  };
  process.on('message', (ask: Ask) => {
    if (ask.do === 'sample-start') {
      samples.length = 0;
      sample();
      timer = setInterval(sample, 1000);
      send({ done: ask.do });
    } else if (ask.do === 'sample-stop') {
      clearInterval(timer);
      sample();
      send({ done: ask.do, samples });
    } else if (ask.do === 'close') {
      void (async () => {
        await listening.close();
        await trimout.close();
        await db.close();
        send({ done: ask.do });
        process.disconnect();
      })();
    }
  });
  send({ done: 'listening', url: listening.url });
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
