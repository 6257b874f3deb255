/**
 * From a loaded workspace to the planned pack: every output file with its
 * bytes, decided before anything is written (the pack writer writes them).
 */
import type { Assessed } from './analyse.ts';
import { collectIfGrown } from './collect.ts';
import { type KnownReview, type Reviewed, reviewAll, sha256 } from './assess.ts';
import { type PreviousLedger, rewriteSentence } from './review/ledger-chain.ts';
import type { Diagnostic } from './diagnostics.ts';
import type { IsoDate } from './model.ts';
import { type PackItem, type PackTree, buildPackTree, madeHeadings } from './pack/content.ts';
import type { Brief } from './pack/brief.ts';
import { type MadeSection, madeOf, nodesDigest } from './pack/made-section.ts';
import { MarkedJson, WrittenJson, jsonBytes, jsonChunks, plainJsonBytes } from './pack/json-bytes.ts';
import { type FileSink, type FileStamp, type SunkFile, type UnfilledFile, fillFile, stampOf, writePieces } from './pack/write.ts';
import { type KnownText, type PagePart, type SvgJob, type TextPagesInput, writeTextPagesHere } from './pack/text-pages.ts';
import { type PagesWorker, startPagesWorker, startsPagesWorkerEarly } from './pack/pages-thread.ts';
import { type Paper, toPdf } from './pack/pdf.ts';
import { loadFonts } from './render/fonts.ts';
import { rememberParsed, templatesParsed } from './pack/template.ts';
import { rememberWords, wordsShaped } from './render/fontkit.ts';
import { fontPartsOf, rememberFontParts } from './render/pdf-font.ts';
import { layoutChart } from './render/scene/layout.ts';
import { chartSpec } from './render/scene/spec.ts';
import { createTextMetrics } from './render/scene/text-metrics.ts';
import type { Scene } from './render/scene/types.ts';
import { defaultJobs, drawCharts } from './render/pool/chart-pool.ts';
import { type CacheHit, type CachedPart, ENTRY_INDEX, type FaceLayouts, type PageRecord, RECORD_STAMP, SHAPED_WORDS, TEMPLATE_TREES, shapedWordsFile, templateTreesFile, TEXT_INDEX, recordStamp, type TextIndex, type IndexedEntry, SECTION_INDEX, SUMMARY_INDEX, type Side, type SideKind, type Sides, type Stored, type SummaryIndex, type SummaryPieces, cacheKey, encodeEntry, encodeStored, entryPath, partKey, partPath, sectionKey, sidePath } from './pack/build-cache.ts';
import { chartIdOf, chartIdsIn, hasFootnotes } from './pack/mdast.ts';
import type { Root, RootContent } from 'mdast';
import { splitParts } from './pack/parts.ts';
import { RECORD_FILE, type SummaryLike, compareSummaries, recordOf } from './review/since.ts';
import { SUMMARY_FORMAT, buildSummary } from './summary.ts';
import { TOOL } from './version.ts';
import type { Workspace } from './workspace/load.ts';
import { deserialize } from 'node:v8';
import path from 'node:path';

export interface PlannedPack {
  /** Output path (relative to --out) → contents, in write order. */
  readonly files: ReadonlyMap<string, Uint8Array>;
  /** Output files already written through a sink (summary.json with `summarySink`): their size and SHA-256, which the manifest lists. */
  readonly placed: ReadonlyMap<string, { readonly bytes: number; readonly sha256: string }>;
  /** Output files to copy from a file of the build cache read (charts drawn by an earlier build), with the size and SHA-256 it recorded. */
  readonly copies: ReadonlyMap<string, CopiedFile>;
  /**
   * The build cache to leave in the pack folder (path → bytes, made when
   * written: a plant's cache is hundreds of megabytes, not worth holding at
   * once); not part of the pack, not in the manifest.
   */
  readonly cache: ReadonlyMap<string, (into: string) => Uint8Array>;
  /** Cache paths whose entry was read unchanged from the earlier build's cache: the writer may link those files rather than write them again. */
  readonly cacheKept: ReadonlySet<string>;
  /** Characteristics taken from the cache, and those analysed (and drawn) afresh. */
  readonly cacheUse: { readonly reused: number; readonly redone: number };
  /** Every characteristic in brief, in order. */
  readonly briefs: readonly Brief[];
  readonly diagnostics: readonly Diagnostic[];
  /** 0 when every characteristic was assessed, 1 otherwise. */
  readonly exitCode: 0 | 1;
}

