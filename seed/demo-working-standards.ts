/**
 * Demo working standards of the fictional Harbourside Water Laboratory, made through the real services (lineage,
 * series, mix, gravimetric dilution, signatures, expiry extension) so the parent rules, the dilution core, the
 * budgets, the expiry caps, the signatures and the audit run exactly as they do for a user. Runs after
 * seed/demo-preparations.ts (it dilutes that file's verified Pb stock). Dates are written as of the demo's
 * "today" (DEMO_BASE_DAY, 2026-12-01) and move with the seeding day (seed/demo-clock.ts).
 *   1. Pb 10 mg/L: a volumetric dilution of the verified Pb stock (1 mL into 100 mL), verified.
 *   2. A five-level Pb calibration series from it (0.1, 0.2, 0.5, 1 and 2 mg/L): the two lowest levels verified,
 *      0.5 mg/L signed "prepared" (awaiting verification), 1 and 2 mg/L planned.
 *   3. Pb 10 mg/kg: a gravimetric dilution (by mass) of the Pb stock on BAL-A1, signed "prepared".
 *   4. A Cd 1000 mg/L stock (cadmium metal dissolved in nitric acid), verified, and a Pb + Cd 10 mg/L mix of both
 *      stocks, verified.
 *   5. An earlier Pb stock made in October (expired) and a Pb 100 mg/L working standard from it, expired with
 *      it: its expiry was capped by the parent's, so QA's extension is refused, naming the parent.
 * Each solution has its own flask and each open record its own pipettes: the chemist registers VF-100-04…11 (VF-100-03 holds the demo TOC stock),
 * VF-50-02/03 and second and third bulb pipettes first (inventory service, ISO 1042 / ISO 648 class A
 * tolerances as in demo-data.ts, from memory). The readings are invented but plausible for the balances used.
 * Handling lead and cadmium solutions: the usual cautions (gloves, eye protection, fume hood for the nitric acid
 * digestion); the SDS and local procedures decide.
 */
import { D } from '../shared/calc/index.ts';
import { Balance, Preparation, ReferenceMaterial, Solvent, User, VolumetricWare } from '../server/db/models/index.ts';
import { AppError } from '../server/errors/app-error.ts';
import { createPreparation, recordMakeUp, recordWeighing, type Actor } from '../server/services/preparations.service.ts';
import { createVolumetricWare } from '../server/services/inventory.service.ts';
import { wareCreateInputSchema } from '../shared/schemas/inventory.ts';
import { createDilution, createSeries, recordAliquot } from '../server/services/lineage.service.ts';
import { createMix } from '../server/services/mix.service.ts';
import { createGravimetricDilution, recordGravimetricReadings } from '../server/services/gravimetric-dilution.service.ts';
import { extendExpiry } from '../server/services/expiry-extension.service.ts';
import { sign } from '../server/services/signatures.service.ts';
import { VERIFICATION_CHECKLIST } from '../shared/schemas/preparations.ts';
import { DEMO_PASSWORD } from './demo-data.ts';
import { demoDay, demoInstant } from './demo-clock.ts';

/** What the seed made, by role in the scenario (identifiers), for the seed test and the report. */
export interface DemoWorkingStandards {
  leadStock: string;
  leadDilution: string;
  series: { identifier: string; levels: string[] };
  gravimetric: string;
  cadmiumStock: string;
  mix: string;
  oldLeadStock: string;
  expired: string;
  /** the message of the refused QA extension of `expired` */
  refusedExtension: string;
}

async function actor(email: string): Promise<Actor & { role: string }> {
  const u = await User.findOne({ where: { email } });
  if (!u) throw new Error(`demo user ${email} is missing`);
  return { id: u.id, fullName: u.fullName, role: u.role };
}

