/**
 * One flask, one open solution (server/services/flask-occupancy.ts): a test that makes up several open records
 * needs a flask that holds none. Returns a flask registered for the tests (VF-<ml>-T<n>, class A, the ISO 1042
 * tolerance of its size, from memory) that holds no open preparation (the list's `holds`), registering a new one
 * when every such flask is taken. The demo flasks stay for what each test names explicitly.
 * `cookie` must be a chemist's or admin's (they register ware).
 */
import request from 'supertest';
import type { Express } from 'express';

const TOLERANCE: Record<string, string> = { '10': '0.025', '25': '0.04', '50': '0.06', '100': '0.10', '250': '0.15', '500': '0.25', '1000': '0.40' };

export async function freeFlask(app: Express, cookie: string, nominalMl = '100'): Promise<{ id: number; identifier: string }> {
  const list = await request(app).get('/api/volumetric-ware?kind=volumetric_flask&usable=1&pageSize=200').set('Cookie', cookie);
  if (list.status !== 200) throw new Error(`flask list: ${list.status} ${JSON.stringify(list.body)}`);
  const items = list.body.items as Array<{ id: number; identifier: string; holds?: string | null }>;
  const prefix = `VF-${nominalMl}-T`;
  const free = items.find((w) => w.identifier.startsWith(prefix) && !w.holds);
  if (free) return { id: free.id, identifier: free.identifier };
  for (let n = items.filter((w) => w.identifier.startsWith(prefix)).length + 1; ; n++) {
    const identifier = `${prefix}${String(n).padStart(2, '0')}`;
    const res = await request(app)
      .post('/api/volumetric-ware')
      .set('Cookie', cookie)
      .send({ identifier, kind: 'volumetric_flask', nominalVolumeMl: nominalMl, class: 'A', toleranceMl: TOLERANCE[nominalMl] ?? '0.10', material: 'borosilicate 3.3', status: 'in_service' });
    if (res.status === 201) return { id: res.body.id, identifier };
    if (res.status !== 409) throw new Error(`registering ${identifier}: ${res.status} ${JSON.stringify(res.body)}`);
  }
}

/**
 * Empties a named flask for a test that needs that very flask (e.g. the one a stored volume check belongs to):
 * the record it holds is discarded by QA with a reason, as a lab would before reusing the flask.
 */
export async function emptyFlask(app: Express, qaCookie: string, identifier: string, password: string): Promise<void> {
  const list = await request(app).get(`/api/volumetric-ware?kind=volumetric_flask&pageSize=200`).set('Cookie', qaCookie);
  if (list.status !== 200) throw new Error(`flask list: ${list.status} ${JSON.stringify(list.body)}`);
  const flask = (list.body.items as Array<{ identifier: string; holds?: string | null }>).find((w) => w.identifier === identifier);
  if (!flask?.holds) return;
  const res = await request(app)
    .post(`/api/preparations/${flask.holds}/signatures`)
    .set('Cookie', qaCookie)
    .send({ meaning: 'discarded', password, acknowledgeResponsibility: true, reason: `${identifier} emptied for the next test` });
  if (res.status !== 201) throw new Error(`discarding ${flask.holds}: ${res.status} ${JSON.stringify(res.body)}`);
}
