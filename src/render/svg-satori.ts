/**
 * The standalone SVG of a chart: geometry as SVG elements and every label
 * as glyph paths from the embedded font, so the file looks the same in any
 * viewer and needs no installed font. satori is the text-to-path engine;
 * every position comes from the scene.
 *
 * satori's cost is per call and per glyph (about 2 ms a call, 50 µs a
 * glyph), and a plant's charts are thousands of distinct labels ("12.43",
 * "UCL 8.07") made of a few dozen glyphs. satori itself draws a label as
 * its glyphs' outlines, each scaled to the size and moved to the pen
 * position its shaper gives, then rounded to 0.1. So each glyph (character
 * and weight) is laid out by satori once, at one point per font unit, and a
 * label is its glyphs' outlines scaled, placed at fontkit's pen positions
 * (the same advances and kerning as satori's shaper, and those the scene
 * measured with) and rounded as satori rounds. A ligature is laid out as
 * its characters together. A label whose glyphs do not spell it (a
 * character missing from the font) or whose white space satori would
 * collapse is laid out whole, at the same scale. Glyphs and whole labels
 * are laid out many to a call, all at the same origin, each in its own marker colour, so a label's
 * paths never depend on which others shared its batch: the same label gives
 * the same bytes in every build.
 */
import satori from 'satori';
import { compactTenths, geom } from '../format.ts';
import { compactPathOf } from './path-data.ts';
import { FONT_FAMILY } from './fonts.ts';
import { type FontkitFont, shapingFontkit } from './fontkit.ts';
import { pairRuns } from './pair-runs.ts';
import type { Primitive, Scene } from './scene/types.ts';
import { escapeXml } from './svg-inline.ts';

type Text = Extract<Primitive, { kind: 'text' }>;
type Geometry = Exclude<Primitive, { kind: 'text' }>;
type Label = Pick<Text, 'size' | 'weight' | 'text'>;

/** Baseline of satori's line box with `line-height: 1`, as a share of the font size (IBM Plex Sans: (1 − 1.3)/2 + 1.025). */
const BASELINE_IN_BOX = 0.875;
/**
 * The canvas glyphs are laid out on: one point per font unit (IBM Plex
 * Sans has 1,000 to the em), the baseline on a whole point. Wide enough for
 * a long label laid out whole; satori does not rasterise, so size is free.
 */
const CANVAS = { width: 200_000, height: 2400, baseline: 1600 };
/** Glyphs laid out in one satori call. */
const BATCH = 400;

export interface SatoriFonts {
  readonly regular: Uint8Array;
  readonly semibold: Uint8Array;
}

type Weight = Label['weight'];

const labelKey = (p: Label) => `${p.size}|${p.weight}|${p.text}`;

/** The marker colour of the i-th glyph of a batch; satori writes it back as the path's fill. */
const marker = (i: number) => `#${(i + 1).toString(16).padStart(6, '0')}`;

/**
 * A glyph's outline as satori draws it at one point per font unit: its
 * commands (M, L, Q, C, Z) and their coordinates in font units, x from the
 * glyph's origin and y down from the baseline.
 */
interface Outline {
  readonly commands: string;
  readonly coords: Float64Array;
}

/**
 * A piece of a label and where it goes (pen position and offsets, in
 * points): one glyph's characters (one, or two or three for a ligature),
 * or the whole label.
 */
interface Placed {
  readonly unit: string;
  readonly dx: number;
  readonly dy: number;
}

/** satori's rounding of an x, in tenths: halves away from zero. */
const tenthX = (v: number) => (v < 0 ? -Math.round(-v * 10) : Math.round(v * 10)) || 0;
/**
 * satori's rounding of a y, in tenths. It rounds on a canvas where every y
 * is positive, so halves go down the page: a label's bytes are what laying
 * it out whole at its size gave.
 */
const tenthY = (v: number) => Math.round(v * 10) || 0;

/**
 * Laid-out labels: path data (`d`) with the label's start at x = 0 and its
 * baseline at y = 0, shared by every chart drawn with the same fonts.
 */
