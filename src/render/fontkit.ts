/**
 * @pdf-lib/fontkit ships a UMD bundle whose only usable export under Node's
 * ESM loader is `default`, while its type declarations name the functions
 * directly. This adapter gives the rest of the code the typed module.
 */
import * as ns from '@pdf-lib/fontkit';

export type FontkitModule = typeof ns;
export type FontkitFont = ReturnType<typeof ns.create>;

export const fontkit: FontkitModule = (ns as unknown as { default?: FontkitModule }).default ?? ns;
