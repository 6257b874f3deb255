/**
 * summary.json written through a sink as it is made (the CLI's route, into
 * the pack's temporary folder) is the file the in-memory route gives, and
 * the manifest lists it with the same size and SHA-256.
 */
import { createHash } from 'node:crypto';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { planPack } from '../../src/build.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';
import { ROOT } from '../helpers/cli.ts';

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
});
