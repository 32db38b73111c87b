/**
 * One physical item per open preparation (issue 16 §4): a volumetric flask holds the solution of the preparation
 * last made up in it until that preparation is discarded or expired (expiry is the lab date past `expiresOn`,
 * shown not stored). Such a flask is refused at make-up and for a new dilution, series level or mix (409
 * `flask_occupied`, at the field, naming the record that holds it), marked as occupied in the pickers, and never
 * proposed for a series. A planned flask is only a plan: the flask a solution is in is the one scanned at make-up.
 */
import { QueryTypes, type Transaction } from 'sequelize';
import { Preparation } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';

/** Statuses whose solution is gone from the flask (expired is also reached by date). */
const GONE = ['discarded', 'expired'];

/**
 * Flask id → the identifier of the open preparation whose solution it holds (its latest make-up's flask), as of
 * the lab date `today`. `exceptPreparationId`: leave out one record (its own new make-up may reuse its flask).
 */
export async function flasksHoldingSolutions(today: string, opts: { exceptPreparationId?: number; transaction?: Transaction } = {}): Promise<Map<number, string>> {
  const rows = await Preparation.sequelize!.query<{ flaskId: number | null; identifier: string }>(
    `SELECT (SELECT m.flask_id FROM make_ups m WHERE m.preparation_id = p.id ORDER BY m.id DESC LIMIT 1) AS flaskId, p.identifier AS identifier
       FROM preparations p
      WHERE p.status NOT IN (:gone) AND p.expires_on >= :today AND p.id <> :except
      ORDER BY p.id`,
    { replacements: { gone: GONE, today, except: opts.exceptPreparationId ?? -1 }, type: QueryTypes.SELECT, transaction: opts.transaction },
  );
  const held = new Map<number, string>();
  for (const r of rows) if (r.flaskId !== null && !held.has(r.flaskId)) held.set(r.flaskId, r.identifier);
  return held;
}

/** 409 flask_occupied at `field` when the flask still holds an open preparation's solution. */
export async function assertFlaskFree(flask: { id: number; identifier: string }, field: string, today: string, opts: { exceptPreparationId?: number; transaction?: Transaction } = {}): Promise<void> {
  const holder = (await flasksHoldingSolutions(today, opts)).get(flask.id);
  if (holder === undefined) return;
  const msg = `${flask.identifier} still holds ${holder}`;
  throw new AppError('flask_occupied', 409, `${msg}: one flask, one open solution`, {
    fields: { [field]: `${msg}; use another flask, or discard ${holder} (or let it expire) first` },
  });
}
