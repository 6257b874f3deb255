/**
 * The chart as an inline SVG for the HTML pack: the same scene, but labels
 * stay `<text>` in the page's embedded font, so readers can search and
 * select values and screen readers can read them, and the page stays light.
 *
 * Written as markup directly, not as a hast tree for hast-util-to-html to
 * serialise: a plant's thousand charts are hundreds of thousands of
 * elements, and serialising their trees was half of index.html's time
 * (1.0 of 1.9 s). The bytes are those hast-util-to-html writes for the
 * element tree this replaced, escaping included (test/render/inline-svg.test.ts
 * compares them on seeded scenes and hostile text).
 */
import { geom, printable } from '../format.ts';
import { compactPathOf } from './path-data.ts';
import { FONT_FAMILY } from './fonts.ts';
import type { Primitive, Scene } from './scene/types.ts';

export function escapeXml(s: string): string {
  return printable(s).replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

// As hast-util-to-html escapes with its default options, each as a hexadecimal character reference:
// in text `&` and `<`; in a double-quoted attribute value NUL, `"`, `&`, `'` and the backtick (its
// set for values that cause no parse error in any space).
const TEXT_ESCAPES: Readonly<Record<string, string>> = { '&': '&#x26;', '<': '&#x3C;' };
const ATTRIBUTE_ESCAPES: Readonly<Record<string, string>> = { '\0': '&#x0;', '"': '&#x22;', '&': '&#x26;', "'": '&#x27;', '`': '&#x60;' };
const text = (s: string) => s.replace(/[&<]/g, (c) => TEXT_ESCAPES[c]!);
const attribute = (name: string, value: string | number) => ` ${name}="${String(value).replace(/[\0"&'`]/g, (c) => ATTRIBUTE_ESCAPES[c]!)}"`;

function markup(p: Primitive): string {
  switch (p.kind) {
    case 'rect':
      return `<rect${attribute('x', geom(p.x))}${attribute('y', geom(p.y))}${attribute('width', geom(p.w))}${attribute('height', geom(p.h))}${attribute('fill', p.fill)}${p.opacity !== undefined ? attribute('fill-opacity', p.opacity) : ''}></rect>`;
    case 'path': {
      const stroke = p.stroke
        ? `${attribute('stroke', p.stroke.paint)}${attribute('stroke-width', p.stroke.width)}${p.stroke.dash ? attribute('stroke-dasharray', p.stroke.dash.join(' ')) : ''}`
        : '';
      return `<path${attribute('d', compactPathOf(p))}${attribute('fill', p.fill ?? 'none')}${stroke}${p.opacity !== undefined ? attribute('opacity', p.opacity) : ''}></path>`;
    }
    case 'text':
      return (
        `<text${attribute('x', geom(p.x))}${attribute('y', geom(p.y))}${attribute('font-size', p.size)}` +
        `${p.weight !== 400 ? attribute('font-weight', p.weight) : ''}${p.anchor !== 'start' ? attribute('text-anchor', p.anchor) : ''}${p.fill !== '#1f1f1f' ? attribute('fill', p.fill) : ''}>` +
        `${text(p.text)}</text>`
      );
  }
}

/** `idBase` must be unique in the page; it names the title and description for aria-labelledby. */
export function inlineSvg(scene: Scene, idBase: string): string {
  const open =
    `<svg${attribute('xmlns', 'http://www.w3.org/2000/svg')}${attribute('viewBox', `0 0 ${scene.width} ${scene.height}`)}${attribute('width', scene.width)}${attribute('height', scene.height)}` +
    `${attribute('role', 'img')}${attribute('aria-labelledby', `${idBase}-title ${idBase}-desc`)}${attribute('class', 'chart')}${attribute('font-family', FONT_FAMILY)}${attribute('fill', '#1f1f1f')}>`;
  const head =
    `<title${attribute('id', `${idBase}-title`)}>${text(printable(scene.title))}</title><desc${attribute('id', `${idBase}-desc`)}>${text(printable(scene.desc))}</desc>` +
    `<rect${attribute('x', 0)}${attribute('y', 0)}${attribute('width', scene.width)}${attribute('height', scene.height)}${attribute('fill', '#ffffff')}></rect>`;
  return `${open}${head}${scene.items.map(markup).join('')}</svg>`;
}
