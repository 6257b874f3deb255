/**
 * The command line: the only module that talks to the terminal and sets the
 * exit status. 0 built; 1 built, but something could not be assessed;
 * 2 bad input or usage, nothing written; 70 a fault in plumbline itself.
 */
import { parseArgs } from 'node:util';
import { planSummary } from './assess.ts';
import { type Diagnostic, formatDiagnostic, hasErrors, sortDiagnostics } from './diagnostics.ts';
import { OutputRefused, checkOutDir, writePack } from './pack/write.ts';
import { TOOL } from './version.ts';
import { isIsoDate } from './workspace/dates.ts';
import { loadWorkspace } from './workspace/load.ts';

export const EXIT = { ok: 0, notAssessed: 1, usage: 2, internal: 70 } as const;

export interface Io {
  out(line: string): void;
  err(line: string): void;
  /** Transient progress on a terminal; absent when stderr is not one. */
  progress?(line: string): void;
}

const consoleIo: Io = {
  out: (l) => process.stdout.write(`${l}\n`),
  err: (l) => process.stderr.write(`${l}\n`),
  ...(process.stderr.isTTY ? { progress: (l: string) => process.stderr.write(l ? `\r\u001b[2K${l}` : '\r\u001b[2K') } : {}),
};

const HELP: Record<string, string> = {
  main: `plumbline ${TOOL.version} — control-limit decisions and review packs from plain files

Usage:
  plumbline check <workspace>               validate the workspace and print its problems; writes nothing
  plumbline build <workspace> --out <dir>   assess every characteristic and write the pack to <dir>

Options:
  -h, --help       show help (also: plumbline <command> --help)
  -v, --version    print the version

Exit status: 0 built, 1 built but a characteristic could not be assessed,
2 bad input or usage (nothing written), 70 a fault in plumbline.`,
  check: `Usage: plumbline check <workspace> [--quiet]

Reads review.yaml, every data file and ledger.csv, and prints each problem as
file:line:column with a sentence saying what is wrong. Writes nothing.

Options:
  -q, --quiet   print errors only
  -h, --help    show this help

Exit status: 0 no errors, 1 a characteristic has errors, 2 review.yaml is unusable.`,
  build: `Usage: plumbline build <workspace> --out <dir> [--date YYYY-MM-DD] [--paper a4|letter] [--png] [--quiet]

Assesses every characteristic (limits, signals, a recommendation) and writes
the review pack to <dir>: index.md with charts/*.svg, index.html, pack.pdf,
summary.json and manifest.json. The folder is replaced whole, and only once
everything is ready.

Options:
  -o, --out <dir>       where the pack goes (required; a new or earlier pack folder)
  -d, --date <date>     the build date: written on proposed ledger lines and in the PDF (default: the period's end)
      --paper <size>    PDF paper size, a4 (default) or letter
      --png             also write charts/*.png (twice the chart size, for slides and e-mail)
  -q, --quiet           print errors and the one-line result only
  -h, --help         show this help

Exit status: 0 built, 1 built but a characteristic could not be assessed,
2 bad input or usage (nothing written).`,
};

const COMMANDS = ['check', 'build', 'help'] as const;

class UsageError extends Error {}

function closest(word: string, options: readonly string[]): string | undefined {
  const distance = (a: string, b: string) => {
    const d = Array.from({ length: a.length + 1 }, (_, i) => [i, ...Array<number>(b.length).fill(0)]);
    for (let j = 1; j <= b.length; j++) d[0]![j] = j;
    for (let i = 1; i <= a.length; i++)
      for (let j = 1; j <= b.length; j++)
        d[i]![j] = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1));
    return d[a.length]![b.length]!;
  };
  const best = options.map((o) => [o, distance(word, o)] as const).sort((x, y) => x[1] - y[1])[0];
  return best && best[1] <= 2 ? best[0] : undefined;
}

interface Parsed {
  readonly values: Readonly<Record<string, string | boolean | undefined>>;
  readonly positionals: string[];
}

function parse(args: string[], options: Record<string, { type: 'string' | 'boolean'; short?: string }>): Parsed {
  try {
    return parseArgs({ args, options: { help: { type: 'boolean', short: 'h' }, ...options }, allowPositionals: true, strict: true });
  } catch (e) {
    const m = /Unknown option '(-{1,2})([^']+)'/.exec((e as Error).message);
    if (m) {
      const hint = closest(m[2]!, Object.keys(options));
      throw new UsageError(`unknown option ${m[1]}${m[2]}${hint ? `; did you mean --${hint}?` : ''}`);
    }
    throw new UsageError((e as Error).message);
  }
}

function printDiagnostics(io: Io, list: readonly Diagnostic[], quiet: boolean) {
  for (const d of sortDiagnostics(list)) {
    if (quiet && d.severity !== 'error') continue;
    io.err(formatDiagnostic(d));
  }
}

function workspaceArg(positionals: string[], command: string): string {
  if (positionals.length === 0) throw new UsageError(`${command} needs a workspace folder: plumbline ${command} <workspace>`);
  if (positionals.length > 1) throw new UsageError(`${command} takes one workspace folder, not ${positionals.length} (${positionals.join(' ')})`);
  return positionals[0]!;
}

