/**
 * Page-weight benchmark (`npx tsx tests/bench/page-weight.ts`, or `npm run bench -- page-weight`):
 * how much JavaScript a phone downloads to use the walk-through, gzipped as the server's
 * compression or a CDN would send it. Read from the production build: the island's entry
 * chunk and the React renderer, with every chunk they import statically; chunks the island
 * loads later (force-trace chart, swing geometry) are listed apart. The page's CSS is shown
 * for scale. Builds first when the build is stale.
 *
 * Keep the first figure small (React DOM is most of it): do not import zod, the engine's index or
 * chart code into the island's first chunk; load such parts lazily after hydration.
 */
import fs from 'node:fs';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { ensureBuilt, projectRoot } from '../../src/cli/services';
import { isMain } from '../../src/cli/is-main';

export interface PageWeightFigures {
  /** JavaScript the walk-through page needs before it is interactive, gzipped, KiB. */
  walkthroughGzipKb: number;
  /** Chunks fetched after hydration (charts, geometry), gzipped, KiB. */
  onDemandGzipKb: number;
  /** Same as walkthroughGzipKb, uncompressed, KiB. */
  walkthroughRawKb: number;
  /** The stylesheet(s) of the build, gzipped, KiB. */
  cssGzipKb: number;
  files: number;
}

const assetsDir = path.join(projectRoot, 'dist/client/_astro');
const STATIC_IMPORT = /(?:import|export)\s*(?:[\w*{}\s,$]*?from\s*)?["']\.\/([^"']+\.js)["']/g;
const DYNAMIC_IMPORT = /import\(\s*["']\.\/([^"']+\.js)["']\s*\)/g;

const kib = (bytes: number) => Math.round((bytes / 1024) * 10) / 10;
const gzip = (file: string) => gzipSync(fs.readFileSync(path.join(assetsDir, file)), { level: 9 }).byteLength;

function importsOf(file: string, pattern: RegExp): string[] {
  const source = fs.readFileSync(path.join(assetsDir, file), 'utf8');
  return [...source.matchAll(pattern)].map((m) => m[1] as string);
}

/** The files `entries` load statically, entries included. */
function staticClosure(entries: string[]): Set<string> {
  const seen = new Set<string>();
  const queue = [...entries];
  while (queue.length) {
    const file = queue.pop() as string;
    if (seen.has(file)) continue;
    seen.add(file);
    queue.push(...importsOf(file, STATIC_IMPORT));
  }
  return seen;
}

/** The island's entry: the WalkThrough chunk that re-exports the component as `default`. */
function walkEntry(files: string[]): string {
  const candidates = files.filter((f) => /^WalkThrough\.[\w-]+\.js$/.test(f));
  const entry = candidates.find((f) =>
    /export\s*\{[^}]*\bas default\b|export default/.test(fs.readFileSync(path.join(assetsDir, f), 'utf8')),
  );
  if (!entry)
    throw new Error(`no WalkThrough entry chunk among ${candidates.join(', ') || 'the build files'}`);
  return entry;
}

/** The React renderer's hydration script (`@astrojs/react/client.js`), the one chunk that holds react-dom's client. */
function reactRenderer(files: string[]): string {
  const renderer = files.find(
    (f) =>
      /^client\.[\w-]+\.js$/.test(f) &&
      /hydrateRoot|createRoot/.test(fs.readFileSync(path.join(assetsDir, f), 'utf8')),
  );
  if (!renderer) throw new Error('no React renderer chunk (client.*.js) in the build');
  return renderer;
}

export async function runPageWeightBench(
  log: (line: string) => void = console.log,
): Promise<PageWeightFigures> {
  await ensureBuilt(() => {});
  const files = fs.readdirSync(assetsDir);
  const entry = walkEntry(files);
  const renderer = reactRenderer(files);
  const pageScripts = files.filter((f) => /^walk\.astro_astro_type_script/.test(f));
  const initial = staticClosure([entry, renderer, ...pageScripts]);
  const lazy = new Set<string>();
  for (const file of initial)
    for (const target of importsOf(file, DYNAMIC_IMPORT))
      for (const f of staticClosure([target])) if (!initial.has(f)) lazy.add(f);

  const sized = [...initial]
    .map((f) => ({ f, raw: fs.statSync(path.join(assetsDir, f)).size, gz: gzip(f) }))
    .sort((a, b) => b.gz - a.gz);
  const lazySized = [...lazy].map((f) => ({ f, gz: gzip(f) })).sort((a, b) => b.gz - a.gz);
  const css = files.filter((f) => f.endsWith('.css')).map((f) => gzip(f));
  const figures: PageWeightFigures = {
    walkthroughGzipKb: kib(sized.reduce((n, s) => n + s.gz, 0)),
    walkthroughRawKb: kib(sized.reduce((n, s) => n + s.raw, 0)),
    onDemandGzipKb: kib(lazySized.reduce((n, s) => n + s.gz, 0)),
    cssGzipKb: kib(css.reduce((n, s) => n + s, 0)),
    files: sized.length,
  };

  log(
    `walk-through page, JavaScript before it is interactive: ${figures.walkthroughGzipKb} KiB gzipped (${figures.walkthroughRawKb} KiB raw, ${figures.files} files)`,
  );
  for (const s of sized) log(`  ${String(kib(s.gz)).padStart(6)} KiB  ${s.f}`);
  log(`loaded on demand after hydration: ${figures.onDemandGzipKb} KiB gzipped`);
  for (const s of lazySized) log(`  ${String(kib(s.gz)).padStart(6)} KiB  ${s.f}`);
  log(`stylesheets: ${figures.cssGzipKb} KiB gzipped`);
  return figures;
}

if (isMain(import.meta.url)) await runPageWeightBench();