export class LabelPaths {
  private readonly done = new Map<string, readonly string[]>();
  /** Glyphs (and labels laid out whole) as satori drew them, by weight and characters. */
  private readonly outlines = new Map<string, Outline>();
  private readonly fonts: Parameters<typeof satori>[1]['fonts'];
  private readonly faces: Readonly<Record<Weight, FontkitFont>>;
  /** Each face's layout of a label of figures, from its pairs (pair-runs.ts); undefined for other labels. */
  private readonly figures: Readonly<Record<Weight, (text: string) => ReturnType<FontkitFont['layout']> | undefined>>;

  constructor(fonts: SatoriFonts) {
    // satori caches parsed fonts by buffer identity, so one list serves every call.
    const ab = (b: Uint8Array) => b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;
    this.fonts = [
      { name: FONT_FAMILY, data: ab(fonts.regular), weight: 400, style: 'normal' },
      { name: FONT_FAMILY, data: ab(fonts.semibold), weight: 600, style: 'normal' },
    ];
    this.faces = { 400: shapingFontkit.create(fonts.regular), 600: shapingFontkit.create(fonts.semibold) };
    const figures = (face: FontkitFont) => pairRuns(face, face.layout.bind(face));
    this.figures = { 400: figures(this.faces[400]), 600: figures(this.faces[600]) };
  }

  /** Labels known. */
  get size(): number {
    return this.done.size;
  }

  /** Lays out every label not yet known. */
  async prepare(labels: Iterable<Label>): Promise<void> {
    const todo = new Map<string, { readonly label: Label; readonly placed: readonly Placed[] }>();
    const units = new Map<string, { readonly weight: Weight; readonly text: string }>();
    for (const l of labels) {
      const k = labelKey(l);
      if (this.done.has(k) || todo.has(k)) continue;
      const placed = this.place(l);
      todo.set(k, { label: l, placed });
      for (const p of placed) {
        const u = `${l.weight}|${p.unit}`;
        if (!this.outlines.has(u)) units.set(u, { weight: l.weight, text: p.unit });
      }
    }
    const list = [...units];
    for (let from = 0; from < list.length; from += BATCH) {
      const batch = list.slice(from, from + BATCH);
      const paths = await this.layBatch(batch.map(([, u]) => u));
      batch.forEach(([key], i) => this.outlines.set(key, toOutline(paths[i]!)));
    }
    for (const [key, { label, placed }] of todo) this.done.set(key, this.compose(label, placed));
  }

  /** The label's path data; `prepare` must have seen it. */
  paths(p: Label): readonly string[] {
    const d = this.done.get(labelKey(p));
    if (!d) throw new Error(`label not prepared: ${p.text}`);
    return d;
  }

  /**
   * The label's glyphs at fontkit's pen positions. A label is laid out
   * whole when its glyphs do not spell its text one after another (a
   * character the font lacks, a reordering), when a glyph is not what its
   * character gives alone (a contextual form), or when satori would
   * collapse or trim its white space.
   */
  private place(l: Label): readonly Placed[] {
    const whole = [{ unit: l.text, dx: 0, dy: 0 }];
    if (l.text === '' || /^\s|\s$|\s\s|[^\S ]/.test(l.text)) return whole;
    const face = this.faces[l.weight];
    const run = this.figures[l.weight](l.text) ?? face.layout(l.text);
    const scale = l.size / face.unitsPerEm;
    const placed: Placed[] = [];
    let pen = 0;
    let spelt = '';
    for (let i = 0; i < run.glyphs.length; i++) {
      const g = run.glyphs[i]!;
      const unit = String.fromCodePoint(...g.codePoints);
      if (g.id === 0 || unit === '' || (g.codePoints.length === 1 && face.glyphForCodePoint(g.codePoints[0]!).id !== g.id)) return whole;
      spelt += unit;
      const pos = run.positions[i]!;
      if (unit !== ' ') placed.push({ unit, dx: pen + pos.xOffset * scale, dy: -pos.yOffset * scale });
      pen += pos.xAdvance * scale;
    }
    return spelt === l.text ? placed : whole;
  }

