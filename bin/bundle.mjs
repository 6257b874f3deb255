// Bundles the compiled CLI (dist/) into dist/bundle/: the CLI and its two
// worker threads as three entries, with their dependencies in shared chunks.
// Loading a few large modules instead of hundreds of small ones (remark,
// micromark, zod, satori…) saves the main thread about 0.2 s at the start of
// every command and the pages worker about as much (measured on the 2-core
// machine: a 100-characteristic build in 3.22–3.39 s against 3.45–3.60 s).
// The bundle sits two folders below the checkout, as dist/<module>/ files
// do, so paths each module takes from its own URL (the tool's templates,
// the workers beside it) still point at the same files. Native modules
// (resvg) and what the code loads with `require` (pdf-lib, fontkit, the
// fonts) are left to Node to load from node_modules.
import { rmSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { rolldown } from 'rolldown';

const root = fileURLToPath(new URL('..', import.meta.url));
const out = path.join(root, 'dist/bundle');
rmSync(out, { recursive: true, force: true });
const bundle = await rolldown({
  input: {
    cli: path.join(root, 'dist/cli.js'),
    'pages-worker': path.join(root, 'dist/pack/pages-worker.js'),
    'chart-worker': path.join(root, 'dist/render/pool/chart-worker.js'),
  },
  platform: 'node',
  external: ['@resvg/resvg-js', /\.node$/],
  logLevel: 'warn',
});
await bundle.write({ dir: out, format: 'esm', entryFileNames: '[name].js', chunkFileNames: '[name]-[hash].js' });
await bundle.close();
