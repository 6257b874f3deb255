/**
 * The one writer: puts a planned pack into --out atomically. Files go to a
 * temporary folder beside --out, which then replaces --out by rename, so a
 * reader never sees half a pack and a failed build leaves the previous one.
 */
import { createHash } from 'node:crypto';
import { closeSync, constants, copyFileSync, existsSync, linkSync, lstatSync, mkdirSync, openSync, readSync, readdirSync, renameSync, rmSync, rmdirSync, statSync, unlinkSync, writeFileSync, writeSync, writevSync } from 'node:fs';
import path from 'node:path';
import type { ByteSink, FileRange } from './bytes.ts';

export class OutputRefused extends Error {}

/** Refuse an --out that would overwrite inputs or something that is not a pack. */
export function checkOutDir(outDir: string, workspaceRoot: string, inputFiles: readonly string[]): void {
  const out = path.resolve(outDir);
  const root = path.resolve(workspaceRoot);
  const inside = (child: string, parent: string) => {
    const rel = path.relative(parent, child);
    return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
  };
  if (inside(root, out)) throw new OutputRefused(`--out ${outDir} is the workspace or a folder that contains it; choose a folder of its own, e.g. out/pack.`);
  for (const f of inputFiles) {
    const abs = path.resolve(root, f);
    if (inside(abs, out)) throw new OutputRefused(`--out ${outDir} contains the input ${f}; choose another folder.`);
    const dataDir = path.dirname(abs);
    if (dataDir !== root && inside(out, dataDir)) throw new OutputRefused(`--out ${outDir} lies inside the data folder ${path.relative(root, dataDir)}; choose a folder outside it.`);
  }
  if (existsSync(out)) {
    if (!statSync(out).isDirectory()) throw new OutputRefused(`--out ${outDir} is a file, not a folder.`);
    const names = readdirSync(out);
    if (names.length > 0 && !names.includes('manifest.json')) {
      throw new OutputRefused(`--out ${outDir} is not empty and holds no earlier pack (no manifest.json); plumbline replaces --out whole, so point it at an empty or new folder.`);
    }
  }
}

/** Is the process that named a temporary folder still running? */
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * A build killed midway (SIGKILL, power loss) leaves its temporary folder
 * beside --out, and one killed between its two renames leaves the previous
 * pack under its side name with --out gone. Before writing, restore such a
 * previous pack and remove the leftovers of builds that are no longer running.
 */
export function recoverInterrupted(outDir: string): string[] {
  const out = path.resolve(outDir);
  const parent = path.dirname(out);
  if (!existsSync(parent)) return [];
  const base = path.basename(out);
  const pattern = new RegExp(`^\\.${base.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\.(building|previous)-(\\d+)-\\d+$`);
  const removed: string[] = [];
  for (const name of readdirSync(parent).sort()) {
    const m = pattern.exec(name);
    if (!m || alive(Number(m[2]))) continue;
    const full = path.join(parent, name);
    if (m[1] === 'previous' && !existsSync(out)) {
      renameSync(full, out);
      continue;
    }
    rmSync(full, { recursive: true, force: true });
    removed.push(full);
  }
  return removed;
}

/**
 * The temporary folder beside --out that one build writes into, named for
 * its process so that a later build can tell a killed build's leftovers
 * (recoverInterrupted) from a running one's.
 */
export interface PackFolder {
  /** --out, resolved. */
  readonly out: string;
  readonly temp: string;
  /** Where the previous pack waits between the two renames. */
  readonly old: string;
  /** The first folder above --out that this build made, if --out's parent did not exist: a failed build removes it again. */
  readonly madeParent: string | undefined;
}

/** Clears what killed builds left beside --out, then makes this build's temporary folder. */
export function openPackFolder(outDir: string): PackFolder {
  const out = path.resolve(outDir);
  const parent = path.dirname(out);
  const madeParent = mkdirSync(parent, { recursive: true });
  recoverInterrupted(out);
  const stamp = `${process.pid}-${Date.now()}`;
  const base = path.basename(out);
  const folder = { out, temp: path.join(parent, `.${base}.building-${stamp}`), old: path.join(parent, `.${base}.previous-${stamp}`), madeParent };
  mkdirSync(folder.temp);
  return folder;
}

