/**
 * The comparison record (record.json) is the part of a summary that "Since
 * the last review" reads. Checked the direct way: comparing two full
 * summaries and comparing their records must give the same report, on a
 * pair of demo months that differ in actions, signals, limits and ledger rows.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { planSummary } from '../../src/assess.ts';
import { compareSummaries, comparisonRecord, previousSummarySchema } from '../../src/review/since.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';

const DEMO = path.join(import.meta.dirname, '../../data/demo');
const temp = mkdtempSync(path.join(tmpdir(), 'plumbline-record-'));
afterAll(() => rmSync(temp, { recursive: true, force: true }));

function summaryOf(dir: string, asOf: string) {
  const loaded = loadWorkspace(dir);
  if (!loaded.ok) throw new Error('demo did not load');
  // Through JSON, as a pack's summary.json is read back.
  return previousSummarySchema.parse(JSON.parse(JSON.stringify(planSummary(loaded.workspace, asOf).summary)));
}

describe('the comparison record', () => {
  // Last month: October's review, before the ledger's last three rows (November's points are left for later).
  const october = path.join(temp, 'october');
  cpSync(DEMO, october, { recursive: true });
  const review = readFileSync(path.join(DEMO, 'review.yaml'), 'utf8');
  writeFileSync(path.join(october, 'review.yaml'), review.replace('period: {from: 2026-11-01, to: 2026-11-30}', 'period: {from: 2026-10-01, to: 2026-10-31}'));
  const ledger = readFileSync(path.join(DEMO, 'ledger.csv'), 'utf8').trimEnd().split('\n');
  writeFileSync(path.join(october, 'ledger.csv'), `${ledger.slice(0, -3).join('\n')}\n`);
  const previous = summaryOf(october, '2026-10-31');
  const current = summaryOf(DEMO, '2026-11-30');

  it('gives the same "since" report as the full summaries, on months that differ in every respect compared', () => {
    expect(review).toContain('period: {from: 2026-11-01, to: 2026-11-30}');
    const full = compareSummaries(previous, current);
    expect(compareSummaries(comparisonRecord(previous), comparisonRecord(current))).toEqual(full);
    // The pair is a real test: something of each kind changed.
    expect(full.actions.length).toBeGreaterThan(0);
    expect(full.signals.length).toBeGreaterThan(0);
    expect(full.limits.length).toBeGreaterThan(0);
    expect(full.ledger).toHaveLength(3);
  });

  it('keeps one point per characteristic at most, and reads back through the schema it is checked with', () => {
    const record = comparisonRecord(current);
    expect(record.characteristics.every((c) => c.points.length <= 1)).toBe(true);
    expect(previousSummarySchema.parse(JSON.parse(JSON.stringify(record)))).toEqual(record);
  });
});
