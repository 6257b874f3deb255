/**
 * Evidence integrity: the ledger's running hash in manifest.json, the
 * history check against the previous pack, and `plumbline verify`. Hashes
 * are recomputed here with node:crypto, independently of the code under test.
 */
import { createHash } from 'node:crypto';
import { appendFileSync, cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main } from '../src/cli.ts';
import { findRewrite, ledgerChain, ledgerRows } from '../src/review/ledger-chain.ts';

const ROOT = path.join(import.meta.dirname, '..');
const FIXTURE = path.join(ROOT, 'test/fixtures/engine');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-integrity-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));
const sha = (s: string | Uint8Array) => createHash('sha256').update(s).digest('hex');

async function run(...args: string[]) {
  const out: string[] = [];
  const err: string[] = [];
  const code = await main(args, { out: (l) => out.push(l), err: (l) => err.push(l), today: '2026-12-02' });
  return { code, out: out.join('\n'), err: err.join('\n') };
}

const HEADER = 'date,characteristic,action,point,reason,by\n';
const ROW1 = '2026-01-05,a,freeze,2026-01-04,Stable,R. O.';
const ROW2 = '2026-02-01,a,note,,"Gauge, recalibrated",M. S.';

describe('the running hash of ledger rows', () => {
  it('hᵢ = SHA-256(hᵢ₋₁ ␤ fields joined by U+001F), h₀ = SHA-256 of the format name', () => {
    const c = ledgerChain(ledgerRows(HEADER + ROW1 + '\n' + ROW2 + '\n'));
    const h0 = sha('plumbline-ledger-chain-1');
    const h1 = sha(`${h0}\n${['2026-01-05', 'a', 'freeze', '2026-01-04', 'Stable', 'R. O.'].join('\u001f')}`);
    const h2 = sha(`${h1}\n${['2026-02-01', 'a', 'note', '', 'Gauge, recalibrated', 'M. S.'].join('\u001f')}`);
    expect(c.chain).toEqual([h1, h2]);
    expect(c.head).toBe(h2);
    expect(c.rows).toBe(2);
  });
  it('counts content, not line ends or quoting', () => {
    const lf = ledgerChain(ledgerRows(HEADER + ROW1 + '\n'));
    const crlf = ledgerChain(ledgerRows((HEADER + ROW1 + '\n').replace(/\n/g, '\r\n')));
    const quoted = ledgerChain(ledgerRows(HEADER + '"2026-01-05","a","freeze","2026-01-04","Stable","R. O."\n'));
    expect(crlf.head).toBe(lf.head);
    expect(quoted.head).toBe(lf.head);
  });
  it('finds no rewrite when the ledger only grew, and the first row that differs otherwise', () => {
    const before = ledgerChain(ledgerRows(HEADER + ROW1 + '\n' + ROW2 + '\n'));
    const grown = ledgerRows(HEADER + ROW1 + '\n' + ROW2 + '\n2026-03-01,a,note,,More,\n');
    expect(findRewrite(before, ledgerChain(grown), grown)).toBeNull();
    const edited = ledgerRows(HEADER + ROW1 + '\n' + ROW2.replace('Gauge', 'Scale') + '\n');
    expect(findRewrite(before, ledgerChain(edited), edited)).toMatchObject({ row: 2, previousRows: 2, currentRows: 2 });
    const cut = ledgerRows(HEADER + ROW1 + '\n');
    expect(findRewrite(before, ledgerChain(cut), cut)).toMatchObject({ row: 2, previousRows: 2, currentRows: 1 });
    const inserted = ledgerRows(HEADER + '2025-12-01,a,note,,Earlier,\n' + ROW1 + '\n' + ROW2 + '\n');
    expect(findRewrite(before, ledgerChain(inserted), inserted)?.row).toBe(1);
  });
});