export async function seedDemoWorkingStandards(now: Date = new Date()): Promise<DemoWorkingStandards> {
  const when = (iso: string) => new Date(demoInstant(iso, now));
  const at = (iso: string) => ({ now: when(iso) });
  const maren = await actor('chemist@harbourside.example');
  const idris = await actor('chemist2@harbourside.example');
  const priya = await actor('technician@harbourside.example');
  const qa = await actor('qa@harbourside.example');
  const ware = async (identifier: string) => {
    const w = await VolumetricWare.findOne({ where: { identifier } });
    if (!w) throw new Error(`demo ware ${identifier} is missing`);
    return w.id;
  };
  const balance = async (identifier: string) => {
    const b = await Balance.findOne({ where: { identifier } });
    if (!b) throw new Error(`demo balance ${identifier} is missing`);
    return b.id;
  };
  const material = async (formula: string) => {
    const m = await ReferenceMaterial.findOne({ where: { formula } });
    if (!m) throw new Error(`demo material ${formula} is missing`);
    return m.id;
  };
  const nitricRow = await Solvent.findOne({ where: { name: 'Nitric acid 2 % (v/v)' } });
  if (!nitricRow) throw new Error('demo solvent Nitric acid 2 % (v/v) is missing');
  const nitric = { id: nitricRow.id, lot: nitricRow.lot };
  const makeUp = (flaskIdentifier: string, t: string) => ({ flaskIdentifier, solventId: nitric.id, solventLot: nitric.lot, solutionTemperatureC: t, applyTemperatureCorrection: false });
  const room = (t: string, p: string, rh: string, measuredAt: string) => ({ source: 'measured' as const, temperatureC: t, pressureHPa: p, relativeHumidityPct: rh, measuredAt: when(measuredAt).toISOString() });

  const checklist = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true as const]));
  const signing = (iso: string) => ({ lockoutThreshold: 5, publicUrl: process.env.PUBLIC_URL ?? `http://localhost:${process.env.PORT || 3000}`, now: when(iso) });
  const prepared = (key: string, who: Actor, iso: string) => sign(key, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true }, who, signing(iso));
  const verified = (key: string, who: Actor, iso: string) => sign(key, { meaning: 'verified', password: DEMO_PASSWORD, checklist, acknowledgeResponsibility: true }, who, signing(iso));

  // More class A ware, registered through the inventory service (audited like any new item).
  const BORO = 'borosilicate 3.3';
  const newWare = [
    ...['04', '05', '06', '07', '08', '09', '10', '11'].map((n) => ({ identifier: `VF-100-${n}`, kind: 'volumetric_flask', nominalVolumeMl: '100', class: 'A', toleranceMl: '0.10', material: BORO })),
    ...['02', '03'].map((n) => ({ identifier: `VF-50-${n}`, kind: 'volumetric_flask', nominalVolumeMl: '50', class: 'A', toleranceMl: '0.06', material: BORO })),
    ...[['1', '0.008', '02'], ['1', '0.008', '03'], ['2', '0.010', '02'], ['5', '0.015', '02'], ['10', '0.020', '02']].map(([ml, tol, n]) => ({ identifier: `BP-${ml}-${n}`, kind: 'bulb_pipette', nominalVolumeMl: ml!, class: 'A', toleranceMl: tol!, material: BORO })),
  ];
  for (const w of newWare) await createVolumetricWare(wareCreateInputSchema.parse(w), maren);

  // The verified Pb stock of seed/demo-preparations.ts (the first Pb record).
  const leadRow = await Preparation.findOne({ where: { analyteFormula: 'Pb', status: 'verified' }, order: [['id', 'ASC']] });
  if (!leadRow) throw new Error('the verified demo Pb stock is missing (seed/demo-preparations.ts runs first)');
  const leadStock = leadRow.identifier;

  /** A 1000 mg/L stock weighed on BAL-SM1 a few scale intervals from the planned reading and made up in 2 % nitric acid. */
  async function stock(formula: string, analyte: string, flask: string, steps: number, day: string, by: Actor, notes: string): Promise<string> {
    const p = await createPreparation(
      { materialId: await material(formula), analyteFormula: analyte, target: { value: '1000', unit: 'mg/L' }, flaskId: await ware(flask), balanceId: await balance('BAL-SM1'), conditions: room('20.8', '1006', '46', `${day}T08:30:00Z`), notes },
      by,
      at(`${day}T08:30:00Z`),
    );
    const reading = new D(p.plan.targetReading.value).plus(new D('0.01').times(steps)).toFixed(2);
    await recordWeighing(p.identifier, { mode: 'direct', reading, unit: 'mg', conditions: room('20.8', '1006', '46', `${day}T08:41:00Z`) }, by, at(`${day}T08:42:00Z`));
    await recordMakeUp(p.identifier, makeUp(flask, '20.6'), by, at(`${day}T09:30:00Z`));
    return p.identifier;
  }

  // 5a. October's Pb stock: verified then, expired since (30-day lab rule).
  const oldLeadStock = await stock('Pb(NO3)2', 'Pb', 'VF-100-11', 4, '2026-10-01', maren, 'Previous lead stock for the ICP-MS calibration');
  await prepared(oldLeadStock, maren, '2026-10-01T10:05:00Z');
  await verified(oldLeadStock, idris, '2026-10-01T14:20:00Z');

  // 5b. Pb 100 mg/L from it (10 mL into 100 mL), verified; its expiry is capped by the parent's.
  const expiredWs = await createDilution(oldLeadStock, { method: 'volumetric', target: { value: '100', unit: 'mg/L' }, pipetteId: await ware('BP-10-01'), flaskId: await ware('VF-100-04'), solventId: nitric.id, notes: 'Intermediate for the October calibrations' }, maren, at('2026-10-20T09:00:00Z'));
  await recordAliquot(expiredWs.identifier, { pipetteIdentifier: 'BP-10-01' }, priya, at('2026-10-20T09:10:00Z'));
  await recordMakeUp(expiredWs.identifier, makeUp('VF-100-04', '20.5'), priya, at('2026-10-20T09:20:00Z'));
  await prepared(expiredWs.identifier, maren, '2026-10-20T09:40:00Z');
  await verified(expiredWs.identifier, idris, '2026-10-20T11:15:00Z');

  // 1. Pb 10 mg/L from the current stock (1 mL into 100 mL), verified.
  const d1 = await createDilution(leadStock, { method: 'volumetric', target: { value: '10', unit: 'mg/L' }, pipetteId: await ware('BP-1-01'), flaskId: await ware('VF-100-05'), solventId: nitric.id, notes: 'Intermediate for the lead calibration series' }, maren, at('2026-11-25T08:45:00Z'));
  await recordAliquot(d1.identifier, { pipetteIdentifier: 'BP-1-01' }, priya, at('2026-11-25T09:02:00Z'));
  await recordMakeUp(d1.identifier, makeUp('VF-100-05', '20.7'), priya, at('2026-11-25T09:10:00Z'));
  await prepared(d1.identifier, maren, '2026-11-25T09:30:00Z');
  await verified(d1.identifier, idris, '2026-11-25T11:40:00Z');

  // 2. Five-level series from the 10 mg/L dilution, each level its own pipette and flask.
  const levels = [
    { value: '0.1', pipette: 'BP-1-02', flask: 'VF-100-06' },
    { value: '0.2', pipette: 'BP-2-01', flask: 'VF-100-07' },
    { value: '0.5', pipette: 'BP-5-01', flask: 'VF-100-08' },
    { value: '1', pipette: 'BP-5-02', flask: 'VF-50-02' },
    { value: '2', pipette: 'BP-10-02', flask: 'VF-50-03' },
  ];
  const created = await createSeries(
    { parentKey: d1.identifier, levels: await Promise.all(levels.map(async (l) => ({ target: { value: l.value, unit: 'mg/L' }, pipetteId: await ware(l.pipette), flaskId: await ware(l.flask) }))), notes: 'ICP-MS lead calibration, 0.1 to 2 mg/L' },
    maren,
    at('2026-11-26T08:30:00Z'),
  );
  const lv = created.preparations.map((p) => p.identifier);
  for (const [i, key] of lv.slice(0, 3).entries()) {
    const l = levels[i]!;
    const day = i < 2 ? '2026-11-27' : '2026-11-30';
    await recordAliquot(key, { pipetteIdentifier: l.pipette }, priya, at(`${day}T09:${String(10 + i * 6).padStart(2, '0')}:00Z`));
    await recordMakeUp(key, makeUp(l.flask, '20.9'), priya, at(`${day}T09:${String(13 + i * 6).padStart(2, '0')}:00Z`));
    await prepared(key, maren, `${day}T10:${String(10 + i * 3).padStart(2, '0')}:00Z`);
    if (i < 2) await verified(key, idris, `${day}T13:${String(10 + i * 3).padStart(2, '0')}:00Z`);
  }

  // 3. Pb 10 mg/kg by mass: about 1 g of the stock made up to 100 g on BAL-A1 (0.1 mg), signed "prepared".
  const grav = await createGravimetricDilution(leadStock, { target: { value: '10', unit: 'mg/kg' }, balanceId: await balance('BAL-A1'), plannedFinalMassG: '100', solventId: nitric.id, notes: 'Check standard for the lead calibration, by mass' }, idris, at('2026-11-27T14:00:00Z'));
  const plan = grav.gravimetric!.plan;
  const aliquotReading = new D(plan.aliquot.readingShownG).plus('0.0003').toFixed(4);
  const finalReading = new D(plan.final.readingShownG).minus('0.0112').toFixed(4);
  await recordGravimetricReadings(grav.identifier, { aliquotReading, finalReading, unit: 'g', room: { temperatureC: '20.7', pressureHPa: '1009', humidityPct: '44' } }, priya, at('2026-11-27T14:20:00Z'));
  await prepared(grav.identifier, idris, '2026-11-27T14:45:00Z');

  // 4. Cd stock (verified) and the Pb + Cd mix (1 mL of each into 100 mL), verified.
  const cadmiumStock = await stock('Cd', 'Cd', 'VF-100-09', -3, '2026-11-23', idris, 'Cadmium stock: metal dissolved in nitric acid in the fume hood');
  await prepared(cadmiumStock, idris, '2026-11-23T10:10:00Z');
  await verified(cadmiumStock, maren, '2026-11-23T15:30:00Z');
  const mix = await createMix(
    { components: [{ parentKey: leadStock, pipetteId: await ware('BP-1-03') }, { parentKey: cadmiumStock, pipetteId: await ware('PP-1000-01') }], flaskId: await ware('VF-100-10'), solventId: nitric.id, notes: 'Pb and Cd check standard for the ICP-MS run' },
    maren,
    at('2026-11-28T08:30:00Z'),
  );
  const components = mix.mix!.components;
  await recordAliquot(mix.identifier, { componentId: components[0]!.linkId, pipetteIdentifier: 'BP-1-03' }, priya, at('2026-11-28T08:50:00Z'));
  await recordAliquot(mix.identifier, { componentId: components[1]!.linkId, pipetteIdentifier: 'PP-1000-01', volumeMl: '1.000' }, priya, at('2026-11-28T08:53:00Z'));
  await recordMakeUp(mix.identifier, makeUp('VF-100-10', '20.8'), priya, at('2026-11-28T09:05:00Z'));
  await prepared(mix.identifier, maren, '2026-11-28T09:30:00Z');
  await verified(mix.identifier, idris, '2026-11-28T12:00:00Z');

  // 5c. QA is asked to extend the expired 100 mg/L standard by two weeks: refused, its parent expired first.
  let refusedExtension = '';
  try {
    await extendExpiry(
      expiredWs.identifier,
      { newExpiresOn: demoDay('2026-12-15', now), reason: 'Stability data for lead in 2 % nitric acid support a further two weeks', password: DEMO_PASSWORD, acknowledgeResponsibility: true },
      qa,
      { lockoutThreshold: 5, now },
    );
  } catch (e) {
    if (!(e instanceof AppError) || e.status !== 422) throw e;
    refusedExtension = e.message;
  }
  if (!refusedExtension.includes(oldLeadStock)) throw new Error(`the demo expiry extension of ${expiredWs.identifier} was not refused by its parent's expiry: ${refusedExtension || 'it was allowed'}`);

  return {
    leadStock,
    leadDilution: d1.identifier,
    series: { identifier: created.series.identifier, levels: lv },
    gravimetric: grav.identifier,
    cadmiumStock,
    mix: mix.identifier,
    oldLeadStock,
    expired: expiredWs.identifier,
    refusedExtension,
  };
}