  /**
   * The label as satori draws it: each glyph's outline scaled to the size
   * and moved to its place (satori's own arithmetic), every coordinate
   * rounded as satori rounds, then written compactly.
   */
  private compose(l: Label, placed: readonly Placed[]): readonly string[] {
    const scale = l.size / this.faces[l.weight].unitsPerEm;
    let commands = '';
    const tenths: number[] = [];
    for (const p of placed) {
      const o = this.outlines.get(`${l.weight}|${p.unit}`)!;
      commands += o.commands;
      for (let at = 0; at < o.coords.length; at += 2) tenths.push(tenthX(p.dx + o.coords[at]! * scale), tenthY(p.dy + o.coords[at + 1]! * scale));
    }
    return commands === '' ? [] : [compactTenths(commands, tenths)];
  }

  /** satori's paths for each piece of the batch, as it wrote them (absolute, on the canvas), at one point per font unit. */
  private async layBatch(batch: readonly { readonly weight: Weight; readonly text: string }[]): Promise<string[][]> {
    const root = {
      type: 'div',
      props: {
        style: { display: 'flex', position: 'relative', width: CANVAS.width, height: CANVAS.height },
        children: batch.map((u, i) => {
          const size = this.faces[u.weight].unitsPerEm;
          return {
            type: 'div',
            props: {
              style: {
                display: 'flex',
                position: 'absolute',
                left: 0,
                top: CANVAS.baseline - BASELINE_IN_BOX * size,
                fontFamily: FONT_FAMILY,
                fontSize: size,
                fontWeight: u.weight,
                lineHeight: 1,
                color: marker(i),
                whiteSpace: 'nowrap',
              },
              children: u.text,
            },
          };
        }),
      },
    };
    const svg = await satori(root as unknown as Parameters<typeof satori>[0], { width: CANVAS.width, height: CANVAS.height, fonts: this.fonts });
    const found = new Map<string, string[]>();
    for (const m of svg.matchAll(/<path fill="(#[0-9a-f]{6})" d="([^"]*)"/g)) {
      const list = found.get(m[1]!);
      if (list) list.push(m[2]!);
      else found.set(m[1]!, [m[2]!]);
    }
    return batch.map((_, i) => found.get(marker(i)) ?? []);
  }
}

/** Pieces laid out on the canvas, moved to their origin on the baseline, in font units. */
function toOutline(paths: readonly string[]): Outline {
  // Joined once, not grown by += (a rope kept for the whole build; see compactTenths).
  const commands: string[] = [];
  const coords: number[] = [];
  let y = false;
  for (const t of paths.join('').match(/[MLQCZ]|-?\d*\.?\d+/g) ?? []) {
    if (t >= 'A') {
      commands.push(t);
      y = false;
      continue;
    }
    // Outline points are whole font units, and on-curve points implied between two
    // quadratic controls halves: exact at satori's 0.1 (rounded again to drop float error).
    coords.push(tenthX(y ? Number(t) - CANVAS.baseline : Number(t)) / 10);
    y = !y;
  }
  return { commands: commands.join(''), coords: Float64Array.from(coords) };
}

function geometryElement(p: Geometry): string {
  const opacity = p.opacity !== undefined ? ` fill-opacity="${p.opacity}"` : '';
  if (p.kind === 'rect') {
    return `<rect x="${geom(p.x)}" y="${geom(p.y)}" width="${geom(p.w)}" height="${geom(p.h)}" fill="${escapeXml(p.fill)}"${opacity}/>`;
  }
  const stroke = p.stroke
    ? ` stroke="${escapeXml(p.stroke.paint)}" stroke-width="${p.stroke.width}"${p.stroke.dash ? ` stroke-dasharray="${p.stroke.dash.join(' ')}"` : ''}`
    : '';
  return `<path d="${escapeXml(compactPathOf(p))}" fill="${escapeXml(p.fill ?? 'none')}"${stroke}${p.opacity !== undefined ? ` opacity="${p.opacity}"` : ''}/>`;
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