export interface PackOptions {
  readonly paper: Paper;
  /** Also write a PNG of every chart (charts/<id>.png), at twice the scene's size. */
  readonly png: boolean;
  /** Called as each stage finishes, for progress on long builds. */
  readonly progress?: (stage: string, done: number, total: number) => void;
  /** The previous pack's comparison record (record.json, or its summary.json), for the "Since the last review" section. */
  readonly previous?: SummaryLike;
  /** The previous pack's manifest record of the ledger, to tell whether earlier rows were rewritten. */
  readonly previousLedger?: PreviousLedger;
  /** A customer's pack: the tag it was narrowed to and the customer's name. */
  readonly audience?: { readonly tag: string; readonly name: string | null };
  /** Threads to use (the main one included) when PNGs are drawn: they are drawn on the others. Default: every core. */
  readonly jobs?: number;
  /** Called with each stage's wall time as it ends (analysis, scenes, tree, markdown, html, pdf, charts, summary), for benchmarks. */
  readonly timing?: (stage: string, ms: number) => void;
  /**
   * Where summary.json goes as it is made (a file in the pack's temporary
   * folder): the largest file of a pack, 436 MB for a million points, is
   * then never held whole. The plan lists it under `placed`, not `files`.
   */
  readonly summarySink?: () => FileSink;
  /**
   * The pack's temporary folder, where the pages worker writes each
   * standalone SVG (and the cache's copy) as soon as it draws it: a
   * plant's 66 MB of charts, written twice and hashed, had been the main
   * thread's at the end of the build. The plan lists them under `placed`,
   * and pack.pdf, written there by this thread, too.
   */
  readonly chartsInto?: string;
  /**
   * The pages worker, started by the caller as soon as it had read the
   * workspace (`startsPagesWorkerEarly`), so that it has loaded its modules
   * by the time it is needed; the caller stops it. Used where the build may
   * use two threads or more.
   */
  readonly pagesWorker?: PagesWorker;
  /** Characteristics with more points are not cached (default MAX_CACHED_POINTS). */
  readonly maxCachedPoints?: number;
  /** Entries of an earlier build's cache, by key; absent: no cache is read or written. */
  readonly cache?: (key: string) => CacheHit | undefined;
  /** The pack's parts as an earlier build made them (pages of pack.pdf, index.md and index.html texts), by part key (read only when `cache` is given). */
  readonly partCache?: Stored<CachedPart>;
  /** The parts of an earlier build's summary.json, by cache key (read only when `cache` is given). */
  readonly summaryPieces?: SummaryPieces;
  /** The characteristics' sections as an earlier build made them, by section key (read only when `cache` is given). */
  readonly madeSections?: (key: string) => MadeSection | undefined;
  /** Where an earlier build's index.md and index.html hold each part's texts, by part key (read only when `cache` is given). */
  readonly partTexts?: (key: string) => KnownText | undefined;
  /** The words an earlier build shaped whole with the font file of a SHA-256 (read only when `cache` is given). */
  readonly shapedWords?: (fontSha256: string) => FaceLayouts | undefined;
  /** The templates' syntax trees an earlier build parsed, by template text (used only when `cache` is given). */
  readonly templateTrees?: ReadonlyMap<string, Root> | undefined;
}

export const DEFAULT_OPTIONS: PackOptions = { paper: 'a4', png: false };

const encoder = new TextEncoder();
const json = jsonBytes;
/** summary.json: one line per point (see jsonBytes). */
const SUMMARY_LAYOUT = { itemPerLine: new Set(['points']) };
/** Where summary.json's characteristics are written: items of an array in the top-level object. */
const CHARACTERISTIC_INDENT = '    ';
const comparePaths = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
const byPath = ([a]: [string, unknown], [b]: [string, unknown]) => comparePaths(a, b);

function entries(m: ReadonlyMap<string, Uint8Array>) {
  return [...m.entries()].sort(byPath).map(([p, b]) => ({ path: p, bytes: b.length, sha256: sha256(b) }));
}

export const chartFile = (id: string) => `charts/${id}.svg`;
const pngFile = (id: string) => `charts/${id}.png`;

/** An output file copied from the build cache: `from` is relative to the pack folder the cache was read from. */
export interface CopiedFile {
  readonly from: string;
  readonly bytes: number;
  readonly sha256: string;
  /** The stamp the pack's file of the same name was written with: linked from there while it has it. */
  readonly unchanged?: FileStamp | undefined;
}

/** Characteristics with more points than this are not kept in the build cache. */
export const MAX_CACHED_POINTS = 100_000;

/**
 * The analysis, with summary.json written at once and the comparison with
 * the previous pack made: the summary object repeats every point of every
 * chart, and a plant's is hundreds of megabytes of heap that nothing after
 * this needs (its bytes live outside the heap), so it is not kept. An
 * unchanged characteristic's brief and part of summary.json come from the
 * build cache, and its assessment is not read back.
 */
