/**
 * summary.json written through a sink as it is made (the CLI's route, into
 * the pack's temporary folder) is the file the in-memory route gives, and
 * the manifest lists it with the same size and SHA-256.
 */
import { createHash } from 'node:crypto';
import { deserialize } from 'node:v8';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { planPack } from '../../src/build.ts';
import type { Assessment } from '../../src/analyse.ts';
import { type CacheHit, ENTRY_INDEX, type IndexedEntry, SUMMARY_INDEX, type SideKind, type SummaryIndex, sidePath } from '../../src/pack/build-cache.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { ROOT } from '../helpers/cli.ts';

/** The folder a pack is written into: none here (the cache's files are made in memory). */
const NOWHERE = path.join(ROOT, 'no such folder');

const byId = (a: { id: string }, b: { id: string }) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

describe('summary.json through a sink', () => {
  it('gives the same bytes and the same manifest as the in-memory route', async () => {
    const loaded = loadWorkspace(path.join(ROOT, 'data/demo'));
    if (!loaded.ok) throw new Error('demo does not load');
    const ws = loaded.workspace;
    const options = { paper: 'a4', png: false, jobs: 1 } as const;
    const held = await planPack(ws, '2026-11-30', options);
    const parts: Buffer[] = [];
    let opened = 0;
    const streamed = await planPack(ws, '2026-11-30', {
      ...options,
      summarySink: () => {
        opened++;
        const hash = createHash('sha256');
        let bytes = 0;
        return {
          write: (b) => (parts.push(Buffer.from(b)), hash.update(b), (bytes += b.length)),
          copy: () => {
            throw new Error('a build without a cache copies nothing');
          },
          close: () => ({ bytes, sha256: hash.digest('hex') }),
        };
      },
    });
    expect(opened).toBe(1);
    expect(held.placed.size).toBe(0);
    expect(streamed.files.has('summary.json')).toBe(false);
    const expected = Buffer.from(held.files.get('summary.json')!);
    expect(Buffer.concat(parts).equals(expected)).toBe(true);
    expect(streamed.placed.get('summary.json')).toEqual({ bytes: expected.length, sha256: createHash('sha256').update(expected).digest('hex') });
    expect(Buffer.from(streamed.files.get('manifest.json')!).equals(Buffer.from(held.files.get('manifest.json')!))).toBe(true);
  }, 60_000);

  it('keeps each characteristic\'s part of it in the cache, and a build from that cache writes the same bytes', async () => {
    const loaded = loadWorkspace(path.join(ROOT, 'data/demo'));
    if (!loaded.ok) throw new Error('demo does not load');
    const ws = loaded.workspace;
    const options = { paper: 'a4', png: false, jobs: 1 } as const;
    const first = await planPack(ws, '2026-11-30', { ...options, cache: () => undefined });
    const bytes = Buffer.from(first.files.get('summary.json')!);
    const parsed = JSON.parse(bytes.toString('utf8')) as { characteristics: { id: string }[] };
    const entryFile = /^\.plumbline-cache\/([0-9a-f]{64})\.v8$/;
    // Each entry file holds the assessment; the index (made after them) the brief and the side files.
    const assessments = new Map([...first.cache].flatMap(([p, made]) => {
      const m = entryFile.exec(p);
      return m ? [[m[1]!, deserialize(made(NOWHERE)) as Assessment] as const] : [];
    }));
    const entries = deserialize(first.cache.get(ENTRY_INDEX)!(NOWHERE)) as Map<string, IndexedEntry>;
    expect([...entries.keys()].sort()).toEqual([...assessments.keys()].sort());
    expect(entries.size).toBe(19);
    const side = (key: string, kind: SideKind) => first.cache.get(sidePath(key, kind))!(NOWHERE);
    // The index names each entry's part of summary.json: one item of its characteristics, as that file has it.
    const index = deserialize(first.cache.get(SUMMARY_INDEX)!(NOWHERE)) as SummaryIndex;
    expect(index.bytes).toBe(bytes.length);
    expect(index.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect([...index.pieces.keys()].sort()).toEqual([...entries.keys()].sort());
    const piece = (key: string) => bytes.subarray(...index.pieces.get(key)!);
    const items = [...entries.keys()].map((k) => JSON.parse(piece(k).toString('utf8')));
    expect(items.sort(byId)).toEqual([...parsed.characteristics].sort(byId));
    // Built again from the entries alone: the same summary.json, every part taken from the cache, and
    // the charts copied from it with the size and SHA-256 of the first build's files (hashed here).
    let piecesRead = 0;
    // And without reading a cached characteristic's data: every field read from it throws here.
    const untouched = {
      ...ws,
      characteristics: ws.characteristics.map((c) => {
        const refuse = (): never => {
          throw new Error(`the data of ${c.configured.id} was read`);
        };
        return { configured: c.configured, ledger: c.ledger, ledgerDiagnostics: c.ledgerDiagnostics, data: c.data, get characteristic() { return refuse(); }, get samples() { return refuse(); }, get laterLabels() { return refuse(); }, get diagnostics() { return refuse(); } };
      }),
    };
    const again = await planPack(untouched, '2026-11-30', {
      ...options,
      // Held in memory (no sink), each piece is read: where it is goes unused.
      summaryPieces: (key) => (index.pieces.has(key) ? { from: { file: 'not read', start: 0, end: 0 }, read: () => (piecesRead++, new Uint8Array(piece(key))) } : undefined),
      cache: (key) => {
        const entry = entries.get(key);
        if (!entry) return undefined;
        const sides = entry.sides as Record<SideKind, { bytes: number; sha256?: string } | undefined>;
        const hit = (kind: SideKind) => (sides[kind] ? { path: sidePath(key, kind), file: sides[kind], read: () => side(key, kind) } : undefined);
        return { brief: entry.brief, sides: entry.sides, assessment: () => assessments.get(key), path: 'not linked', entryBytes: entry.bytes, packed: entry.packed, side: hit } as CacheHit;
      },
    });
    expect(again.cacheUse).toEqual({ reused: 19, redone: 0 });
    expect(piecesRead).toBe(19);
    expect(Buffer.from(again.files.get('summary.json')!).equals(bytes)).toBe(true);
    const charts = [...first.files].filter(([p]) => p.startsWith('charts/'));
    expect(charts).toHaveLength(19);
    expect([...again.files.keys()].filter((p) => p.startsWith('charts/'))).toEqual([]);
    for (const [p, b] of charts) {
      const copy = again.copies.get(p)!;
      expect({ bytes: copy.bytes, sha256: copy.sha256 }).toEqual({ bytes: b.length, sha256: createHash('sha256').update(b).digest('hex') });
      expect(Buffer.from(first.cache.get(copy.from)!(NOWHERE)).equals(Buffer.from(b))).toBe(true);
    }
    expect(Buffer.from(again.files.get('manifest.json')!).equals(Buffer.from(first.files.get('manifest.json')!))).toBe(true);
  }, 60_000);
});
