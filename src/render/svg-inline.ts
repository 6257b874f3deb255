/**
 * The chart as an inline SVG for the HTML pack, as a hast tree: the same
 * scene, but labels stay `<text>` in the page's embedded font, so readers can
 * search and select values and screen readers can read them, and the page
 * stays light. hast serialisation escapes every string.
 */
import type { Element, ElementContent } from 'hast';
import { compactPath, geom, printable } from '../format.ts';
import { FONT_FAMILY } from './fonts.ts';
import type { Primitive, Scene } from './scene/types.ts';

export function escapeXml(s: string): string {
  return printable(s).replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

const el = (tagName: string, properties: Element['properties'], children: ElementContent[] = []): Element => ({
  type: 'element',
  tagName,
  properties,
  children,
});

function node(p: Primitive): Element {
  switch (p.kind) {
    case 'rect':
      return el('rect', { x: geom(p.x), y: geom(p.y), width: geom(p.w), height: geom(p.h), fill: p.fill, ...(p.opacity !== undefined ? { fillOpacity: p.opacity } : {}) });
    case 'path':
      return el('path', {
        d: compactPath(p.d),
        fill: p.fill ?? 'none',
        ...(p.stroke ? { stroke: p.stroke.paint, strokeWidth: p.stroke.width, ...(p.stroke.dash ? { strokeDasharray: p.stroke.dash.join(' ') } : {}) } : {}),
        ...(p.opacity !== undefined ? { opacity: p.opacity } : {}),
      });
    case 'text':
      return el(
        'text',
        {
          x: geom(p.x),
          y: geom(p.y),
          fontSize: p.size,
          ...(p.weight !== 400 ? { fontWeight: p.weight } : {}),
          ...(p.anchor !== 'start' ? { textAnchor: p.anchor } : {}),
          ...(p.fill !== '#1f1f1f' ? { fill: p.fill } : {}),
        },
        [{ type: 'text', value: p.text }],
      );
  }
}

/** `idBase` must be unique in the page; it names the title and description for aria-labelledby. */
export function inlineSvg(scene: Scene, idBase: string): Element {
  return el(
    'svg',
    {
      xmlns: 'http://www.w3.org/2000/svg',
      viewBox: `0 0 ${scene.width} ${scene.height}`,
      width: scene.width,
      height: scene.height,
      role: 'img',
      ariaLabelledBy: `${idBase}-title ${idBase}-desc`,
      className: ['chart'],
      fontFamily: FONT_FAMILY,
      fill: '#1f1f1f',
    },
    [
      el('title', { id: `${idBase}-title` }, [{ type: 'text', value: printable(scene.title) }]),
      el('desc', { id: `${idBase}-desc` }, [{ type: 'text', value: printable(scene.desc) }]),
      el('rect', { x: 0, y: 0, width: scene.width, height: scene.height, fill: '#ffffff' }),
      ...scene.items.map(node),
    ],
  );
}
