/**
 * Reading a file the user named, safely: only regular files (never a FIFO, a
 * device or a folder, which could block forever or stream without end), with
 * the size checked before reading and again while reading (a file may grow
 * under us, and /proc-like files report size 0), and every failure turned into
 * a one-line UserError that names the file. Text is decoded as UTF-8: a UTF-8
 * byte-order mark is dropped, UTF-16/32 and binary data are refused.
 */
import { closeSync, fstatSync, openSync, readSync, constants as fsConstants } from 'node:fs';
import { fileError, UserError } from '../errors.js';
import { noteInput } from './inputs.js';

/** Why a read failed, in words for people. */
export function describeFsError(err: unknown): string {
  const code = (err as NodeJS.ErrnoException)?.code;
  switch (code) {
    case 'ENOENT':
      return 'no such file';
    case 'EACCES':
    case 'EPERM':
      return 'permission denied';
    case 'EISDIR':
      return 'is a folder, not a file';
    case 'ENOTDIR':
      return 'a part of the path is not a folder';
    case 'ELOOP':
      return 'too many symbolic links';
    case 'ENAMETOOLONG':
      return 'the path is too long';
    case 'EMFILE':
    case 'ENFILE':
      return 'too many open files';
    case 'EIO':
      return 'input/output error';
    default:
      return code ?? 'error';
  }
}

/** "EACCES: permission denied", or the code alone where it says enough. */
export function codeAndWords(err: unknown): string {
  const code = (err as NodeJS.ErrnoException)?.code;
  const words = describeFsError(err);
  return code && words !== code ? `${code}: ${words}` : words;
}

export interface ReadUserFileOptions {
  /** What the file is meant to be, for messages ("spectrum file", "design file"). */
  what: string;
  /** Largest accepted size [bytes]. */
  maxBytes: number;
}

/** Bytes larger than `maxBytes` in words: "12 MiB" or "3400 bytes". */
function sizeText(bytes: number): string {
  return bytes >= 2 ** 20 ? `${(bytes / 2 ** 20).toFixed(0)} MiB` : `${bytes} bytes`;
}

/** A user's file opened for reading after the checks of openUserFile. */
export interface OpenedUserFile {
  fd: number;
  /** Size when opened [bytes]; reading may find more (checkGrowth) or less. */
  size: number;
}

/**
 * Open a user's file for reading: only a regular file no larger than
 * `maxBytes`, noted as an input of the run. Every failure is a UserError that
 * names the file. The caller reads with readUserChunk, checks the running
 * total with checkGrowth, and closes the descriptor.
 */
export function openUserFile(path: string, opts: ReadUserFileOptions): OpenedUserFile {
  injectedReadFault(path, opts.what);
  let fd: number;
  try {
    // O_NONBLOCK: opening a FIFO must not wait for a writer; it is refused just below.
    fd = openSync(path, fsConstants.O_RDONLY | fsConstants.O_NONBLOCK);
  } catch (err) {
    throw new UserError(`${path}: cannot open ${opts.what} (${codeAndWords(err)})`);
  }
  try {
    const st = fstatSync(fd);
    if (st.isDirectory()) throw fileError(path, undefined, `is a folder, not a ${opts.what}`);
    if (!st.isFile()) throw fileError(path, undefined, `is not a regular file (a FIFO, socket or device); a ${opts.what} must be a file`);
    if (st.size > opts.maxBytes) throw fileError(path, undefined, `is ${sizeText(st.size)}; a ${opts.what} above ${sizeText(opts.maxBytes)} is refused`);
    noteInput(path, st);
    return { fd, size: st.size };
  } catch (err) {
    closeSync(fd);
    throw err;
  }
}

/** readSync on an opened user file; a failure (EIO, …) is a UserError naming the file. */
export function readUserChunk(path: string, what: string, fd: number, buf: Uint8Array, offset: number, length: number, position: number | null): number {
  try {
    return readSync(fd, buf, offset, length, position);
  } catch (err) {
    throw new UserError(`${path}: cannot read ${what} (${codeAndWords(err)})`);
  }
}

/** Refuse a file found, while being read, to hold more than `maxBytes` (it grew, or its size was not reported). */
export function checkGrowth(path: string, opts: ReadUserFileOptions, bytesSoFar: number): void {
  if (bytesSoFar > opts.maxBytes) throw fileError(path, undefined, `grew past ${sizeText(opts.maxBytes)} while being read; a ${opts.what} above that is refused`);
}

/**
 * Read a user's file into memory, refusing anything but a regular file and
 * anything above `maxBytes`, before and while reading.
 */
export function readUserFile(path: string, opts: ReadUserFileOptions): Buffer {
  const { fd } = openUserFile(path, opts);
  try {
    const chunks: Buffer[] = [];
    let total = 0;
    const chunk = Buffer.allocUnsafe(Math.min(1 << 20, opts.maxBytes + 1));
    for (;;) {
      const n = readUserChunk(path, opts.what, fd, chunk, 0, chunk.length, null);
      if (n === 0) break;
      total += n;
      checkGrowth(path, opts, total);
      chunks.push(Buffer.from(chunk.subarray(0, n)));
    }
    return Buffer.concat(chunks, total);
  } finally {
    closeSync(fd);
  }
}

/**
 * The file's text as UTF-8, without a leading byte-order mark. UTF-16/UTF-32
 * (by their marks, or by the NUL bytes every ASCII character carries in them)
 * and other binary data are refused with a line saying what to do.
 */
export function decodeUserText(path: string, bytes: Buffer, what: string): string {
  const b0 = bytes[0];
  const b1 = bytes[1];
  if ((b0 === 0xff && b1 === 0xfe) || (b0 === 0xfe && b1 === 0xff)) {
    throw fileError(path, 1, `is UTF-16 encoded; save the ${what} as UTF-8`);
  }
  const nul = bytes.indexOf(0);
  if (nul >= 0) {
    // Every other byte NUL in the first characters: UTF-16 text without a mark.
    const head = bytes.subarray(0, Math.min(bytes.length, 64));
    let zeros = 0;
    for (const b of head) if (b === 0) zeros++;
    if (head.length >= 4 && zeros >= head.length / 3) throw fileError(path, 1, `looks UTF-16 or UTF-32 encoded (NUL bytes between characters); save the ${what} as UTF-8`);
    const line = bytes.subarray(0, nul).toString('latin1').split('\n').length;
    throw fileError(path, line, `contains binary data (NUL bytes); expected a text ${what}`);
  }
  const start = b0 === 0xef && b1 === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  return bytes.subarray(start).toString('utf8');
}

/** Read a user's text file: `readUserFile` then `decodeUserText`. */
export function readUserText(path: string, opts: ReadUserFileOptions): { bytes: Buffer; text: string } {
  const bytes = readUserFile(path, opts);
  return { bytes, text: decodeUserText(path, bytes, opts.what) };
}

/**
 * Tests only (documented in DEVELOPERS.md): `GAPSTACK_FAULT_INJECTION=eacces:<text>`
 * makes opening any user file whose path contains <text> fail as permission
 * denied, for machines where the tests run as root and cannot run the
 * command line as an unprivileged user. Nothing else reads it.
 */
function injectedReadFault(path: string, what: string): void {
  const spec = process.env.GAPSTACK_FAULT_INJECTION;
  if (!spec?.startsWith('eacces:')) return;
  const needle = spec.slice('eacces:'.length);
  if (needle !== '' && path.includes(needle)) throw new UserError(`${path}: cannot open ${what} (${codeAndWords({ code: 'EACCES' })})`);
}