function summarise(
  ws: Workspace,
  asOf: IsoDate,
  options: PackOptions,
  known: (i: number) => KnownReview | undefined,
  written: (i: number) => ReturnType<SummaryPieces>,
  assessed: (i: number, r: Reviewed) => void,
) {
  // Progress every 50 characteristics: a plant's analysis takes seconds.
  const progress = (done: number, total: number) => (done % 50 === 0 ? options.progress?.('analysis', done, total) : undefined);
  const review = reviewAll(ws, asOf, options.previousLedger, known, progress, assessed);
  const record = recordOf({ format: SUMMARY_FORMAT, asOf, period: ws.config.period }, review.briefs.map((b) => b.record));
  const since = options.previous ? compareSummaries(options.previous, record) : undefined;
  // A characteristic's part of summary.json is a function of what its cache key hashes: one from the
  // cache goes in as the bytes the earlier pack's summary.json has (a plant's 86 MB took 1.6 s to
  // write afresh). Every part is marked, so that the next build finds it in this one's.
  const ranges: (readonly [number, number])[] = [];
  const characteristics = review.reviewed.map((r, i) => {
    const piece = written(i);
    return new MarkedJson(piece ? new WrittenJson(piece.read, CHARACTERISTIC_INDENT, piece.from) : r.json(), (start, end) => (ranges[i] = [start, end]));
  });
  const document = buildSummary(ws.config, review.briefs, characteristics, review.global, asOf, review.integrity);
  let summaryFile: Uint8Array | SunkFile | UnfilledFile;
  if (options.summarySink) {
    const sink = options.summarySink();
    // Through a sink, the earlier file's parts are left for the sink to copy (fillFile, later).
    jsonChunks(document, SUMMARY_LAYOUT, (b) => sink.write(b), undefined, (from) => sink.copy(from));
    summaryFile = sink.close();
  } else {
    summaryFile = json(document, SUMMARY_LAYOUT);
  }
  const { reviewed, briefs, diagnostics, integrity, exitCode } = review;
  return { reviewed, briefs, diagnostics, integrity, exitCode, summaryFile, summaryRanges: ranges, recordBytes: plainJsonBytes(record), since };
}


/** Charts sent to the worker at a time while the analysis goes on: fewer messages, and satori lays out their labels together. */
const DRAW_BATCH = 50;



export async function planPack(ws: Workspace, asOf: IsoDate, options: PackOptions = DEFAULT_OPTIONS): Promise<PlannedPack> {
  const allowed = Math.max(1, Math.floor(options.jobs ?? defaultJobs()));
  let pagesWorker: PagesWorker | undefined;
  try {
    return await plan(ws, asOf, options, allowed, () => (pagesWorker = startPagesWorker()));
  } finally {
    pagesWorker?.stop();
  }
}

