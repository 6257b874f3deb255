/** Reading our PDFs back in tests: poppler's tools and the inflated content streams. */
import { execFileSync } from 'node:child_process';
import { inflateSync } from 'node:zlib';

/** Every stream of the file, inflated where it is Flate-compressed, as latin1 text. */
export function streams(pdf: Uint8Array): string[] {
  const text = Buffer.from(pdf);
  const out: string[] = [];
  let at = 0;
  for (;;) {
    const start = text.indexOf('stream\n', at, 'latin1');
    if (start < 0) break;
    const end = text.indexOf('\nendstream', start, 'latin1');
    const body = text.subarray(start + 7, end);
    try {
      out.push(inflateSync(body).toString('latin1'));
    } catch {
      out.push(body.toString('latin1'));
    }
    at = end + 10;
  }
  return out;
}

export function pdftotext(file: string, ...args: string[]): string {
  return execFileSync('pdftotext', [...args, file, '-'], { encoding: 'utf8' });
}

export function pdfinfo(file: string): Record<string, string> {
  const out = execFileSync('pdfinfo', [file], { encoding: 'utf8' });
  return Object.fromEntries(out.split('\n').filter(Boolean).map((l) => [l.slice(0, l.indexOf(':')), l.slice(l.indexOf(':') + 1).trim()]));
}
