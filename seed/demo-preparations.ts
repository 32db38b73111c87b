/**
 * Demo preparations for the fictional Harbourside Water Laboratory, created through the real services so
 * every number (plan, window, result, budget, expiry) is computed by the metrology core, not typed in.
 * Dates are written in November 2026 and move with the seeding day (seed/demo-clock.ts); the readings are
 * invented but plausible for the balances used.
 *   1. Pb 1000 mg/L (Pb(NO3)2), weighed and made up: complete with a result.
 *   2. Cl 1000 mg/L (NaCl): a mistyped reading corrected by a superseding weighing, then made up.
 *   3. C (TOC) 1000 mg/L (KHP): an out-of-window weighing kept with its reason, then made up.
 *   4. Cu 1000 mg/L (CuSO4·5H2O): weighed by difference, not yet made up.
 *   5. NO3 1000 mg/L (NaNO3): planned only.
 * Signatures go through the signature service (real passwords, real record hashes): Pb is signed "prepared" by
 * the first chemist and "verified" by the second; the TOC record is signed "prepared" and awaits verification.
 */
import { D } from '../shared/calc/index.ts';
import { Balance, ReferenceMaterial, Solvent, User, VolumetricWare } from '../server/db/models/index.ts';
import { createPreparation, recordMakeUp, recordWeighing, type Actor } from '../server/services/preparations.service.ts';
import { sign } from '../server/services/signatures.service.ts';
import { VERIFICATION_CHECKLIST } from '../shared/schemas/preparations.ts';
import { DEMO_PASSWORD } from './demo-data.ts';
import { demoInstant } from './demo-clock.ts';

async function actor(email: string): Promise<Actor> {
  const u = await User.findOne({ where: { email } });
  if (!u) throw new Error(`demo user ${email} is missing`);
  return { id: u.id, fullName: u.fullName };
}

async function idOf<T extends { id: number }>(row: Promise<T | null>, what: string): Promise<number> {
  const r = await row;
  if (!r) throw new Error(`demo ${what} is missing`);
  return r.id;
}

/** The seeding day: every scenario time below is shifted with it (seed/demo-clock.ts). */
let seedNow = new Date();
const when = (iso: string) => demoInstant(iso, seedNow);
const at = (iso: string) => ({ now: new Date(when(iso)) });
const room = (t: string, p: string, rh: string, measuredAt: string) => ({ source: 'measured' as const, temperatureC: t, pressureHPa: p, relativeHumidityPct: rh, measuredAt: when(measuredAt) });

/** The planned reading moved by n scale intervals, with the balance's decimals (a plausible actual reading). */
function near(target: string, steps: number, readabilityMg: string): string {
  const d = new D(readabilityMg);
  return new D(target).plus(d.times(steps)).toFixed(d.decimalPlaces());
}

