/**
 * Benchmarks (`npm run bench`): speed is shown here, never asserted in a test (DEVELOPERS.md).
 * `npm run bench` (or `-- --quick`) runs the goals of issue 11 (goals-bench.ts: PASS/FAIL, bench-results.json);
 * `npm run bench -- <section name>` runs the in-process sections below whose name contains the words.
 * Builds a temporary database, fills it, then times API requests in-process with supertest and prints
 * median and p95 per case. Each case is bounded (at most `maxRuns` requests or `maxMs` wall time).
 *
 * Add a section: push a `BenchSection` onto `SECTIONS` (or export one and add it here). A section gets a
 * `BenchContext` (app, signed-in cookie, sequelize) after its own `setup` and returns named cases.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import type { Express } from 'express';
import type { Sequelize } from 'sequelize';
import request from 'supertest';
import { createApp } from '../../server/app.ts';
import { loadConfig } from '../../server/config.ts';
import { migrateUp } from '../../server/db/migrate.ts';
import { ReferenceMaterial, VolumetricWare } from '../../server/db/models/index.ts';
import { openDatabase } from '../../server/db/sequelize.ts';
import { hashPassword } from '../../server/services/passwords.ts';
import { DEMO_PASSWORD } from '../../seed/demo-data.ts';
import { seedDemoLab } from '../../seed/seed-demo-lab.ts';
import { runGoals } from './goals-bench.ts';
import { printingSection } from './printing-bench.ts';

export interface BenchContext {
  app: Express;
  sequelize: Sequelize;
  /** Session cookie of the demo chemist. */
  cookie: string;
}

export interface BenchCase {
  name: string;
  run: (ctx: BenchContext) => Promise<void>;
}

export interface BenchSection {
  name: string;
  setup?: (ctx: BenchContext) => Promise<void>;
  cases: BenchCase[];
}

const ROWS = 10_000;

/** GET a URL and insist on 200, so a broken endpoint cannot look fast. */
const getOk = (path: string): BenchCase['run'] => async ({ app, cookie }) => {
  const res = await request(app).get(path).set('Cookie', cookie);
  if (res.status !== 200) throw new Error(`${path} → ${res.status} ${JSON.stringify(res.body)}`);
};

const listCase = (name: string, path: string): BenchCase => ({ name, run: getOk(path) });

const GRADES = ['CRM', 'RM', 'reagent'] as const;
const STATUSES = ['accepted', 'quarantined', 'retired'] as const;
const WARE_KINDS = ['volumetric_flask', 'bulb_pipette', 'graduated_pipette', 'piston_pipette'] as const;
const VOLUMES = ['1', '2', '5', '10', '20', '25', '50', '100', '200', '250', '500', '1000'];
const pad = (n: number, w = 5) => String(n).padStart(w, '0');
const isoDay = (i: number) => new Date(Date.UTC(2026, 0, 1) + (i % 1500) * 86_400_000).toISOString().slice(0, 10);

async function fillInventory({ sequelize }: BenchContext): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    for (let start = 0; start < ROWS; start += 1000) {
      const materials = Array.from({ length: 1000 }, (_, j) => {
        const i = start + j;
        return {
          name: `Bench material ${pad(i)} ${['nitrate', 'chloride', 'sulfate', 'phosphate'][i % 4]}`,
          formula: ['NaNO3', 'NaCl', 'Na2SO4', 'KH2PO4'][i % 4]!,
          analytes: [{ name: ['nitrate', 'chloride', 'sulfate', 'phosphate'][i % 4]!, formula: ['NO3', 'Cl', 'SO4', 'PO4'][i % 4]! }],
          casNumber: null,
          grade: GRADES[i % 3]!,
          producer: `Producer ${i % 37}`,
          catalogueNumber: `CAT-${pad(i)}`,
          lot: `LOT-${pad(ROWS - i)}`,
          certificateNumber: null,
          purityValue: '0.9990',
          purityExpandedUncertainty: '0.0004',
          purityK: '2',
          purityStandardUncertainty: null,
          purityBasis: 'as-is' as const,
          densityValue: null,
          receivedOn: '2025-12-01',
          openedOn: null,
          expiresOn: i % 11 === 0 ? null : isoDay(i * 7),
          storage: null,
          ghsHazardStatements: [],
          ghsPictograms: [],
          status: STATUSES[i % 3]!,
        };
      });
      await ReferenceMaterial.bulkCreate(materials, { transaction });
      const ware = Array.from({ length: 1000 }, (_, j) => {
        const i = start + j;
        return {
          identifier: `BW-${pad(i)}`,
          kind: WARE_KINDS[i % 4]!,
          nominalVolumeMl: VOLUMES[i % VOLUMES.length]!,
          wareClass: 'A' as const,
          toleranceMl: null,
          material: i % 2 ? 'borosilicate 3.3' : 'soda-lime',
          status: (i % 10 === 0 ? 'out_of_service' : 'in_service') as 'in_service' | 'out_of_service',
        };
      });
      await VolumetricWare.bulkCreate(ware, { transaction });
    }
  });
}

