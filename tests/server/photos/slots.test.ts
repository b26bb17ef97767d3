/**
 * The decode slots (server/services/slots.ts): at most `size` pieces of work at once, the rest
 * wait in arrival order, and a failure frees its slot.
 */
import { createSlots } from '../../../server/services/slots';

function gate() {
  let open!: () => void;
  let fail!: (err: Error) => void;
  const promise = new Promise<void>((resolve, reject) => {
    open = resolve;
    fail = reject;
  });
  return { promise, open, fail };
}

/** Lets every pending promise callback run. */
const settle = () => new Promise((resolve) => setImmediate(resolve));

it('runs at most `size` at once, starts the waiting ones in arrival order, and frees a slot on failure', async () => {
  const slots = createSlots(2);
  const gates = Array.from({ length: 5 }, gate);
  const started: number[] = [];
  const runs = gates.map((g, i) =>
    slots.run(async () => {
      started.push(i);
      await g.promise;
      return i;
    }),
  );
  await settle();
  expect(started).toEqual([0, 1]);
  expect([slots.running, slots.waiting]).toEqual([2, 3]);

  gates[1]!.fail(new Error('decoder failed'));
  await expect(runs[1]).rejects.toThrow('decoder failed');
  await settle();
  expect(started).toEqual([0, 1, 2]);
  expect([slots.running, slots.waiting]).toEqual([2, 2]);

  gates[0]!.open();
  gates[2]!.open();
  await settle();
  expect(started).toEqual([0, 1, 2, 3, 4]);
  expect([slots.running, slots.waiting]).toEqual([2, 0]);
  gates[3]!.open();
  gates[4]!.open();
  expect(await Promise.all([runs[0], runs[2], runs[3], runs[4]])).toEqual([0, 2, 3, 4]);
  expect([slots.running, slots.waiting]).toEqual([0, 0]);
});
