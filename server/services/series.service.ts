/**
 * Calibration series as the bench and QA read them (issue: "N levels from one parent; each level becomes its
 * own preparation with its own identifier, readings and signatures; a printed series sheet lists them").
 *
 *   GET /api/series              seriesListQuerySchema → SeriesList (newest first, optional parent filter)
 *   GET /api/series/:key         id or HWL-2026-S001   → SeriesDetail (every level in full)
 *   GET /api/series/:key/sheet.pdf                     → the series sheet (A4), audited as a print
 *
 * A series is created by lineage.service.ts (createSeries). Each level is read through the preparations
 * service (getPreparation), so its status (expired on read), stage, signatures, expiry and the dilution
 * section (planned result from the stored plan, recomputed result from the stored aliquot and make-up) are
 * exactly what the level's own detail shows. Numbers stay decimal strings.
 */
import { Op, QueryTypes } from 'sequelize';
import type { PreparationDetail, Signature } from '../../shared/schemas/preparations.ts';
import type { PreparationDetailWithLineage, SeriesConcentration, SeriesDetail, SeriesLevelDetail, SeriesList, SeriesListQuery, SeriesSigner, SeriesSummary } from '../../shared/schemas/lineage.ts';
import type { DilutionResult } from '../../shared/calc/dilution.ts';
import { shownStatus } from '../../shared/schemas/expiry.ts';
import { Preparation, PreparationParent, Series, User } from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { qrPng } from '../pdf/barcodes.ts';
import { renderSeriesSheet } from '../pdf/series-sheet.tsx';
import { recordAudit } from './audit.service.ts';
import { SERIES_ID_RE } from '../../shared/prep/identifiers.ts';
import { hazardsFor } from './preparation-hazards.ts';
import { mergeHazards } from '../../shared/prep/cautions.ts';
import { getPreparation, labDate, type Actor } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';

const NUMERIC_ID_RE = /^[1-9]\d{0,15}$/;

/** 400 for a key that can be neither an id nor a series identifier; 404 for a well-formed key with no series. */
async function findSeries(key: string): Promise<Series> {
  const k = key.trim();
  let s: Series | null = null;
  if (NUMERIC_ID_RE.test(k)) s = await Series.findByPk(Number(k));
  else if (SERIES_ID_RE.test(k)) s = await Series.findOne({ where: { identifier: k } });
  else throw AppError.validation(`"${key.slice(0, 40)}" is not a series identifier`, { key: 'Give a series identifier such as HWL-2026-S001, or its id' });
  if (!s) throw AppError.notFound(`Series ${k}`);
  return s;
}

