/**
 * The standalone SVG of a chart: geometry as SVG elements and every label
 * laid out by satori as glyph paths from the embedded font, so the file
 * looks the same in any viewer and needs no installed font. satori is used
 * as the text-to-path engine only; every position comes from the scene.
 */
import satori from 'satori';
import { FONT_FAMILY } from './fonts.ts';
import type { Primitive, Scene } from './scene/types.ts';
import { escapeXml } from './svg-inline.ts';

/** Baseline of satori's line box with `line-height: 1`, as a share of the font size (IBM Plex Sans: (1 − 1.3)/2 + 1.025). */
const BASELINE_IN_BOX = 0.875;

interface Node {
  type: string;
  props: Record<string, unknown> & { children?: unknown };
}

function geometryNode(p: Exclude<Primitive, { kind: 'text' }>): Node {
  if (p.kind === 'rect') {
    return { type: 'rect', props: { x: p.x, y: p.y, width: p.w, height: p.h, fill: p.fill, ...(p.opacity !== undefined ? { fillOpacity: p.opacity } : {}) } };
  }
  return {
    type: 'path',
    props: {
      d: p.d,
      fill: p.fill ?? 'none',
      ...(p.stroke
        ? { stroke: p.stroke.paint, strokeWidth: p.stroke.width, ...(p.stroke.dash ? { strokeDasharray: p.stroke.dash.join(' ') } : {}) }
        : {}),
      ...(p.opacity !== undefined ? { opacity: p.opacity } : {}),
    },
  };
}

function labelNode(p: Extract<Primitive, { kind: 'text' }>): Node {
  const left = p.anchor === 'start' ? p.x : p.anchor === 'middle' ? p.x - p.width / 2 : p.x - p.width;
  return {
    type: 'div',
    props: {
      style: {
        display: 'flex',
        position: 'absolute',
        left,
        // The small nudge keeps satori's rounding of the baseline on the scene's whole point.
        top: p.y - BASELINE_IN_BOX * p.size + 0.01,
        fontFamily: FONT_FAMILY,
        fontSize: p.size,
        fontWeight: p.weight,
        lineHeight: 1,
        color: p.fill,
        whiteSpace: 'nowrap',
      },
      children: p.text,
    },
  };
}

export interface SatoriFonts {
  readonly regular: Uint8Array;
  readonly semibold: Uint8Array;
}

let fontList: { key: SatoriFonts; list: Parameters<typeof satori>[1]['fonts'] } | undefined;

function fontsFor(fonts: SatoriFonts) {
  // satori caches parsed fonts by buffer identity, so reuse one list.
  if (fontList?.key !== fonts) {
    const ab = (b: Uint8Array) => b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;
    fontList = {
      key: fonts,
      list: [
        { name: FONT_FAMILY, data: ab(fonts.regular), weight: 400, style: 'normal' },
        { name: FONT_FAMILY, data: ab(fonts.semibold), weight: 600, style: 'normal' },
      ],
    };
  }
  return fontList.list;
}

export async function renderStandaloneSvg(scene: Scene, fonts: SatoriFonts): Promise<string> {
  const geometry = scene.items.filter((p): p is Exclude<Primitive, { kind: 'text' }> => p.kind !== 'text').map(geometryNode);
  const labels = scene.items.filter((p): p is Extract<Primitive, { kind: 'text' }> => p.kind === 'text').map(labelNode);
  const root: Node = {
    type: 'div',
    props: {
      style: { display: 'flex', position: 'relative', width: scene.width, height: scene.height, backgroundColor: '#ffffff' },
      children: [
        {
          type: 'svg',
          props: {
            width: scene.width,
            height: scene.height,
            viewBox: `0 0 ${scene.width} ${scene.height}`,
            style: { position: 'absolute', left: 0, top: 0 },
            children: geometry,
          },
        },
        ...labels,
      ],
    },
  };
  const svg = await satori(root as unknown as Parameters<typeof satori>[0], { width: scene.width, height: scene.height, fonts: fontsFor(fonts) });
  // satori writes no accessible name; give the file its title and summary.
  const open = svg.indexOf('>') + 1;
  return `${svg.slice(0, open - 1)} role="img"><title>${escapeXml(scene.title)}</title><desc>${escapeXml(scene.desc)}</desc>${svg.slice(open)}`;
}
