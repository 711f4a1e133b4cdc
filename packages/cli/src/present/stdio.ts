/**
 * Standard output and error written synchronously, a whole piece before the
 * next is made. `process.stdout.write` to a pipe queues what the reader has
 * not taken yet: a long JSON report piped to another program was held in
 * memory whole (129 MB peak for a 15 MB report, against 76 MB written to a
 * file), and a reader that closed early (`| head`) ended the command with
 * an unhandled EPIPE error and its stack trace. Here a full pipe is waited
 * for (EAGAIN: a millisecond, then again), and a closed one ends the output
 * quietly: nothing more is written to it, the command runs to its end and
 * keeps its exit status, as a filter's reader expects.
 */
import { writeSync } from 'node:fs';

/** One synchronous output stream on a file descriptor. */
export interface SyncStream {
  /** Writes `text` whole (or drops it once the reader has gone). */
  readonly write: (text: string) => void;
  /** True once the reader closed the stream (EPIPE); later writes are dropped. */
  readonly closed: () => boolean;
}

const pause = new Int32Array(new SharedArrayBuffer(4));

/** A {@link SyncStream} on file descriptor `fd` (1 standard output, 2 standard error). */
export function syncStream(fd: number): SyncStream {
  let gone = false;
  const write = (text: string): void => {
    if (gone || text.length === 0) return;
    const bytes = Buffer.from(text, 'utf8');
    let at = 0;
    while (at < bytes.length) {
      try {
        at += writeSync(fd, bytes, at, bytes.length - at);
      } catch (e) {
        const code = (e as NodeJS.ErrnoException).code;
        if (code === 'EAGAIN') {
          Atomics.wait(pause, 0, 0, 1);
          continue;
        }
        if (code === 'EPIPE') {
          gone = true;
          return;
        }
        throw e;
      }
    }
  };
  return { write, closed: () => gone };
}
