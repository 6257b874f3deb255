/**
 * Loads @pdf-lib/fontkit's CommonJS bundle the way `require` would, less
 * two costs every build paid on each thread that uses it (measured on the
 * 2-core machine: 150 ms to load it, against 80 ms so):
 *
 * - Its Brotli decoder (bundled for WOFF2 fonts, which plumbline never
 *   opens) decompresses a 120 KB dictionary as the bundle is evaluated:
 *   50 ms. The dictionary is made when it is first read instead (`LAZY`).
 *   Nothing else in the bundle changes, so every font it opens is read and
 *   laid out by the same code.
 * - V8 compiles the 1.5 MB bundle afresh (37 ms), from text decoded from
 *   UTF-8 (20 ms). The text as patched (UTF-16, read back as a copy) and
 *   V8's code cache for it are kept in the system's temporary folder, as
 *   Node's own compile cache does (`module.enableCompileCache`, Node 22,
 *   not in Node 20), under the bundle file's identity (inode, size,
 *   modification time) and Node's version; V8 checks its code cache again
 *   and ignores one it cannot use. The folder is the user's own
 *   (made private; one another user made or can write to is not used).
 *   NODE_DISABLE_COMPILE_CACHE=1, which turns Node's cache off, turns this
 *   one off too.
 *
 * Anything unexpected (the bundle's text not as this version has it, the
 * cache unwritable) falls back to what `require` does, only slower.
 */
import { createHash } from 'node:crypto';
import { lstatSync, mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { Module, createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Script } from 'node:vm';
import { threadId } from 'node:worker_threads';

/** Where the Brotli dictionary is made, in @pdf-lib/fontkit 1.1.1's dist/fontkit.umd.js. */
export const EAGER_DICTIONARY = 'exports.dictionary = dictionaryDataCompressed.init(BrotliDecompressBuffer);';
/** The same, made on first read. */
const LAZY_DICTIONARY =
  'var lazyDictionary; Object.defineProperty(exports, "dictionary", { configurable: true, enumerable: true, get: function () { return lazyDictionary || (lazyDictionary = dictionaryDataCompressed.init(BrotliDecompressBuffer)); } });';

/** The folder of compile caches: the system's temporary folder, as Node's own compile cache, one folder per user. */
export const COMPILE_CACHE = path.join(tmpdir(), `plumbline-compile-cache${typeof process.getuid === 'function' ? `-${process.getuid()}` : ''}`);

/**
 * Whether the cache folder is this user's alone: compiled code is run as
 * it is read, so a folder another user made or can write into (the
 * temporary folder is shared) is not used. Made if missing, private.
 */
function privateFolder(dir: string): boolean {
  try {
    mkdirSync(dir, { recursive: true, mode: 0o700 });
    const st = lstatSync(dir);
    if (!st.isDirectory()) return false;
    if (typeof process.getuid !== 'function') return true;
    return st.uid === process.getuid() && (st.mode & 0o022) === 0;
  } catch {
    return false;
  }
}

/** The patched bundle as an earlier load kept it (UTF-16, read back without decoding), or undefined. */
function readKeptText(file: string): string | undefined {
  try {
    const bytes = readFileSync(file);
    return bytes.length % 2 === 0 ? bytes.toString('utf16le') : undefined;
  } catch {
    return undefined;
  }
}

/** Writes `bytes` as `file` in the cache folder: under a name of its own first, so that a thread reading it never finds half a file. */
function keep(file: string, bytes: Uint8Array): void {
  try {
    const temp = `${file}.${process.pid}-${threadId}`;
    writeFileSync(temp, bytes, { mode: 0o600 });
    renameSync(temp, file);
  } catch {
    // Not kept this time: the next load does the work again.
  }
}

export function loadFontkit<T>(): T {
  const require = createRequire(import.meta.url);
  const file = require.resolve('@pdf-lib/fontkit');
  const fallback = () => require('@pdf-lib/fontkit') as T;
  const caching = !process.env.NODE_DISABLE_COMPILE_CACHE && privateFolder(COMPILE_CACHE);
  // Kept under the bundle file's identity (inode, size, modification time), Node's version and this
  // module's change to it: the patched text as UTF-16, which reads back as a copy (decoding the
  // bundle's UTF-8, 70,000 characters of it not ASCII, took 20 ms), and V8's code for that text.
  let stat;
  try {
    stat = statSync(file, { bigint: true });
  } catch {
    return fallback();
  }
  const key = createHash('sha256').update([process.version, EAGER_DICTIONARY, LAZY_DICTIONARY, stat.ino, stat.size, stat.mtimeNs].join('\0')).digest('hex').slice(0, 32);
  const textFile = path.join(COMPILE_CACHE, `fontkit-${key}.source`);
  const codeFile = path.join(COMPILE_CACHE, `fontkit-${key}.v8code`);
  let text = caching ? readKeptText(textFile) : undefined;
  const textKept = text !== undefined;
  if (text === undefined) {
    let source: string;
    try {
      source = readFileSync(file, 'utf8');
    } catch {
      return fallback();
    }
    if (!source.includes(EAGER_DICTIONARY)) return fallback();
    text = Module.wrap(source.replace(EAGER_DICTIONARY, LAZY_DICTIONARY));
  }
  let cachedData: Buffer | undefined;
  try {
    cachedData = caching && textKept ? readFileSync(codeFile) : undefined;
  } catch {
    cachedData = undefined;
  }
  let run: (...args: unknown[]) => void;
  try {
    const script = new Script(text, { filename: file, ...(cachedData ? { cachedData } : {}) });
    run = script.runInThisContext() as typeof run;
    const module = { exports: {} as unknown };
    run.call(module.exports, module.exports, createRequire(file), module, file, path.dirname(file));
    if (caching && !textKept) keep(textFile, Buffer.from(text, 'utf16le'));
    // Made after the bundle ran, so that it holds the functions evaluating it compiled.
    if (caching && (!cachedData || script.cachedDataRejected)) keep(codeFile, script.createCachedData());
    return module.exports as T;
  } catch {
    // A kept text that does not compile or run (a disk that filled as it was written): as require does.
    return fallback();
  }
}
