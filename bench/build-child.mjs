// Runs one `plumbline` command in this process and prints, as the last line
// on stderr, a JSON record of its wall time and peak resident memory (which
// counts its worker threads too: they share this process's memory).
import { loadCli } from '../bin/load-cli.mjs';
import { peakMiB } from './peak.mjs';

const t0 = performance.now();
const main = await loadCli();
const io = { out: () => {}, err: (s) => process.stderr.write(`${s}\n`) };
const code = await main(process.argv.slice(2), io);
process.stderr.write(`\n${JSON.stringify({ code, wallMs: performance.now() - t0, maxRssMiB: peakMiB() })}\n`);
process.exit(0);
