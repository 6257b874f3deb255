/**
 * The command line: the only module that talks to the process — argv, the
 * terminal, the clock for today's date, and the exit status. 0 done; 1 done,
 * but something could not be assessed; 2 bad input or usage, nothing
 * written; 70 a fault in plumbline itself.
 */
import { createInterface } from 'node:readline/promises';
import { build, check } from './commands/assess.ts';
import { EXIT, type Io, UsageError, closest } from './commands/common.ts';
import { HELP } from './commands/help.ts';
import { init } from './commands/init.ts';
import { ledger } from './commands/ledger.ts';
import { verify } from './commands/verify.ts';
import { OutputRefused } from './pack/write.ts';
import { TOOL } from './version.ts';
import { WorkspaceRefused } from './workspace/write.ts';

export { EXIT, type Io };

const interactive = process.stdin.isTTY === true && process.stderr.isTTY === true;

const consoleIo: Io = {
  out: (l) => process.stdout.write(`${l}\n`),
  err: (l) => process.stderr.write(`${l}\n`),
  ...(process.stderr.isTTY ? { progress: (l: string) => process.stderr.write(l ? `\r\u001b[2K${l}` : '\r\u001b[2K') } : {}),
  // https://no-color.org: any non-empty NO_COLOR turns colour off.
  color: process.stderr.isTTY === true && !process.env.NO_COLOR,
  ...(interactive
    ? {
        ask: async (question: string) => {
          const rl = createInterface({ input: process.stdin, output: process.stderr });
          try {
            return await rl.question(question);
          } finally {
            rl.close();
          }
        },
      }
    : {}),
  today: new Date().toISOString().slice(0, 10),
  ...(process.env.PLUMBLINE_TIMING ? { timing: true } : {}),
};

const COMMANDS = ['init', 'check', 'build', 'ledger', 'verify', 'help'] as const;

export async function main(argv: readonly string[], io: Io = consoleIo): Promise<number> {
  const [command, ...rest] = argv;
  try {
    if (command === undefined || command === '-h' || command === '--help' || command === 'help') {
      const topic = command === 'help' ? rest[0] : undefined;
      io.out(HELP[topic && topic in HELP ? topic : 'main']!);
      return EXIT.ok;
    }
    if (command === '-v' || command === '--version' || rest.includes('--version') || rest.includes('-v')) return io.out(TOOL.version), EXIT.ok;
    if (command === 'init') return init(rest, io);
    if (command === 'check') return check(rest, io);
    if (command === 'build') return await build(rest, io);
    if (command === 'ledger') return await ledger(rest, io);
    if (command === 'verify') return verify(rest, io);
    const hint = closest(command, COMMANDS);
    throw new UsageError(`unknown command "${command}"${hint ? `; did you mean "${hint}"?` : ''} (commands: ${COMMANDS.filter((c) => c !== 'help').join(', ')})`);
  } catch (e) {
    if (e instanceof UsageError || e instanceof OutputRefused || e instanceof WorkspaceRefused) {
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
