/**
 * Atomic output: a build writes into a temporary folder beside --out and
 * renames it into place, so a build killed midway leaves the previous pack
 * as it was; the next build clears what the killed one left. Refused --out
 * folders, and inputs that are never modified, checked by hashing.
 */
import { spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { appendFileSync, cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, renameSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { discardPackFolder, fileSink, fillFile, openPackFolder, removeTree, writePack, writePieces } from '../src/pack/write.ts';
import { BIN, ROOT, cli, hashTree } from './helpers/cli.ts';

const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-atomic-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

/** A process id that has certainly ended: a child we ran to completion. */
const deadPid = () => spawnSync(process.execPath, ['-e', '0']).pid!;
const leftovers = (parent: string, base: string) => readdirSync(parent).filter((n) => n.startsWith(`.${base}.`));

describe('a build killed midway', () => {
  const ws = path.join(temp, 'ws');
  const out = path.join(temp, 'pack');
  it('leaves the previous pack byte for byte, and the next build clears what it left', async () => {
    cpSync(path.join(ROOT, 'data/demo'), ws, { recursive: true });
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    const before = hashTree(out);
    const inputs = hashTree(ws);
    // Change the data so the killed build would have written a different pack.
    appendFileSync(path.join(ws, 'ledger.csv'), '2026-12-01,carbonation,note,,Killed build,\n');
    const child = spawn(process.execPath, [BIN, 'build', ws, '--out', out, '-q'], { stdio: 'ignore' });
    // Killed once it is midway: its temporary folder holds summary.json, written during the analysis.
    // (A fixed delay raced the build: the demo now builds in under two seconds.)
    const midway = () => leftovers(temp, 'pack').some((n) => n.includes('.building-') && existsSync(path.join(temp, n, 'summary.json')));
    for (const started = Date.now(); !midway(); ) {
      if (Date.now() - started > 60_000) throw new Error('the build never got midway');
      await new Promise((r) => setTimeout(r, 5));
    }
    child.kill('SIGKILL');
    await new Promise((r) => child.once('exit', r));
    expect(hashTree(out)).toEqual(before);
    const after = hashTree(ws);
    expect(Object.keys(after).sort()).toEqual(Object.keys(inputs).sort());
    for (const [f, h] of Object.entries(after)) if (f !== 'ledger.csv') expect(h, f).toBe(inputs[f]);
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(leftovers(temp, 'pack')).toEqual([]);
    expect(hashTree(out)).not.toEqual(before);
  });

  it('the next build removes a half-written folder left beside --out by a build that is no longer running', () => {
    const stale = path.join(temp, `.pack.building-${deadPid()}-1`);
    mkdirSync(path.join(stale, 'charts'), { recursive: true });
    writeFileSync(path.join(stale, 'charts', 'partial.svg'), '<svg');
    expect(cli('build', ws, '--out', out, '-q').code).toBe(0);
    expect(existsSync(stale)).toBe(false);
  });

  it('a build killed between its two renames leaves the previous pack under a side name: the next build puts it back and compares with it', () => {
    const side = path.join(temp, `.pack.previous-${deadPid()}-2`);
    renameSync(out, side);
    const r = cli('build', ws, '--out', out);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Compared with the pack built for 2026-11-30/);
    expect(leftovers(temp, 'pack')).toEqual([]);
  });
});

describe('--out that would touch the inputs is refused, and nothing is written', () => {
  const ws = path.join(temp, 'ws2');
  it('the workspace itself, a folder that contains it, a folder inside its data', () => {
    cpSync(path.join(ROOT, 'data/demo'), ws, { recursive: true });
    const inputs = hashTree(ws);
    for (const [out, message] of [
      [ws, /is the workspace or a folder that contains it/],
      [temp, /is the workspace or a folder that contains it/],
      [path.join(ws, 'data', 'pack'), /lies inside the data folder data/],
    ] as const) {
      const r = cli('build', ws, '--out', out);
      expect(r.code, out).toBe(2);
      expect(r.err).toMatch(message);
    }
    expect(hashTree(ws)).toEqual(inputs);
    expect(existsSync(path.join(ws, 'data', 'pack'))).toBe(false);
  });
});

describe('the pack folder a build opens before it plans', () => {
  it('holds what is written as it is made; a failed build removes it, and the folders it made above --out', () => {
    const out = path.join(temp, 'new', 'deep', 'pack');
    const folder = openPackFolder(out);
    expect(path.dirname(folder.temp)).toBe(path.dirname(out));
    const sink = fileSink(folder, 'summary.json');
    sink.write(new TextEncoder().encode('{"a":'));
    sink.write(new TextEncoder().encode('1}\n'));
    // SHA-256 of the 8 bytes '{"a":1}\n', from Node's crypto module (a reference outside this project).
    expect(sink.close()).toEqual({ bytes: 8, sha256: createHash('sha256').update('{"a":1}\n').digest('hex') });
    discardPackFolder(folder);
    expect(existsSync(path.join(temp, 'new'))).toBe(false);

    // A parent that was there before stays.
    const kept = path.join(temp, 'existing');
    mkdirSync(kept);
    discardPackFolder(openPackFolder(path.join(kept, 'pack')));
    expect(readdirSync(kept)).toEqual([]);
  });

  it('leaves room for other files\' bytes, which fillFile copies in before it hashes the whole file', () => {
    const source = path.join(temp, 'earlier.json');
    // Over a megabyte, so that fillFile reads the written bytes back, and copies, in more than one turn.
    const earlier = Buffer.from(Array.from({ length: 600_000 }, (_, i) => `${i % 97},`).join(''));
    writeFileSync(source, earlier);
    const folder = openPackFolder(path.join(temp, 'filled'));
    const sink = fileSink(folder, 'summary.json');
    const head = Buffer.from('{"a": [');
    const middle = Buffer.from('"ünïcode", ');
    const tail = Buffer.from('1]}\n'.repeat(400_000));
    sink.write(head);
    sink.copy({ file: source, start: 10, end: 1_100_000 });
    sink.write(middle);
    sink.copy({ file: source, start: 0, end: 5 });
    sink.write(tail);
    const unfilled = sink.close();
    // The expected file, joined here from the same pieces; its hashes from Node's crypto module.
    const expected = Buffer.concat([head, earlier.subarray(10, 1_100_000), middle, earlier.subarray(0, 5), tail]);
    if (!('fill' in unfilled)) throw new Error('no room was left');
    expect(unfilled.fill.bytes).toBe(expected.length);
    expect(fillFile(unfilled.fill)).toEqual({
      bytes: expected.length,
      sha256: createHash('sha256').update(expected).digest('hex'),
    });
    expect(readFileSync(path.join(folder.temp, 'summary.json')).equals(expected)).toBe(true);
    // A source that has shrunk since is an error, not a file with a hole in it.
    writeFileSync(source, earlier.subarray(0, 1000));
    expect(() => fillFile(unfilled.fill)).toThrow(/changed during the build/);
    discardPackFolder(folder);
  });

  it('holds what is written after the first room for fillFile to write, up to its limit; past it, writes at once', () => {
    const source = path.join(temp, 'earlier-held.json');
    const earlier = Buffer.from(Array.from({ length: 500_000 }, (_, i) => `${i % 89};`).join(''));
    writeFileSync(source, earlier);
    const pieces = [Buffer.from('{"items": ['), Buffer.from(',\n    '), Buffer.from(',\n    '), Buffer.from('x'.repeat(3_000_000)), Buffer.from(']}\n')];
    const ranges = [{ file: source, start: 0, end: 400_000 }, { file: source, start: 5, end: 17 }, { file: source, start: 500_000, end: 1_200_000 }];
    // The expected file joined here, piece, range, piece, range…; its hash from Node's crypto module.
    const expected = Buffer.concat([pieces[0]!, earlier.subarray(0, 400_000), pieces[1]!, earlier.subarray(5, 17), pieces[2]!, earlier.subarray(500_000, 1_200_000), pieces[3]!, pieces[4]!]);
    for (const [limit, heldCount] of [[undefined, 4], [10, 2]] as const) {
      const folder = openPackFolder(path.join(temp, `held-${limit ?? 'default'}`));
      const sink = fileSink(folder, 'summary.json', limit);
      sink.write(pieces[0]!);
      sink.copy(ranges[0]!);
      sink.write(pieces[1]!);
      sink.copy(ranges[1]!);
      sink.write(pieces[2]!);
      sink.copy(ranges[2]!);
      sink.write(pieces[3]!);
      sink.write(pieces[4]!);
      const unfilled = sink.close();
      if (!('fill' in unfilled)) throw new Error('no room was left');
      // Held: everything after the first room, within the limit (with 10 bytes: the first separator and the
      // closing bracket, each direct write between them written at once).
      expect(unfilled.fill.held?.length ?? 0).toBe(heldCount);
      const before = readFileSync(path.join(folder.temp, 'summary.json'));
      const separatorAt = pieces[0]!.length + 400_000;
      expect(before.subarray(separatorAt, separatorAt + pieces[1]!.length).every((b) => b === 0), 'a held separator is not written before fillFile').toBe(true);
      expect(fillFile(unfilled.fill)).toEqual({ bytes: expected.length, sha256: createHash('sha256').update(expected).digest('hex') });
      expect(readFileSync(path.join(folder.temp, 'summary.json')).equals(expected)).toBe(true);
      discardPackFolder(folder);
    }
  });
});

describe('removing the previous pack', () => {
  it('removes the folder and all in it, a link to a folder without what it links to, and nothing when there is no folder', () => {
    const dir = path.join(temp, 'old-pack');
    const outside = path.join(temp, 'outside');
    mkdirSync(path.join(dir, 'charts', 'deep'), { recursive: true });
    mkdirSync(outside, { recursive: true });
    writeFileSync(path.join(outside, 'keep.txt'), 'kept');
    for (const f of ['index.md', 'charts/a.svg', 'charts/deep/b.svg']) writeFileSync(path.join(dir, f), f);
    symlinkSync(outside, path.join(dir, 'linked'));
    removeTree(dir);
    expect(existsSync(dir)).toBe(false);
    expect(readFileSync(path.join(outside, 'keep.txt'), 'utf8')).toBe('kept');
    expect(() => removeTree(dir)).not.toThrow();
  });
});

describe('a file written in pieces (pack.pdf)', () => {
  it('is the pieces joined, with their size and SHA-256, past the 1,024 buffers of one system call', () => {
    // 2,500 pieces of 0 to 4,999 bytes: three writes of up to 1,024 buffers, empty ones among them.
    const pieces = Array.from({ length: 2500 }, (_, i) => Buffer.alloc((i * 7919) % 5000, i % 251));
    const file = path.join(temp, 'pieces', 'deep', 'pack.pdf');
    const written = writePieces(file, pieces);
    // The expected file joined here; its hash from Node's crypto module (a reference outside this project).
    const expected = Buffer.concat(pieces);
    expect(written).toEqual({ bytes: expected.length, sha256: createHash('sha256').update(expected).digest('hex') });
    expect(readFileSync(file).equals(expected)).toBe(true);
    // Written again, shorter: the file is replaced, not overwritten in place.
    expect(writePieces(file, [Buffer.from('%PDF')]).bytes).toBe(4);
    expect(readFileSync(file, 'latin1')).toBe('%PDF');
  });
});

describe('the build cache taken over from --out', () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'plumbline-takeover-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const out = path.join(dir, 'out');
  const cacheFile = (name: string) => path.join(out, 'cache', name);
  const pack = () => {
    const folder = openPackFolder(out);
    return folder;
  };

  it('keeps the kept files, writes the rest and removes what the new build does not list', () => {
    mkdirSync(path.join(out, 'cache'), { recursive: true });
    writeFileSync(path.join(out, 'manifest.json'), '{}');
    writeFileSync(cacheFile('kept'), 'kept bytes');
    writeFileSync(cacheFile('stale'), 'no longer listed');
    const extra = new Map<string, (into: string) => Uint8Array>([
      ['cache/kept', () => { throw new Error('a kept file is not made again'); }],
      ['cache/new', () => new TextEncoder().encode('made here')],
    ]);
    writePack(pack(), new Map([['manifest.json', new TextEncoder().encode('{"v":2}')]]), extra, new Set(['cache/kept']), new Map(), 'cache');
    expect(readdirSync(path.join(out, 'cache')).sort()).toEqual(['kept', 'new']);
    expect(readFileSync(cacheFile('kept'), 'utf8')).toBe('kept bytes');
    expect(readFileSync(cacheFile('new'), 'utf8')).toBe('made here');
    expect(readFileSync(path.join(out, 'manifest.json'), 'utf8')).toBe('{"v":2}');
    expect(readdirSync(dir)).toEqual(['out']);
  });

  it('puts the cache back into --out when the new pack cannot be written', () => {
    const before = hashTree(out);
    const extra = new Map<string, (into: string) => Uint8Array>([
      ['cache/kept', () => new Uint8Array()],
      ['cache/broken', () => { throw new Error('cannot be made'); }],
    ]);
    expect(() => writePack(pack(), new Map([['manifest.json', new Uint8Array([123, 125])]]), extra, new Set(['cache/kept']), new Map(), 'cache')).toThrow('cannot be made');
    expect(hashTree(out)).toEqual(before);
    expect(readdirSync(dir)).toEqual(['out']);
  });
});
