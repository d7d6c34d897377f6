/**
 * Reading an input file (a case file, a prescription) safely: only a regular file, its size checked before
 * a byte is read, and never more than the cap read. A device (/dev/zero), a FIFO, a socket
 * or a folder is refused at once, without waiting for a writer or reading without end; a
 * huge file is refused by its size. Errors name the file and say why (InputError).
 */
import { closeSync, constants, fstatSync, openSync, readSync } from 'node:fs';
import { type BinocularCase, MAX_CASE_BYTES } from '../case/caseFile.ts';
import { InputError } from '../case/input.ts';
import { api, fileNames } from './api.ts';
import { oneLine } from './output.ts';

/** A size in words: "300 MB", "12 kB", "5 bytes". */
export function sizeText(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(bytes >= 10 * 1024 * 1024 ? 0 : 1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(bytes >= 10 * 1024 ? 0 : 1)} kB`;
  return `${bytes} bytes`;
}

const READ_REASONS: Record<string, string> = {
  ENOENT: 'no such file',
  EACCES: 'permission denied',
  ENOTDIR: 'a part of the path is not a folder',
  ELOOP: 'too many symbolic links',
  EIO: 'input/output error',
};

function cannotRead(field: string, e: unknown): InputError {
  const code = (e as NodeJS.ErrnoException | null)?.code ?? 'error';
  return new InputError(field, `cannot be read (${code}${READ_REASONS[code] ? `: ${READ_REASONS[code]}` : ''})`);
}

function kindOf(st: ReturnType<typeof fstatSync>): string {
  if (st.isDirectory()) return 'a folder';
  if (st.isFIFO()) return 'a FIFO (named pipe)';
  if (st.isCharacterDevice()) return 'a character device';
  if (st.isBlockDevice()) return 'a block device';
  if (st.isSocket()) return 'a socket';
  return 'not a regular file';
}

/**
 * The bytes of the regular file at `path`, at most `maxBytes` of them; an InputError naming
 * `field` (the file, by default) otherwise, that calls the file `what` ("a case file"). The
 * file is opened without blocking (a FIFO with no writer would otherwise wait for one), then
 * checked with fstat on the open descriptor (so the file checked is the file read).
 */
export function readFileCapped(path: string, maxBytes: number, field = oneLine(path), what = 'a file read here'): Uint8Array {
  let fd: number;
  try {
    fd = openSync(path, constants.O_RDONLY | constants.O_NONBLOCK);
  } catch (e) {
    throw cannotRead(field, e);
  }
  try {
    const st = fstatSync(fd);
    if (!st.isFile()) throw new InputError(field, `is ${kindOf(st)}, not a regular file`);
    const limit = `${what} is at most ${sizeText(maxBytes)}`;
    if (st.size > maxBytes) {
      const size = sizeText(st.size);
      throw new InputError(field, `is ${size === sizeText(maxBytes) ? 'more than ' : ''}${size}; ${limit}`);
    }
    // read up to one byte beyond the cap: the file may have grown since fstat
    const buf = Buffer.allocUnsafe(maxBytes + 1);
    let n = 0;
    for (;;) {
      const got = readSync(fd, buf, n, buf.length - n, null);
      if (got === 0) break;
      n += got;
      if (n > maxBytes) throw new InputError(field, `is larger than ${sizeText(maxBytes)}; ${limit}`);
    }
    return buf.subarray(0, n);
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw cannotRead(field, e);
  } finally {
    closeSync(fd);
  }
}

/** A case file (docs/case-file.md) from disk, read as readFileCapped reads and checked by the library. */
export function loadCaseFile(path: string): BinocularCase {
  const name = oneLine(path);
  return api.openCase(fileNames(name, 'case'), readFileCapped(path, MAX_CASE_BYTES, name, 'a case file'));
}
