/** What every command shares: the terminal as an interface, argument parsing with suggestions, diagnostics printing. */
import { parseArgs } from 'node:util';
import { type Diagnostic, formatDiagnostic, sortDiagnostics } from '../diagnostics.ts';

export const EXIT = { ok: 0, notAssessed: 1, usage: 2, internal: 70 } as const;

/** The terminal, injected so commands can be run and tested without a process. */
export interface Io {
  out(line: string): void;
  err(line: string): void;
  /** Transient progress on a terminal; absent when stderr is not one. */
  progress?(line: string): void;
  /** Colour is wanted: stderr is a terminal and NO_COLOR is not set. */
  readonly color?: boolean;
  /** Asks a question on a terminal and returns the answer; absent when stdin is not one. */
  ask?(question: string): Promise<string>;
  /** Today's date (YYYY-MM-DD), the default date of ledger rows; read from the clock at the edge. */
  readonly today?: string;
  /** Each stage's time is wanted on stderr (PLUMBLINE_TIMING=1). */
  readonly timing?: boolean;
}

/** A user's mistake in how plumbline was called: printed as one line, exit 2, no stack. */
export class UsageError extends Error {}

export function closest(word: string, options: readonly string[]): string | undefined {
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

export interface Parsed {
  readonly values: Readonly<Record<string, string | boolean | undefined>>;
  readonly positionals: string[];
}

export type OptionSpec = Record<string, { type: 'string' | 'boolean'; short?: string }>;

/** Every command takes --help and --version. */
export function parse(args: readonly string[], options: OptionSpec): Parsed {
  const all: OptionSpec = { help: { type: 'boolean', short: 'h' }, version: { type: 'boolean', short: 'v' }, ...options };
  try {
    return parseArgs({ args: [...args], options: all, allowPositionals: true, strict: true });
  } catch (e) {
    const m = /Unknown option '(-{1,2})([^']+)'/.exec((e as Error).message);
    if (m) {
      const hint = closest(m[2]!, Object.keys(all));
      throw new UsageError(`unknown option ${m[1]}${m[2]}${hint ? `; did you mean --${hint}?` : ''}`);
    }
    throw new UsageError((e as Error).message);
  }
}

const PAINT = { error: '\u001b[31m', warning: '\u001b[33m', info: '\u001b[2m' } as const;

export function printDiagnostics(io: Io, list: readonly Diagnostic[], quiet: boolean) {
  for (const d of sortDiagnostics(list)) {
    if (quiet && d.severity !== 'error') continue;
    const line = formatDiagnostic(d);
    io.err(io.color ? line.replace(`: ${d.severity} `, `: ${PAINT[d.severity]}${d.severity}\u001b[0m `) : line);
  }
}

export function diagnosticJson(d: Diagnostic) {
  return { severity: d.severity, ruleId: d.ruleId, file: d.file, line: d.line ?? null, column: d.column ?? null, characteristic: d.characteristic ?? null, message: d.message };
}

export function workspaceArg(positionals: readonly string[], command: string): string {
  if (positionals.length === 0) throw new UsageError(`${command} needs a workspace folder: plumbline ${command} <workspace>`);
  if (positionals.length > 1) throw new UsageError(`${command} takes one workspace folder, not ${positionals.length} (${positionals.join(' ')})`);
  return positionals[0]!;
}

export { plural } from '../format.ts';
