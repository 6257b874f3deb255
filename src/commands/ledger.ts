/**
 * `ledger <workspace> add|accept`: record decisions in ledger.csv. Every new
 * row is checked exactly as build would read it — the workspace is loaded
 * with the rows appended in memory and assessed — and refused, with the
 * diagnostics, if it brings any new error. Only then is it appended.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { parse as parseCsv } from 'csv-parse/sync';
import { planSummary } from '../assess.ts';
import type { Diagnostic } from '../diagnostics.ts';
import { LEDGER_ACTIONS, type LedgerAction } from '../model.ts';
import { LEDGER_COLUMNS, ledgerLine } from '../review/ledger-line.ts';
import { isIsoDate } from '../workspace/dates.ts';
import { LEDGER_FILE } from '../workspace/ledger-file.ts';
import { loadWorkspace } from '../workspace/load.ts';
import { appendOnce, ledgerWithLines, readIfExists } from '../workspace/write.ts';
import { EXIT, type Io, UsageError, closest, parse, plural, printDiagnostics } from './common.ts';
import { HELP } from './help.ts';

const HEADER = LEDGER_COLUMNS.join(',');

const errorKey = (d: Diagnostic) => `${d.ruleId}|${d.characteristic ?? ''}|${d.message}`;

class Refused extends Error {
  constructor(
    readonly diagnostics: readonly Diagnostic[],
    message: string,
  ) {
    super(message);
  }
}

function errorsWith(dir: string, ledgerText: string): Diagnostic[] {
  const loaded = loadWorkspace(dir, { ledgerText });
  if (!loaded.ok) throw new Refused(loaded.diagnostics, 'The workspace cannot be read; fix the problems above first.');
  return planSummary(loaded.workspace, loaded.workspace.config.period.to).diagnostics.filter((d) => d.severity === 'error');
}

/** Errors the build would have with `lines` appended that it does not have now, or that sit on the new rows. */
function newErrors(dir: string, existing: string, lines: readonly string[]): { errors: Diagnostic[]; append: string } {
  const had = new Set(errorsWith(dir, existing).map(errorKey));
  const { text, append } = ledgerWithLines(existing, lines);
  const firstNew = existing.split(/\r\n|\n/).length - (existing.endsWith('\n') ? 1 : 0) + 1;
  const errors = errorsWith(dir, text).filter((d) => !had.has(errorKey(d)) || (d.file === LEDGER_FILE && (d.line ?? 0) >= firstNew));
  return { errors, append };
}

/** Checks `lines` and appends them to the workspace's ledger, creating it with its header if it is missing. */
function appendChecked(dir: string, lines: readonly string[], io: Io): number {
  const file = path.join(dir, LEDGER_FILE);
  const current = readIfExists(file);
  const existing = current ?? `${HEADER}\n`;
  try {
    const { errors, append } = newErrors(dir, existing, lines);
    if (errors.length > 0) {
      printDiagnostics(io, errors, false);
      io.err(`Nothing was appended: the ${lines.length === 1 ? 'row' : 'rows'} would bring ${plural(errors.length, 'error')} into the build.`);
      return EXIT.usage;
    }
    // A workspace without a ledger gets one, header first, in the same single write.
    appendOnce(file, current === undefined ? existing + append : append);
  } catch (e) {
    if (e instanceof Refused) {
      printDiagnostics(io, e.diagnostics, false);
      io.err(e.message);
      return EXIT.usage;
    }
    throw e;
  }
  for (const l of lines) io.out(`appended: ${l}`);
  return EXIT.ok;
}

function requireWorkspace(dir: string): void {
  if (!existsSync(path.join(dir, 'review.yaml'))) throw new UsageError(`${dir} has no review.yaml; give a workspace folder`);
}

function add(dir: string, args: readonly string[], io: Io): number {
  const { values, positionals } = parse(args, {
    characteristic: { type: 'string', short: 'c' },
    action: { type: 'string', short: 'a' },
    point: { type: 'string', short: 'p' },
    reason: { type: 'string', short: 'r' },
    by: { type: 'string', short: 'b' },
    date: { type: 'string', short: 'd' },
  });
  if (values.help) return io.out(HELP.ledger!), EXIT.ok;
  if (positionals.length > 0) throw new UsageError(`ledger add takes options only, not ${positionals.join(' ')}`);
  const need = (name: string) => {
    const v = values[name];
    if (typeof v !== 'string' || v === '') throw new UsageError(`ledger add needs --${name}`);
    return v;
  };
  const action = need('action');
  if (!(LEDGER_ACTIONS as readonly string[]).includes(action)) {
    const hint = closest(action, LEDGER_ACTIONS);
    throw new UsageError(`--action ${action} is not a ledger action${hint ? `; did you mean ${hint}?` : ''} (actions: ${LEDGER_ACTIONS.join(', ')})`);
  }
  const date = typeof values.date === 'string' ? values.date : io.today;
  if (!date || !isIsoDate(date)) throw new UsageError(`--date ${String(date)} is not a date written YYYY-MM-DD`);
  const line = ledgerLine({
    date,
    characteristic: need('characteristic'),
    action: action as LedgerAction,
    point: action === 'note' ? (typeof values.point === 'string' ? values.point : '') : need('point'),
    reason: typeof values.reason === 'string' ? values.reason : '',
    by: typeof values.by === 'string' ? values.by : '',
  });
  return appendChecked(dir, [line], io);
}

