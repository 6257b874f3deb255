/** `check` and `build`: read the workspace, assess it, and (for build) write the pack. */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { planSummary } from '../assess.ts';
import { moderateHeapGrowth } from '../collect.ts';
import type { PreviousLedger, RewriteRecord } from '../review/ledger-chain.ts';
import type { Brief } from '../pack/brief.ts';
import { type Diagnostic, hasErrors } from '../diagnostics.ts';
import { checkOutDir, discardPackFolder, fileSink, openPackFolder, recoverInterrupted, writePack } from '../pack/write.ts';
import { RECORD_FILE, type SummaryLike, comparisonRecord, previousSummarySchema } from '../review/since.ts';
import { TOOL } from '../version.ts';
import { isIsoDate } from '../workspace/dates.ts';
import { loadWorkspace } from '../workspace/load.ts';
import { selectByTag, tagsOf } from '../workspace/select.ts';
import { EXIT, type Io, UsageError, diagnosticJson, parse, plural, printDiagnostics, workspaceArg } from './common.ts';
import { HELP } from './help.ts';

function resultJson(command: string, workspace: string, exitCode: number, diagnostics: readonly Diagnostic[], briefs: readonly Brief[], extra: object = {}) {
  return JSON.stringify(
    {
      tool: TOOL,
      command,
      workspace,
      exitCode,
      ...extra,
      characteristics: briefs.map((b) => ({ id: b.id, status: b.status, action: b.action, reasons: b.reasons, ledger: b.ledger })),
      diagnostics: diagnostics.map(diagnosticJson),
    },
    null,
    2,
  );
}

export function check(args: readonly string[], io: Io): number {
  const { values, positionals } = parse(args, { quiet: { type: 'boolean', short: 'q' }, json: { type: 'boolean' } });
  if (values.help) return io.out(HELP.check!), EXIT.ok;
  const dir = workspaceArg(positionals, 'check');
  const loaded = loadWorkspace(dir);
  if (!loaded.ok) {
    if (values.json) io.out(resultJson('check', dir, EXIT.usage, loaded.diagnostics, []));
    else {
      printDiagnostics(io, loaded.diagnostics, false);
      io.err('The workspace cannot be read (review.yaml or a template); nothing else was checked.');
    }
    return EXIT.usage;
  }
  const plan = planSummary(loaded.workspace, loaded.workspace.config.period.to);
  const code = plan.exitCode === 0 && !hasErrors(plan.diagnostics) ? EXIT.ok : EXIT.notAssessed;
  if (values.json) return io.out(resultJson('check', dir, code, plan.diagnostics, plan.briefs)), code;
  printDiagnostics(io, plan.diagnostics, values.quiet === true);
  const bad = plan.briefs.filter((b) => b.status !== 'assessed').map((b) => b.id);
  const errors = plan.diagnostics.filter((d) => d.severity === 'error').length;
  io.out(
    bad.length > 0 || errors > 0
      ? `${plural(errors, 'error')}; ${bad.length} of ${plan.briefs.length} characteristics cannot be assessed${bad.length ? `: ${bad.join(', ')}` : ''}.`
      : `No errors; ${plan.briefs.length} characteristics can be assessed.`,
  );
  return code;
}

/** What the previous pack's manifest.json records of the ledger; absent in packs built before it did. */
function readPreviousLedger(dir: string, asOf: string): PreviousLedger | undefined {
  try {
    const m = JSON.parse(readFileSync(path.join(dir, 'manifest.json'), 'utf8')) as { ledger?: { rows?: unknown; chain?: unknown; rewrites?: unknown } };
    const { rows, chain, rewrites } = m.ledger ?? {};
    if (typeof rows !== 'number' || !Array.isArray(chain) || chain.length !== rows || !chain.every((h) => typeof h === 'string')) return undefined;
    const kept = Array.isArray(rewrites) ? rewrites.filter((r): r is RewriteRecord => typeof r === 'object' && r !== null && typeof (r as RewriteRecord).row === 'number') : [];
    return { asOf, rows, chain: chain as string[], rewrites: kept };
  } catch {
    return undefined;
  }
}

/**
 * The previous pack's comparison record, read as untrusted input: its
 * record.json, or its summary.json when it has none (a pack built before
 * the record was written).
 */