/** Removes the temporary folder of a build that failed, and the folders above it that the build made. */
export function discardPackFolder(folder: PackFolder): void {
  rmSync(folder.temp, { recursive: true, force: true });
  if (folder.madeParent && !existsSync(folder.out)) rmSync(folder.madeParent, { recursive: true, force: true });
}

/**
 * A file written into a pack folder as it is made, hashed on the way: its
 * size and SHA-256 for the manifest (which the build cache also checks the
 * file against, where its stamp changed, before a rebuild copies parts of
 * it).
 */
export interface FileSink {
  write(bytes: Uint8Array): void;
  /**
   * Leaves room for the bytes of `from`, which `fillFile` copies in later
   * (on another thread, where there is one): a rebuild's summary.json is
   * nearly all the previous one's bytes, and copying and hashing a plant's
   * 86 MB took 0.4 s. The file is then hashed by `fillFile`, not here.
   */
  copy(from: FileRange): void;
  close(): SunkFile | UnfilledFile;
}

export interface SunkFile {
  readonly bytes: number;
  readonly sha256: string;
}

export type { FileRange } from './bytes.ts';

/** A sunk file with room left for other files' bytes: `fillFile(fill)` copies them in and hashes it. */
export interface UnfilledFile {
  readonly fill: FillJob;
}

export interface FillJob {
  readonly file: string;
  readonly bytes: number;
  /** In order of `at`, the offset in `file` where each range goes. */
  readonly holes: readonly { readonly at: number; readonly from: FileRange }[];
  /** In order of `at`, bytes the sink held rather than wrote (after its first hole), for fillFile to write. */
  readonly held?: readonly { readonly at: number; readonly bytes: Uint8Array }[];
}

/** What a sink holds of its writes after its first hole, at most: more is written at once. */
export const HOLD_BYTES = 16 << 20;

/**
 * `holdBytes`: how much of what is written after the first hole the sink
 * holds for fillFile to write, in order with the ranges it copies: a
 * rebuild's summary.json is a thousand copied items with a separator
 * between each, and writing each separator took 30 ms of the main thread.
 */
export function fileSink(folder: PackFolder, name: string, holdBytes = HOLD_BYTES): FileSink {
  const target = path.join(folder.temp, name);
  mkdirSync(path.dirname(target), { recursive: true });
  const fd = openSync(target, 'w');
  const hash = createHash('sha256');
  const holes: { at: number; from: FileRange }[] = [];
  const held: { at: number; bytes: Uint8Array }[] = [];
  let holding = 0;
  let bytes = 0;
  return {
    write(chunk) {
      if (holes.length > 0 && holding + chunk.length <= holdBytes) {
        // The chunk is only valid until this returns: a copy is held.
        held.push({ at: bytes, bytes: chunk.slice() });
        holding += chunk.length;
      } else {
        writeExactly(fd, chunk, bytes);
        // With room left, fillFile hashes the whole file once it is filled.
        if (holes.length === 0) hash.update(chunk);
      }
      bytes += chunk.length;
    },
    copy(from) {
      holes.push({ at: bytes, from });
      bytes += from.end - from.start;
    },
    close() {
      closeSync(fd);
      if (holes.length > 0) return { fill: { file: target, bytes, holes, ...(held.length ? { held } : {}) } };
      return { bytes, sha256: hash.digest('hex') };
    },
  };
}

/**
 * A file written from a sink (`file`, made with its folders), hashed on
 * the way: a range is copied in at once, read from its file. `close` gives
 * its size and SHA-256. A source shorter than its range (changed since the
 * build began) is an error.
 */
export function copyingSink(file: string): ByteSink & { close(): { readonly bytes: number; readonly sha256: string } } {
  mkdirSync(path.dirname(file), { recursive: true });
  const fd = openSync(file, 'w');
  const hash = createHash('sha256');
  const ranges = rangeReader(1 << 16);
  let length = 0;
  const write = (bytes: Uint8Array) => {
    writeExactly(fd, bytes, length);
    hash.update(bytes);
    length += bytes.length;
  };
  const closeAll = () => {
    closeSync(fd);
    ranges.close();
  };
  return {
    write,
    copy(from) {
      try {
        write(ranges.read(from));
      } catch (e) {
        closeAll();
        throw e;
      }
    },
    get length() {
      return length;
    },
    close() {
      closeAll();
      return { bytes: length, sha256: hash.digest('hex') };
    },
  };
}

