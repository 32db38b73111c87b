/**
 * Demo volume checks of the fictional Harbourside Water Laboratory, made through the real services so the
 * balance gates, the calculation (shared/calc/volume-check.ts), the signatures and the audit all run:
 *   1. BP-10-01 (10 mL bulb pipette, class A) on BAL-A1: 10 replicates by the technician, signed "prepared" by
 *      the first chemist and "verified" by the second: passed, so the pipette is calibrated.
 *   2. PP-200-01 (200 µL piston pipette) on BAL-SM1: nominal, 50 % and 10 %, 10 replicates each; delivers about
 *      2.4 µL short at nominal (limit ±1.6 µL, ISO 8655-2 from memory): verified as failed, so the pipette is refused
 *      for preparations until a new check passes.
 * The readings are invented but plausible for the balances used. Dates move with the seeding day (demo-clock.ts).
 */
import { User, VolumetricWare, Balance } from '../server/db/models/index.ts';
import { planVolumeCheck, recordReading, signVolumeCheck, VOLUME_CHECK_CHECKLIST, type Actor } from '../server/services/volume-check.service.ts';
import { DEMO_PASSWORD } from './demo-data.ts';
import { demoInstant } from './demo-clock.ts';

async function actor(email: string): Promise<Actor> {
  const u = await User.findOne({ where: { email } });
  if (!u) throw new Error(`demo user ${email} is missing`);
  return { id: u.id, fullName: u.fullName };
}

async function idOf(model: typeof VolumetricWare | typeof Balance, identifier: string): Promise<number> {
  const row = await (model as typeof Balance).findOne({ where: { identifier } });
  if (!row) throw new Error(`demo ${identifier} is missing`);
  return row.id;
}

export async function seedDemoVolumeChecks(now: Date = new Date()): Promise<number> {
  const at = (iso: string) => new Date(demoInstant(iso, now));
  const maren = await actor('chemist@harbourside.example');
  const idris = await actor('chemist2@harbourside.example');
  const priya = await actor('technician@harbourside.example');
  const checklist = Object.fromEntries(VOLUME_CHECK_CHECKLIST.map((c) => [c.key, true]));
  const signing = (iso: string) => ({ lockoutThreshold: 5, now: at(iso) });

  // 1. BP-10-01: passes (mean about 10.004 mL against ±0.020 mL).
  const bp = await planVolumeCheck(
    {
      wareId: await idOf(VolumetricWare, 'BP-10-01'),
      balanceId: await idOf(Balance, 'BAL-A1'),
      replicates: 10,
      conditions: { waterTemperatureC: '20.6', waterAirSaturated: true, air: { temperatureC: '20.9', pressureHPa: '1011', relativeHumidityPct: '47' } },
      notes: 'Annual check',
    },
    priya,
    { now: at('2026-11-16T10:05:00Z') },
  );
  const bpReadings = ['9.9741', '9.9752', '9.9738', '9.9760', '9.9745', '9.9749', '9.9736', '9.9755', '9.9747', '9.9743'];
  for (const [i, value] of bpReadings.entries()) {
    await recordReading(bp.identifier, { testedIndex: 0, replicate: i + 1, value, unit: 'g' }, priya, { now: at(`2026-11-16T10:${String(12 + i * 2).padStart(2, '0')}:00Z`) });
  }
  await signVolumeCheck(bp.identifier, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true }, maren, signing('2026-11-16T11:02:00Z'));
  await signVolumeCheck(bp.identifier, { meaning: 'verified', password: DEMO_PASSWORD, checklist, acknowledgeResponsibility: true }, idris, signing('2026-11-16T15:20:00Z'));

  // 2. PP-200-01: fails at nominal volume (systematic error about −2.4 µL).
  const pp = await planVolumeCheck(
    {
      wareId: await idOf(VolumetricWare, 'PP-200-01'),
      balanceId: await idOf(Balance, 'BAL-SM1'),
      conditions: { waterTemperatureC: '21.2', air: { temperatureC: '21.4', pressureHPa: '1004', relativeHumidityPct: '44' } },
      notes: 'Routine check after a drop on the bench',
    },
    priya,
    { now: at('2026-11-20T08:40:00Z') },
  );
  const series = [
    ['196.98', '197.02', '196.95', '197.06', '197.00', '196.97', '197.04', '196.99', '197.03', '196.96'],
    ['99.12', '99.15', '99.10', '99.18', '99.13', '99.11', '99.16', '99.14', '99.09', '99.17'],
    ['19.74', '19.77', '19.72', '19.79', '19.75', '19.73', '19.78', '19.76', '19.71', '19.74'],
  ];
  let minute = 0;
  for (const [testedIndex, values] of series.entries()) {
    for (const [i, value] of values.entries()) {
      minute += 1;
      await recordReading(pp.identifier, { testedIndex, replicate: i + 1, value, unit: 'mg' }, priya, { now: new Date(at('2026-11-20T08:45:00Z').getTime() + minute * 60_000) });
    }
  }
  await signVolumeCheck(pp.identifier, { meaning: 'prepared', password: DEMO_PASSWORD, acknowledgeResponsibility: true }, maren, signing('2026-11-20T10:10:00Z'));
  await signVolumeCheck(pp.identifier, { meaning: 'verified', password: DEMO_PASSWORD, checklist, acknowledgeResponsibility: true }, idris, signing('2026-11-20T13:45:00Z'));
  return 2;
}
