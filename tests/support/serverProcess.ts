/**
 * The test app in a child process of its own (tests/support/serverProcessMain.ts), for a test that
 * measures the server's memory: jest's own process holds every test file run before (--runInBand),
 * so its heap is large and a full collection there takes seconds; the child's is the server's alone.
 */
import { fork, type ChildProcess } from 'node:child_process';
import path from 'node:path';

export interface MemorySample {
  rss: number;
  heap: number;
}

export interface ServerProcess {
  url: string;
  /** Starts sampling memory every second (after a full collection each time). */
  startSampling(): Promise<void>;
  /** Stops sampling and hands back every sample, the first taken at the start. */
  stopSampling(): Promise<MemorySample[]>;
  close(): Promise<void>;
}

export async function startServerProcess(): Promise<ServerProcess> {
  const child: ChildProcess = fork(path.join(__dirname, 'serverProcessMain.ts'), [], {
    execArgv: ['--expose-gc', '--import', 'tsx'],
    env: process.env,
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
  });
  const answer = <T extends object>(done: string) =>
    new Promise<T>((resolve, reject) => {
      const onMessage = (message: { done?: string }) => {
        if (message.done !== done) return;
        child.off('exit', onExit);
        child.off('message', onMessage);
        resolve(message as T);
      };
      const onExit = (code: number | null) => reject(new Error(`the server process ended (exit ${code}) before "${done}"`));
      child.on('message', onMessage);
      child.once('exit', onExit);
    });
  const ask = <T extends object>(what: string) => {
    const waiting = answer<T>(what);
    child.send({ do: what });
    return waiting;
  };
  const { url } = await answer<{ url: string }>('listening');
  return {
    url,
    startSampling: async () => void (await ask('sample-start')),
    stopSampling: async () => (await ask<{ samples: MemorySample[] }>('sample-stop')).samples,
    close: async () => {
      if (child.exitCode !== null) return;
      const ended = new Promise<void>((resolve) => child.once('exit', () => resolve()));
      await ask('close');
      await ended;
    },
  };
}