function check(args: string[], io: Io): number {
  const { values, positionals } = parse(args, { quiet: { type: 'boolean', short: 'q' } });
  if (values.help) return io.out(HELP.check!), EXIT.ok;
  const loaded = loadWorkspace(workspaceArg(positionals, 'check'));
  if (!loaded.ok) {
    printDiagnostics(io, loaded.diagnostics, false);
    io.err('The workspace cannot be read (review.yaml or a template); nothing else was checked.');
    return EXIT.usage;
  }
  const plan = planSummary(loaded.workspace, loaded.workspace.config.period.to);
  printDiagnostics(io, plan.diagnostics, values.quiet === true);
  const bad = plan.assessments.filter((a) => a.status !== 'assessed').map((a) => a.characteristic.id);
  const errors = plan.diagnostics.filter((d) => d.severity === 'error').length;
  io.out(
    bad.length > 0 || errors > 0
      ? `${errors} error${errors === 1 ? '' : 's'}; ${bad.length} of ${plan.assessments.length} characteristics cannot be assessed${bad.length ? `: ${bad.join(', ')}` : ''}.`
      : `No errors; ${plan.assessments.length} characteristics can be assessed.`,
  );
  return plan.exitCode === 0 && !hasErrors(plan.diagnostics) ? EXIT.ok : EXIT.notAssessed;
}

async function build(args: string[], io: Io): Promise<number> {
  const { values, positionals } = parse(args, {
    out: { type: 'string', short: 'o' },
    date: { type: 'string', short: 'd' },
    paper: { type: 'string' },
    png: { type: 'boolean' },
    quiet: { type: 'boolean', short: 'q' },
  });
  if (values.help) return io.out(HELP.build!), EXIT.ok;
  const dir = workspaceArg(positionals, 'build');
  if (typeof values.out !== 'string' || values.out === '') throw new UsageError('build needs --out <dir>, the folder the pack is written to');
  if (typeof values.date === 'string' && !isIsoDate(values.date)) throw new UsageError(`--date ${values.date} is not a date written YYYY-MM-DD`);
  const paper = values.paper ?? 'a4';
  if (paper !== 'a4' && paper !== 'letter') throw new UsageError(`--paper ${String(paper)} is not a paper size this build knows; use a4 or letter`);
  const outDir = values.out;
  const asOf = typeof values.date === 'string' ? values.date : undefined;
  const loaded = loadWorkspace(dir);
  if (!loaded.ok) {
    printDiagnostics(io, loaded.diagnostics, false);
    io.err('Nothing was written: fix the problems above first.');
    return EXIT.usage;
  }
  const ws = loaded.workspace;
  checkOutDir(outDir, ws.root, [...ws.inputs.keys()]);
  const quiet = values.quiet === true;
  const progress = quiet || !io.progress ? undefined : io.progress.bind(io);
  // The renderers are loaded only when a pack is built.
  const { planPack } = await import('./build.ts');
  const plan = await planPack(ws, asOf ?? ws.config.period.to, {
    paper,
    png: values.png === true,
    ...(progress ? { progress: (stage: string, done: number, total: number) => progress(`${stage} ${done}/${total}`) } : {}),
  });
  progress?.('');
  printDiagnostics(io, plan.diagnostics, quiet);
  writePack(outDir, plan.files);
  const counts = new Map<string, number>();
  for (const a of plan.assessments) {
    const key = a.status === 'assessed' ? a.recommendation.action : 'cannot be assessed';
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  const order = ['investigate', 're-baseline', 'freeze', 'keep', 'cannot be assessed'];
  const parts = order.filter((k) => counts.has(k)).map((k) => `${counts.get(k)} ${k}`);
  io.out(`Built ${plan.assessments.length} characteristic${plan.assessments.length === 1 ? '' : 's'} into ${outDir}: ${parts.join(', ')}.`);
  return plan.exitCode;
}

export async function main(argv: readonly string[], io: Io = consoleIo): Promise<number> {
  const [command, ...rest] = argv;
  try {
    if (command === undefined || command === '-h' || command === '--help' || command === 'help') {
      const topic = command === 'help' ? rest[0] : undefined;
      io.out(HELP[topic && topic in HELP ? topic : 'main']!);
      return EXIT.ok;
    }
    if (command === '-v' || command === '--version') return io.out(TOOL.version), EXIT.ok;
    if (command === 'check') return check(rest, io);
    if (command === 'build') return await build(rest, io);
    const hint = closest(command, COMMANDS);
    throw new UsageError(`unknown command "${command}"${hint ? `; did you mean "${hint}"?` : ''} (commands: check, build)`);
  } catch (e) {
    if (e instanceof UsageError || e instanceof OutputRefused) {
      io.err(`plumbline: ${e.message}`);
      if (e instanceof UsageError) io.err('Run plumbline --help for usage.');
      return EXIT.usage;
    }
    const err = e as Error;
    io.err(`plumbline: internal error — this is a fault in plumbline, not in your files. Please report it with the text below.`);
    io.err(err.stack ?? String(err));
    for (let c = err.cause as Error | undefined; c; c = c.cause as Error | undefined) io.err(`caused by: ${c.stack ?? String(c)}`);
    return EXIT.internal;
  }
}
