// POST /api/calc/preparation with "monteCarlo": the Monte Carlo propagation (JCGM 101) of the actual concentration,
// run in a worker thread. The numbers are checked against their sources in tests/shared/calc/monte-carlo.test.ts;
// here the HTTP contract, the 400s at the field, reproducibility and the worker.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { D } from '../../shared/calc/decimal.ts';
import { monteCarloWorkerStats, stopMonteCarloWorker } from '../../server/services/monte-carlo.service.ts';
import { DEMO, expectErrorBody, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';
import { validCalcRequest } from './helpers/calc-request.ts';

let t: TestApp;
let chemist: string;
beforeAll(async () => {
  t = await makeTestApp();
  chemist = await sessionCookie(t.app, DEMO.chemist);
});
afterAll(async () => {
  await stopMonteCarloWorker();
  await t.close();
});

const post = (body: unknown) => request(t.app).post('/api/calc/preparation').set('Cookie', chemist).send(body as object);
const withMc = (mc: Record<string, unknown>) => ({ ...validCalcRequest(), monteCarlo: mc });

describe('POST /api/calc/preparation with monteCarlo', () => {
  it('adds actual.monteCarlo: mean, standard uncertainty, 95 % interval as decimal strings, the verdict and a histogram', async () => {
    const res = await post(withMc({ trials: '20000', seed: '1' }));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const mc = res.body.actual.monteCarlo;
    expect(mc).toMatchObject({
      trials: '20000',
      seed: '1',
      unit: 'mg/L',
      mean: expect.stringMatching(/^\d+\.\d+$/),
      standardUncertainty: expect.stringMatching(/^\d+\.\d+$/),
      interval95: { low: expect.any(String), high: expect.any(String) },
      agreesWithGum: expect.any(Boolean),
    });
    expect(mc.histogram.length).toBe(40);
    expect(mc.histogram.reduce((s: number, b: { count: number }) => s + b.count, 0)).toBe(20000);
    // the same model as the budget: the MC mean and u sit on the GUM value and u (a near-linear model)
    const gum = res.body.actual.concentration;
    expect(new D(mc.mean).minus(gum.value).abs().lte(new D(gum.standardUncertainty).div(10))).toBe(true);
    expect(new D(mc.standardUncertainty).div(gum.standardUncertainty).minus(1).abs().lt('0.05')).toBe(true);
    expect(mc.agreesWithGum).toBe(true);
    expect(new D(mc.interval95.low).lt(mc.mean) && new D(mc.interval95.high).gt(mc.mean)).toBe(true);
  });

  it('defaults to 10⁵ trials and seed 1; the same seed gives the same answer', async () => {
    const a = await post(withMc({}));
    const b = await post(withMc({ trials: '100000', seed: '1' }));
    expect(a.status).toBe(200);
    expect(a.body.actual.monteCarlo.trials).toBe('100000');
    expect(b.body.actual.monteCarlo).toEqual(a.body.actual.monteCarlo);
    const c = await post(withMc({ trials: '100000', seed: '2' }));
    expect(c.body.actual.monteCarlo.mean).not.toBe(a.body.actual.monteCarlo.mean);
  });

  it.each([
    ['999', 'monteCarlo.trials'],
    ['1000001', 'monteCarlo.trials'],
    ['1e5', 'monteCarlo.trials'],
    ['abc', 'monteCarlo.trials'],
  ])('trials "%s" → 400 at %s', async (trials, field) => {
    const res = await post(withMc({ trials, seed: '1' }));
    expect(res.status).toBe(400);
    expectErrorBody(res.body);
    expect(res.body.error.fields[field]).toMatch(/1000 to 1000000/);
  });

  it('a seed that is not a whole number → 400 at monteCarlo.seed', async () => {
    const res = await post(withMc({ seed: '-1' }));
    expect(res.status).toBe(400);
    expectErrorBody(res.body);
    expect(Object.keys(res.body.error.fields)).toEqual(['monteCarlo.seed']);
  });

  it('without a weighing there is nothing to propagate → 400 at the balance reading', async () => {
    const body: any = withMc({ trials: '1000' });
    delete body.weighing;
    const res = await post(body);
    expect(res.status).toBe(400);
    expectErrorBody(res.body);
    expect(res.body.error.fields['weighing.reading.value']).toMatch(/balance reading/);
  });

  it('runs in the worker thread: a health request sent after a 10⁶-trial run is answered before it', async () => {
    const before = monteCarloWorkerStats().jobsRun;
    const order: string[] = [];
    const mc = post(withMc({ trials: '1000000', seed: '3' })).then((r) => {
      order.push('monte-carlo');
      return r;
    });
    // let the Monte Carlo request reach its handler before asking for health
    await new Promise((r) => setTimeout(r, 50));
    const health = request(t.app)
      .get('/api/health')
      .then((r) => {
        order.push('health');
        return r;
      });
    const [m, h] = await Promise.all([mc, health]);
    expect(h.status).toBe(200);
    expect(m.status, JSON.stringify(m.body).slice(0, 300)).toBe(200);
    expect(order).toEqual(['health', 'monte-carlo']);
    expect(monteCarloWorkerStats().jobsRun).toBe(before + 1);
    expect(monteCarloWorkerStats().workersStarted).toBeGreaterThanOrEqual(1);
  });
});