function readPrevious(dir: string, explicit: boolean, asWritten = false): SummaryLike | undefined {
  const record = path.join(dir, RECORD_FILE);
  const file = existsSync(record) ? record : path.join(dir, 'summary.json');
  if (!existsSync(file)) {
    if (explicit) throw new UsageError(`--previous ${dir} holds no ${RECORD_FILE} or summary.json; give the folder of an earlier pack`);
    return undefined;
  }
  let json: unknown;
  try {
    json = JSON.parse(readFileSync(file, 'utf8'));
  } catch (e) {
    // A summary of millions of points can be longer than a string may be; then there is nothing to compare with.
    if ((e as NodeJS.ErrnoException).code === 'ERR_STRING_TOO_LONG') {
      if (explicit) throw new UsageError(`${file} is too large to read back for a comparison; build without --previous`);
      return undefined;
    }
    throw new UsageError(`${file} is not valid JSON (${(e as Error).message}); give the folder of an earlier pack`);
  }
  // The record this tool wrote into --out, unchanged since (recordAsWritten), is what comparisonRecord made.
  if (asWritten && file === record) return json as SummaryLike;
  const parsed = previousSummarySchema.safeParse(json);
  if (!parsed.success) {
    if (!explicit) return undefined;
    const issue = parsed.error.issues[0]!;
    throw new UsageError(`${file} is not a plumbline ${file === record ? 'comparison record' : 'summary'} (format 1): ${issue.path.join('.') || 'the top level'} ${issue.message}`);
  }
  // Only what the comparison reads is kept: an old pack's summary.json may hold millions of points.
  return comparisonRecord(parsed.data);
}

