/**
 * The analysis core is pure (DEVELOPERS.md): no file system, no process, no
 * clock, no randomness. Until a linter enforces it, this test reads the
 * sources and rejects the imports and calls that would break it.
 */
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const SRC = path.join(import.meta.dirname, '../src');
const PURE = ['stats', 'limits', 'signals', 'review', 'render/scene'];
const FORBIDDEN: [RegExp, string][] = [
  [/from ['"]node:(fs|path|os|child_process)['"]/, 'imports a node I/O module'],
  [/\bprocess\./, 'touches process'],
  [/Date\.now\(\)|new Date\(\)/, 'reads the clock'],
  [/Math\.random\(/, 'draws random numbers'],
];

const files = [
  ...PURE.flatMap((dir) =>
    (readdirSync(path.join(SRC, dir), { recursive: true }) as string[]).filter((f) => f.endsWith('.ts')).map((f) => path.join(dir, f)),
  ),
  'analyse.ts',
  'summary.ts',
  'format.ts',
  'pack/content.ts',
  'pack/template.ts',
  'pack/mdast.ts',
  'pack/markdown.ts',
  'pack/figures.ts',
  'pack/cautions.ts',
  'workspace/select.ts',
];

describe('the analysis core stays pure', () => {
  it('covers the pure folders', () => expect(files.length).toBeGreaterThan(20));
  for (const f of files) {
    it(f, () => {
      const text = readFileSync(path.join(SRC, f), 'utf8');
      for (const [pattern, what] of FORBIDDEN) expect(pattern.test(text), `${f} ${what}`).toBe(false);
    });
  }
});
