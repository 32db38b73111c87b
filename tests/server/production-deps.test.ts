// A production install (npm ci --omit=dev) has only "dependencies": everything the server loads at start must be
// one of them. Dev-only modules (the fake SMTP server's smtp-server and mailparser, vite, the demo seed) may be
// reached only through a dynamic import() on a path production does not take (MAIL_MODE=fake, a development
// client build, an empty non-production database).
import { builtinModules } from 'node:module';
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { build, type Metafile } from 'esbuild';
import { describe, expect, it } from 'vitest';

const ROOT = resolve(import.meta.dirname, '../..');
const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { dependencies: Record<string, string>; devDependencies: Record<string, string> };
const packageOf = (spec: string) => (spec.startsWith('@') ? spec.split('/').slice(0, 2).join('/') : spec.split('/')[0]!);
const isBuiltin = (spec: string) => spec.startsWith('node:') || builtinModules.includes(packageOf(spec));

/** Packages reached from `entry` through static imports only (import statements, not import()). */
async function staticPackages(entry: string): Promise<Set<string>> {
  const { metafile } = await build({ entryPoints: [join(ROOT, entry)], bundle: true, write: false, platform: 'node', format: 'esm', packages: 'external', metafile: true, logLevel: 'silent', jsx: 'automatic', absWorkingDir: ROOT });
  const inputs = (metafile as Metafile).inputs;
  const seen = new Set<string>();
  const out = new Set<string>();
  const walk = (file: string) => {
    if (seen.has(file)) return;
    seen.add(file);
    for (const imp of inputs[file]?.imports ?? []) {
      if (imp.kind !== 'import-statement') continue;
      if (imp.external) {
        if (!isBuiltin(imp.path) && !imp.path.startsWith('.')) out.add(packageOf(imp.path));
      } else walk(imp.path);
    }
  };
  walk(entry);
  return out;
}

describe('production install', () => {
  it('when the server starts, then every package it imports statically is a runtime dependency', async () => {
    const used = await staticPackages('server/index.ts');
    expect(used.size).toBeGreaterThan(10); // the walk reached the app (express, sequelize, react-pdf …)
    expect(used.has('express')).toBe(true);
    const missing = [...used].filter((p) => !(p in pkg.dependencies));
    expect(missing).toEqual([]);
  });

  it('then the fake mail server, the client build tool and the TypeScript runner are dev dependencies only', async () => {
    const used = await staticPackages('server/index.ts');
    for (const dev of ['smtp-server', 'mailparser', 'vite', 'tsx', 'psychrolib']) {
      expect(used.has(dev), dev).toBe(false);
      expect(pkg.dependencies[dev], dev).toBeUndefined();
    }
  });
});