export async function seedDemoPreparations(now: Date = new Date()): Promise<number> {
  seedNow = now;
  const maren = await actor('chemist@harbourside.example');
  const idris = await actor('chemist2@harbourside.example');
  const priya = await actor('technician@harbourside.example');
  const material = (formula: string) => idOf(ReferenceMaterial.findOne({ where: { formula } }), `material ${formula}`);
  const balance = (identifier: string) => idOf(Balance.findOne({ where: { identifier } }), `balance ${identifier}`);
  const flask = (identifier: string) => idOf(VolumetricWare.findOne({ where: { identifier } }), `flask ${identifier}`);
  const solvent = async (name: string) => {
    const s = await Solvent.findOne({ where: { name } });
    if (!s) throw new Error(`demo solvent ${name} is missing`);
    return { id: s.id, lot: s.lot };
  };
  const water = await solvent('Ultrapure water');
  const nitric = await solvent('Nitric acid 2 % (v/v)');

  // 1. Pb: the METROLOGY §5.4 case (read 160.07 mg on the semi-micro balance), made up in 2 % nitric acid.
  const t1 = '2026-11-09T09:12:00Z';
  const pb = await createPreparation(
    {
      materialId: await material('Pb(NO3)2'),
      analyteFormula: 'Pb',
      target: { value: '1000', unit: 'mg/L' },
      flaskId: await flask('VF-100-01'),
      balanceId: await balance('BAL-SM1'),
      conditions: room('21.0', '985', '45', t1),
      notes: 'Stock for the ICP-MS lead calibration',
    },
    maren,
    at(t1),
  );
  await recordWeighing(pb.identifier, { mode: 'direct', reading: '160.07', unit: 'mg', conditions: room('21.0', '985', '45', '2026-11-09T09:20:00Z') }, maren, at('2026-11-09T09:21:00Z'));
  await recordMakeUp(pb.identifier, { flaskIdentifier: 'VF-100-01', solventId: nitric.id, solventLot: nitric.lot, solutionTemperatureC: '20.4', applyTemperatureCorrection: false }, maren, at('2026-11-09T09:34:00Z'));

  // 2. Cl: the first reading was mistyped (digits transposed) and corrected from the balance printout.
  const t2 = '2026-11-12T10:05:00Z';
  const cl = await createPreparation(
    {
      materialId: await material('NaCl'),
      analyteFormula: 'Cl',
      target: { value: '1000', unit: 'mg/L' },
      flaskId: await flask('VF-250-01'),
      balanceId: await balance('BAL-A1'),
      conditions: room('20.6', '1008', '48', t2),
    },
    idris,
    at(t2),
  );
  const clTyped = near(cl.plan.targetReading.value, 3, '0.1');
  const clWrong = clTyped.replace(/(\d)(\d)\./, '$2$1.');
  const first = await recordWeighing(
    cl.identifier,
    { mode: 'direct', reading: clWrong === clTyped ? near(clTyped, 9, '0.1') : clWrong, unit: 'mg', conditions: room('20.6', '1008', '48', '2026-11-12T10:14:00Z') },
    priya,
    at('2026-11-12T10:15:00Z'),
  );
  await recordWeighing(
    cl.identifier,
    {
      mode: 'direct',
      reading: clTyped,
      unit: 'mg',
      conditions: room('20.6', '1008', '48', '2026-11-12T10:14:00Z'),
      supersedesId: first.weighings[0]!.id,
      correctionReason: `Digits transposed when typing; the balance printout shows ${clTyped} mg`,
    },
    idris,
    at('2026-11-12T10:22:00Z'),
  );
  await recordMakeUp(cl.identifier, { flaskIdentifier: 'VF-250-01', solventId: water.id, solventLot: water.lot, solutionTemperatureC: '20.8', applyTemperatureCorrection: false }, priya, at('2026-11-12T10:40:00Z'));

  // 3. TOC from KHP: the transfer overshot the window; the portion was kept and the reason recorded. In VF-100-03:
  //    VF-100-01 still holds the Pb stock (one flask, one open solution).
  const t3 = '2026-11-18T13:30:00Z';
  const toc = await createPreparation(
    {
      materialId: await material('C8H5KO4'),
      analyteFormula: 'C',
      target: { value: '1000', unit: 'mg/L' },
      flaskId: await flask('VF-100-03'),
      balanceId: await balance('BAL-A1'),
      conditions: room('21.4', '1002', '41', t3),
    },
    maren,
    at(t3),
  );
  const over = new D(toc.plan.window.high).plus('4.6').toFixed(1);
  await recordWeighing(
    toc.identifier,
    {
      mode: 'direct',
      reading: over,
      unit: 'mg',
      conditions: room('21.4', '1002', '41', '2026-11-18T13:41:00Z'),
      confirmOutOfWindow: true,
      outOfWindowReason: 'Overshot while transferring; portion kept, concentration taken from the actual mass',
    },
    maren,
    at('2026-11-18T13:42:00Z'),
  );
  await recordMakeUp(toc.identifier, { flaskIdentifier: 'VF-100-03', solventId: water.id, solventLot: water.lot, solutionTemperatureC: '21.2', applyTemperatureCorrection: false }, maren, at('2026-11-18T13:58:00Z'));

  // Signatures: Pb prepared by Maren and verified by Idris (who entered none of its data); TOC prepared, awaiting review.
  const signing = (iso: string) => ({ lockoutThreshold: 5, publicUrl: process.env.PUBLIC_URL ?? `http://localhost:${process.env.PORT || 3000}`, now: new Date(when(iso)) });
  const checklist = Object.fromEntries(VERIFICATION_CHECKLIST.map((c) => [c.key, true as const]));
  await sign(pb.identifier, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true }, maren, signing('2026-11-09T09:40:00Z'));
  await sign(pb.identifier, { meaning: 'verified', password: DEMO_PASSWORD, checklist, acknowledgeResponsibility: true }, idris, signing('2026-11-09T14:05:00Z'));
  await sign(toc.identifier, { meaning: 'prepared', password: DEMO_PASSWORD }, maren, signing('2026-11-18T14:03:00Z'));

  // 4. Cu: weighed by difference from a weighing boat; make-up not yet recorded.
  const t4 = '2026-11-24T08:50:00Z';
  const cu = await createPreparation(
    {
      materialId: await material('CuSO4(H2O)5'),
      analyteFormula: 'Cu',
      target: { value: '1000', unit: 'mg/L' },
      flaskId: await flask('VF-100-02'),
      balanceId: await balance('BAL-SM1'),
      conditions: { source: 'lab-default' },
    },
    idris,
    at(t4),
  );
  const cuNet = near(cu.plan.targetReading.value, -12, '0.01');
  const before = '15234.56';
  const after = new D(before).minus(cuNet).toFixed(2);
  await recordWeighing(cu.identifier, { mode: 'difference', before, after, unit: 'mg', conditions: room('20.2', '1011', '52', '2026-11-24T09:02:00Z') }, priya, at('2026-11-24T09:03:00Z'));

  // 5. Nitrate: planned only.
  const t5 = '2026-11-30T15:10:00Z';
  await createPreparation(
    {
      materialId: await material('NaNO3'),
      analyteFormula: 'NO3',
      target: { value: '1000', unit: 'mg/L' },
      flaskId: await flask('VF-500-01'),
      balanceId: await balance('BAL-A1'),
      conditions: { source: 'lab-default' },
      notes: 'For Monday’s nitrate calibration',
    },
    maren,
    at(t5),
  );
  return 5;
}
