// Compiles the command line and every service into dist/stemwise.mjs (and its chunks), so the
// long-running processes start without the TypeScript loader (tsx): measured, loading the ingest
// modules through tsx takes about 100 MB more memory than the same code compiled.
//   npm run build            (bin/stemwise.mjs uses the build while no source is newer than it)
// Our workspace packages (and @stdlib's) are bundled; other npm packages stay external (loaded from node_modules as usual).
// `import.meta.url` in our sources is rewritten to the source file's place relative to the bundle,
// so files found next to the sources (migrations, demo data) are found from the bundle too.

import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build, type Plugin } from 'esbuild';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
export const BUNDLE = path.join(ROOT, 'dist', 'stemwise.mjs');
const METRICS_WORKER = path.join(ROOT, 'services', 'compute', 'src', 'metrics-worker.ts');

// Packages bundled all the same: @stdlib's functions are hundreds of small CommonJS files, whose lookup
// and loading one by one cost every command about 0.2 s at start (measured with --cpu-prof).
const BUNDLED_PACKAGES = ['@stemwise/', '@stdlib/'];

/** Bare imports outside our workspace (and BUNDLED_PACKAGES) stay imports of node_modules. */
const externalDependencies: Plugin = {
  name: 'external-dependencies',
  setup(b) {
    b.onResolve({ filter: /^[^./]/ }, (args) => (BUNDLED_PACKAGES.some((p) => args.path.startsWith(p)) ? undefined : { path: args.path, external: true }));
  },
};

function sourceUrls(outfile: string): Plugin {
  return {
    name: 'source-urls',
    setup(b) {
      b.onLoad({ filter: /\.ts$/ }, (args) => {
        if (args.path.includes(`${path.sep}node_modules${path.sep}`)) return undefined;
        const text = fs.readFileSync(args.path, 'utf8');
        if (!text.includes('import.meta.url')) return { contents: text, loader: 'ts' };
        const rel = path.relative(path.dirname(outfile), args.path).split(path.sep).join('/');
        return { contents: text.replaceAll('import.meta.url', `new URL(${JSON.stringify(rel)}, import.meta.url).href`), loader: 'ts' };
      });
    },
  };
}

/**
 * Bundles `entry` (a TypeScript module of this repository) into `outfile`. With `split`, what the entry
 * loads by dynamic `import()` goes into chunk files next to `outfile` (`chunk-<hash>.mjs`), so that the
 * packages those parts import are loaded only when a command needs them: one file would import every
 * package (vega, fastify, pg, bullmq …) at start, about a second before `stemwise --help` could answer.
 */
export async function bundle(entry: string, outfile: string, { split = false } = {}): Promise<void> {
  const outdir = path.dirname(outfile);
  const result = await build({
    // The metrics worker thread's own file is beside every bundle (it is small), for those that start one.
    entryPoints: { [path.basename(outfile, '.mjs')]: entry, 'metrics-worker': METRICS_WORKER },
    outdir,
    outExtension: { '.js': '.mjs' },
    splitting: split,
    chunkNames: 'chunk-[name]-[hash]',
    metafile: true,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    sourcemap: 'linked',
    logLevel: 'warning',
    plugins: [externalDependencies, sourceUrls(outfile)],
    // Bundled code that calls require() (none of ours; kept for dependencies' interop helpers).
    // `__stemwiseBuildUrl`: where the compiled file is, for code that starts a worker thread from a file beside it (metrics-pool.ts).
    banner: { js: "import { createRequire as __stemwiseCreateRequire } from 'node:module'; const require = __stemwiseCreateRequire(import.meta.url); const __stemwiseBuildUrl = import.meta.url;" },
  });
  // Chunks of an earlier split build that this one no longer writes. A single-file bundle (a bench's
  // child process) writes no chunks and must leave those of the command's build alone.
  if (!split) return;
  const written = new Set(Object.keys(result.metafile.outputs).map((f) => path.resolve(f)));
  for (const name of fs.readdirSync(outdir)) {
    const file = path.join(outdir, name);
    if (/^chunk-[\w-]+\.mjs(\.map)?$/.test(name) && !written.has(file)) fs.rmSync(file);
  }
}

if (process.argv[1] && pathToFileURL(process.argv[1]).href === import.meta.url) {
  const t0 = performance.now();
  await bundle(path.join(ROOT, 'cli', 'src', 'main.ts'), BUNDLE, { split: true });
  console.log(`built ${path.relative(ROOT, BUNDLE)} (${(fs.statSync(BUNDLE).size / 1e6).toFixed(1)} MB) in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
}
