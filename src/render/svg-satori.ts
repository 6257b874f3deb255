/**
 * The standalone SVG of a chart: geometry as SVG elements and every label
 * as glyph paths from the embedded font, so the file looks the same in any
 * viewer and needs no installed font. satori is the text-to-path engine;
 * every position comes from the scene.
 *
 * satori's cost is per label and per call (about 2 ms a call, 0.4 ms a label
 * in a batch), and a plant's charts share most labels ("center line", tick
 * values, years). So each distinct label is laid out once, in batches, and
 * kept as path data relative to its own start and baseline; a chart is then
 * its geometry and a translated copy of each label's paths. All labels of a
 * batch are drawn at the same origin, each in its own marker colour, so a
 * label's paths never depend on which other labels shared its batch: the
 * same label gives the same bytes in every build.
 */
import satori from 'satori';
import { compactPath, geom } from '../format.ts';
import { FONT_FAMILY } from './fonts.ts';
import type { Primitive, Scene } from './scene/types.ts';
import { escapeXml } from './svg-inline.ts';

type Text = Extract<Primitive, { kind: 'text' }>;
type Geometry = Exclude<Primitive, { kind: 'text' }>;

/** Baseline of satori's line box with `line-height: 1`, as a share of the font size (IBM Plex Sans: (1 − 1.3)/2 + 1.025). */
const BASELINE_IN_BOX = 0.875;
/** Where every label's baseline sits in the batch canvas: a whole point, clear of the tallest ascender. */
const BASELINE = 40;
const CANVAS = { width: 4000, height: 64 };
/** Labels laid out in one satori call. */
const BATCH = 400;

export interface SatoriFonts {
  readonly regular: Uint8Array;
  readonly semibold: Uint8Array;
}

const labelKey = (p: Pick<Text, 'size' | 'weight' | 'text'>) => `${p.size}|${p.weight}|${p.text}`;

/** The marker colour of the i-th label of a batch; satori writes it back as the path's fill. */
const marker = (i: number) => `#${(i + 1).toString(16).padStart(6, '0')}`;

/**
 * Laid-out labels: path data (`d`) with the label's start at x = 0 and its
 * baseline at y = 0, shared by every chart drawn with the same fonts.
 */
export class LabelPaths {
  private readonly done = new Map<string, readonly string[]>();
  private readonly fonts: Parameters<typeof satori>[1]['fonts'];

  constructor(fonts: SatoriFonts) {
    // satori caches parsed fonts by buffer identity, so one list serves every call.
    const ab = (b: Uint8Array) => b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;
    this.fonts = [
      { name: FONT_FAMILY, data: ab(fonts.regular), weight: 400, style: 'normal' },
      { name: FONT_FAMILY, data: ab(fonts.semibold), weight: 600, style: 'normal' },
    ];
  }

  get size(): number {
    return this.done.size;
  }

  /** Lays out every label not yet known. */
  async prepare(labels: Iterable<Pick<Text, 'size' | 'weight' | 'text'>>): Promise<void> {
    const todo = new Map<string, Pick<Text, 'size' | 'weight' | 'text'>>();
    for (const l of labels) {
      const k = labelKey(l);
      if (!this.done.has(k) && !todo.has(k)) todo.set(k, l);
    }
    const list = [...todo];
    for (let from = 0; from < list.length; from += BATCH) await this.layBatch(list.slice(from, from + BATCH));
  }

  /** The label's path data; `prepare` must have seen it. */
  paths(p: Pick<Text, 'size' | 'weight' | 'text'>): readonly string[] {
    const d = this.done.get(labelKey(p));
    if (!d) throw new Error(`label not prepared: ${p.text}`);
    return d;
  }

