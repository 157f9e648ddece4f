/**
 * Reading part files line by line with byte offsets, so a run can resume after
 * the last complete line and a merge can stream any number of rows.
 */
import { closeSync, openSync, readSync } from 'node:fs';

export interface Line {
  text: string;
  /** Byte offset just past this line's newline (or past its end, when unterminated). */
  end: number;
  /** False for a last line with no newline (a write cut short). */
  complete: boolean;
}

const CHUNK = 1 << 16;

/** Lines of a UTF-8 file, read in fixed-size chunks (memory does not grow with the file). */
export function* readLines(path: string): Generator<Line> {
  const fd = openSync(path, 'r');
  try {
    const buf = Buffer.alloc(CHUNK);
    let pending: Buffer[] = [];
    let pendingLen = 0;
    let offset = 0;
    for (;;) {
      const n = readSync(fd, buf, 0, CHUNK, null);
      if (n === 0) break;
      let start = 0;
      for (let i = 0; i < n; i++) {
        if (buf[i] !== 0x0a) continue;
        const piece = buf.subarray(start, i);
        const text = pendingLen > 0 ? Buffer.concat([...pending, piece]).toString('utf8') : piece.toString('utf8');
        offset += pendingLen + (i - start) + 1;
        pending = [];
        pendingLen = 0;
        start = i + 1;
        yield { text, end: offset, complete: true };
      }
      if (start < n) {
        pending.push(Buffer.from(buf.subarray(start, n)));
        pendingLen += n - start;
      }
    }
    if (pendingLen > 0) yield { text: Buffer.concat(pending).toString('utf8'), end: offset + pendingLen, complete: false };
  } finally {
    closeSync(fd);
  }
}
