// writeFileSafely (src/cli/output.ts), how `--out` writes: a failure part-way through never
// leaves a partial file or destroys the old one. The disk filling up is simulated by making
// the system's write fail with ENOSPC after some bytes went out, as write(2) reports it
// (POSIX write(): "[ENOSPC] There was no free space remaining on the device"); the rename
// into place is atomic within one file system (POSIX rename()), so the old file is either
// kept whole or replaced whole.
import { chmodSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';

const fault = vi.hoisted(() => ({ afterBytes: -1, written: 0 }));

vi.mock('node:fs', async (importOriginal) => {
  const fs = await importOriginal<typeof import('node:fs')>();
  // output.ts calls writeSync(fd, bytes, offset, length)
  const writeSync = ((fd: number, buf: Uint8Array, off: number, len: number) => {
    if (fault.afterBytes >= 0) {
      const room = fault.afterBytes - fault.written;
      if (room <= 0) throw Object.assign(new Error('ENOSPC: no space left on device, write'), { code: 'ENOSPC' });
      len = Math.min(len, room);
    }
    const n = fs.writeSync(fd, buf, off, len);
    fault.written += n;
    return n;
  }) as unknown as typeof fs.writeSync;
  return { ...fs, writeSync, default: { ...fs, writeSync } };
});

const { writeFileSafely, OutputError } = await import('../../src/cli/output.ts');

const dir = mkdtempSync(join(tmpdir(), 'decentra-safewrite-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writeFileSafely on a disk that fills up', () => {
  it('keeps the old file whole, and leaves no temporary file', () => {
    const target = join(dir, 'summary.html');
    writeFileSync(target, 'the old summary');
    fault.afterBytes = 1000;
    fault.written = 0;
    let err: unknown;
    try {
      writeFileSafely(target, 'x'.repeat(100_000));
    } catch (e) {
      err = e;
    } finally {
      fault.afterBytes = -1;
    }
    expect(err).toBeInstanceOf(OutputError);
    expect((err as Error).message).toBe(`--out: cannot write '${target}' (ENOSPC: no space left on the device)`);
    expect(fault.written).toBe(1000); // some bytes did go out before the failure
    expect(readFileSync(target, 'utf8')).toBe('the old summary');
    expect(readdirSync(dir)).toEqual(['summary.html']);
  });

  it('makes no file at all when there was none', () => {
    const target = join(dir, 'new.html');
    fault.afterBytes = 10;
    fault.written = 0;
    expect(() => writeFileSafely(target, 'y'.repeat(5000), '--to')).toThrow(/^--to: cannot write .*\(ENOSPC/);
    fault.afterBytes = -1;
    expect(readdirSync(dir)).toEqual(['summary.html']);
  });

  it('with room, replaces the file whole and keeps its permissions', () => {
    const target = join(dir, 'summary.html');
    writeFileSync(target, 'old');
    chmodSync(target, 0o640);
    writeFileSafely(target, 'new contents');
    expect(readFileSync(target, 'utf8')).toBe('new contents');
    expect(statSync(target).mode & 0o777).toBe(0o640);
    expect(readdirSync(dir)).toEqual(['summary.html']);
  });
});
