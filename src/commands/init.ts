/** `init <dir>`: a small working workspace to start from. */
import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { TOOL_TEMPLATES } from '../workspace/templates.ts';
import { createWorkspace } from '../workspace/write.ts';
import { EXIT, type Io, UsageError, parse } from './common.ts';
import { HELP } from './help.ts';

const STARTER = path.join(TOOL_TEMPLATES, 'init');

export function init(args: readonly string[], io: Io): number {
  const { values, positionals } = parse(args, {});
  if (values.help) return io.out(HELP.init!), EXIT.ok;
  if (positionals.length !== 1) throw new UsageError('init needs one folder to create: plumbline init <dir>');
  const dir = positionals[0]!;
  const files = new Map<string, Uint8Array>();
  for (const name of readdirSync(STARTER, { recursive: true }) as string[]) {
    const full = path.join(STARTER, name);
    if (name.endsWith('.csv') || name.endsWith('.yaml')) files.set(name.split(path.sep).join('/'), readFileSync(full));
  }
  createWorkspace(dir, files);
  io.out(`Created ${dir}: review.yaml, ${files.size - 2} data files and an empty ledger.csv.`);
  io.out(`Next: plumbline check ${dir} && plumbline build ${dir} --out ${path.join(dir, '..', `${path.basename(path.resolve(dir))}-pack`)}`);
  return EXIT.ok;
}
