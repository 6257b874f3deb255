/**
 * Reading a workspace: the only stage that touches input files. Returns the
 * typed configuration, each characteristic's samples and ledger entries, the
 * bytes of every input (for the manifest) and all diagnostics. Input files
 * are only ever read.
 */
import { readFileSync, realpathSync, statSync } from 'node:fs';
import path from 'node:path';
import { type Diagnostic, error, info } from '../diagnostics.ts';
import type { Characteristic, ConfiguredCharacteristic, LedgerEntry, ReviewConfig, Sample } from '../model.ts';
import { readDataFile } from './data-file.ts';
import { LEDGER_FILE, readLedger } from './ledger-file.ts';
import { REVIEW_FILE, dataFieldLine, readReview } from './review-file.ts';
import type { Templates } from '../pack/template.ts';
import { readTemplates } from './templates.ts';

export interface CharacteristicInput {
  /** As review.yaml configures it (before `chart: auto` is decided from the data). */
  readonly configured: ConfiguredCharacteristic;
  readonly ledger: readonly LedgerEntry[];
  /** What reading the ledger reported about this characteristic. */
  readonly ledgerDiagnostics: readonly Diagnostic[];
  /** The data file's bytes, or why it could not be read. */
  readonly data: { readonly bytes: Uint8Array } | { readonly problem: string };
  /**
   * The rest is read from the data on first use, and is a function of the
   * fields above and the review settings alone (the build cache's key hashes
   * those): a rebuild never parses the data of a characteristic it finds in
   * its cache, which was most of reading a plant.
   */
  readonly characteristic: Characteristic;
  /** Samples through the end of the review period. */
  readonly samples: readonly Sample[];
  readonly laterLabels: ReadonlySet<string>;
  readonly diagnostics: readonly Diagnostic[];
}

export interface Workspace {
  readonly root: string;
  readonly config: ReviewConfig;
  readonly characteristics: readonly CharacteristicInput[];
  /** Problems that belong to no one characteristic (e.g. a ledger row naming an unknown one). */
  readonly diagnostics: readonly Diagnostic[];
  /** Every input file read, relative path → bytes, for the manifest's fingerprints. */
  readonly inputs: ReadonlyMap<string, Uint8Array>;
  /** Pack templates, the workspace's own where it has them. */
  readonly templates: Templates;
}

export type LoadResult =
  | { readonly ok: true; readonly workspace: Workspace }
  | { readonly ok: false; readonly diagnostics: readonly Diagnostic[] };

/** Files larger than this are refused rather than read into memory. */
export const MAX_INPUT_BYTES = 512 * 1024 * 1024;

function readBytes(file: string): { bytes: Uint8Array; problem?: undefined } | { bytes?: undefined; problem: string } {
  try {
    const st = statSync(file);
    if (st.isDirectory()) return { problem: 'is a folder, not a file' };
    if (st.size > MAX_INPUT_BYTES) return { problem: `is ${st.size} bytes; files above ${MAX_INPUT_BYTES} bytes are refused` };
    return { bytes: readFileSync(file) };
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return { problem: code === 'ENOENT' ? 'does not exist' : code === 'EACCES' ? 'cannot be read (permission denied)' : `cannot be read (${code ?? String(e)})` };
  }
}

/** A file's bytes as text; malformed UTF-8 is decoded as U+FFFD, not refused (as before). */
const decode = (bytes: Uint8Array) => new TextDecoder('utf-8', { fatal: false }).decode(bytes);

function readText(file: string): { text?: string; bytes?: Uint8Array; problem?: string } {
  const read = readBytes(file);
  return read.bytes ? { bytes: read.bytes, text: decode(read.bytes) } : { problem: read.problem };
}

type ReadFromData = Pick<CharacteristicInput, 'characteristic' | 'samples' | 'laterLabels' | 'diagnostics'>;

/** A characteristic's input whose data is read when one of its fields from the data is first asked for. */
function onFirstUse(fixed: Omit<CharacteristicInput, keyof ReadFromData>, read: () => ReadFromData): CharacteristicInput {
  let done: ReadFromData | undefined;
  const get = () => (done ??= read());
  return {
    ...fixed,
    get characteristic() {
      return get().characteristic;
    },
    get samples() {
      return get().samples;
    },
    get laterLabels() {
      return get().laterLabels;
    },
    get diagnostics() {
      return get().diagnostics;
    },
  };
}

/** A characteristic whose data could not be read: `chart: auto` stays undecided and is shown as a c chart. */
function unresolved(c: ConfiguredCharacteristic): Characteristic {
  return c.chart === 'auto' ? { ...c, chart: 'c', chosen: 'chart: auto could not choose: the data could not be read.' } : { ...c, chart: c.chart };
}

export interface LoadOptions {
  /** Read the ledger from this text instead of ledger.csv: how `ledger add` checks a row before appending it. */
  readonly ledgerText?: string;
  /** Reads review.yaml's text (default `readReview`): a build takes a plant's settings from its cache (see build-cache.ts, `reviewMemo`). */
  readonly readReview?: (text: string) => ReturnType<typeof readReview>;
}

