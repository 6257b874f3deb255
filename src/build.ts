/**
 * From a loaded workspace to the planned pack: every output file with its
 * bytes, decided before anything is written (the pack writer writes them).
 */
import type { Assessment } from './analyse.ts';
import { planSummary, sha256 } from './assess.ts';
import { type PreviousLedger, rewriteSentence } from './review/ledger-chain.ts';
import type { Diagnostic } from './diagnostics.ts';
import type { IsoDate } from './model.ts';
import { buildPackTree } from './pack/content.ts';
import { jsonBytes } from './pack/json-bytes.ts';
import { toHtml } from './pack/html.ts';
import { toMarkdown } from './pack/markdown.ts';
import { type Paper, toPdf } from './pack/pdf.ts';
import { loadFonts } from './render/fonts.ts';
import { svgToPng } from './render/png.ts';
import { layoutChart } from './render/scene/layout.ts';
import { chartSpec } from './render/scene/spec.ts';
import { createTextMetrics } from './render/scene/text-metrics.ts';
import type { Scene } from './render/scene/types.ts';
import { renderStandaloneSvg } from './render/svg-satori.ts';
import { type SummaryLike, compareSummaries, previousSummarySchema } from './review/since.ts';
import { TOOL } from './version.ts';
import type { Workspace } from './workspace/load.ts';

export interface PlannedPack {
  /** Output path (relative to --out) → contents, in write order. */
  readonly files: ReadonlyMap<string, Uint8Array>;
  readonly assessments: readonly Assessment[];
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
  /** The previous pack's summary.json, for the "Since the last review" section. */
  readonly previous?: SummaryLike;
  /** The previous pack's manifest record of the ledger, to tell whether earlier rows were rewritten. */
  readonly previousLedger?: PreviousLedger;
  /** A customer's pack: the tag it was narrowed to and the customer's name. */
  readonly audience?: { readonly tag: string; readonly name: string | null };
}

export const DEFAULT_OPTIONS: PackOptions = { paper: 'a4', png: false };

const encoder = new TextEncoder();
const json = jsonBytes;
const byPath = ([a]: [string, unknown], [b]: [string, unknown]) => (a < b ? -1 : a > b ? 1 : 0);

function entries(m: ReadonlyMap<string, Uint8Array>) {
  return [...m.entries()].sort(byPath).map(([p, b]) => ({ path: p, bytes: b.length, sha256: sha256(b) }));
}

export const chartFile = (id: string) => `charts/${id}.svg`;

export async function planPack(ws: Workspace, asOf: IsoDate, options: PackOptions = DEFAULT_OPTIONS): Promise<PlannedPack> {
  const { assessments, summary, diagnostics, integrity, exitCode } = planSummary(ws, asOf, options.previousLedger);
  const inputs = entries(ws.inputs);
  // One hash over the input hashes: the pack's fingerprint of what it was built from.
  const fingerprint = sha256(encoder.encode(inputs.map((i) => `${i.sha256}  ${i.path}`).join('\n')));
  const fonts = loadFonts();
  const metrics = createTextMetrics(fonts);
  const files = new Map<string, Uint8Array>();

  const scenes = new Map<string, Scene>();
  const assessed = assessments.filter((a) => a.status === 'assessed');
  for (const [k, a] of assessed.entries()) {
    const scene = layoutChart(chartSpec(a, ws.config.period), metrics);
    scenes.set(a.characteristic.id, scene);
    const svg = await renderStandaloneSvg(scene, fonts);
    files.set(chartFile(a.characteristic.id), encoder.encode(svg));
    if (options.png) files.set(`charts/${a.characteristic.id}.png`, svgToPng(svg, [fonts.regularPath, fonts.semiboldPath], scene.width * 2));
    options.progress?.('charts', k + 1, assessed.length);
  }

  const pack = buildPackTree({
    config: ws.config,
    assessments,
    diagnostics: ws.diagnostics,
    asOf,
    fingerprint,
    tool: TOOL,
    templates: ws.templates,
    chartFile,
    ...(options.audience ? { audience: options.audience } : {}),
    ...(integrity.rewrite ? { rewritten: rewriteSentence(integrity.rewrite) } : {}),
    ...(options.previous ? { since: compareSummaries(options.previous, previousSummarySchema.parse(summary)) } : {}),
  });
  const packDiagnostics = [...diagnostics, ...pack.diagnostics];
  files.set('index.md', encoder.encode(toMarkdown(pack.tree)));
  files.set('index.html', encoder.encode(toHtml({ tree: pack.tree, title: ws.config.title, scenes, fonts })));
  options.progress?.('pages', 1, 2);
  files.set(
    'pack.pdf',
    await toPdf({
      tree: pack.tree,
      title: ws.config.title,
      subject: `Control-limit review, ${ws.config.period.from} to ${ws.config.period.to}`,
      author: ws.config.organisation,
      asOf,
      paper: options.paper,
      scenes,
      fonts,
      producer: `${TOOL.name} ${TOOL.version}`,
    }),
  );
  options.progress?.('pages', 2, 2);
  files.set('summary.json', json(summary));
  files.set('manifest.json', json({ tool: TOOL, asOf, fingerprint, inputs, ledger: { ...integrity.chain, rewrites: integrity.rewrites }, outputs: entries(files) }));
  return { files, assessments, diagnostics: packDiagnostics, exitCode };
}