describe('build against the previous pack', () => {
  const ws = path.join(temp, 'ws');
  const out = path.join(temp, 'pack');
  it('records the chain in manifest.json; a changed earlier row is reported at the top of the next pack, and the record is carried forward', async () => {
    cpSync(FIXTURE, ws, { recursive: true });
    expect((await run('build', ws, '--out', out, '-q')).code).toBe(0);
    const ledgerText = readFileSync(path.join(ws, 'ledger.csv'), 'utf8');
    const manifest = JSON.parse(readFileSync(path.join(out, 'manifest.json'), 'utf8'));
    const dataRows = ledgerText.trim().split('\n').length - 1;
    expect(manifest.ledger.rows).toBe(dataRows);
    expect(manifest.ledger.chain).toHaveLength(dataRows);
    expect(manifest.ledger.rewrites).toEqual([]);

    // Appending keeps the history: no warning.
    appendFileSync(path.join(ws, 'ledger.csv'), '2031-01-01,torque,note,,Appended later,\n');
    const grown = await run('build', ws, '--out', out);
    expect(grown.err).not.toMatch(/history-rewritten/);

    // Editing the second row rewrites history.
    const lines = readFileSync(path.join(ws, 'ledger.csv'), 'utf8').split('\n');
    lines[2] = lines[2]!.replace(/,([^,]*),([^,]*)$/, ',Edited afterwards,$2');
    writeFileSync(path.join(ws, 'ledger.csv'), lines.join('\n'));
    const r = await run('build', ws, '--out', out);
    expect(r.err).toMatch(/ledger\.csv:3: warning Ledger history was rewritten since the pack built for .*: row 2 is not what it was .*\[ledger\/history-rewritten\]/);
    const md = readFileSync(path.join(out, 'index.md'), 'utf8');
    // The warning comes right after the title, before the cover table and everything else.
    expect(md.indexOf('## Ledger history rewritten')).toBeGreaterThan(0);
    expect(md.indexOf('## Ledger history rewritten')).toBeLessThan(md.indexOf('| Review'));
    const summary = JSON.parse(readFileSync(path.join(out, 'summary.json'), 'utf8'));
    expect(summary.integrity.rewritten).toMatchObject({ row: 2 });
    const again = await run('build', ws, '--out', out, '-q');
    expect(again.code).toBe(0);
    const carried = JSON.parse(readFileSync(path.join(out, 'manifest.json'), 'utf8')).ledger.rewrites;
    expect(carried).toHaveLength(1);
    expect(carried[0]).toMatchObject({ row: 2 });
  });
});

describe('plumbline verify', () => {
  const ws = path.join(temp, 'ws-verify');
  const out = path.join(temp, 'pack-verify');
  it('passes an intact pack and prints the manifest’s own SHA-256', async () => {
    cpSync(FIXTURE, ws, { recursive: true });
    await run('build', ws, '--out', out, '-q');
    const r = await run('verify', out, '--workspace', ws);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^Intact: \d+ files match manifest\.json, and \d+ inputs match/);
    expect(r.out).toContain(sha(readFileSync(path.join(out, 'manifest.json'))));
  });
  it('exits 1 naming each file changed, missing or added, and each input that differs', async () => {
    appendFileSync(path.join(out, 'index.md'), 'tampered\n');
    rmSync(path.join(out, 'summary.json'));
    writeFileSync(path.join(out, 'charts', 'extra.svg'), '<svg/>');
    appendFileSync(path.join(ws, 'ledger.csv'), '2031-01-02,torque,note,,Later,\n');
    const r = await run('verify', out, '--workspace', ws, '--json');
    expect(r.code).toBe(1);
    const j = JSON.parse(r.out);
    expect(j.intact).toBe(false);
    expect(j.findings).toEqual([
      { path: 'charts/extra.svg', problem: 'not in the manifest', where: 'pack' },
      { path: 'index.md', problem: 'changed', where: 'pack' },
      { path: 'summary.json', problem: 'missing', where: 'pack' },
      { path: 'ledger.csv', problem: 'changed', where: 'workspace' },
    ]);
  });
  it('never reads outside the pack for a path the manifest lists, and refuses a folder without a manifest (exit 2)', async () => {
    const forged = path.join(temp, 'forged');
    cpSync(out, forged, { recursive: true });
    const m = JSON.parse(readFileSync(path.join(forged, 'manifest.json'), 'utf8'));
    m.outputs = [{ path: '../pack-verify/index.html', bytes: 1, sha256: sha(readFileSync(path.join(out, 'index.html'))) }];
    writeFileSync(path.join(forged, 'manifest.json'), JSON.stringify(m));
    const r = await run('verify', forged, '--json');
    expect(r.code).toBe(1);
    expect(JSON.parse(r.out).findings[0]).toEqual({ path: '../pack-verify/index.html', problem: 'missing', where: 'pack' });
    const none = await run('verify', ws);
    expect(none.code).toBe(2);
    expect(none.err).toMatch(/holds no manifest\.json/);
  });
});