async function levelIdsOf(seriesIds: number[]): Promise<Map<number, Array<{ id: number; identifier: string; status: string; targetValue: string; targetUnit: string; expiresOn: string }>>> {
  const out = new Map<number, Array<{ id: number; identifier: string; status: string; targetValue: string; targetUnit: string; expiresOn: string }>>();
  if (!seriesIds.length) return out;
  const rows = await Preparation.sequelize!.query<{ id: number; series_id: number; identifier: string; status: string; target_value: string; target_unit: string; expires_on: string }>(
    'SELECT id, series_id, identifier, status, target_value, target_unit, expires_on FROM preparations WHERE series_id IN (:ids) ORDER BY id',
    { replacements: { ids: seriesIds }, type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    const list = out.get(r.series_id) ?? [];
    list.push({ id: r.id, identifier: r.identifier, status: r.status, targetValue: r.target_value, targetUnit: r.target_unit, expiresOn: r.expires_on });
    out.set(r.series_id, list);
  }
  return out;
}

/** GET /api/series: newest first; `parent` (identifier or id) keeps the series made from that preparation. */
export async function listSeries(q: SeriesListQuery): Promise<SeriesList> {
  const where: Record<string, unknown> = {};
  if (q.parent) {
    const parent = NUMERIC_ID_RE.test(q.parent) ? await Preparation.findByPk(Number(q.parent)) : await Preparation.findOne({ where: { identifier: q.parent } });
    if (!parent) return { items: [], total: 0, page: q.page, pageSize: q.pageSize };
    where.parentPreparationId = parent.id;
  }
  const { rows, count } = await Series.findAndCountAll({
    where,
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: q.pageSize,
    offset: (q.page - 1) * q.pageSize,
  });
  const [parents, users, levels, settings] = await Promise.all([
    rows.length ? Preparation.findAll({ attributes: ['id', 'identifier'], where: { id: { [Op.in]: [...new Set(rows.map((s) => s.parentPreparationId))] } } }) : [],
    rows.length ? User.findAll({ where: { id: { [Op.in]: [...new Set(rows.map((s) => s.createdBy))] } } }) : [],
    levelIdsOf(rows.map((s) => s.id)),
    getSettings(),
  ]);
  const today = labDate(new Date(), settings.timeZone);
  const parentById = new Map(parents.map((p) => [p.id, p.identifier]));
  const userById = new Map(users.map((u) => [u.id, u.fullName]));
  const items: SeriesSummary[] = rows.map((s) => ({
    id: s.id,
    identifier: s.identifier,
    parent: { id: s.parentPreparationId, identifier: parentById.get(s.parentPreparationId) ?? `preparation ${s.parentPreparationId}` },
    analyteFormula: s.analyteFormula,
    unit: s.unit,
    createdBy: { id: s.createdBy, fullName: userById.get(s.createdBy) ?? `user ${s.createdBy}` },
    createdAt: s.createdAt,
    levels: (levels.get(s.id) ?? []).map((l) => ({ id: l.id, identifier: l.identifier, status: shownStatus(l.status, l.expiresOn, today).status, target: { value: l.targetValue, unit: l.targetUnit }, expiresOn: l.expiresOn })),
  }));
  return { items, total: count, page: q.page, pageSize: q.pageSize };
}

const concentration = (r: Pick<DilutionResult, 'value' | 'unit' | 'standardUncertainty' | 'expandedUncertainty' | 'k' | 'display'>): SeriesConcentration => ({
  value: r.value,
  unit: r.unit,
  standardUncertainty: r.standardUncertainty,
  expandedUncertainty: r.expandedUncertainty,
  k: r.k,
  display: r.display,
});

/** The newest valid signature of a meaning (superseded signatures do not count). */
function signer(sigs: Signature[] | undefined, meaning: string): SeriesSigner | undefined {
  const s = (Array.isArray(sigs) ? sigs : []).filter((g) => g.meaning === meaning && g.valid).at(-1);
  return s ? { id: s.signer.id, fullName: s.signer.fullName, signedAt: s.signedAt } : undefined;
}

function levelOf(d: PreparationDetailWithLineage, levelNo: number): SeriesLevelDetail {
  const dil = d.dilution;
  if (!dil) throw new AppError('series_level_without_plan', 409, `${d.identifier} has no dilution plan, so it cannot be listed as a series level`);
  const pipette = dil.plannedAliquot.pipette;
  const flask = d.snapshot.flask;
  const current = [...dil.aliquots].reverse().find((a) => a.supersededById === undefined);
  const level: SeriesLevelDetail = {
    id: d.id,
    identifier: d.identifier,
    status: d.status,
    target: { value: d.target.value, unit: d.target.unit },
    pipetteIdentifier: pipette.identifier,
    flaskIdentifier: flask?.identifier ?? '',
    plannedConcentration: dil.planned.value,
    expiresOn: d.expiry.expiresOn,
    levelNo,
    version: d.version,
    stage: d.stage,
    aliquot: { pipette: { id: pipette.id, identifier: pipette.identifier, kind: pipette.snapshot.kind, nominalVolumeMl: pipette.snapshot.nominalVolumeMl }, volumeMl: dil.plannedAliquot.volumeMl },
    flask: { id: flask?.id ?? null, identifier: flask?.identifier ?? '', nominalVolumeMl: flask?.nominalVolumeMl ?? dil.plannedFinalMl },
    planned: concentration(dil.planned),
    expiryReason: d.expiry.reason,
  };
  if (dil.result) level.result = { ...concentration(dil.result), basedOn: dil.result.basedOn };
  if (current) level.aliquotRecorded = { pipetteIdentifier: current.pipette.identifier, volumeMl: current.volumeMl };
  const prepared = signer(d.signatures, 'prepared');
  if (prepared) level.preparedBy = prepared;
  const verified = signer(d.signatures, 'verified');
  if (verified) level.verifiedBy = verified;
  return level;
}

async function detailOf(s: Series): Promise<SeriesDetail> {
  const [parentRow, creator, levelRows] = await Promise.all([Preparation.findByPk(s.parentPreparationId), User.findByPk(s.createdBy), levelIdsOf([s.id])]);
  const rows = levelRows.get(s.id) ?? [];
  const details = (await Promise.all(rows.map((r) => getPreparation(String(r.id))))) as PreparationDetailWithLineage[];
  // the parent as used: the snapshot frozen on the first level's link (all levels of a series share it)
  const link = rows.length ? await PreparationParent.findOne({ where: { preparationId: rows[0]!.id, role: 'aliquot' } }) : null;
  const snap = link?.snapshot;
  const m = parentRow?.snapshotMaterial;
  const detail: SeriesDetail = {
    id: s.id,
    identifier: s.identifier,
    parent: {
      id: s.parentPreparationId,
      identifier: parentRow?.identifier ?? snap?.identifier ?? `preparation ${s.parentPreparationId}`,
      version: snap?.version ?? parentRow?.version ?? 0,
      concentrationDisplay: snap?.concentration.display ?? parentRow?.concentrationDisplay ?? '',
      expiresOn: snap?.expiresOn ?? parentRow?.expiresOn ?? '',
      status: parentRow?.status ?? 'unknown',
      material: { name: m?.name ?? '', lot: m?.lot ?? '', producer: m?.producer ?? '', certificateNumber: m?.certificateNumber ?? null, expiresOn: m?.expiresOn ?? null },
    },
    analyteFormula: s.analyteFormula,
    unit: s.unit,
    createdBy: { id: s.createdBy, fullName: creator?.fullName ?? `user ${s.createdBy}` },
    createdAt: s.createdAt,
    levels: details.map((d, i) => levelOf(d, i + 1)),
    // pipetting the parent's solution: the levels' cautions (their solvents and the parent's matrix), each once
    hazards: mergeHazards(details.map((d) => d.hazards)) ?? hazardsFor(m ?? { ghsHazardStatements: [], ghsPictograms: [] }, 'pipette_solution'),
  };
  const notes = details[0]?.notes;
  if (notes) detail.notes = notes;
  return detail;
}

/** GET /api/series/:key (numeric id or identifier such as HWL-2026-S001). */
export async function getSeriesDetail(key: string): Promise<SeriesDetail> {
  return detailOf(await findSeries(key));
}

/** GET /api/series/:key/sheet.pdf: the series sheet as the records are now; recorded as a print (like the prep sheet). */
export async function seriesSheetPdf(key: string, actor: Actor): Promise<{ pdf: Buffer; filename: string }> {
  const [series, settings] = await Promise.all([getSeriesDetail(key), getSettings()]);
  const generatedAt = new Date().toISOString();
  const pdf = await renderSeriesSheet({
    lab: { name: settings.labName, timeZone: settings.timeZone },
    series,
    generatedAt,
    generatedBy: actor.fullName,
    qr: await qrPng(series.identifier),
    qrText: series.identifier,
  });
  await writeTransaction((transaction) =>
    recordAudit(
      {
        actor,
        action: 'print',
        entity: 'series',
        entityId: series.id,
        changes: [
          { field: 'kind', oldValue: null, newValue: 'series_sheet' },
          { field: 'identifier', oldValue: null, newValue: series.identifier },
          { field: 'levels', oldValue: null, newValue: series.levels.map((l) => `${l.identifier} v${l.version} ${l.status}`) },
        ],
      },
      transaction,
    ),
  );
  return { pdf, filename: `${series.identifier}-series-sheet.pdf` };
}
