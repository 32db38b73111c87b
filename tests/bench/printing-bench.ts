/**
 * Printing benchmark section (`npm run bench printing`): the prep sheet and a sheet of 100 labels, next to a
 * one-page minimal react-pdf document rendered in the same process, so the numbers can be read relative to
 * react-pdf's own floor on this machine. Cold = the first render in the process (fonts parsed, code warmed);
 * warm = the median/p95 table the runner prints afterwards.
 */
import { performance } from 'node:perf_hooks';
import request from 'supertest';
import { renderMinimal } from '../../server/pdf/render.ts';
import type { BenchCase, BenchContext, BenchSection } from './run-bench.ts';

let key = '';
let templateId = 0;

const pdfOk = (path: () => string): BenchCase['run'] => async ({ app, cookie }) => {
  const res = await request(app).get(path()).set('Cookie', cookie).buffer(true);
  if (res.status !== 200 || !String(res.headers['content-type']).startsWith('application/pdf')) {
    throw new Error(`${path()} → ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`);
  }
};

const minimal: BenchCase = { name: 'minimal one-page react-pdf document (baseline)', run: async () => void (await renderMinimal()) };
const prepSheet: BenchCase = { name: 'prep sheet (GET prep-sheet.pdf, audited)', run: pdfOk(() => `/api/preparations/${key}/prep-sheet.pdf`) };
const labels100: BenchCase = {
  name: '100 labels, A4 sheet 3×8 (GET labels-preview.pdf)',
  run: pdfOk(() => `/api/preparations/${key}/labels-preview.pdf?templateId=${templateId}&copies=100`),
};

async function setup(ctx: BenchContext): Promise<void> {
  const list = await request(ctx.app).get('/api/preparations?pageSize=100').set('Cookie', ctx.cookie);
  const complete = (list.body.items as Array<{ identifier: string; stage: string }>).find((p) => p.stage === 'complete');
  if (!complete) throw new Error('bench printing: the demo lab has no complete preparation');
  key = complete.identifier;
  const templates = await request(ctx.app).get('/api/label-templates').set('Cookie', ctx.cookie);
  const sheet = (templates.body.items as Array<{ id: number; name: string }>).find((x) => x.name === 'A4 sheet 3×8 full');
  if (!sheet) throw new Error('bench printing: template "A4 sheet 3×8 full" is missing');
  templateId = sheet.id;

  // cold: the first render of each in this process, in this order (the minimal one also loads the fonts)
  const cold: Array<[string, number]> = [];
  for (const c of [minimal, prepSheet, labels100]) {
    const t0 = performance.now();
    await c.run(ctx);
    cold.push([c.name, performance.now() - t0]);
  }
  const width = Math.max(...cold.map(([n]) => n.length));
  console.log(`\n### printing: cold (first render in this process, ${key})\n`);
  console.log(`${'case'.padEnd(width)}  cold ms`);
  for (const [n, ms] of cold) console.log(`${n.padEnd(width)}  ${ms.toFixed(1).padStart(7)}`);
}

export const printingSection: BenchSection = {
  name: 'printing (prep sheet, 100 labels, minimal react-pdf baseline; warm)',
  setup,
  cases: [minimal, prepSheet, labels100],
};
