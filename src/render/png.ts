/** PNG from the standalone SVG, with resvg and only our own font files (never the system's). */
import { Resvg } from '@resvg/resvg-js';

export function svgToPng(svg: string, fontFiles: readonly string[], pixelWidth: number): Uint8Array {
  const resvg = new Resvg(svg, {
    font: { loadSystemFonts: false, fontFiles: [...fontFiles] },
    fitTo: { mode: 'width', value: Math.round(pixelWidth) },
    background: '#ffffff',
  });
  return new Uint8Array(resvg.render().asPng());
}