const sha = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

async function accept(dir: string, args: readonly string[], io: Io): Promise<number> {
  const { values, positionals } = parse(args, {
    from: { type: 'string', short: 'f' },
    only: { type: 'string' },
    by: { type: 'string', short: 'b' },
    yes: { type: 'boolean', short: 'y' },
  });
  if (values.help) return io.out(HELP.ledger!), EXIT.ok;
  if (positionals.length > 0) throw new UsageError(`ledger accept takes options only, not ${positionals.join(' ')}`);
  if (typeof values.from !== 'string') throw new UsageError('ledger accept needs --from <pack>, the folder of the build whose proposals to accept');
  const pack = values.from;
  const read = (name: string): unknown => {
    const file = path.join(pack, name);
    if (!existsSync(file)) throw new UsageError(`${pack} holds no ${name}; give the folder a build wrote`);
    try {
      return JSON.parse(readFileSync(file, 'utf8'));
    } catch (e) {
      throw new UsageError(`${file} is not valid JSON (${(e as Error).message})`);
    }
  };
  const summary = read('summary.json') as { characteristics?: { id?: unknown; recommendation?: { ledger?: unknown } | null }[] };
  const manifest = read('manifest.json') as { inputs?: { path?: unknown; sha256?: unknown }[] };
  // Proposals are only sound against the ledger they were made from.
  const built = manifest.inputs?.find((i) => i.path === LEDGER_FILE)?.sha256;
  const ledgerFile = path.join(dir, LEDGER_FILE);
  const now = existsSync(ledgerFile) ? sha(readFileSync(ledgerFile)) : undefined;
  if (built !== now) {
    throw new UsageError(`ledger.csv has changed since ${pack} was built; build again and accept from the new pack`);
  }
  const ids = new Set<string>();
  let lines: { id: string; line: string }[] = [];
  for (const c of summary.characteristics ?? []) {
    if (typeof c.id !== 'string') continue;
    ids.add(c.id);
    const proposed = c.recommendation?.ledger;
    if (Array.isArray(proposed)) for (const l of proposed) if (typeof l === 'string') lines.push({ id: c.id, line: l });
  }
  if (typeof values.only === 'string') {
    if (!ids.has(values.only)) {
      const hint = closest(values.only, [...ids]);
      throw new UsageError(`--only ${values.only} names no characteristic of that pack${hint ? `; did you mean ${hint}?` : ''}`);
    }
    lines = lines.filter((l) => l.id === values.only);
  }
  if (typeof values.by === 'string') {
    lines = lines.map((l) => {
      const cells = (parseCsv(l.line, { relax_column_count: true }) as string[][])[0]!;
      cells[LEDGER_COLUMNS.indexOf('by')] = values.by as string;
      return {
        id: l.id,
        line: ledgerLine({ date: cells[0]!, characteristic: cells[1]!, action: cells[2] as LedgerAction, point: cells[3]!, reason: cells[4]!, by: cells[5]! }),
      };
    });
  }
  if (lines.length === 0) return io.out('Nothing to accept: that build proposed no ledger lines.'), EXIT.ok;
  let chosen = lines;
  if (values.yes !== true) {
    if (!io.ask) throw new UsageError('ledger accept asks before appending each line; run it in a terminal, or pass --yes to accept them all');
    chosen = [];
    for (const l of lines) {
      io.out(l.line);
      const answer = (await io.ask(`Append this line for ${l.id}? [y/N] `)).trim().toLowerCase();
      if (answer === 'y' || answer === 'yes') chosen.push(l);
    }
    if (chosen.length === 0) return io.out('Nothing appended.'), EXIT.ok;
  }
  return appendChecked(
    dir,
    chosen.map((l) => l.line),
    io,
  );
}

export async function ledger(args: readonly string[], io: Io): Promise<number> {
  const [dir, sub, ...rest] = args;
  if (dir === undefined || dir === '--help' || dir === '-h') return io.out(HELP.ledger!), EXIT.ok;
  if (sub === undefined) throw new UsageError('ledger needs a subcommand: plumbline ledger <workspace> add|accept ...');
  requireWorkspace(dir);
  if (sub === 'add') return add(dir, rest, io);
  if (sub === 'accept') return await accept(dir, rest, io);
  const hint = closest(sub, ['add', 'accept']);
  throw new UsageError(`unknown ledger subcommand "${sub}"${hint ? `; did you mean "${hint}"?` : ''} (add, accept)`);
}