export async function build(args: readonly string[], io: Io): Promise<number> {
  const { values, positionals } = parse(args, {
    out: { type: 'string', short: 'o' },
    date: { type: 'string', short: 'd' },
    previous: { type: 'string' },
    paper: { type: 'string' },
    png: { type: 'boolean' },
    only: { type: 'string' },
    quiet: { type: 'boolean', short: 'q' },
    json: { type: 'boolean' },
    jobs: { type: 'string', short: 'j' },
    'no-cache': { type: 'boolean' },
  });
  if (values.help) return io.out(HELP.build!), EXIT.ok;
  const jobs = values.jobs === undefined ? undefined : Number(values.jobs);
  if (jobs !== undefined && !(Number.isInteger(jobs) && jobs >= 1 && jobs <= 256)) throw new UsageError(`--jobs ${String(values.jobs)} is not a number of threads; give a whole number from 1 to 256`);
  const only = typeof values.only === 'string' ? /^tag=(.+)$/.exec(values.only)?.[1] : undefined;
  if (values.only !== undefined && only === undefined) throw new UsageError(`--only ${String(values.only)} is not a selection this build knows; use --only tag=NAME`);
  const dir = workspaceArg(positionals, 'build');
  if (typeof values.out !== 'string' || values.out === '') throw new UsageError('build needs --out <dir>, the folder the pack is written to');
  if (typeof values.date === 'string' && !isIsoDate(values.date)) throw new UsageError(`--date ${values.date} is not a date written YYYY-MM-DD`);
  const paper = values.paper ?? 'a4';
  if (paper !== 'a4' && paper !== 'letter') throw new UsageError(`--paper ${String(paper)} is not a paper size this build knows; use a4 or letter`);
  const outDir = values.out;
  const json = values.json === true;
  const asOf = typeof values.date === 'string' ? values.date : undefined;
  // With PLUMBLINE_TIMING=1 (io.timing): each stage's milliseconds on stderr, with the time since the process started
  // (DEVELOPERS.md, "Where a build's time goes").
  const timing = io.timing ? (stage: string, ms: number) => io.err(`timing: ${stage.padEnd(48)} ${ms.toFixed(0).padStart(5)} ms, at ${performance.now().toFixed(0)} ms`) : undefined;
  let clock = performance.now();
  const lap = (stage: string) => {
    timing?.(stage, performance.now() - clock);
    clock = performance.now();
  };
  lap('start and arguments');
  // A build's heap stays near what is live: a million-point series peaked at 1.5 GB without this (collect.ts).
  moderateHeapGrowth();
  // review.yaml's settings as the last build into --out read them, where its text is the same.
  const { CACHE_DIR, REVIEW_MEMO, openCache, openMadeSections, openPartCache, openPartTexts, openShapedWords, openSummaryPieces, openTemplateTrees, recordAsWritten, reviewMemo } = await import('../pack/build-cache.ts');
  const memo = values['no-cache'] === true ? undefined : reviewMemo(outDir);
  const loaded = loadWorkspace(dir, memo ? { readReview: memo.read } : {});
  if (!loaded.ok) {
    if (json) io.out(resultJson('build', dir, EXIT.usage, loaded.diagnostics, []));
    else {
      printDiagnostics(io, loaded.diagnostics, false);
      io.err('Nothing was written: fix the problems above first.');
    }
    return EXIT.usage;
  }
  lap('workspace read');
  let ws = loaded.workspace;
  let audience: { tag: string; name: string | null } | undefined;
  if (only !== undefined) {
    const selected = selectByTag(ws, only);
    if (!selected) {
      const tags = tagsOf(ws);
      throw new UsageError(`no characteristic is tagged ${only}; ${tags.length ? `tags in use: ${tags.join(', ')}` : 'no characteristic has tags'}`);
    }
    ws = selected.workspace;
    audience = { tag: only, name: selected.name };
  }
  checkOutDir(outDir, ws.root, [...loaded.workspace.inputs.keys()]);
  // A build killed earlier may have left --out under its side name; put it back before reading it.
  recoverInterrupted(outDir);
  // The pages worker starts now, so that it has loaded its modules (0.5 s) by the time this thread
  // has read the earlier pack and loaded its own: on a plant's rebuild this thread had waited for it.
  const { startPagesWorker, startsPagesWorkerEarly } = await import('../pack/pages-thread.ts');
  const pagesWorker = startsPagesWorkerEarly(ws, jobs) ? startPagesWorker() : undefined;
  let plan: Awaited<ReturnType<typeof import('../build.ts').planPack>>;
  let previous: ReturnType<typeof readPrevious>;
  let folder: ReturnType<typeof openPackFolder>;
  const quiet = values.quiet === true || json;
  const progress = quiet || !io.progress ? undefined : io.progress.bind(io);
  try {
    // Read the earlier pack before this build replaces it.
    const previousDir = typeof values.previous === 'string' ? values.previous : outDir;
    previous = readPrevious(previousDir, typeof values.previous === 'string', previousDir === outDir && values['no-cache'] !== true && recordAsWritten(outDir));
    const previousLedger = previous ? readPreviousLedger(previousDir, previous.asOf) : undefined;
    // The renderers are loaded only when a pack is built.
    const { planPack } = await import('../build.ts');
    lap('earlier pack read, build modules loaded');
    // The pack's temporary folder, from here: summary.json is written into it as the analysis makes it.
    folder = openPackFolder(outDir);
    try {
      plan = await planPack(ws, asOf ?? ws.config.period.to, {
        paper,
        summarySink: () => fileSink(folder, 'summary.json'),
        chartsInto: folder.temp,
        ...(jobs !== undefined ? { jobs } : {}),
        ...(pagesWorker ? { pagesWorker } : {}),
        ...(values['no-cache'] === true ? {} : { cache: openCache(outDir), partCache: openPartCache(outDir), summaryPieces: openSummaryPieces(outDir), madeSections: openMadeSections(outDir), partTexts: openPartTexts(outDir), shapedWords: openShapedWords(outDir), templateTrees: openTemplateTrees(outDir) }),
        png: values.png === true,
        ...(previous ? { previous } : {}),
        ...(previousLedger ? { previousLedger } : {}),
        ...(audience ? { audience } : {}),
        ...(progress ? { progress: (stage: string, done: number, total: number) => progress(`${stage} ${done}/${total}`) } : {}),
        ...(timing ? { timing } : {}),
      });
      clock = performance.now();
    } catch (e) {
      discardPackFolder(folder);
      throw e;
    }
  } finally {
    pagesWorker?.stop();
  }
  progress?.('');
  const kept = memo?.keep();
  const cache = kept ? new Map([...plan.cache, [REVIEW_MEMO, () => kept.bytes]]) : plan.cache;
  writePack(folder, plan.files, cache, kept?.unchanged ? new Set([...plan.cacheKept, REVIEW_MEMO]) : plan.cacheKept, plan.copies, CACHE_DIR);
  lap('pack written');
  if (json) return io.out(resultJson('build', dir, plan.exitCode, plan.diagnostics, plan.briefs, { out: outDir, files: [...plan.files.keys(), ...plan.placed.keys(), ...plan.copies.keys()].sort(), comparedWith: previous?.asOf ?? null, cache: values['no-cache'] === true ? null : plan.cacheUse })), plan.exitCode;
  printDiagnostics(io, plan.diagnostics, quiet);
  const counts = new Map<string, number>();
  for (const b of plan.briefs) {
    const key = b.action ?? 'cannot be assessed';
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  const order = ['investigate', 're-baseline', 'freeze', 'keep', 'cannot be assessed'];
  const parts = order.filter((k) => counts.has(k)).map((k) => `${counts.get(k)} ${k}`);
  const manifestSha = createHash('sha256').update(plan.files.get('manifest.json')!).digest('hex');
  io.out(
    `Built ${plural(plan.briefs.length, 'characteristic')}${audience ? ` tagged ${audience.tag}${audience.name ? ` (for ${audience.name})` : ''}` : ''} into ${outDir}: ${parts.join(', ')}.${previous ? ` Compared with the pack built for ${previous.asOf}.` : ''}`,
  );
  if (!quiet) io.out(`manifest.json SHA-256 ${manifestSha}: send it apart from the pack; plumbline verify checks a copy against its manifest.`);
  return plan.exitCode;
}
