// What a label says about storage: a solution is stored as the lab's rule for solutions says (or the stability
// rule that applies to it), never as the solid it was made from (a drying instruction on a vial is wrong).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { getPreparation } from '../../server/services/preparations.service.ts';
import { labelSnapshotOf, solutionStorageOf } from '../../server/services/printing.service.ts';
import { DEFAULT_LAB_SETTINGS, DEFAULT_SOLUTION_STORAGE } from '../../shared/schemas/settings.ts';
import { DEMO, makeTestApp, sessionCookie, type TestApp } from './helpers/test-app.ts';

let t: TestApp;
let admin: string;
beforeAll(async () => {
  t = await makeTestApp();
  admin = await sessionCookie(t.app, DEMO.admin);
});
afterAll(() => t.close());

describe('storage on labels', () => {
  it("when the demo Pb stock is labelled, then the storage line is the lab's rule for solutions, not the salt's drying instruction", async () => {
    const d = await getPreparation('HWL-2026-0001');
    expect(d.snapshot.material.storage).toMatch(/dry/i); // the solid's storage says to dry it
    const label = await labelSnapshotOf(d, 'Europe/London');
    expect(label.storage).toBe(DEFAULT_SOLUTION_STORAGE);
    expect(label.storage).not.toMatch(/dry|desiccator/i);
  });

  it("when the lab sets its own rule for solutions, then labels say it", async () => {
    const res = await request(t.app).put('/api/settings').set('Cookie', admin).send({ solutionStorage: 'Tightly closed, 2–8 °C' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const label = await labelSnapshotOf(await getPreparation('HWL-2026-0001'), 'Europe/London');
    expect(label.storage).toBe('Tightly closed, 2–8 °C');
  });

  it('when a stability rule that applies says how its solutions are stored, then that wins over the lab rule', () => {
    const settings = {
      ...DEFAULT_LAB_SETTINGS,
      solutionStorage: 'Tightly closed, room temperature',
      stabilityRules: [{ id: 'SR-1', appliesTo: { kind: 'dilution' as const, analyteFormula: 'Pb', maxConcentrationMgL: '10' }, days: 7, basis: 'study ST-1', storage: 'PFA bottle, 2–8 °C' }],
    };
    expect(solutionStorageOf({ kind: 'dilution', analyteFormula: 'Pb', target: { value: '5', unit: 'mg/L' } }, settings)).toBe('PFA bottle, 2–8 °C');
    expect(solutionStorageOf({ kind: 'dilution', analyteFormula: 'Pb', target: { value: '50', unit: 'mg/L' } }, settings)).toBe('Tightly closed, room temperature');
    expect(solutionStorageOf({ kind: 'stock', analyteFormula: 'Pb', target: { value: '1000', unit: 'mg/L' } }, settings)).toBe('Tightly closed, room temperature');
  });
});
