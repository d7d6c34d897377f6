/**
 * Where the CLI's output goes, and what happens when it cannot go there.
 *
 * - `StreamSink` writes to stdout (or any writable stream) and turns a failed write into one
 *   `OutputError` (EPIPE when the reader has gone, as with `| head -1`; ENOSPC on a full disk;
 *   EACCES, ...), never an unhandled 'error' event with a stack trace. It waits for 'drain'
 *   when the stream asks it to, so a slow reader bounds the memory of a long table.
 * - `writeFileSafely` is how `--out` writes: a temporary file in the same folder, renamed
 *   into place, so a failure leaves neither a partial file nor a destroyed old one.
 * - `oneLine` shows text from people (flag values, file names) on one line with control
 *   characters escaped, so an error message is one line and cannot drive the terminal.
 *
 * Exit statuses are in docs/cli.md: 0 done, 1 stdout could not be written, 2 bad input (a
 * file named by a flag that cannot be written included, as any bad flag value), 141
 * (128 + SIGPIPE, as Unix tools end) the reader closed the pipe.
 */
import { closeSync, constants, fstatSync, fsyncSync, openSync, realpathSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../case/input.ts';

/** Status when the reader of stdout has gone (a shell reports a SIGPIPE death as 128 + 13). */
export const EXIT_PIPE = 141;
/** Status when stdout could not be written (full disk, no permission, ...). */
export const EXIT_OUTPUT = 1;

/**
 * A write that failed; `code` is the system's (EPIPE, ENOSPC, EACCES, ...). It is an
 * InputError naming the flag that named the file ("--out: cannot write 'x.html' (ENOSPC:
 * no space left on the device)"), or "stdout" for standard output.
 */
export class OutputError extends InputError {
  constructor(field: string, readonly code: string, path?: string) {
    const why = REASONS[code];
    super(field, `cannot ${path === undefined ? 'be written' : `write '${oneLine(path)}'`} (${code}${why ? `: ${why}` : ''})`);
    this.name = 'OutputError';
  }
}

const REASONS: Record<string, string> = {
  EPIPE: 'the reader closed the pipe',
  ENOSPC: 'no space left on the device',
  EDQUOT: 'disk quota exceeded',
  EACCES: 'permission denied',
  EPERM: 'operation not permitted',
  EROFS: 'read-only file system',
  EISDIR: 'it is a folder',
  ENOENT: 'no such folder',
  ENOTDIR: 'a part of the path is not a folder',
  EIO: 'input/output error',
  EFBIG: 'file too large',
};

/** An OutputError from whatever a failed write threw. */
export function outputError(field: string, e: unknown, path?: string): OutputError {
  return new OutputError(field, (e as NodeJS.ErrnoException | null)?.code ?? 'error', path);
}

/** Something the CLI writes text or bytes to, in order. A returned promise means: wait. */
export interface Sink {
  write(chunk: string | Uint8Array): void | Promise<void>;
}

/** A sink that keeps everything (for tests and for callers that want the whole text). */
export class StringSink implements Sink {
  private readonly parts: string[] = [];
  private readonly decoder = new TextDecoder();
  write(chunk: string | Uint8Array): void {
    this.parts.push(typeof chunk === 'string' ? chunk : this.decoder.decode(chunk, { stream: true }));
  }
  text(): string {
    return this.parts.join('') + this.decoder.decode();
  }
}

/**
 * A writable stream as a sink. The first failure is kept: that write (or the next) rejects
 * with an OutputError, and every later write rejects with the same error.
 */
export class StreamSink implements Sink {
  private failure: OutputError | null = null;
  private waiting: { resolve: () => void; reject: (e: OutputError) => void } | null = null;

  constructor(private readonly stream: NodeJS.WritableStream, private readonly target = 'stdout') {
    stream.on('error', (e) => this.fail(outputError(this.target, e)));
    stream.on('drain', () => {
      const w = this.waiting;
      this.waiting = null;
      w?.resolve();
    });
  }

  private fail(e: OutputError): void {
    if (!this.failure) this.failure = e;
    const w = this.waiting;
    this.waiting = null;
    w?.reject(this.failure);
  }

  get failed(): OutputError | null {
    return this.failure;
  }

  write(chunk: string | Uint8Array): void | Promise<void> {
    if (this.failure) return Promise.reject(this.failure);
    let more: boolean;
    try {
      more = this.stream.write(chunk);
    } catch (e) {
      // a file or a blocking pipe can fail inside write() itself
      this.fail(outputError(this.target, e));
      return Promise.reject(this.failure!);
    }
    if (more) return;
    return new Promise<void>((resolve, reject) => {
      if (this.failure) reject(this.failure);
      else this.waiting = { resolve, reject };
    });
  }

  /** Resolves when everything written so far has been handed to the system. */
  end(): Promise<void> {
    if (this.failure) return Promise.reject(this.failure);
    return new Promise<void>((resolve, reject) => {
      // an empty write's callback runs after the writes queued before it
      this.stream.write('', (e) => {
        if (e) this.fail(outputError(this.target, e));
        if (this.failure) reject(this.failure);
        else resolve();
      });
    });
  }
}

/**
 * Writes `data` to `path` without ever leaving a partial file or destroying the old one: the
 * bytes go to a new temporary file in the same folder, are flushed to the disk, and the file
 * is renamed over `path` (a rename within one file system is atomic on POSIX). On a failure
 * the temporary file is removed and the old file, if any, is untouched.
 *
 * A path that already exists and is not a regular file (a device such as /dev/stdout or
 * /dev/full, a FIFO) is written directly: renaming a file over a device would replace it.
 * A symbolic link is followed: the file it points to is replaced, the link is kept.
 */
export function writeFileSafely(path: string, data: string | Uint8Array, flag = '--out'): void {
  let real = path;
  let mode = 0o666;
  let existing: ReturnType<typeof statSync> | undefined;
  try {
    existing = statSync(path);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw outputError(flag, e, path);
  }
  if (existing) {
    if (existing.isDirectory()) throw new OutputError(flag, 'EISDIR', path);
    if (!existing.isFile()) {
      writeDirect(path, data, flag);
      return;
    }
    real = realpathSync(path);
    mode = Number(existing.mode) & 0o7777;
  }
  const tmp = join(dirname(real), `.${basename(real)}.${process.pid}.${Date.now().toString(36)}.tmp`);
  let fd: number | null = null;
  try {
    fd = openSync(tmp, constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL, mode);
    writeAll(fd, data);
    fsyncSync(fd);
    closeSync(fd);
    fd = null;
    renameSync(tmp, real);
  } catch (e) {
    if (fd !== null) try { closeSync(fd); } catch { /* already failing */ }
    try { unlinkSync(tmp); } catch { /* it may never have been made */ }
    throw outputError(flag, e, path);
  }
}

function writeDirect(path: string, data: string | Uint8Array, flag: string): void {
  let fd: number | null = null;
  try {
    fd = openSync(path, constants.O_WRONLY | constants.O_NONBLOCK);
    // a FIFO needs blocking writes once it has a reader; a device does not mind either way
    if (fstatSync(fd).isFIFO()) {
      closeSync(fd);
      fd = openSync(path, constants.O_WRONLY);
    }
    writeAll(fd, data);
    closeSync(fd);
    fd = null;
  } catch (e) {
    if (fd !== null) try { closeSync(fd); } catch { /* already failing */ }
    throw outputError(flag, e, path);
  }
}

function writeAll(fd: number, data: string | Uint8Array): void {
  const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
  let off = 0;
  while (off < bytes.length) off += writeSync(fd, bytes, off, bytes.length - off);
}

/**
 * Text from outside (a flag value, a file name, a message that quotes one) on one line:
 * control characters (C0, DEL, C1), line and paragraph separators and the bidirectional
 * controls are shown as escapes (\n, \t, \r, \x1b, \u202e), so one message stays one line
 * and an escape sequence is printed, not obeyed. A backslash is left as it is.
 */
export function oneLine(text: string): string {
  return text.replace(CONTROL, (c) => {
    const named = NAMED[c];
    if (named) return named;
    const code = c.charCodeAt(0);
    return code <= 0xff ? `\\x${code.toString(16).padStart(2, '0')}` : `\\u${code.toString(16).padStart(4, '0')}`;
  });
}

const CONTROL = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;
const NAMED: Record<string, string> = { '\n': '\\n', '\r': '\\r', '\t': '\\t' };