async function plan(ws: Workspace, asOf: IsoDate, options: PackOptions, allowed: number, startWorker: () => PagesWorker): Promise<PlannedPack> {
  // Reading the workspace left its own garbage (every row's fields and strings).
  collectIfGrown();
  let clock = performance.now();
  const lap = (stage: string) => {
    // What the stage left behind is collected now, not when the heap has grown to a multiple of it (see collect.ts).
    collectIfGrown();
    const now = performance.now();
    options.timing?.(stage, now - clock);
    clock = now;
  };
  // Markdown and HTML go to another thread when the build may use two. It starts before the analysis,
  // so that it has loaded its modules (satori, fontkit, remark, rehype: 0.5–0.8 s) by the time the
  // charts are sent: at 100 characteristics the worker was the longer path, and starting it here
  // took 0.2–0.3 s off the build (4.14–4.39 s against 4.00–4.18 s, alternately). Not where a data
  // file is long: that series' analysis is then the build's peak of memory, and the idle thread's
  // 50 MB would add to it; the worker starts after the analysis.
  const early = startsPagesWorkerEarly(ws, allowed) ? (options.pagesWorker ?? startWorker()) : undefined;
  const keys = options.cache ? ws.characteristics.map((c) => cacheKey(ws, c, asOf)) : [];
  const hits = keys.map((k) => options.cache?.(k));
  const fonts = loadFonts();
  // The fonts' words as the last build shaped them: the global pages' words are the same build after build.
  const faceFiles = [fonts.regular, fonts.semibold].map((data) => ({ data, sha256: sha256(data) }));
  const storedWords = new Map<string, number>();
  if (options.cache && options.shapedWords) {
    for (const f of faceFiles) {
      const layouts = options.shapedWords(f.sha256);
      if (!layouts) continue;
      rememberWords(f.data, layouts);
      rememberFontParts(f.data, layouts.pdf);
      // Counted as kept only with the font's parts for pack.pdf: otherwise the file is written again with them.
      if (fontPartsOf(f.data) === layouts.pdf) storedWords.set(f.sha256, layouts.words.size + layouts.pairs.size);
    }
  }
  const metrics = createTextMetrics(fonts);
  if (options.cache && options.templateTrees) rememberParsed(options.templateTrees);

  // Scenes here (every page needs them); charts from the cache are not drawn again, but copied from
  // it into the pack. A cached scene is read only where a page that draws it is laid out or written
  // again: a rebuild takes nearly every page from the cache.
  const scenes = new Map<string, Scene>();
  const cachedScenes = new Map<string, Side>();
  const sceneOf = (id: string): Scene | undefined => {
    let scene = scenes.get(id);
    const side = scene ? undefined : cachedScenes.get(id);
    if (side) scenes.set(id, (scene = deserialize(side.read()) as Scene));
    return scene;
  };
  /** Charts kept in the cache, by pack path: copied from there into the pack. */
  const copies = new Map<string, CopiedFile>();
  const jobs: SvgJob[] = [];
  const svgsOnPagesWorker = allowed > 1 && !options.png;
  // Where the worker writes a chart it draws: into the pack, and into the cache where it is kept, with
  // the scene's side file (serialised there: the main thread's 0.2 s for a plant, and 20 MB to write).
  const filesFor = (i: number, id: string, b: Brief): Pick<SvgJob, 'to' | 'sceneTo'> => {
    if (!svgsOnPagesWorker || options.chartsInto === undefined) return {};
    const into = options.chartsInto;
    const cached = options.cache && b.status === 'assessed' && b.points <= (options.maxCachedPoints ?? MAX_CACHED_POINTS);
    const pack = path.join(into, chartFile(id));
    return cached ? { to: [pack, path.join(into, sidePath(keys[i]!, 'svg'))], sceneTo: path.join(into, sidePath(keys[i]!, 'scene')) } : { to: [pack] };
  };
  let total = 0;
  const place = (r: Reviewed, i: number) => {
    if (r.brief.status !== 'assessed') return;
    total++;
    const id = r.brief.id;
    const hit = hits[i];
    const scene = hit?.side('scene');
    if (scene) cachedScenes.set(id, scene);
    else scenes.set(id, layoutChart(chartSpec(r.assessment() as Assessed, ws.config.period), metrics));
    const svg = hit?.side('svg');
    const png = hit?.side('png');
    if (svg && (png || !options.png)) {
      copies.set(chartFile(id), { from: svg.path, ...svg.file, unchanged: hit!.packed.svg });
      if (options.png && png) copies.set(pngFile(id), { from: png.path, ...png.file, unchanged: hit!.packed.png });
    } else {
      jobs.push({ id, scene: sceneOf(id)!, png: options.png, ...filesFor(i, id, r.brief) });
    }
  };
  // With the worker already running, each chart is laid out as its characteristic is assessed and the
  // worker draws its SVG then, beside the analysis: a plant's worker had idled through the analysis
  // and was the longer path after it (1.3–1.9 s of waiting for it after the PDF).
  const pipelined = early !== undefined && svgsOnPagesWorker;
  let sent = 0;
  const send = (atLeast: number) => {
    if (jobs.length - sent < atLeast || jobs.length === sent) return;
    early!.draw(jobs.slice(sent));
    sent = jobs.length;
  };
  // Entries that could not be read back when asked for (made afresh): written again, not linked.
  const spoiled = new Set<number>();
  const known = (i: number): KnownReview | undefined => {
    const hit = hits[i];
    if (!hit) return undefined;
    return {
      brief: hit.brief,
      assessment: () => {
        const a = hit.assessment();
        if (!a) spoiled.add(i);
        return a;
      },
    };
  };
  const { reviewed, briefs, diagnostics, integrity, exitCode, summaryFile, summaryRanges, recordBytes, since } = summarise(
    ws,
    asOf,
    options,
    known,
    (i) => (hits[i] ? options.summaryPieces?.(keys[i]!) : undefined),
    pipelined ? (i, r) => (place(r, i), send(DRAW_BATCH)) : () => {},
  );
  lap('analysis and summary.json');
  const pagesWorker = early ?? (allowed > 1 ? startWorker() : undefined);
  // A rebuild's summary.json has room left for the previous one's parts: the worker copies them in
  // and hashes the file while this thread goes on (a plant's: 0.4 s), or this thread does it now.
  const summaryDone: Promise<SunkFile> | Uint8Array | SunkFile =
    summaryFile instanceof Uint8Array || !('fill' in summaryFile) ? summaryFile : pagesWorker ? pagesWorker.fill(summaryFile.fill) : fillFile(summaryFile.fill);
  // Waited for before the manifest; a failure meanwhile is reported there, not as an unhandled rejection.
  if (summaryDone instanceof Promise) summaryDone.catch(() => {});
  const inputs = entries(ws.inputs);
  // One hash over the input hashes: the pack's fingerprint of what it was built from.
  const fingerprint = sha256(encoder.encode(inputs.map((i) => `${i.sha256}  ${i.path}`).join('\n')));
  const files = new Map<string, Uint8Array>();
  if (!pipelined) {
    reviewed.forEach(place);
    lap('scenes');
  }
  let done = total - jobs.length;
  options.progress?.('charts', done, total);
  // Threads. With two or more, index.md and index.html are written on a worker while this thread
  // lays out the PDF (1,000 characteristics on two cores: 38–43 s → 35 s), and that worker draws the
  // SVGs too: during the analysis when it started before it (above), else from now on, while this
  // thread builds the tree; the pages come after. In a pool of their own beside the PDF, SVGs slowed
  // both down. PNGs (resvg, about 50 ms a chart) go to a pool of their own beside the pages (300
  // characteristics: 39 s → 32 s).
  if (svgsOnPagesWorker && jobs.length > sent) pagesWorker!.draw(jobs.slice(sent));
  const charts = svgsOnPagesWorker ? undefined : drawCharts(jobs, options.png ? allowed - 1 : 0, (n) => options.progress?.('charts', (done += n), total));
  if (charts && !(options.png && allowed > 1)) {
    await charts;
    lap('charts');
  }

  // An unchanged characteristic's section goes into the tree as the earlier build made it, where that
  // build's part (pages, Markdown and HTML) is in the cache: its section is not built again, nor its
  // assessment read back (a plant's 999 were 0.5 s to read and 1.4 s of tree and garbage).
  const keyOfChart = new Map(options.cache ? ws.characteristics.map((c, i) => [c.configured.id, keys[i]!] as const) : []);
  const chartKeysOf = (ids: readonly string[]) => ids.map((id) => keyOfChart.get(id) ?? `unknown ${id}`);
  const sectionKeys = options.cache ? keys.map((k) => sectionKey(k, ws.templates.characteristic)) : [];
  /** The cached part of each characteristic whose made section is used, by index. */
  const madeParts = new Map<number, { key: string; hit: NonNullable<ReturnType<Stored<CachedPart>>>; text: KnownText }>();
  let made: (MadeSection | undefined)[] = reviewed.map((_, i) => {
    const m = options.cache ? options.madeSections?.(sectionKeys[i]!) : undefined;
    if (!m) return undefined;
    const key = partKey(m.digest, chartKeysOf(m.charts), options.paper);
    const hit = options.partCache?.(key);
    const text = hit && options.partTexts?.(key);
    if (!text) return undefined;
    madeParts.set(i, { key, hit, text });
    return m;
  });
  let pack: PackTree;
  let parts: ReturnType<typeof splitParts>;
  let footnotes: boolean;
  for (;;) {
    pack = buildPackTree({
      config: ws.config,
      characteristics: reviewed.map((r, i): PackItem => (made[i] ? { brief: r.brief, assessment: r.assessment, made: made[i] } : r)),
      diagnostics: ws.diagnostics,
      asOf,
      fingerprint,
      tool: TOOL,
      templates: ws.templates,
      chartFile,
      ...(options.audience ? { audience: options.audience } : {}),
      ...(integrity.rewrite ? { rewritten: rewriteSentence(integrity.rewrite) } : {}),
      ...(since ? { since } : {}),
    });
    parts = splitParts(pack.tree);
    footnotes = hasFootnotes(pack.tree);
    // A made section must be a part alone (the pack's template may follow the characteristics with
    // more), and a tree with footnotes is written whole, from its nodes: where not, build it again.
    const alone = new Set(parts.flatMap((p) => (p.length === 1 && madeOf(p[0]!) ? [p[0]!] : [])));
    const keep = made.map((m, i) => m !== undefined && !footnotes && alone.has(pack.sections[i]![0]!));
    if (made.every((m, i) => m === undefined || keep[i])) break;
    made = made.map((m, i) => (keep[i] ? m : undefined));
  }
  lap('tree');
  const packDiagnostics = [...diagnostics, ...pack.diagnostics];
  // The tree's parts (each level-2 section) are kept in the cache, pages, Markdown and HTML, by a key
  // over their nodes' digest and the keys of their charts' characteristics (whose scenes they draw).
  const sectionAt = new Map(pack.sections.map((nodes, i) => [nodes[0]!, i] as const));
  const chartIdsOf = (nodes: readonly RootContent[]) => nodes.flatMap((n) => chartIdOf(n) ?? []);
  const digests: (string | undefined)[] = [];
  /** The cached part of part `p`, where it is a made section. */
  const madeAt = (p: number) => (madeOf(parts[p]![0]!) ? madeParts.get(sectionAt.get(parts[p]![0]!)!) : undefined);
  const partKeys = options.cache
    ? parts.map((nodes, p) => {
        const known = madeAt(p);
        if (known) return known.key;
        const digest = (digests[p] = nodesDigest(nodes));
        return partKey(digest, chartKeysOf(chartIdsOf(nodes)), options.paper);
      })
    : [];
  // What the next build takes of each characteristic's section: where it is a part alone (its own
  // level-2 heading and nothing else), without footnotes.
  const sectionsMade = new Map<string, MadeSection>();
  if (options.cache) {
    parts.forEach((nodes, p) => {
      const i = sectionAt.get(nodes[0]!);
      if (i === undefined) return;
      const m = madeOf(nodes[0]!);
      const own = pack.sections[i]!;
      if (m) sectionsMade.set(sectionKeys[i]!, m);
      else if (nodes.length === own.length && nodes.every((n, k) => n === own[k]) && !nodes.some(hasFootnotes)) {
        sectionsMade.set(sectionKeys[i]!, { digest: digests[p]!, headings: madeHeadings(nodes, pack.bases), charts: chartIdsOf(nodes), diagnostics: pack.sectionDiagnostics[i]! });
      }
    });
  }
  const partHits = partKeys.map((key, p) => madeAt(p)?.hit ?? options.partCache?.(key));
  const partTexts = partKeys.map((key, p) => madeAt(p)?.text ?? options.partTexts?.(key));
  // Markdown and HTML on the other thread, while this one lays out the PDF. With the cache, a tree
  // without footnotes goes in parts, and the parts an earlier build wrote go as where that build's
  // files hold their texts: the worker is sent only the nodes and scenes of the others (a whole
  // plant's were 0.6 s to send), and copies the rest from there.
  // The scenes the pages draw, less those the worker was sent with the charts it draws.
  const withJobs = new Set(svgsOnPagesWorker ? jobs.map((j) => j.id) : []);
  const scenesOf = (ids: Iterable<string>) =>
    new Map([...ids].flatMap((id) => {
      const scene = withJobs.has(id) ? undefined : sceneOf(id);
      return scene ? [[id, scene] as const] : [];
    }));
  let pagesTree: TextPagesInput['tree'];
  let pageScenes: ReadonlyMap<string, Scene>;
  if (options.cache && !footnotes) {
    const drawnHere = new Set<string>();
    pagesTree = {
      parts: parts.map((nodes, i): PagePart => {
        const known = partTexts[i];
        if (known) return { known };
        chartIdsIn(nodes, drawnHere);
        return { nodes };
      }),
    };
    pageScenes = scenesOf(drawnHere);
  } else {
    pagesTree = { whole: pack.tree };
    pageScenes = scenesOf(chartIdsIn(pack.tree.children));
  }
  const pagesInput: TextPagesInput = { tree: pagesTree, title: ws.config.title, scenes: pageScenes, ...(options.chartsInto !== undefined ? { into: options.chartsInto } : {}) };
  const textPages = pagesWorker ? pagesWorker.run(pagesInput) : writeTextPagesHere(pagesInput);
  lap(pagesWorker ? 'markdown and html sent' : 'markdown and html');
  options.progress?.('pages', 1, 2);
  const pdf = await toPdf({
    tree: pack.tree,
    title: ws.config.title,
    subject: `Control-limit review, ${ws.config.period.from} to ${ws.config.period.to}`,
    author: ws.config.organisation,
    asOf,
    paper: options.paper,
    scenes: { get: sceneOf },
    fonts,
    producer: `${TOOL.name} ${TOOL.version}`,
    reuse: (i) => partHits[i]?.value.pdf,
  });
  // Into the pack's folder as the pieces it was gathered in, where the build writes there; else joined.
  const pdfPlaced = options.chartsInto !== undefined ? writePieces(path.join(options.chartsInto, 'pack.pdf'), pdf.pieces) : undefined;
  if (!pdfPlaced) files.set('pack.pdf', Buffer.concat(pdf.pieces));
  lap('pdf');
  const { md, html, charts: drawnWithPages, placed: textsPlaced } = await textPages;
  /** index.md and index.html as the worker wrote them into the pack's folder (`into`), with their size and SHA-256. */
  const pages = new Map<string, { readonly bytes: number; readonly sha256: string }>();
  for (const [name, page] of [['index.md', md], ['index.html', html]] as const) {
    if (page instanceof Uint8Array) files.set(name, page);
    else pages.set(name, page);
  }
  if (pagesWorker) lap(svgsOnPagesWorker ? 'markdown, html and svgs (waiting for the worker)' : 'markdown and html (waiting for the worker)');
  if (svgsOnPagesWorker) options.progress?.('charts', total, total);
  options.progress?.('pages', 2, 2);
  const drawn = new Map<string, { svg: Uint8Array; png: Uint8Array | null }>();
  /** Charts the worker wrote into the pack folder (and the cache's copy, where kept), with their size and SHA-256. */
  const placedCharts = new Map<string, { readonly bytes: number; readonly sha256: string }>();
  /** Scenes the worker wrote into the cache (their files' sizes). */
  const placedScenes = new Map<string, number>();
  if (charts) for (const r of await charts) drawn.set(r.id, { svg: encoder.encode(r.svg), png: r.png });
  else {
    for (const r of drawnWithPages) {
      if ('svg' in r) drawn.set(r.id, { svg: r.svg, png: null });
      else placedCharts.set(r.id, r.written);
      if (r.sceneBytes !== undefined) placedScenes.set(r.id, r.sceneBytes);
    }
  }
  if (options.png && allowed > 1) lap('charts (waiting for the workers)');
  for (const { id } of briefs) {
    const d = drawn.get(id);
    if (!d) continue;
    files.set(chartFile(id), d.svg);
    if (options.png && d.png) files.set(pngFile(id), d.png);
  }
  const placed = new Map<string, { readonly bytes: number; readonly sha256: string }>([...pages, ...[...placedCharts].map(([id, f]) => [chartFile(id), f] as const)]);
  if (pdfPlaced) placed.set('pack.pdf', pdfPlaced);
  const summaryMade = await summaryDone;
  if (summaryMade instanceof Uint8Array) files.set('summary.json', summaryMade);
  else placed.set('summary.json', { bytes: summaryMade.bytes, sha256: summaryMade.sha256 });
  files.set(RECORD_FILE, recordBytes);
  const outputs = [...entries(files), ...[...placed, ...copies].map(([p, f]) => ({ path: p, bytes: f.bytes, sha256: f.sha256 }))].sort((a, b) => comparePaths(a.path, b.path));
  files.set('manifest.json', json({ tool: TOOL, asOf, fingerprint, inputs, ledger: { ...integrity.chain, rewrites: integrity.rewrites }, outputs }));
  const cache = new Map<string, (into: string) => Uint8Array>();
  const cacheKept = new Set<string>();
  if (options.cache) {
    const shaOf = new Map(outputs.map((o) => [o.path, o.sha256]));
    const listed = new Map(outputs.map((o) => [o.path, o]));
    /** The index of the entries, each with its entry file's size: known once the entry is written (below). */
    const indexed = new Map<string, { -readonly [K in keyof IndexedEntry]: IndexedEntry[K] }>();
    reviewed.forEach((r, i) => {
      const b = r.brief;
      // A very long series would cost more to keep (hundreds of megabytes) than to analyse again.
      if (b.status === 'assessed' && b.points > (options.maxCachedPoints ?? MAX_CACHED_POINTS)) return;
      const key = keys[i]!;
      const id = b.id;
      const hit = hits[i];
      // Each side file is kept (linked) as the earlier build left it, or made here; the entry (the
      // assessment) is linked as it was unless it could not be read back.
      const sides: Sides = {};
      const keep = (kind: SideKind): boolean => {
        const side = hit?.side(kind);
        if (!side) return false;
        Object.assign(sides, { [kind]: side.file });
        cache.set(side.path, () => side.read());
        cacheKept.add(side.path);
        return true;
      };
      const make = <K extends SideKind>(kind: K, file: NonNullable<Sides[K]>, bytes: () => Uint8Array) => {
        Object.assign(sides, { [kind]: file });
        cache.set(sidePath(key, kind), bytes);
      };
      const scene = scenes.get(id);
      const sceneBytes = placedScenes.get(id);
      if (keep('scene')) {
        // As the earlier build left it.
      } else if (sceneBytes !== undefined) {
        // The worker wrote it (the job's `sceneTo`).
        Object.assign(sides, { scene: { bytes: sceneBytes } });
      } else if (scene) {
        const bytes = encodeStored(scene);
        make('scene', { bytes: bytes.length }, () => bytes);
      }
      const d = drawn.get(id);
      const w = placedCharts.get(id);
      if (d) {
        make('svg', { bytes: d.svg.length, sha256: shaOf.get(chartFile(id))! }, () => d.svg);
        const png = d.png;
        if (png) make('png', { bytes: png.length, sha256: shaOf.get(pngFile(id))! }, () => png);
      } else if (w) {
        // The worker wrote the side file beside the pack's copy (the job's `to`).
        Object.assign(sides, { svg: w });
      } else {
        keep('svg');
        keep('png');
      }
      const file = entryPath(key);
      const entry: (typeof indexed extends Map<string, infer E> ? E : never) = { brief: b, sides, bytes: hit?.entryBytes ?? 0, packed: {} };
      indexed.set(key, entry);
      // Where the entry cannot be linked, or was not read back, it is written: its size is then known.
      const write = () => {
        const bytes = encodeEntry(r.assessment());
        entry.bytes = bytes.length;
        return bytes;
      };
      cache.set(file, write);
      if (hit && !spoiled.has(i)) cacheKept.add(file);
    });
    // After the entries, whose sizes it records, and the pack's charts, whose stamps it records (the
    // writer makes the cache's files in this order, after the pack's).
    cache.set(ENTRY_INDEX, (into) => {
      for (const entry of indexed.values()) {
        const svg = entry.sides.svg ? stampOf(path.join(into, chartFile(entry.brief.id))) : undefined;
        const png = entry.sides.png ? stampOf(path.join(into, pngFile(entry.brief.id))) : undefined;
        entry.packed = { ...(svg ? { svg } : {}), ...(png ? { png } : {}) };
      }
      return encodeStored(indexed);
    });
    cache.set(SECTION_INDEX, () => encodeStored(sectionsMade));
    // Where each cached characteristic's part of summary.json is, for the next build.
    const pieces = new Map(keys.flatMap((key, i) => (summaryRanges[i] && cache.has(entryPath(key)) ? [[key, summaryRanges[i]] as const] : [])));
    const summary = listed.get('summary.json')!;
    cache.set(SUMMARY_INDEX, (into) => encodeStored({ bytes: summary.bytes, sha256: summary.sha256, pieces, stamp: stampOf(path.join(into, 'summary.json')) } satisfies SummaryIndex));
    // Parts read unchanged are linked; new ones are written.
    partKeys.forEach((key, i) => {
      const file = partPath(key);
      const hit = partHits[i];
      if (hit) {
        cache.set(file, hit.bytes);
        cacheKept.add(file);
      } else cache.set(file, () => encodeStored({ pdf: pdf.parts[i]! } satisfies CachedPart));
    });
    // Where each part's texts went in index.md and index.html (none for a tree with footnotes,
    // written whole), with the files as written: after the pack's files, whose stamps it records.
    const record = (name: string, into: string): PageRecord => ({ bytes: listed.get(name)!.bytes, sha256: listed.get(name)!.sha256, stamp: stampOf(path.join(into, name)) });
    const textAt = new Map(textsPlaced.map((at, i) => [partKeys[i]!, at] as const));
    cache.set(RECORD_STAMP, recordStamp);
    // The words this build shaped whole, for the next; the earlier build's file is kept where they are the same.
    const shaped = new Map<string, FaceLayouts>();
    let sameWords = storedWords.size === faceFiles.length;
    for (const f of faceFiles) {
      const s = wordsShaped(f.data);
      if (!s) continue;
      const pdf = fontPartsOf(f.data);
      shaped.set(f.sha256, { words: s.words, pairs: s.pairs, plain: s.plain, ...(pdf ? { pdf } : {}) });
      if (s.fresh > 0 || s.words.size + s.pairs.size !== storedWords.get(f.sha256)) sameWords = false;
    }
    cache.set(SHAPED_WORDS, () => shapedWordsFile(shaped));
    if (sameWords) cacheKept.add(SHAPED_WORDS);
    // The templates' trees, likewise.
    const trees = templatesParsed(ws.templates);
    cache.set(TEMPLATE_TREES, () => templateTreesFile(trees.trees));
    const keptTrees = options.templateTrees;
    if (trees.fresh === 0 && keptTrees?.size === trees.trees.size && [...trees.trees.keys()].every((t) => keptTrees.has(t))) cacheKept.add(TEMPLATE_TREES);
    cache.set(TEXT_INDEX, (into) => encodeStored({ md: record('index.md', into), html: record('index.html', into), parts: textAt } satisfies TextIndex));
  }
  lap('manifest and cache');
  const reused = hits.filter((h) => h !== undefined).length;
  return { files, placed, copies, cache, cacheKept, cacheUse: { reused, redone: briefs.length - reused }, briefs, diagnostics: packDiagnostics, exitCode };
}
