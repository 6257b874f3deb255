/**
 * The bad-input corpus (test/fixtures/bad/, written by make-cases.mjs): one
 * small workspace per problem with review.yaml, data and ledger files, and
 * what plumbline must say — every error and warning with its file, line and
 * rule id, a pattern for the meaning of its message, and the exit class
 * (2: the workspace is refused, nothing else read; 1: built, but a
 * characteristic cannot be assessed; 0: built). Cases named ok-* are inputs
 * plumbline accepts as they are (a byte-order mark, CRLF, trailing
 * delimiters, quoted fields) and must read the values written.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { planSummary } from '../../src/assess.ts';
import { loadWorkspace } from '../../src/workspace/load.ts';

const DIR = path.join(import.meta.dirname, '../fixtures/bad');
const cases = readdirSync(DIR).filter((n) => statSync(path.join(DIR, n)).isDirectory()).sort();

interface Expected {
  exit: 0 | 1 | 2;
  diagnostics: { severity: string; file: string; line: number | null; ruleId: string; meaning: string }[];
  values?: number[];
}

describe('the bad-input corpus', () => {
  it('has at least 60 cases', () => expect(cases.length).toBeGreaterThanOrEqual(60));
  for (const name of cases) {
    it(name, () => {
      const expected = JSON.parse(readFileSync(path.join(DIR, name, 'expected.json'), 'utf8')) as Expected;
      const loaded = loadWorkspace(path.join(DIR, name));
      const plan = loaded.ok ? planSummary(loaded.workspace, loaded.workspace.config.period.to) : undefined;
      const exit = loaded.ok ? plan!.exitCode : 2;
      const all = loaded.ok ? plan!.diagnostics : loaded.diagnostics;
      const got = all.filter((d) => d.severity !== 'info');
      expect(got.map((d) => [d.severity, d.file, d.line ?? null, d.ruleId])).toEqual(expected.diagnostics.map((d) => [d.severity, d.file, d.line, d.ruleId]));
      expected.diagnostics.forEach((d, i) => expect(got[i]!.message).toMatch(new RegExp(d.meaning)));
      expect(exit).toBe(expected.exit);
      if (expected.values) {
        const a = plan!.assessments[0]!;
        if (a.status !== 'assessed') throw new Error('not assessed');
        expect(a.location.values).toEqual(expected.values);
      }
    });
  }
});
