/**
 * A reader of SVG path data written here from the SVG 1.1 specification,
 * section 8.3 (implicit repetition of a command, relative coordinates,
 * closepath returning to the subpath's start), independent of the writers
 * it checks.
 */

/** Every coordinate pair the path visits, as absolute points, from any mix of M/m L/l C/c Z/z. */
export function absolutePoints(d: string): [number, number][] {
  const tokens = d.match(/[MmLlQqCcZz]|-?(?:\d+\.?\d*|\.\d+)/g) ?? [];
  const out: [number, number][] = [];
  let cmd = '';
  let cx = 0;
  let cy = 0;
  let sx = 0;
  let sy = 0;
  let i = 0;
  while (i < tokens.length) {
    if (/[A-Za-z]/.test(tokens[i]!)) cmd = tokens[i++]!;
    else if (cmd === 'M') cmd = 'L';
    else if (cmd === 'm') cmd = 'l';
    if (cmd === 'Z' || cmd === 'z') {
      cx = sx;
      cy = sy;
      continue;
    }
    const rel = cmd === cmd.toLowerCase();
    const pairs = cmd.toLowerCase() === 'c' ? 3 : cmd.toLowerCase() === 'q' ? 2 : 1;
    const pts: [number, number][] = [];
    for (let k = 0; k < pairs; k++) {
      const x = Number(tokens[i++]);
      const y = Number(tokens[i++]);
      pts.push(rel ? [cx + x, cy + y] : [x, y]);
    }
    out.push(...pts);
    [cx, cy] = pts.at(-1)!;
    if (cmd === 'M' || cmd === 'm') [sx, sy] = [cx, cy];
  }
  return out;
}