/** Bytes `from.start` to `from.end` of `from.file`, read at once (into `out`, if given: its length is the range's). */
export function readRange(from: FileRange, out: Uint8Array = new Uint8Array(from.end - from.start)): Uint8Array {
  const fd = openSync(from.file, 'r');
  try {
    readExactly(fd, from.file, out, from.start);
    return out;
  } finally {
    closeSync(fd);
  }
}

/**
 * Reads ranges of files, each file opened once, into one buffer that grows
 * as needed (`room`): what `read` gives is valid until the next read.
 * `close` closes the files.
 */
function rangeReader(size: number) {
  const sources = new Map<string, number>();
  let buffer = new Uint8Array(size);
  const room = (n: number) => (buffer.length < n ? (buffer = new Uint8Array(Math.max(n, buffer.length * 2))) : buffer).subarray(0, n);
  return {
    room,
    read(from: FileRange): Uint8Array {
      let source = sources.get(from.file);
      if (source === undefined) sources.set(from.file, (source = openSync(from.file, 'r')));
      const bytes = room(from.end - from.start);
      readExactly(source, from.file, bytes, from.start);
      return bytes;
    },
    close() {
      for (const source of sources.values()) closeSync(source);
    },
  };
}

/**
 * Fills `out` from the open file `fd` (named `file`), from byte `at` on. A
 * file that ends first has changed since the build looked at it: an error.
 */
export function readExactly(fd: number, file: string, out: Uint8Array, at: number): void {
  for (let done = 0; done < out.length; ) {
    const n = readSync(fd, out, done, out.length - done, at + done);
    if (n === 0) throw new Error(`${file} changed during the build; build again`);
    done += n;
  }
}

/**
 * Removes the folder `dir` and everything in it. The folder's own listing
 * says which entries are folders, so no entry is looked up first as
 * rmSync does: removing the previous pack (its thousand charts) took a
 * quarter less. Anything this cannot remove is left to rmSync.
 */
export function removeTree(dir: string): void {
  try {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) removeTree(full);
      else unlinkSync(full);
    }
    rmdirSync(dir);
  } catch {
    rmSync(dir, { recursive: true, force: true });
  }
}

/**
 * Writes `pieces`, joined, as the file `file` (its folder made), hashing
 * them on the way: a file gathered in pieces is not joined first (pack.pdf
 * is ten megabytes for a plant, and joining it took 50 ms). Returns its
 * size and SHA-256.
 */
export function writePieces(file: string, pieces: readonly Uint8Array[]): { readonly bytes: number; readonly sha256: string } {
  mkdirSync(path.dirname(file), { recursive: true });
  const fd = openSync(file, 'w');
  const hash = createHash('sha256');
  let at = 0;
  try {
    // A few system calls for thousands of pieces; POSIX guarantees 1,024 buffers to a call (IOV_MAX).
    for (let first = 0; first < pieces.length; first += 1024) {
      const batch = pieces.slice(first, first + 1024);
      let written = writevSync(fd, batch as Uint8Array[], at);
      // A short write (rare for a regular file) is finished piece by piece.
      for (const piece of batch) {
        hash.update(piece);
        if (written >= piece.length) written -= piece.length;
        else {
          writeExactly(fd, piece.subarray(written), at + written);
          written = 0;
        }
        at += piece.length;
      }
    }
  } finally {
    closeSync(fd);
  }
  return { bytes: at, sha256: hash.digest('hex') };
}

/** Writes all of `bytes` to the open file `fd` from byte `at` on. */
function writeExactly(fd: number, bytes: Uint8Array, at: number): void {
  for (let done = 0; done < bytes.length; ) done += writeSync(fd, bytes, done, bytes.length - done, at + done);
}

/**
 * What a file's metadata says of it: its inode, size and time of last
 * change of its bytes. A build records the stamp of a file it wrote, and a
 * later build takes the file as unchanged while its stamp is the same (an
 * edit changes the modification time; renaming or linking the file keeps
 * all three): so it links a chart, or trusts summary.json, without reading
 * it (git trusts its working tree the same way).
 */