export function loadWorkspace(dir: string, options: LoadOptions = {}): LoadResult {
  const root = path.resolve(dir);
  const reviewPath = path.join(root, REVIEW_FILE);
  const review = readText(reviewPath);
  if (review.text === undefined) {
    return { ok: false, diagnostics: [error('workspace/no-review', { file: REVIEW_FILE }, `${REVIEW_FILE} ${review.problem} in ${root}; a workspace needs one.`)] };
  }
  const parsed = (options.readReview ?? readReview)(review.text);
  if (!parsed.config) return { ok: false, diagnostics: parsed.diagnostics };
  const config = parsed.config;
  const inputs = new Map<string, Uint8Array>([[REVIEW_FILE, review.bytes!]]);

  // Data paths must stay inside the workspace, also through symbolic links. The system's realpath
  // (`.native`) resolves a plant's 1,000 paths in a third of the time of Node's own, which looks up
  // each folder on the way.
  const realRoot = realpathSync.native(root);
  const pathProblems: Diagnostic[] = [];
  config.characteristics.forEach((c, i) => {
    // Finding the line parses review.yaml again, so only for a path that is refused.
    const where = () => ({ file: REVIEW_FILE, ...dataFieldLine(review.text!, i) });
    const resolved = path.resolve(root, c.data);
    const rel = path.relative(root, resolved);
    if (path.isAbsolute(c.data) || rel.startsWith('..') || rel === '') {
      pathProblems.push(error('review/data-outside', where(), `Data path "${c.data}" of "${c.id}" leads outside the workspace; give a path inside it.`));
      return;
    }
    try {
      const real = realpathSync.native(resolved);
      const realRel = path.relative(realRoot, real);
      if (realRel.startsWith('..') || path.isAbsolute(realRel)) {
        pathProblems.push(error('review/data-outside', where(), `Data path "${c.data}" of "${c.id}" is a link to a file outside the workspace.`));
      }
    } catch {
      // A missing file is that characteristic's problem, reported when it is read.
    }
  });
  if (pathProblems.length > 0) return { ok: false, diagnostics: pathProblems };

  const ids = new Set(config.characteristics.map((c) => c.id));
  const global: Diagnostic[] = [];
  let ledger: LedgerEntry[] = [];
  const perLedger = new Map<string, Diagnostic[]>();
  const ledgerText =
    options.ledgerText !== undefined
      ? { text: options.ledgerText, bytes: new TextEncoder().encode(options.ledgerText) }
      : readText(path.join(root, LEDGER_FILE));
  if (ledgerText.text === undefined) {
    global.push(info('ledger/none', { file: LEDGER_FILE }, `No ${LEDGER_FILE} (${ledgerText.problem}); every characteristic starts with trial limits and no decisions.`));
  } else {
    inputs.set(LEDGER_FILE, ledgerText.bytes!);
    const read = readLedger(ledgerText.text, ids);
    ledger = read.entries;
    for (const d of read.diagnostics) {
      if (d.characteristic) {
        const list = perLedger.get(d.characteristic);
        if (list) list.push(d);
        else perLedger.set(d.characteristic, [d]);
      }
      else global.push(d);
    }
  }

  const ledgerOf = new Map<string, LedgerEntry[]>();
  for (const e of ledger) {
    const list = ledgerOf.get(e.characteristic);
    if (list) list.push(e);
    else ledgerOf.set(e.characteristic, [e]);
  }
  const characteristics = config.characteristics.map((c): CharacteristicInput => {
    const file = readBytes(path.join(root, c.data));
    const ledgerDiagnostics = perLedger.get(c.id) ?? [];
    const fixed = { configured: c, ledger: ledgerOf.get(c.id) ?? [], ledgerDiagnostics };
    if (file.bytes === undefined) {
      const diagnostics = [error('data/unreadable', { file: c.data, characteristic: c.id }, `Data file ${c.data} ${file.problem}.`), ...ledgerDiagnostics];
      return { ...fixed, data: { problem: file.problem }, characteristic: unresolved(c), samples: [], laterLabels: new Set(), diagnostics };
    }
    inputs.set(c.data, file.bytes);
    const bytes = file.bytes;
    return onFirstUse({ ...fixed, data: { bytes } }, () => {
      const read = readDataFile(decode(bytes), c, config.period.to);
      const inside = read.samples.filter((s) => s.date <= config.period.to);
      const later = read.samples.filter((s) => s.date > config.period.to);
      const own = [...read.diagnostics, ...ledgerDiagnostics];
      if (later.length > 0) {
        own.push(
          info('data/after-period', { file: c.data, line: later[0]!.line, characteristic: c.id }, `${later.length} point${later.length === 1 ? '' : 's'} dated after the review period (${config.period.to}) ${later.length === 1 ? 'is' : 'are'} left for a later review.`),
        );
      }
      return { characteristic: read.characteristic, samples: inside, laterLabels: new Set(later.map((s) => s.label)), diagnostics: own };
    });
  });

  const templates = readTemplates(root);
  if (templates.diagnostics.length > 0) return { ok: false, diagnostics: templates.diagnostics };
  for (const [file, bytes] of templates.inputs) inputs.set(file, bytes);
  return { ok: true, workspace: { root, config, characteristics, diagnostics: global, inputs, templates: templates.templates } };
}
