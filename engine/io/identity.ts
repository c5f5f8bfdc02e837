/**
 * File identity: which file a path names, whatever its spelling. Two paths
 * name the same file when they reach the same inode on the same device
 * (hard links and symbolic links included); a path that does not exist yet
 * is identified by its real location (every existing folder and symbolic
 * link on the way resolved), so an output cannot create a declared input
 * that is missing either.
 */
import { lstatSync, readlinkSync, realpathSync, statSync } from 'node:fs';
import { basename, dirname, isAbsolute, resolve } from 'node:path';

export interface FileIdentity {
  /** The path with every symbolic link and `..` resolved (for a missing file: its would-be location). */
  real: string;
  /** Device and inode when the file exists (bigint: inode numbers may exceed 2⁵³). */
  dev?: bigint;
  ino?: bigint;
}

/** Symbolic links followed before giving up (as the kernel's ELOOP limit, common practice: 40). */
const MAX_LINKS = 40;

/**
 * Where `path` really is: `realpath` when it exists; for a missing path the
 * real location of its deepest existing folder plus the rest, following a
 * dangling symbolic link to the file it would create.
 */
export function realLocation(path: string, hops = 0): string {
  const abs = resolve(path);
  try {
    return realpathSync.native(abs);
  } catch {
    /* missing, dangling or unreadable: resolve by hand below */
  }
  if (hops < MAX_LINKS) {
    try {
      if (lstatSync(abs).isSymbolicLink()) {
        const target = readlinkSync(abs);
        return realLocation(isAbsolute(target) ? target : resolve(dirname(abs), target), hops + 1);
      }
    } catch {
      /* nothing there */
    }
  }
  const parent = dirname(abs);
  if (parent === abs) return abs;
  return resolve(realLocation(parent, hops), basename(abs));
}

/** The identity of the file `path` names (following links). */
export function fileIdentity(path: string): FileIdentity {
  const real = realLocation(path);
  try {
    const st = statSync(real, { bigint: true });
    return { real, dev: st.dev, ino: st.ino };
  } catch {
    return { real };
  }
}

/** Same file: same device and inode when both exist, else the same real location. */
export function sameFile(a: FileIdentity, b: FileIdentity): boolean {
  if (a.ino !== undefined && b.ino !== undefined) return a.dev === b.dev && a.ino === b.ino;
  return a.real === b.real;
}
