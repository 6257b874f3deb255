/**
 * `verify <pack>`: does a pack still match its manifest? Every output listed
 * must be there with its SHA-256, and nothing else may have been added; with
 * `--workspace`, every input listed must match that workspace too. Prints the
 * manifest's own SHA-256, which sender and receiver can compare by another
 * channel: a manifest rewritten together with the files it lists passes this
 * check, so only that comparison tells the pack is the one that was sent.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { z } from 'zod';
import { EXIT, type Io, UsageError, parse } from './common.ts';
import { CACHE_DIR } from '../pack/build-cache.ts';
import { HELP } from './help.ts';

const listed = z.array(z.looseObject({ path: z.string(), sha256: z.string().regex(/^[0-9a-f]{64}$/) }));
const manifestSchema = z.looseObject({ inputs: listed, outputs: listed });

export interface Finding {
  readonly path: string;
  readonly problem: 'changed' | 'missing' | 'not in the manifest';
  readonly where: 'pack' | 'workspace';
}

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

/** Paths below `dir`, with forward slashes, as the manifest writes them; the build cache is not part of a pack. */
function filesBelow(dir: string): string[] {
  return (readdirSync(dir, { recursive: true }) as string[])
    .filter((f) => statSync(path.join(dir, f)).isFile())
    .map((f) => f.split(path.sep).join('/'))
    .filter((f) => !f.startsWith(`${CACHE_DIR}/`));
}

/** A listed path must stay inside its folder: a manifest is input too. */
function inside(dir: string, rel: string): string | undefined {
  const abs = path.resolve(dir, rel);
  const r = path.relative(dir, abs);
  return r === '' || r.startsWith('..') || path.isAbsolute(r) ? undefined : abs;
}

function compare(dir: string, entries: z.infer<typeof listed>, where: Finding['where']): Finding[] {
  const out: Finding[] = [];
  for (const e of entries) {
    const abs = inside(dir, e.path);
    if (!abs || !existsSync(abs) || !statSync(abs).isFile()) out.push({ path: e.path, problem: 'missing', where });
    else if (sha256(readFileSync(abs)) !== e.sha256) out.push({ path: e.path, problem: 'changed', where });
  }
  return out;
}

export function verify(args: readonly string[], io: Io): number {
  const { values, positionals } = parse(args, { workspace: { type: 'string', short: 'w' }, json: { type: 'boolean' } });
  if (values.help) return io.out(HELP.verify!), EXIT.ok;
  if (positionals.length !== 1) throw new UsageError('verify takes one pack folder: plumbline verify <pack> [--workspace <dir>]');
  const dir = path.resolve(positionals[0]!);
  const file = path.join(dir, 'manifest.json');
  if (!existsSync(file)) throw new UsageError(`${positionals[0]} holds no manifest.json; give the folder of a pack`);
  const bytes = readFileSync(file);
  let json: unknown;
  try {
    json = JSON.parse(new TextDecoder().decode(bytes));
  } catch (e) {
    throw new UsageError(`${file} is not valid JSON (${(e as Error).message.split('\n')[0]})`);
  }
  const parsed = manifestSchema.safeParse(json);
  if (!parsed.success) throw new UsageError(`${file} is not a plumbline manifest: ${parsed.error.issues[0]!.path.join('.') || 'the top level'} ${parsed.error.issues[0]!.message}`);
  const m = parsed.data;

  const findings = compare(dir, m.outputs, 'pack');
  const known = new Set([...m.outputs.map((o) => o.path), 'manifest.json']);
  for (const f of filesBelow(dir)) if (!known.has(f)) findings.push({ path: f, problem: 'not in the manifest', where: 'pack' });
  const workspace = typeof values.workspace === 'string' ? path.resolve(values.workspace) : undefined;
  if (workspace) {
    if (!existsSync(workspace)) throw new UsageError(`--workspace ${values.workspace} does not exist`);
    findings.push(...compare(workspace, m.inputs, 'workspace'));
  }
  findings.sort((a, b) => (a.where === b.where ? (a.path < b.path ? -1 : 1) : a.where === 'pack' ? -1 : 1));
  const manifestSha = sha256(bytes);
  const code = findings.length ? EXIT.notAssessed : EXIT.ok;
  if (values.json) {
    io.out(JSON.stringify({ pack: positionals[0], manifestSha256: manifestSha, intact: findings.length === 0, checked: { outputs: m.outputs.length, inputs: workspace ? m.inputs.length : 0 }, findings }, null, 2));
    return code;
  }
  for (const f of findings) io.err(`${f.where === 'pack' ? positionals[0] : values.workspace}/${f.path}: ${f.problem}`);
  io.out(
    findings.length
      ? `Not intact: ${findings.length} difference${findings.length === 1 ? '' : 's'} from manifest.json.`
      : `Intact: ${m.outputs.length} files match manifest.json${workspace ? `, and ${m.inputs.length} inputs match ${values.workspace}` : ''}.`,
  );
  io.out(`manifest.json SHA-256 ${manifestSha} — compare it with the sender's to know this is the pack that was sent.`);
  return code;
}