  private async layBatch(batch: readonly [string, Pick<Text, 'size' | 'weight' | 'text'>][]): Promise<void> {
    const root = {
      type: 'div',
      props: {
        style: { display: 'flex', position: 'relative', width: CANVAS.width, height: CANVAS.height },
        children: batch.map(([, l], i) => ({
          type: 'div',
          props: {
            style: {
              display: 'flex',
              position: 'absolute',
              left: 0,
              // The small nudge keeps satori's rounding of the baseline on the whole point.
              top: BASELINE - BASELINE_IN_BOX * l.size + 0.01,
              fontFamily: FONT_FAMILY,
              fontSize: l.size,
              fontWeight: l.weight,
              lineHeight: 1,
              color: marker(i),
              whiteSpace: 'nowrap',
            },
            children: l.text,
          },
        })),
      },
    };
    const svg = await satori(root as unknown as Parameters<typeof satori>[0], { ...CANVAS, fonts: this.fonts });
    const found = new Map<string, string[]>();
    for (const m of svg.matchAll(/<path fill="(#[0-9a-f]{6})" d="([^"]*)"/g)) {
      const list = found.get(m[1]!);
      if (list) list.push(m[2]!);
      else found.set(m[1]!, [m[2]!]);
    }
    batch.forEach(([key], i) => this.done.set(key, (found.get(marker(i)) ?? []).map(toBaseline)));
  }
}

/**
 * Moves satori's absolute path data from the batch canvas to the label's
 * own origin (start, baseline), then writes it compactly (relative steps,
 * no zero-length lines). satori writes one decimal; the move is by a whole
 * number, so no precision is lost.
 */
function toBaseline(d: string): string {
  // Absolute M/L/Q/C/Z commands with x,y pairs; only y moves.
  let y = false;
  const moved = d.replace(/[A-Za-z]|-?\d*\.?\d+/g, (t) => {
    if (/[A-Za-z]/.test(t)) {
      y = false;
      return ` ${t} `;
    }
    const v = y ? Math.round((Number(t) - BASELINE) * 10) / 10 : Number(t);
    y = !y;
    return ` ${v === 0 ? 0 : v}`;
  });
  return compactPath(moved.replace(/\s+/g, ' ').trim(), { fillOnly: true });
}

function geometryElement(p: Geometry): string {
  const opacity = p.opacity !== undefined ? ` fill-opacity="${p.opacity}"` : '';
  if (p.kind === 'rect') {
    return `<rect x="${geom(p.x)}" y="${geom(p.y)}" width="${geom(p.w)}" height="${geom(p.h)}" fill="${escapeXml(p.fill)}"${opacity}/>`;
  }
  const stroke = p.stroke
    ? ` stroke="${escapeXml(p.stroke.paint)}" stroke-width="${p.stroke.width}"${p.stroke.dash ? ` stroke-dasharray="${p.stroke.dash.join(' ')}"` : ''}`
    : '';
  return `<path d="${escapeXml(compactPath(p.d))}" fill="${escapeXml(p.fill ?? 'none')}"${stroke}${p.opacity !== undefined ? ` opacity="${p.opacity}"` : ''}/>`;
}

function labelElement(p: Text, labels: LabelPaths): string {
  const left = p.anchor === 'start' ? p.x : p.anchor === 'middle' ? p.x - p.width / 2 : p.x - p.width;
  const d = labels.paths(p);
  if (d.length === 0) return '';
  return `<path fill="${escapeXml(p.fill)}" transform="translate(${geom(left)} ${geom(p.y)})" d="${d.join('')}"/>`;
}

let shared: { key: SatoriFonts; labels: LabelPaths } | undefined;

/** The label cache for these fonts, kept for the life of the process. */
export function labelPathsFor(fonts: SatoriFonts): LabelPaths {
  if (shared?.key !== fonts) shared = { key: fonts, labels: new LabelPaths(fonts) };
  return shared.labels;
}

export async function renderStandaloneSvg(scene: Scene, fonts: SatoriFonts, labels: LabelPaths = labelPathsFor(fonts)): Promise<string> {
  const texts = scene.items.filter((p): p is Text => p.kind === 'text');
  await labels.prepare(texts);
  const body = scene.items.map((p) => (p.kind === 'text' ? labelElement(p, labels) : geometryElement(p))).join('');
  return (
    `<svg width="${scene.width}" height="${scene.height}" viewBox="0 0 ${scene.width} ${scene.height}" xmlns="http://www.w3.org/2000/svg" role="img">` +
    `<title>${escapeXml(scene.title)}</title><desc>${escapeXml(scene.desc)}</desc>` +
    `<rect x="0" y="0" width="${scene.width}" height="${scene.height}" fill="#ffffff"/>${body}</svg>`
  );
}