export interface FileStamp {
  readonly ino: bigint;
  readonly size: bigint;
  readonly mtimeNs: bigint;
}

export function stampOf(file: string): FileStamp | undefined {
  try {
    const s = lstatSync(file, { bigint: true });
    return s.isFile() ? { ino: s.ino, size: s.size, mtimeNs: s.mtimeNs } : undefined;
  } catch {
    return undefined;
  }
}

export const sameStamp = (a: FileStamp | undefined, b: unknown): boolean =>
  a !== undefined && typeof b === 'object' && b !== null && (b as FileStamp).ino === a.ino && (b as FileStamp).size === a.size && (b as FileStamp).mtimeNs === a.mtimeNs;

/**
 * Makes the folder of each file it is given, once per folder: a pack's
 * thousands of files share a few folders.
 */
export function folderMaker(): (file: string) => void {
  const made = new Set<string>();
  return (file) => {
    const dir = path.dirname(file);
    if (!made.has(dir)) mkdirSync(dir, { recursive: true }), made.add(dir);
  };
}

/**
 * Copies each range of `job` into its room in the file, writes what the
 * sink held, and hashes the file from start to end (what the sink wrote
 * itself is read back for it). Ranges and held bytes go out in order
 * through one buffer, a megabyte to a write. A source shorter than its
 * range (changed since the build began) is an error.
 */
export function fillFile(job: FillJob): SunkFile {
  const hash = createHash('sha256');
  const fd = openSync(job.file, 'r+');
  const ranges = rangeReader(1 << 20);
  // What the sink wrote between `start` and `end`, read back in turns.
  const reread = new Uint8Array(1 << 20);
  const hashWritten = (start: number, end: number) => {
    for (let at = start; at < end; ) {
      const chunk = reread.subarray(0, Math.min(reread.length, end - at));
      readExactly(fd, job.file, chunk, at);
      hash.update(chunk);
      at += chunk.length;
    }
  };
  // Bytes going out from `outAt` on, gathered in `out`.
  const out = new Uint8Array(1 << 20);
  let outAt = 0;
  let outLength = 0;
  const flush = () => {
    if (outLength > 0) writeExactly(fd, out.subarray(0, outLength), outAt);
    outAt += outLength;
    outLength = 0;
  };
  const emit = (bytes: Uint8Array) => {
    hash.update(bytes);
    if (outLength + bytes.length > out.length) flush();
    if (bytes.length > out.length) {
      writeExactly(fd, bytes, outAt);
      outAt += bytes.length;
    } else {
      out.set(bytes, outLength);
      outLength += bytes.length;
    }
  };
  const held = job.held ?? [];
  try {
    let at = 0;
    for (let h = 0, k = 0; h < job.holes.length || k < held.length; ) {
      const hole = job.holes[h];
      const keep = held[k];
      const next = keep === undefined || (hole !== undefined && hole.at < keep.at) ? hole! : keep;
      if (next.at > at) {
        // Bytes the sink wrote itself.
        flush();
        hashWritten(at, next.at);
        outAt = next.at;
      }
      if (next === hole) {
        emit(ranges.read(hole.from));
        at = hole.at + (hole.from.end - hole.from.start);
        h++;
      } else {
        emit(keep!.bytes);
        at = keep!.at + keep!.bytes.length;
        k++;
      }
    }
    flush();
    hashWritten(at, job.bytes);
  } finally {
    closeSync(fd);
    ranges.close();
  }
  return { bytes: job.bytes, sha256: hash.digest('hex') };
}

/**
 * Writes the planned files into the build's folder, which then replaces
 * --out. Files already made there (summary.json, through a FileSink) stay;
 * `copies` are output files copied from a file of the current --out (charts
 * the build cache kept), or linked from the file of the same name there
 * where it still has the stamp it was written with (`unchanged`).
 * `extra`: files that go into the folder but are not the pack (the build
 * cache). Those named in `kept` hold the same bytes as the file of that name
 * in the current --out, and are hard-linked from it where the file system
 * allows (a plant's cache is hundreds of megabytes, nearly all unchanged
 * after one data file changes), or, where `takeOver` names their folder,
 * that folder is moved from --out whole and only what changed is written
 * or removed in it; anywhere else they are written, each made
 * when it is written, after the pack's files, and given the folder they
 * are written into. On any failure the folder is removed and --out left as
 * it was.
 */