export const inventoryListSection: BenchSection = {
  name: `inventory lists (${ROWS} materials, ${ROWS} volumetric ware)`,
  setup: fillInventory,
  cases: [
    listCase('materials: first page, default sort', '/api/materials'),
    listCase('materials: page 200 of 25, sort lot desc', '/api/materials?sort=lot&dir=desc&page=200'),
    listCase('materials: search "chloride" (LIKE over text)', '/api/materials?search=chloride'),
    listCase('materials: search two words', '/api/materials?search=sulfate%20Producer%201'),
    listCase('materials: grade=CRM, sort expiresOn', '/api/materials?grade=CRM&sort=expiresOn'),
    listCase('materials: usable=1, pageSize 200', '/api/materials?usable=1&pageSize=200'),
    listCase('materials: status=quarantined, last page', '/api/materials?status=quarantined&page=133'),
    listCase('ware: first page, sort identifier', '/api/volumetric-ware'),
    listCase('ware: sort nominalVolumeMl desc, page 100', '/api/volumetric-ware?sort=nominalVolumeMl&dir=desc&page=100'),
    listCase('ware: kind=bulb_pipette, usable=1', '/api/volumetric-ware?kind=bulb_pipette&usable=1'),
    listCase('ware: search "BW-09"', '/api/volumetric-ware?search=BW-09'),
  ],
};

export const SECTIONS: BenchSection[] = [inventoryListSection, printingSection];

function percentile(sorted: number[], p: number): number {
  if (!sorted.length) return NaN;
  const idx = Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1);
  return sorted[Math.max(0, idx)]!;
}

export async function runCase(ctx: BenchContext, c: BenchCase, { maxRuns = 60, maxMs = 3000, warmup = 3 } = {}) {
  for (let i = 0; i < warmup; i++) await c.run(ctx);
  const times: number[] = [];
  const until = performance.now() + maxMs;
  while (times.length < maxRuns && performance.now() < until) {
    const t0 = performance.now();
    await c.run(ctx);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return { name: c.name, runs: times.length, median: percentile(times, 50), p95: percentile(times, 95) };
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const quick = args.includes('--quick');
  const only = args.filter((a) => a !== '--quick').join(' ').toLowerCase();
  // no section named: the goals of issue 11 (start-up, HTTP ratios, PDFs, core, scaling) with PASS/FAIL
  if (!only) {
    if (!(await runGoals({ quick }))) process.exitCode = 1;
    return;
  }
  const dir = mkdtempSync(join(tmpdir(), 'tarebook-bench-'));
  const dbPath = join(dir, 'bench.sqlite');
  const config = loadConfig({ NODE_ENV: 'test', TAREBOOK_DB: dbPath, SESSION_SECRET: 'bench-secret-'.padEnd(48, 'x') });
  const sequelize = await openDatabase(dbPath);
  try {
    await migrateUp(sequelize);
    await seedDemoLab(sequelize, { env: { NODE_ENV: 'test' }, passwordHash: await hashPassword(DEMO_PASSWORD) });
    const app = createApp({ sequelize, config, distDir: join(dir, 'no-dist') });
    const login = await request(app).post('/api/auth/login').send({ email: 'chemist@harbourside.example', password: DEMO_PASSWORD });
    const cookie = ([] as string[]).concat(login.headers['set-cookie'] ?? []).find((c) => c.startsWith('tarebook_session='))?.split(';')[0];
    if (!cookie) throw new Error(`bench: sign-in failed (${login.status})`);
    const ctx: BenchContext = { app, sequelize, cookie };

    for (const section of SECTIONS) {
      if (only && !section.name.toLowerCase().includes(only)) continue;
      const t0 = performance.now();
      await section.setup?.(ctx);
      console.log(`\n## ${section.name}  (setup ${((performance.now() - t0) / 1000).toFixed(1)} s)\n`);
      const rows = [];
      for (const c of section.cases) rows.push(await runCase(ctx, c));
      const width = Math.max(...rows.map((r) => r.name.length), 4);
      console.log(`${'case'.padEnd(width)}  runs  median ms  p95 ms`);
      for (const r of rows) {
        console.log(`${r.name.padEnd(width)}  ${String(r.runs).padStart(4)}  ${r.median.toFixed(1).padStart(9)}  ${r.p95.toFixed(1).padStart(6)}`);
      }
    }
  } finally {
    await sequelize.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().catch((err) => {
    console.error(err);
    process.exitCode = 1;
  });
}
