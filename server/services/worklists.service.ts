/**
 * The home page's work lists for the signed-in user (shared/schemas/worklists.ts):
 *   awaiting my verification  live records signed "prepared" that the signature service would let this user
 *                             sign "verified" (chemists; the preparer, planner and data recorders are excluded, RV-02)
 *   to weigh or make up today live planned records not yet both weighed (or pipetted) and made up (chemists and
 *                             technicians); the user's own plans first, then oldest first
 *   expiring soon             live records expiring within settings.expiryNoticeDays of the lab date, both ends
 *                             included, as the expiry digest counts them; a chemist sees the records they planned
 *                             (the digest's addressee), technician, QA and admin the whole lab
 * Read only: nothing is written or audited.
 */
import { Op } from 'sequelize';
import { addDays, daysBetween } from '../../shared/prep/index.ts';
import { listPreparationsQuerySchema, type PreparationStage, type PreparationSummary } from '../../shared/schemas/preparations.ts';
import type { Role } from '../../shared/schemas/roles.ts';
import { DEFAULT_EXPIRY_NOTICE_DAYS } from '../../shared/schemas/settings.ts';
import { WORKLIST_LIMIT, type WorkItem, type WorkList, type WorkLists } from '../../shared/schemas/worklists.ts';
import { Preparation, User } from '../db/models/index.ts';
import { DIGEST_EXCLUDED_STATUSES } from './expiry-digest.service.ts';
import { labDate, listPreparations } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';
import { verifyRefusal } from './signatures.service.ts';

export interface WorkListViewer {
  id: number;
  fullName: string;
  role: Role;
}

const NEXT_STEP: Record<PreparationStage, string> = {
  planned: 'Weigh (or pipette the aliquot)',
  weighed: 'Make up to the mark',
  made_up: 'Weigh (or pipette the aliquot)',
  complete: 'Sign as prepared',
};

const expiresText = (d: number) => (d === 0 ? 'Expires today' : d === 1 ? 'Expires tomorrow' : `Expires in ${d} days`);

function itemOf(s: PreparationSummary, viewerId: number, today: string, next: string): WorkItem {
  const item: WorkItem = {
    id: s.id,
    identifier: s.identifier,
    status: s.status,
    stage: s.stage,
    materialName: s.materialName,
    analyteFormula: s.analyteFormula,
    target: s.target,
    createdBy: { id: s.createdBy.id, fullName: s.createdBy.fullName },
    expiresOn: s.expiresOn,
    daysLeft: daysBetween(today, s.expiresOn),
    mine: s.createdBy.id === viewerId,
    next,
  };
  if (s.concentrationDisplay) item.concentrationDisplay = s.concentrationDisplay;
  return item;
}

const list = (items: WorkItem[], scope: string): WorkList => ({ items: items.slice(0, WORKLIST_LIMIT), total: items.length, scope });

async function summaries(status: string, viewer: WorkListViewer, now: Date): Promise<PreparationSummary[]> {
  const q = listPreparationsQuerySchema.parse({ status, pageSize: '100' });
  return (await listPreparations(q, { id: viewer.id, fullName: viewer.fullName }, { now })).items;
}

export async function workListsFor(viewer: WorkListViewer, now: Date = new Date()): Promise<WorkLists> {
  const settings = await getSettings();
  const today = labDate(now, settings.timeZone);
  const noticeDays = settings.expiryNoticeDays ?? DEFAULT_EXPIRY_NOTICE_DAYS;
  const out: WorkLists = { today, noticeDays };

  if (viewer.role === 'chemist') {
    const prepared = await summaries('prepared', viewer, now);
    const rows = prepared.length ? await Preparation.findAll({ where: { id: prepared.map((s) => s.id) } }) : [];
    const byId = new Map(rows.map((r) => [r.id, r]));
    const mayVerify: WorkItem[] = [];
    for (const s of [...prepared].sort((a, b) => a.id - b.id)) {
      const row = byId.get(s.id);
      if (row && (await verifyRefusal(row, viewer)) === null) mayVerify.push(itemOf(s, viewer.id, today, 'Verify'));
    }
    out.awaitingVerification = list(mayVerify, 'Signed "prepared" by a colleague; you may verify');
  }

  if (viewer.role === 'chemist' || viewer.role === 'technician') {
    const planned = (await summaries('planned', viewer, now)).filter((s) => s.stage !== 'complete');
    const items = planned
      .map((s) => itemOf(s, viewer.id, today, NEXT_STEP[s.stage]))
      .sort((a, b) => Number(b.mine) - Number(a.mine) || a.id - b.id);
    out.toWeighOrMakeUp = list(items, viewer.role === 'chemist' ? 'Planned and not yet made up; yours first' : 'Planned and not yet made up, whole lab');
  }

  const until = addDays(today, noticeDays);
  const ownOnly = viewer.role === 'chemist';
  const rows = await Preparation.findAll({
    where: {
      expiresOn: { [Op.gte]: today, [Op.lte]: until },
      status: { [Op.notIn]: [...DIGEST_EXCLUDED_STATUSES] },
      ...(ownOnly ? { createdBy: viewer.id } : {}),
    },
    order: [['expiresOn', 'ASC'], ['identifier', 'ASC']],
  });
  const users = rows.length ? new Map((await User.findAll({ where: { id: [...new Set(rows.map((r) => r.createdBy))] } })).map((u) => [u.id, u])) : new Map<number, User>();
  const expiring = rows.map((p): WorkItem => {
    const daysLeft = daysBetween(today, p.expiresOn);
    const item: WorkItem = {
      id: p.id,
      identifier: p.identifier,
      status: p.status,
      materialName: p.snapshotMaterial.name,
      analyteFormula: p.analyteFormula,
      target: { value: p.targetValue, unit: p.targetUnit },
      createdBy: { id: p.createdBy, fullName: users.get(p.createdBy)?.fullName ?? `user ${p.createdBy}` },
      expiresOn: p.expiresOn,
      daysLeft,
      mine: p.createdBy === viewer.id,
      next: expiresText(daysLeft),
    };
    if (p.concentrationDisplay) item.concentrationDisplay = p.concentrationDisplay;
    return item;
  });
  out.expiringSoon = list(expiring, ownOnly ? `Planned by you, expiring within ${noticeDays} days` : `Whole lab, expiring within ${noticeDays} days`);
  return out;
}
