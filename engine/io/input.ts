/**
 * Reading inputs (specs and data files): only regular files are read. A
 * named pipe, a device (`/dev/stdin` on a terminal, `/dev/zero`), a socket or
 * a folder is refused with a clear reason before any byte is read:
 *   1. `stat` the path (following links) and refuse anything but a regular
 *      file without opening it (opening some devices has effects of its own);
 *   2. open it with O_NONBLOCK (where the platform has it), so that a file
 *      swapped for a named pipe in between cannot block the open;
 *   3. `fstat` the open descriptor and refuse again if it is not a regular
 *      file; only then read.
 * The synchronous readers serve the CLI and the engine; the asynchronous ones
 * (libuv's thread pool, never the calling thread) serve the editor.
 */
import { closeSync, constants, fstatSync, openSync, readFileSync, readSync, statSync, type Stats } from 'node:fs';
import { open, stat, type FileHandle } from 'node:fs/promises';
import { inputText } from '../messages';

export type FileKind = 'file' | 'directory' | 'fifo' | 'device' | 'socket' | 'other';

export function fileKind(st: Stats): FileKind {
  if (st.isFile()) return 'file';
  if (st.isDirectory()) return 'directory';
  if (st.isFIFO()) return 'fifo';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'device';
  if (st.isSocket()) return 'socket';
  return 'other';
}

/** Why an input cannot be read: `ENOENT` (missing), `ENOTREG` (not a regular file, `kind` says what), or the system's code. */
export class InputError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly kind?: FileKind,
  ) {
    super(message);
    this.name = 'InputError';
  }
}

export type InputStatus = { ok: true; size: number } | { ok: false; error: InputError };

/** O_RDONLY | O_NONBLOCK (O_NONBLOCK is undefined on Windows, where named pipes do not live in the file tree). */
const OPEN_FLAGS = constants.O_RDONLY | (constants.O_NONBLOCK ?? 0);

function refusal(kind: Exclude<FileKind, 'file'>): InputError {
  return new InputError(kind === 'directory' ? 'EISDIR' : 'ENOTREG', inputText.notRegular(kind), kind);
}

function systemError(e: unknown): InputError {
  const code = (e as NodeJS.ErrnoException).code ?? 'EIO';
  return new InputError(code, code === 'ENOENT' ? inputText.missing : inputText.unreadable(code), undefined);
}

/** What a path is, without opening it: a readable regular file (and its size) or why not. */
export function inputStatus(path: string): InputStatus {
  try {
    const st = statSync(path);
    const kind = fileKind(st);
    return kind === 'file' ? { ok: true, size: st.size } : { ok: false, error: refusal(kind) };
  } catch (e) {
    return { ok: false, error: systemError(e) };
  }
}

/** Open a regular file for reading (steps 1–3 above); throws an InputError otherwise. The caller closes the descriptor. */
export function openInputSync(path: string): number {
  const before = inputStatus(path);
  if (!before.ok) throw before.error;
  let fd: number;
  try {
    fd = openSync(path, OPEN_FLAGS);
  } catch (e) {
    throw systemError(e);
  }
  const kind = fileKind(fstatSync(fd));
  if (kind !== 'file') {
    closeSync(fd);
    throw refusal(kind);
  }
  return fd;
}

/** The whole content of a regular file; throws an InputError for anything else. */
export function readInputSync(path: string): Buffer {
  const fd = openInputSync(path);
  try {
    return readFileSync(fd);
  } catch (e) {
    throw systemError(e);
  } finally {
    closeSync(fd);
  }
}

/** At most `maxBytes` from the start of a regular file (synchronous). */
export function readInputHeadSync(path: string, maxBytes: number): Buffer {
  const fd = openInputSync(path);
  try {
    const buffer = Buffer.alloc(maxBytes);
    let size = 0;
    while (size < maxBytes) {
      const n = readSync(fd, buffer, size, maxBytes - size, size);
      if (n === 0) break;
      size += n;
    }
    return buffer.subarray(0, size);
  } finally {
    closeSync(fd);
  }
}

/** Asynchronous open of a regular file (steps 1–3 above); rejects with an InputError otherwise. */
export async function openInput(path: string): Promise<FileHandle> {
  let kind: FileKind;
  try {
    kind = fileKind(await stat(path));
  } catch (e) {
    throw systemError(e);
  }
  if (kind !== 'file') throw refusal(kind);
  let handle: FileHandle;
  try {
    handle = await open(path, OPEN_FLAGS);
  } catch (e) {
    throw systemError(e);
  }
  const after = fileKind(await handle.stat());
  if (after !== 'file') {
    await handle.close();
    throw refusal(after);
  }
  return handle;
}

export interface HeadOptions {
  /** Stop reading at this many bytes (a cap, never exceeded). */
  maxBytes: number;
  /** Bytes per read (default 64 KiB). */
  chunkBytes?: number;
  /** True once the bytes read so far hold all the caller needs (e.g. the first complete record); reading stops there. */
  enough?: (bytes: Buffer) => boolean;
}

/**
 * The start of a regular file, read asynchronously in chunks until `enough`
 * says so, the file ends or `maxBytes` is reached. `capped` is true when the
 * cap stopped the read before the file ended and before `enough` held.
 */
export async function readInputHead(path: string, options: HeadOptions): Promise<{ bytes: Buffer; capped: boolean }> {
  const chunk = Math.max(1, Math.min(options.chunkBytes ?? 65536, options.maxBytes));
  const handle = await openInput(path);
  try {
    const parts: Buffer[] = [];
    let size = 0;
    for (;;) {
      const want = Math.min(chunk, options.maxBytes - size);
      if (want <= 0) {
        const all = Buffer.concat(parts, size);
        return { bytes: all, capped: !(options.enough?.(all) ?? false) && (await handle.read(Buffer.alloc(1), 0, 1, size)).bytesRead > 0 };
      }
      const buffer = Buffer.alloc(want);
      const { bytesRead } = await handle.read(buffer, 0, want, size);
      if (bytesRead === 0) return { bytes: Buffer.concat(parts, size), capped: false };
      parts.push(buffer.subarray(0, bytesRead));
      size += bytesRead;
      if (options.enough) {
        const all = Buffer.concat(parts, size);
        parts.length = 0;
        parts.push(all);
        if (options.enough(all)) return { bytes: all, capped: false };
      }
    }
  } catch (e) {
    throw e instanceof InputError ? e : systemError(e);
  } finally {
    await handle.close();
  }
}

/** The whole content of a regular file, read asynchronously; refuses files larger than `maxBytes` (an InputError, code EFBIG). */
export async function readInput(path: string, maxBytes = Infinity): Promise<Buffer> {
  const handle = await openInput(path);
  try {
    const { size } = await handle.stat();
    if (size > maxBytes) throw new InputError('EFBIG', inputText.tooLarge(maxBytes));
    return await handle.readFile();
  } catch (e) {
    throw e instanceof InputError ? e : systemError(e);
  } finally {
    await handle.close();
  }
}
