/**
 * A counting semaphore: at most `size` pieces of work run at once, the rest wait their turn in
 * arrival order. Used process-wide for CPU- and memory-heavy steps (decoding images, drawing
 * PDF pages), so many requests at once queue instead of multiplying the server's memory.
 */
export interface Slots {
  run<T>(work: () => Promise<T>): Promise<T>;
  /** Running now, and waiting (for tests and logs). */
  readonly running: number;
  readonly waiting: number;
}

export function createSlots(size: number): Slots {
  let running = 0;
  const queue: Array<() => void> = [];
  return {
    async run<T>(work: () => Promise<T>): Promise<T> {
      if (running >= size) await new Promise<void>((resolve) => queue.push(resolve));
      else running += 1;
      try {
        return await work();
      } finally {
        // Hand the slot straight to the next in line (running stays the same), or free it.
        const next = queue.shift();
        if (next) next();
        else running -= 1;
      }
    },
    get running() {
      return running;
    },
    get waiting() {
      return queue.length;
    },
  };
}