/** The suffix of a file of a taken-over folder written beside the one it replaces (see writePack). */
const REPLACING = '.replacing';

export function writePack(
  folder: PackFolder,
  files: ReadonlyMap<string, Uint8Array>,
  extra: ReadonlyMap<string, (into: string) => Uint8Array> = new Map(),
  kept: ReadonlySet<string> = new Set(),
  copies: ReadonlyMap<string, { readonly from: string; readonly unchanged?: unknown }> = new Map(),
  takeOver?: string,
): void {
  const { out, temp, old } = folder;
  let taken: string | undefined;
  try {
    const folderFor = folderMaker();
    const put = (name: string, bytes: Uint8Array) => {
      const target = path.join(temp, name);
      folderFor(target);
      writeFileSync(target, bytes);
    };
    // The old file stays until --out is replaced, and a link keeps its bytes after that.
    const linked = (name: string) => {
      const target = path.join(temp, name);
      folderFor(target);
      try {
        linkSync(path.join(out, name), target);
        return true;
      } catch {
        return false;
      }
    };
    for (const [name, bytes] of files) put(name, bytes);
    // Linked from the pack's own file where it is as it was written (the old pack goes, so the new
    // one then has the file alone: a plant's 1,000 charts took 0.26–0.36 s to copy). Else copied
    // from the cache, not linked: a pack's file and the cache's must not be one file that an edit
    // to either changes. Where the file system can clone (Btrfs, XFS), the copy is a clone that
    // shares the blocks until either is written; elsewhere (ext4) it is a plain copy.
    for (const [name, { from, unchanged }] of copies) {
      if (unchanged !== undefined && sameStamp(stampOf(path.join(out, name)), unchanged) && linked(name)) continue;
      const target = path.join(temp, name);
      folderFor(target);
      copyFileSync(path.join(out, from), target, constants.COPYFILE_FICLONE);
    }
    // `takeOver`, the folder of `extra` (the build cache), is moved from --out whole when it holds
    // files kept: its kept files are then in place, the rest is written or removed. A plant's 4,000
    // cache files took 0.15 s to link one by one and 0.1 s to remove with the previous pack.
    if (takeOver !== undefined && kept.size > 0 && existsSync(path.join(out, takeOver)) && !existsSync(path.join(temp, takeOver))) {
      renameSync(path.join(out, takeOver), path.join(temp, takeOver));
      taken = takeOver;
      const present = new Set<string>();
      const stale: string[] = [];
      for (const entry of readdirSync(path.join(temp, takeOver), { recursive: true, withFileTypes: true })) {
        if (!entry.isFile()) continue;
        const rel = path.relative(temp, path.join(entry.parentPath, entry.name));
        if (extra.has(rel)) present.add(rel);
        else stale.push(rel);
      }
      // Every file is made before any of the earlier ones is replaced or removed: should one fail, the
      // folder goes back to --out as it was, with at most new files the next build removes.
      const replaced: string[] = [];
      for (const [name, make] of extra) {
        if (kept.has(name) && present.has(name)) continue;
        if (!present.has(name)) put(name, make(temp));
        else {
          put(`${name}${REPLACING}`, make(temp));
          replaced.push(name);
        }
      }
      for (const name of replaced) renameSync(path.join(temp, `${name}${REPLACING}`), path.join(temp, name));
      for (const name of stale) rmSync(path.join(temp, name));
    } else {
      for (const [name, make] of extra) if (!(kept.has(name) && linked(name))) put(name, make(temp));
    }
    const hadOld = existsSync(out);
    if (hadOld) renameSync(out, old);
    renameSync(temp, out);
    if (hadOld) removeTree(old);
  } catch (e) {
    // The cache moved from --out goes back where the previous pack still is (not part of the pack: a
    // failure here costs the next build its cache at worst).
    if (taken !== undefined && existsSync(out) && !existsSync(path.join(out, taken))) {
      try {
        renameSync(path.join(temp, taken), path.join(out, taken));
      } catch {
        // Removed with the temporary folder.
      }
    }
    discardPackFolder(folder);
    throw e;
  }
}
