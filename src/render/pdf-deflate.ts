/**
 * pdf-lib compresses every content stream and font with pako, zlib written
 * in JavaScript; on a 1,000-characteristic pack that was a fifth of the PDF
 * time. Node's own zlib makes the same Deflate format natively, several
 * times faster, so pdf-lib's pako is pointed at it. The output is still
 * deterministic (one zlib, fixed level); it differs from pako's bytes, so
 * PDFs are compared between builds of the same tool, never against pako.
 */
import { createRequire } from 'node:module';
import { constants, deflateSync } from 'node:zlib';

let done = false;

export function useNativeDeflate(): void {
  if (done) return;
  const fromPdfLib = createRequire(createRequire(import.meta.url).resolve('pdf-lib'));
  const pako = fromPdfLib('pako') as { deflate: (data: Uint8Array | string) => Uint8Array };
  pako.deflate = (data) => new Uint8Array(deflateSync(typeof data === 'string' ? Buffer.from(data, 'utf8') : data, { level: constants.Z_DEFAULT_COMPRESSION }));
  done = true;
}
