/**
 * Compiles the server (server/, shared/, seed/) to plain JavaScript in build/, one file per source file, so
 * `npm start` runs node on compiled code instead of transpiling TypeScript at every start (issue 11).
 * esbuild strips the types (.ts and .tsx, JSX by the automatic runtime); the explicit ".ts"/".tsx" in relative
 * imports become ".js". build/.stamp records when it was built; `needsServerBuild()` compares it with the
 * sources so a pulled change is never served from a stale build.
 *
 *   node scripts/build-server.mjs           build now
 *   node scripts/build-server.mjs --if-stale build only when build/ is missing or older than a source file
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = fileURLToPath(new URL('..', import.meta.url));
export const BUILD_DIR = join(ROOT, 'build');
const SOURCE_DIRS = ['server', 'shared', 'seed'];
const STAMP = join(BUILD_DIR, '.stamp');

function sources() {
  const out = [];
  const walk = (dir) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (/\.tsx?$/.test(e.name) && !e.name.endsWith('.d.ts')) out.push(p);
    }
  };
  for (const d of SOURCE_DIRS) walk(join(ROOT, d));
  return out;
}

/** True when build/ is missing, a source (or this script, or package.json) changed since, or a source was added or removed. */
export function needsServerBuild() {
  if (!existsSync(STAMP)) return true;
  // a production image ships build/ without the TypeScript sources: nothing to compare, nothing to rebuild
  if (!SOURCE_DIRS.some((d) => existsSync(join(ROOT, d)))) return false;
  const built = statSync(STAMP).mtimeMs;
  const files = sources();
  let stamped = -1;
  try {
    stamped = JSON.parse(readFileSync(STAMP, 'utf8')).files;
  } catch {
    return true;
  }
  if (stamped !== files.length) return true;
  return [...files, fileURLToPath(import.meta.url), join(ROOT, 'package.json')].some((f) => statSync(f).mtimeMs > built);
}

export async function buildServer({ log = console.log } = {}) {
  const t0 = performance.now();
  const { build } = await import('esbuild');
  const files = sources();
  // written beside build/ and swapped in at the end, so a server starting meanwhile never sees half a build
  const out = `${BUILD_DIR}.tmp-${process.pid}`;
  rmSync(out, { recursive: true, force: true });
  const rewrite = {
    name: 'ts-extensions',
    setup(b) {
      b.onEnd((result) => {
        for (const f of result.outputFiles ?? []) {
          const text = f.text.replace(/((?:from|import)\s*\(?\s*["'])(\.{1,2}\/[^"']+?)\.tsx?(["'])/g, '$1$2.js$3');
          mkdirSync(dirname(f.path), { recursive: true });
          writeFileSync(f.path, text);
        }
      });
    },
  };
  await build({
    entryPoints: files,
    outdir: out,
    outbase: ROOT,
    bundle: false,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    jsx: 'automatic',
    sourcemap: false,
    write: false,
    logLevel: 'warning',
    plugins: [rewrite],
  });
  writeFileSync(join(out, '.stamp'), JSON.stringify({ builtAt: new Date().toISOString(), files: files.length }) + '\n');
  rmSync(BUILD_DIR, { recursive: true, force: true });
  renameSync(out, BUILD_DIR);
  log(`Compiled the server: ${files.length} files to ${relative(ROOT, BUILD_DIR)}/ in ${Math.round(performance.now() - t0)} ms`);
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const ifStale = process.argv.includes('--if-stale');
  if (!ifStale || needsServerBuild()) await buildServer();
}
