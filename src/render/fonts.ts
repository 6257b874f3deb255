/**
 * The font files every renderer uses, read once from the pinned
 * @expo-google-fonts/ibm-plex-sans package (SIL Open Font License 1.1). This
 * is an input edge like the workspace reader: the renderers themselves get
 * the bytes passed in and never touch the disk.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';

export interface FontFiles {
  readonly regular: Uint8Array;
  readonly semibold: Uint8Array;
  /** Path of the regular TTF, for resvg, which takes font files by path. */
  readonly regularPath: string;
  readonly semiboldPath: string;
}

let cached: FontFiles | undefined;

export function loadFonts(): FontFiles {
  if (cached) return cached;
  const require = createRequire(import.meta.url);
  const root = path.dirname(require.resolve('@expo-google-fonts/ibm-plex-sans/package.json'));
  const regularPath = path.join(root, '400Regular/IBMPlexSans_400Regular.ttf');
  const semiboldPath = path.join(root, '600SemiBold/IBMPlexSans_600SemiBold.ttf');
  cached = { regular: new Uint8Array(readFileSync(regularPath)), semibold: new Uint8Array(readFileSync(semiboldPath)), regularPath, semiboldPath };
  return cached;
}

/** The family name the HTML page and satori know the font by. */
export const FONT_FAMILY = 'IBM Plex Sans';
