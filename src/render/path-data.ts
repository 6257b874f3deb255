/**
 * A path primitive's compact path data (compactPath), made once per
 * primitive: the standalone SVG and the inline SVG both write every path of
 * a scene, on the same thread (the pages worker draws the one and writes the
 * page with the other), and compacting a plant's paths took 0.3 s each time.
 * Kept as long as the primitive is, no longer.
 */
import { compactPath } from '../format.ts';

const made = new WeakMap<object, string>();

export function compactPathOf(path: { readonly d: string }): string {
  let d = made.get(path);
  if (d === undefined) made.set(path, (d = compactPath(path.d)));
  return d;
}
