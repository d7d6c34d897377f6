/**
 * The garbage-collection observer of the allocation tests (allocation.test.ts,
 * powerAllocation.test.ts): minor collections by start time on the performance clock
 * (node:perf_hooks 'gc' entries; --expose-gc is not needed), and a way to prove that this
 * environment reports them at all, without which an allocation check could not fail.
 */
import { PerformanceObserver, constants } from 'node:perf_hooks';
import { afterAll } from 'vitest';

export const settle = (ms: number): Promise<unknown> => new Promise((r) => setTimeout(r, ms));

/** Start observing for the calling test file; disconnected after all its tests. */
export function watchMinorGc(): { minor: number[]; entries: () => number; makeGarbage: () => Promise<{ before: number; held: unknown[] }> } {
  const minor: number[] = [];
  let entries = 0;
  const observer = new PerformanceObserver((list) => {
    for (const e of list.getEntries()) {
      entries++;
      if ((e as unknown as { detail?: { kind?: number } }).detail?.kind === constants.NODE_PERFORMANCE_GC_MINOR) minor.push(e.startTime);
    }
  });
  observer.observe({ entryTypes: ['gc'] });
  afterAll(() => observer.disconnect());
  /** make garbage until the young generation fills (at most 20 rounds): a minor collection should follow */
  const makeGarbage = async (): Promise<{ before: number; held: unknown[] }> => {
    const before = minor.length;
    const held: unknown[] = [];
    for (let round = 0; round < 20 && minor.length === before; round++) {
      for (let i = 0; i < 200_000; i++) held[i & 1023] = [i, { i }];
      await settle(20);
    }
    return { before, held };
  };
  return { minor, entries: () => entries, makeGarbage };
}
