/**
 * The app's undo history (src/ui/history.ts): the behaviour docs/visualiser.md promises
 * ("Undo and redo"). The expectations are the usual contract of an undo stack in editing
 * programs (common practice, no source): undo then redo returns to the same state, a new
 * edit after an undo clears redo, the depth is bounded, quick edits of one field are one step.
 */
import { describe, expect, it } from 'vitest';
import { GROUP_MS, History } from '../../src/ui/history.ts';

const same = (a: number, b: number): boolean => a === b;

describe('History', () => {
  it('undoes and redoes in order, and says when it cannot', () => {
    const h = new History<number>(0, same);
    expect(h.canUndo).toBe(false);
    expect(h.undo()).toBeNull();
    h.record(1, 'a', 0);
    h.record(2, 'b', 10);
    expect(h.undo()).toBe(1);
    expect(h.undo()).toBe(0);
    expect(h.undo()).toBeNull();
    expect(h.canRedo).toBe(true);
    expect(h.redo()).toBe(1);
    expect(h.redo()).toBe(2);
    expect(h.redo()).toBeNull();
  });

  it('a new state after an undo clears redo; the same state again is no step', () => {
    const h = new History<number>(0, same);
    h.record(1, null, 0);
    h.undo();
    h.record(0, null, 5000); // the state undo brought back: nothing changes, redo stays
    expect(h.canRedo).toBe(true);
    h.record(5, null, 6000);
    expect(h.canRedo).toBe(false);
    expect(h.undo()).toBe(0);
  });

  it('merges quick edits of one field into one step, but not of two fields or slow ones', () => {
    const h = new History<number>(0, same);
    h.record(1, 'sphere', 0);
    h.record(12, 'sphere', GROUP_MS / 2); // typing "12" after "1"
    expect(h.undo()).toBe(0);
    h.redo();
    h.record(3, 'x', GROUP_MS / 2 + 1);
    expect(h.undo()).toBe(12);
    h.redo();
    h.record(4, 'x', 10 * GROUP_MS);
    expect(h.undo()).toBe(3);
  });

  it('reset starts afresh: nothing to undo or redo', () => {
    const h = new History<number>(0, same);
    h.record(1, null, 0);
    h.record(2, null, 5000);
    h.undo();
    h.reset(7);
    expect(h.canUndo).toBe(false);
    expect(h.canRedo).toBe(false);
    h.record(8, null, 9000);
    expect(h.undo()).toBe(7);
  });

  it('keeps at most its depth of steps back', () => {
    const h = new History<number>(0, same, 5);
    for (let i = 1; i <= 20; i++) h.record(i, null, i * 10 * GROUP_MS);
    let n = 0;
    while (h.undo() !== null) n++;
    expect(n).toBe(5);
    expect(h.redo()).toBe(16);
  });
});
