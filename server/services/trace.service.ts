/**
 * Traceability (REQUIREMENTS §0.1 principles 5–6, TR-04, TR-07, TR-12): the backward and forward trace of
 * any identifier as a graph, QA review flags on everything a forward trace reaches, and the rows of the
 * traceability report of one standard.
 *
 * - Backward from a preparation: its material lot and the certificate versions on file when it was planned,
 *   the balance of every weighing with its status taken from the snapshot stored at the weighing (never the
 *   register as it is now), the flask and solvent lot of every make-up, the aliquot pipette and parent of a
 *   dilution (recursively), and the people who planned, weighed, made up and signed it.
 * - Forward from a material lot, balance, volumetric ware, solvent lot or preparation: every preparation that
 *   used it (limited by use time to `from`..`to`, lab dates, both included), recursively everything made from
 *   those, and their label prints. A balance's forward set counts the weighings that a preparation's result
 *   rests on (not superseded by a correction); a flask's and a solvent lot's, the latest make-up.
 * - Dilutions: parents are read from `preparation_parents` when that table exists (checked in sqlite_master);
 *   without it every preparation is a stock standard made from its material lot.
 */
import { traceVolumeCheck } from './volume-check-trace.ts';
import { Op, QueryTypes } from 'sequelize';
import { addDays, parsePreparationId } from '../../shared/prep/index.ts';
import type { Balance as BalanceDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type {
  ReviewFlagDto,
  ReviewFlagList,
  ReviewFlagsCreated,
  ReviewFlagsInput,
  TraceEdge,
  TraceGraph,
  TraceNode,
  TraceNodeType,
  TraceQuery,
  TraceReportRow,
  TraceResponse,
  TraceSubject,
} from '../../shared/schemas/trace.ts';
import { TRACE_REPORT_COLUMNS } from '../../shared/schemas/trace.ts';
import {
  Balance,
  LabelPrint,
  MakeUp,
  MaterialCertificate,
  Preparation,
  ReferenceMaterial,
  Signature,
  Solvent,
  User,
  VolumetricWare,
  Weighing,
} from '../db/models/index.ts';
import { writeTransaction } from '../db/transaction.ts';
import { AppError } from '../errors/app-error.ts';
import { renderTraceabilityReport } from '../pdf/traceability-report.tsx';
import { renderForwardReport } from '../pdf/forward-report.tsx';
import { FORWARD_REPORT_COLUMNS, type ForwardReportRow } from '../../shared/schemas/trace.ts';
import { shownStatus } from '../../shared/schemas/expiry.ts';
import { csvLine, recordAudit } from './audit.service.ts';
import { labDate } from './preparations.service.ts';
import { getSettings } from './settings.service.ts';
import { SEAL_BROKEN, sealStates, type SealBroken } from './record-integrity.ts';
import { recordSeal, shownColumns } from './signatures.service.ts';

export interface Actor {
  id: number;
  fullName: string;
}

// ------------------------------------------------------------------ graph

class Graph {
  private readonly nodes = new Map<string, TraceNode>();
  private readonly edges: TraceEdge[] = [];
  private readonly edgeKeys = new Set<string>();

  has(id: string): boolean {
    return this.nodes.has(id);
  }

  /** The first description of a node wins (the earliest use seen). */
  node(n: TraceNode): string {
    if (!this.nodes.has(n.id)) this.nodes.set(n.id, n);
    return n.id;
  }

  edge(e: TraceEdge): void {
    const key = `${e.from}|${e.to}|${e.relation}|${e.at ?? ''}`;
    if (this.edgeKeys.has(key)) return;
    this.edgeKeys.add(key);
    this.edges.push(e);
  }

  toJSON(): TraceGraph {
    return { nodes: [...this.nodes.values()], edges: [...this.edges] };
  }
}

const nodeId = (type: TraceNodeType, key: string | number) => `${type}:${key}`;

/** "in service; calibrated 2026-01-10, due 2027-01-10" as it stood on the day of use (from the snapshot). */
export function balanceStatusOn(b: Pick<BalanceDto, 'status' | 'calibratedOn' | 'calibrationDueOn'>, day: string): string {
  const status = b.status === 'in_service' ? 'in service' : String(b.status).replace(/_/g, ' ');
  if (!b.calibrationDueOn) return `${status}; no calibration due date recorded`;
  if (day > b.calibrationDueOn) return `${status}; calibration overdue (due ${b.calibrationDueOn})`;
  return `${status}; calibrated ${b.calibratedOn ?? '—'}, due ${b.calibrationDueOn}`;
}

const wareStatus = (w: Pick<WareDto, 'status' | 'class'>) => `${String(w.status).replace(/_/g, ' ')}; class ${w.class}`;
const plainStatus = (s: string | null | undefined) => (s ? String(s).replace(/_/g, ' ') : 'unknown');

// ------------------------------------------------------------------ parent links (dilutions)

interface ParentLink {
  preparationId: number;
  parentId: number;
  aliquotWareId: number | null;
  snapshot: Record<string, unknown> | null;
}

function sequelize() {
  const s = Preparation.sequelize;
  if (!s) throw new Error('trace: models are not initialised');
  return s;
}

/**
 * What the lineage tables look like. Cache keyed on the Sequelize instance (one per open database), dropped
 * with it: the schema changes only by migrations, which run before the app serves.
 */
const schemaCache = new WeakMap<object, { parents?: Promise<Set<string> | null>; aliquots?: Promise<boolean> }>();
const schemaOf = () => schemaCache.get(sequelize()) ?? (schemaCache.set(sequelize(), {}), schemaCache.get(sequelize())!);

/** The columns of preparation_parents, or null when the table does not exist (stock standards only). */
function parentColumns(): Promise<Set<string> | null> {
  const cache = schemaOf();
  return (cache.parents ??= (async () => {
    const rows = await sequelize().query<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'preparation_parents'", { type: QueryTypes.SELECT });
    if (!rows.length) return null;
    const cols = await sequelize().query<{ name: string }>('PRAGMA table_info(preparation_parents)', { type: QueryTypes.SELECT });
    return new Set(cols.map((c) => c.name));
  })());
}

function parseJson(raw: unknown): Record<string, unknown> | null {
  if (raw === null || raw === undefined) return null;
  if (typeof raw === 'object') return raw as Record<string, unknown>;
  try {
    const v = JSON.parse(String(raw)) as unknown;
    return v && typeof v === 'object' ? (v as Record<string, unknown>) : null;
  } catch {
    return null;
  }
}

async function parentLinks(column: 'preparation_id' | 'parent_preparation_id' | 'aliquot_ware_id', ids: number[]): Promise<ParentLink[]> {
  if (!ids.length) return [];
  const cols = await parentColumns();
  if (!cols || !cols.has(column)) return [];
  const aliquot = cols.has('aliquot_ware_id') ? 'aliquot_ware_id' : 'NULL';
  const snapshot = cols.has('snapshot') ? 'snapshot' : 'NULL';
  const rows = await sequelize().query<{ preparation_id: number; parent_preparation_id: number; aliquot_ware_id: number | null; snapshot: unknown }>(
    `SELECT preparation_id, parent_preparation_id, ${aliquot} AS aliquot_ware_id, ${snapshot} AS snapshot FROM preparation_parents WHERE ${column} IN (${ids.map(() => '?').join(',')}) ORDER BY preparation_id, parent_preparation_id`,
    { type: QueryTypes.SELECT, replacements: ids },
  );
  return rows.map((r) => ({
    preparationId: Number(r.preparation_id),
    parentId: Number(r.parent_preparation_id),
    aliquotWareId: r.aliquot_ware_id === null || r.aliquot_ware_id === undefined ? null : Number(r.aliquot_ware_id),
    snapshot: parseJson(r.snapshot),
  }));
}

interface AliquotRow {
  id: number;
  preparationId: number;
  pipetteId: number;
  pipetteIdentifier: string;
  pipetteSnapshot: Record<string, unknown> | null;
  volumeMl: string;
  recordedBy: number;
  recordedAt: string;
}

/** Standing (not superseded) bench aliquots from dilution_aliquots, when the lineage feature has the table. */
async function aliquots(column: 'preparation_id' | 'pipette_id', ids: number[]): Promise<AliquotRow[]> {
  if (!ids.length) return [];
  const cache = schemaOf();
  const exists = await (cache.aliquots ??= sequelize()
    .query("SELECT name FROM sqlite_master WHERE type = 'table' AND name = 'dilution_aliquots'", { type: QueryTypes.SELECT })
    .then((rows) => rows.length > 0));
  if (!exists) return [];
  const rows = await sequelize().query<{ id: number; preparation_id: number; pipette_id: number; pipette_identifier: string; pipette_snapshot: unknown; volume_ml: string; recorded_by: number; recorded_at: string }>(
    `SELECT a.id, a.preparation_id, a.pipette_id, a.pipette_identifier, a.pipette_snapshot, a.volume_ml, a.recorded_by, a.recorded_at FROM dilution_aliquots a
     WHERE a.${column} IN (${ids.map(() => '?').join(',')}) AND NOT EXISTS (SELECT 1 FROM dilution_aliquots b WHERE b.supersedes_id = a.id) ORDER BY a.id`,
    { type: QueryTypes.SELECT, replacements: ids },
  );
  return rows.map((r) => ({
    id: Number(r.id),
    preparationId: Number(r.preparation_id),
    pipetteId: Number(r.pipette_id),
    pipetteIdentifier: r.pipette_identifier,
    pipetteSnapshot: parseJson(r.pipette_snapshot),
    volumeMl: r.volume_ml,
    recordedBy: Number(r.recorded_by),
    recordedAt: r.recorded_at,
  }));
}

/** A preparation's kind (stock unless the lineage feature says otherwise). */
const kindOf = (p: Preparation) => (p.get('kind') as string | undefined | null) ?? 'stock';

// ------------------------------------------------------------------ subject

interface Resolved {
  subject: TraceSubject;
  preparation?: Preparation;
  balance?: Balance;
  ware?: VolumetricWare;
  material?: ReferenceMaterial;
  solvent?: Solvent;
}

const SUBJECT_WORD: Record<TraceSubject['type'], string> = {
  preparation: 'standard',
  material_lot: 'material lot',
  balance: 'balance',
  volumetric_ware: 'volumetric ware',
  solvent_lot: 'solvent lot',
};

const prepLabel = (p: Preparation) => `${p.identifier} ${p.analyteFormula} from ${p.snapshotMaterial.name}${p.concentrationDisplay ? `, ${p.concentrationDisplay}` : ''}`;

/** An identifier as typed or scanned: a preparation, balance, ware identifier, material lot or solvent lot. */
export async function resolveSubject(raw: string): Promise<Resolved> {
  // a scanned record code carries the version ("HWL-2026-0042;v3")
  const key = raw.trim().replace(/;v\d+$/i, '');
  if (!key || key.length > 200) throw AppError.notFound(`Identifier ${raw}`);
  if (parsePreparationId(key)) {
    const p = await Preparation.findOne({ where: { identifier: key } });
    if (p) return { subject: { type: 'preparation', id: p.id, identifier: p.identifier, label: prepLabel(p) }, preparation: p };
  }
  const balance = await Balance.findOne({ where: { identifier: key } });
  if (balance) return { subject: { type: 'balance', id: balance.id, identifier: balance.identifier, label: `${balance.identifier} ${balance.description}` }, balance };
  const ware = await VolumetricWare.findOne({ where: { identifier: key } });
  if (ware) return { subject: { type: 'volumetric_ware', id: ware.id, identifier: ware.identifier, label: `${ware.identifier} ${ware.nominalVolumeMl} mL ${ware.kind.replace(/_/g, ' ')}` }, ware };
  const materials = await ReferenceMaterial.findAll({ where: { lot: key }, order: [['id', 'ASC']] });
  const solvents = await Solvent.findAll({ where: { lot: key }, order: [['id', 'ASC']] });
  if (materials.length + solvents.length > 1) {
    throw new AppError('ambiguous_identifier', 409, `${key} is the lot of ${materials.length + solvents.length} inventory items (${[...materials.map((m) => m.name), ...solvents.map((s) => s.name)].join(', ')}); trace one of their preparations instead`);
  }
  const m = materials[0];
  if (m) return { subject: { type: 'material_lot', id: m.id, identifier: m.lot, label: `${m.name} lot ${m.lot}` }, material: m };
  const s = solvents[0];
  if (s) return { subject: { type: 'solvent_lot', id: s.id, identifier: s.lot, label: `${s.name} lot ${s.lot}` }, solvent: s };
  throw AppError.notFound(`Identifier ${key}`);
}

// ------------------------------------------------------------------ nodes

function preparationNode(g: Graph, p: Preparation): string {
  return g.node({
    id: nodeId('preparation', p.id),
    type: 'preparation',
    label: prepLabel(p),
    status: p.status,
    detail: {
      identifier: p.identifier,
      kind: kindOf(p),
      version: p.version,
      materialName: p.snapshotMaterial.name,
      analyteFormula: p.analyteFormula,
      concentrationDisplay: p.concentrationDisplay,
      createdAt: p.createdAt,
      expiresOn: p.expiresOn,
    },
  });
}

async function usersMap(ids: number[]): Promise<Map<number, User>> {
  const unique = [...new Set(ids)];
  if (!unique.length) return new Map();
  return new Map((await User.findAll({ where: { id: unique } })).map((u) => [u.id, u]));
}

function userNode(g: Graph, users: Map<number, User>, id: number, fallbackName?: string): string {
  const u = users.get(id);
  return g.node({
    id: nodeId('user', id),
    type: 'user',
    label: u?.fullName ?? fallbackName ?? `user ${id}`,
    status: u ? (u.active ? 'active' : 'deactivated') : 'unknown',
    detail: { initials: u?.initials ?? null, role: u?.role ?? null },
  });
}

// ------------------------------------------------------------------ backward

interface BackwardResult {
  graph: TraceGraph;
  rows: TraceReportRow[];
}

/** Backward trace of one preparation (recursively through its parents), with the report rows. */
async function backwardOf(root: Preparation, timeZone: string): Promise<BackwardResult> {
  const g = new Graph();
  const rows: TraceReportRow[] = [];
  const seen = new Set<number>();
  const queue: Array<{ p: Preparation; level: number; statusWhenUsed: string; usedAt: string | null; relation: string }> = [
    { p: root, level: 0, statusWhenUsed: root.status, usedAt: root.createdAt, relation: 'the standard' },
  ];
  while (queue.length) {
    const { p, level, statusWhenUsed, usedAt, relation } = queue.shift()!;
    if (seen.has(p.id)) continue;
    seen.add(p.id);
    const pid = preparationNode(g, p);
    rows.push({
      level,
      link: 'preparation',
      identifier: p.identifier,
      description: prepLabel(p),
      relation,
      usedAt,
      statusWhenUsed,
      statusNow: p.status,
      detail: `version ${p.version}; planned ${p.createdAt}; expires ${p.expiresOn}`,
    });
    const day = (iso: string) => labDate(new Date(iso), timeZone);

    const [weighings, makeUps, signatures, links] = await Promise.all([
      Weighing.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
      MakeUp.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
      Signature.findAll({ where: { preparationId: p.id }, order: [['id', 'ASC']] }),
      parentLinks('preparation_id', [p.id]),
    ]);
    const users = await usersMap([p.createdBy, ...weighings.map((w) => w.recordedBy), ...makeUps.map((m) => m.recordedBy), ...signatures.map((s) => s.signerId)]);

    // material lot and certificate versions (stock standards; a dilution's analyte comes from its parents)
    if (links.length === 0) {
      const m = p.snapshotMaterial;
      const current = await ReferenceMaterial.findByPk(m.id);
      const mid = g.node({
        id: nodeId('material_lot', m.id),
        type: 'material_lot',
        label: `${m.name} lot ${m.lot}`,
        status: plainStatus(m.status),
        detail: { identifier: m.lot, name: m.name, producer: m.producer, grade: m.grade, certificateNumber: m.certificateNumber, expiresOnAtUse: m.expiresOn, statusNow: current ? plainStatus(current.status) : 'unknown' },
      });
      const statusAtUse = `${plainStatus(m.status)}; lot expires ${m.expiresOn ?? '—'}`;
      g.edge({ from: mid, to: pid, relation: 'analyte source', at: p.createdAt, statusAtUse });
      rows.push({
        level,
        link: 'material_lot',
        identifier: m.lot,
        description: `${m.name} (${m.producer}${m.certificateNumber ? `, certificate ${m.certificateNumber}` : ''})`,
        relation: 'analyte source',
        usedAt: p.createdAt,
        statusWhenUsed: statusAtUse,
        statusNow: current ? plainStatus(current.status) : 'unknown',
        detail: `purity ${m.purity.value}${m.purity.expandedUncertainty ? ` ± ${m.purity.expandedUncertainty} (k = ${m.purity.k ?? '2'})` : ''}`,
      });
      const certs = await MaterialCertificate.findAll({ where: { materialId: m.id, uploadedAt: { [Op.lte]: p.createdAt } }, order: [['version', 'ASC']] });
      const latest = certs.at(-1)?.id;
      for (const c of certs) {
        const inForce = c.id === latest ? 'current when used' : 'earlier version';
        const cid = g.node({
          id: nodeId('certificate', c.id),
          type: 'certificate',
          label: `Certificate v${c.version} of ${m.name} lot ${m.lot}`,
          status: inForce,
          detail: { identifier: `${m.lot} certificate v${c.version}`, version: c.version, originalName: c.originalName, sha256: c.sha256, uploadedAt: c.uploadedAt },
        });
        g.edge({ from: cid, to: mid, relation: 'certificate', at: c.uploadedAt, statusAtUse: inForce });
        rows.push({
          level,
          link: 'certificate',
          identifier: `${m.lot} v${c.version}`,
          description: c.originalName,
          relation: 'certificate',
          usedAt: c.uploadedAt,
          statusWhenUsed: inForce,
          statusNow: 'on file',
          detail: `sha256 ${c.sha256}`,
        });
      }
    }

    // balances, with their status at the weighing (from the snapshot stored then)
    const superseded = new Set(weighings.map((w) => w.supersedesId).filter((x): x is number => x !== null));
    for (const w of weighings) {
      const b = w.balanceSnapshot;
      const current = await Balance.findByPk(w.balanceId);
      const statusAtUse = balanceStatusOn(b, day(w.recordedAt));
      const bid = g.node({
        id: nodeId('balance', w.balanceId),
        type: 'balance',
        label: `${b.identifier} ${b.description}`,
        status: statusAtUse,
        detail: { identifier: b.identifier, calibratedOn: b.calibratedOn, calibrationDueOn: b.calibrationDueOn, readabilityMg: b.readabilityMg, statusNow: current ? balanceStatusOn(balanceFields(current), labDate(new Date(), timeZone)) : 'unknown' },
      });
      const rel = superseded.has(w.id) ? 'weighed on (superseded weighing)' : 'weighed on';
      g.edge({ from: bid, to: pid, relation: rel, at: w.recordedAt, statusAtUse });
      g.edge({ from: userNode(g, users, w.recordedBy), to: pid, relation: 'weighed by', at: w.recordedAt });
      rows.push({
        level,
        link: 'balance',
        identifier: b.identifier,
        description: b.description,
        relation: rel,
        usedAt: w.recordedAt,
        statusWhenUsed: statusAtUse,
        statusNow: current ? balanceStatusOn(balanceFields(current), labDate(new Date(), timeZone)) : 'unknown',
        detail: `weighing ${w.id}: net ${w.netMg} mg${w.inWindow ? '' : ' (outside the window)'}`,
      });
    }

    // flask and solvent lot of each make-up; the planned flask when not made up yet
    const madeUp = new Set(makeUps.map((m) => m.supersedesId).filter((x): x is number => x !== null));
    const latestMakeUp = makeUps.at(-1)?.id;
    for (const mu of makeUps) {
      const f = mu.flaskSnapshot;
      const older = mu.id !== latestMakeUp || madeUp.has(mu.id) ? ' (earlier make-up)' : '';
      const currentFlask = await VolumetricWare.findByPk(mu.flaskId);
      const fid = g.node({
        id: nodeId('volumetric_ware', mu.flaskId),
        type: 'volumetric_ware',
        label: `${f.identifier} ${f.nominalVolumeMl} mL ${String(f.kind).replace(/_/g, ' ')}`,
        status: wareStatus(f),
        detail: { identifier: f.identifier, nominalVolumeMl: f.nominalVolumeMl, class: f.class, toleranceMl: f.toleranceMl, statusNow: currentFlask ? wareStatus({ status: currentFlask.status, class: currentFlask.wareClass }) : 'unknown' },
      });
      g.edge({ from: fid, to: pid, relation: `made up in${older}`, at: mu.recordedAt, statusAtUse: wareStatus(f) });
      await traceVolumeCheck(g, fid, mu.flaskId, mu.recordedAt, f.calibratedVolume ? { calibratedVolume: f.calibratedVolume, preparationNodeId: pid, what: `flask${older}` } : undefined);
      rows.push({
        level,
        link: 'volumetric_ware',
        identifier: f.identifier,
        description: `${f.nominalVolumeMl} mL ${String(f.kind).replace(/_/g, ' ')}`,
        relation: `made up in${older}`,
        usedAt: mu.recordedAt,
        statusWhenUsed: wareStatus(f),
        statusNow: currentFlask ? wareStatus({ status: currentFlask.status, class: currentFlask.wareClass }) : 'unknown',
        detail: `tolerance ${f.toleranceMl ?? '—'} mL${f.calibratedVolume ? `; calibrated volume used, from ${f.calibratedVolume.checkIdentifier}` : ''}${mu.substituted ? '; substituted for the planned flask' : ''}`,
      });
      const s = mu.solventSnapshot;
      const currentSolvent = await Solvent.findByPk(mu.solventId);
      const solventStatus = `${plainStatus(s.status)}; lot expires ${s.expiresOn ?? '—'}`;
      const sid = g.node({
        id: nodeId('solvent_lot', mu.solventId),
        type: 'solvent_lot',
        label: `${s.name} lot ${mu.solventLot}`,
        status: solventStatus,
        detail: { identifier: mu.solventLot, name: s.name, grade: s.grade, statusNow: currentSolvent ? plainStatus(currentSolvent.status) : 'unknown' },
      });
      g.edge({ from: sid, to: pid, relation: `solvent${older}`, at: mu.recordedAt, statusAtUse: solventStatus });
      g.edge({ from: userNode(g, users, mu.recordedBy), to: pid, relation: 'made up by', at: mu.recordedAt });
      rows.push({
        level,
        link: 'solvent_lot',
        identifier: mu.solventLot,
        description: `${s.name}${s.grade ? ` (${s.grade})` : ''}`,
        relation: `solvent${older}`,
        usedAt: mu.recordedAt,
        statusWhenUsed: solventStatus,
        statusNow: currentSolvent ? plainStatus(currentSolvent.status) : 'unknown',
        detail: `made up at ${mu.solutionTemperatureC} °C`,
      });
    }
    if (!makeUps.length && p.snapshotFlask) {
      const f = p.snapshotFlask;
      const fid = g.node({
        id: nodeId('volumetric_ware', f.id),
        type: 'volumetric_ware',
        label: `${f.identifier} ${f.nominalVolumeMl} mL ${String(f.kind).replace(/_/g, ' ')}`,
        status: wareStatus(f),
        detail: { identifier: f.identifier, nominalVolumeMl: f.nominalVolumeMl, class: f.class },
      });
      g.edge({ from: fid, to: pid, relation: 'planned flask (not made up yet)', at: p.createdAt, statusAtUse: wareStatus(f) });
    }

    // people
    const planner = userNode(g, users, p.createdBy);
    g.edge({ from: planner, to: pid, relation: 'planned by', at: p.createdAt });
    for (const s of signatures) {
      g.edge({ from: userNode(g, users, s.signerId, s.signerName), to: pid, relation: `signed ${s.meaning} (v${s.recordVersion})`, at: s.signedAt });
    }
    rows.push({
      level,
      link: 'user',
      identifier: users.get(p.createdBy)?.initials ?? String(p.createdBy),
      description: users.get(p.createdBy)?.fullName ?? `user ${p.createdBy}`,
      relation: 'planned by',
      usedAt: p.createdAt,
      statusWhenUsed: 'preparer',
      statusNow: users.get(p.createdBy)?.active === false ? 'deactivated' : 'active',
      detail: '',
    });
    for (const s of signatures) {
      rows.push({
        level,
        link: 'user',
        identifier: users.get(s.signerId)?.initials ?? String(s.signerId),
        description: s.signerName,
        relation: `signed ${s.meaning}`,
        usedAt: s.signedAt,
        statusWhenUsed: `signature on version ${s.recordVersion}`,
        statusNow: s.recordVersion === p.version ? 'applies to the current version' : `superseded: applied to v${s.recordVersion}`,
        detail: s.meaningText,
      });
    }

    // parents of a dilution, with the aliquot pipette
    for (const link of links) {
      const parent = await Preparation.findByPk(link.parentId);
      if (!parent) continue;
      const parentNode = preparationNode(g, parent);
      const parentStatusThen = typeof link.snapshot?.status === 'string' ? (link.snapshot.status as string) : 'not recorded';
      g.edge({ from: parentNode, to: pid, relation: 'diluted into', at: p.createdAt, statusAtUse: parentStatusThen });
      if (link.aliquotWareId !== null) {
        const pip = await VolumetricWare.findByPk(link.aliquotWareId);
        const snap = (link.snapshot?.aliquotWare ?? link.snapshot?.pipette ?? null) as Partial<WareDto> | null;
        const identifier = snap?.identifier ?? pip?.identifier ?? `ware ${link.aliquotWareId}`;
        const statusAtUse = snap?.status ? wareStatus({ status: snap.status, class: snap.class ?? '—' } as WareDto) : 'not recorded';
        const wid = g.node({
          id: nodeId('volumetric_ware', link.aliquotWareId),
          type: 'volumetric_ware',
          label: `${identifier}${pip ? ` ${pip.nominalVolumeMl} mL ${pip.kind.replace(/_/g, ' ')}` : ''}`,
          status: statusAtUse,
          detail: { identifier, statusNow: pip ? wareStatus({ status: pip.status, class: pip.wareClass }) : 'unknown' },
        });
        g.edge({ from: wid, to: pid, relation: 'aliquot pipette', at: p.createdAt, statusAtUse });
        await traceVolumeCheck(g, wid, link.aliquotWareId, p.createdAt);
        rows.push({
          level,
          link: 'volumetric_ware',
          identifier,
          description: pip ? `${pip.nominalVolumeMl} mL ${pip.kind.replace(/_/g, ' ')}` : 'aliquot ware',
          relation: 'aliquot pipette',
          usedAt: p.createdAt,
          statusWhenUsed: statusAtUse,
          statusNow: pip ? wareStatus({ status: pip.status, class: pip.wareClass }) : 'unknown',
          detail: `aliquot of ${parent.identifier}`,
        });
      }
      queue.push({ p: parent, level: level + 1, statusWhenUsed: parentStatusThen, usedAt: p.createdAt, relation: `parent of ${p.identifier}` });
    }
    // the pipette actually used at the bench for each aliquot (dilution_aliquots, with its snapshot then)
    const delivered = await aliquots('preparation_id', [p.id]);
    const benchUsers = await usersMap(delivered.map((a) => a.recordedBy));
    for (const a of delivered) {
      const snap = (a.pipetteSnapshot ?? {}) as Partial<WareDto>;
      const pip = await VolumetricWare.findByPk(a.pipetteId);
      const statusAtUse = snap.status ? wareStatus({ status: snap.status, class: snap.class ?? '—' } as WareDto) : 'not recorded';
      const statusNow = pip ? wareStatus({ status: pip.status, class: pip.wareClass }) : 'unknown';
      const wid = g.node({
        id: nodeId('volumetric_ware', a.pipetteId),
        type: 'volumetric_ware',
        label: `${a.pipetteIdentifier}${snap.nominalVolumeMl ? ` ${snap.nominalVolumeMl} mL ${String(snap.kind ?? '').replace(/_/g, ' ')}` : ''}`.trim(),
        status: statusAtUse,
        detail: { identifier: a.pipetteIdentifier, statusNow },
      });
      g.edge({ from: wid, to: pid, relation: 'aliquot delivered with', at: a.recordedAt, statusAtUse });
      if (snap.calibratedVolume) await traceVolumeCheck(g, wid, a.pipetteId, a.recordedAt, { calibratedVolume: snap.calibratedVolume, preparationNodeId: pid, what: `aliquot ${a.id}` });
      g.edge({ from: userNode(g, benchUsers, a.recordedBy), to: pid, relation: 'aliquot delivered by', at: a.recordedAt });
      rows.push({
        level,
        link: 'volumetric_ware',
        identifier: a.pipetteIdentifier,
        description: `aliquot ${a.volumeMl} mL`,
        relation: 'aliquot delivered with',
        usedAt: a.recordedAt,
        statusWhenUsed: statusAtUse,
        statusNow,
        detail: `aliquot ${a.id}${snap.calibratedVolume ? `; calibrated volume used, from ${snap.calibratedVolume.checkIdentifier}` : ''}`,
      });
    }
  }
  return { graph: g.toJSON(), rows };
}

const balanceFields = (b: Balance) => ({ status: b.status, calibratedOn: b.calibratedOn, calibrationDueOn: b.calibrationDueOn });

// ------------------------------------------------------------------ forward

interface Use {
  preparationId: number;
  at: string;
  relation: string;
  statusAtUse?: string;
}

interface ForwardResult {
  graph: TraceGraph;
  /** every preparation reached, except the subject itself, oldest first */
  preparationIds: number[];
}

/** Non-superseded rows of an append-only table (a correction names the row it supersedes). */
function standing<T extends { id: number; supersedesId: number | null }>(rows: T[]): T[] {
  const superseded = new Set(rows.map((r) => r.supersedesId).filter((x): x is number => x !== null));
  return rows.filter((r) => !superseded.has(r.id));
}

/**
 * A use-time range in lab dates as a UTC window for SQL, one day wider on each side (any time zone is within
 * ±14 h of UTC); the exact lab-date test stays in forwardOf. Lets the indexes read only the rows near the range.
 */
function utcWindow(range: { from: string | null; to: string | null }, column: string): Record<string, unknown> {
  const cond: Record<symbol, string> = {};
  if (range.from) cond[Op.gte] = addDays(range.from, -1);
  if (range.to) cond[Op.lt] = addDays(range.to, 2);
  return Object.getOwnPropertySymbols(cond).length ? { [column]: cond } : {};
}

/** The latest standing make-up per preparation. */
async function latestMakeUps(where: Record<string, unknown>): Promise<MakeUp[]> {
  const rows = await MakeUp.findAll({ where, order: [['id', 'ASC']] });
  const all = await MakeUp.findAll({ where: { preparationId: [...new Set(rows.map((r) => r.preparationId))] }, order: [['id', 'ASC']] });
  const latest = new Map<number, number>();
  for (const m of all) latest.set(m.preparationId, m.id);
  return rows.filter((r) => latest.get(r.preparationId) === r.id);
}

async function directUses(r: Resolved, timeZone: string, range: { from: string | null; to: string | null }): Promise<Use[]> {
  const day = (iso: string) => labDate(new Date(iso), timeZone);
  switch (r.subject.type) {
    case 'balance': {
      const used = await Weighing.findAll({ where: { balanceId: r.subject.id, ...utcWindow(range, 'recordedAt') }, attributes: ['preparationId'] });
      // every weighing of those preparations (a later correction on another balance supersedes this one)
      const ws = standing(await Weighing.findAll({ where: { preparationId: [...new Set(used.map((w) => w.preparationId))] }, order: [['id', 'ASC']] }));
      return ws.filter((w) => w.balanceId === r.subject.id).map((w) => ({ preparationId: w.preparationId, at: w.recordedAt, relation: 'weighed on', statusAtUse: balanceStatusOn(w.balanceSnapshot, day(w.recordedAt)) }));
    }
    case 'material_lot': {
      const ps = await Preparation.findAll({ attributes: ['id', 'createdAt', 'snapshotMaterial'], where: { materialId: r.subject.id, ...utcWindow(range, 'createdAt') }, order: [['id', 'ASC']] });
      const dilutions = new Set((await parentLinks('preparation_id', ps.map((p) => p.id))).map((l) => l.preparationId));
      return ps
        .filter((p) => !dilutions.has(p.id))
        .map((p) => ({ preparationId: p.id, at: p.createdAt, relation: 'analyte source', statusAtUse: `${plainStatus(p.snapshotMaterial.status)}; lot expires ${p.snapshotMaterial.expiresOn ?? '—'}` }));
    }
    case 'volumetric_ware': {
      const made = (await latestMakeUps({ flaskId: r.subject.id, ...utcWindow(range, 'recordedAt') })).map((m) => ({ preparationId: m.preparationId, at: m.recordedAt, relation: 'made up in', statusAtUse: wareStatus(m.flaskSnapshot) }));
      const links = await parentLinks('aliquot_ware_id', [r.subject.id]);
      const children = links.length ? await Preparation.findAll({ where: { id: links.map((l) => l.preparationId) } }) : [];
      const pipetted = children.map((c) => ({ preparationId: c.id, at: c.createdAt, relation: 'aliquot pipette' }));
      const delivered = (await aliquots('pipette_id', [r.subject.id])).map((a) => ({
        preparationId: a.preparationId,
        at: a.recordedAt,
        relation: 'aliquot delivered with',
        statusAtUse: typeof a.pipetteSnapshot?.status === 'string' ? plainStatus(a.pipetteSnapshot.status as string) : 'not recorded',
      }));
      return [...made, ...pipetted, ...delivered];
    }
    case 'solvent_lot': {
      return (await latestMakeUps({ solventId: r.subject.id, ...utcWindow(range, 'recordedAt') })).map((m) => ({ preparationId: m.preparationId, at: m.recordedAt, relation: 'solvent', statusAtUse: `${plainStatus(m.solventSnapshot.status)}; lot expires ${m.solventSnapshot.expiresOn ?? '—'}` }));
    }
    case 'preparation': {
      const links = await parentLinks('parent_preparation_id', [r.subject.id]);
      const children = links.length ? await Preparation.findAll({ where: { id: links.map((l) => l.preparationId) } }) : [];
      return children.map((c) => ({ preparationId: c.id, at: c.createdAt, relation: 'diluted into' }));
    }
  }
}

function subjectNode(g: Graph, r: Resolved, timeZone: string): string {
  if (r.preparation) return preparationNode(g, r.preparation);
  const s = r.subject;
  const status = r.balance
    ? balanceStatusOn(balanceFields(r.balance), labDate(new Date(), timeZone)) // today on the lab's calendar
    : r.ware
      ? wareStatus({ status: r.ware.status, class: r.ware.wareClass })
      : plainStatus((r.material ?? r.solvent)?.status);
  const detail: Record<string, unknown> = { identifier: s.identifier };
  if (r.balance) Object.assign(detail, { calibratedOn: r.balance.calibratedOn, calibrationDueOn: r.balance.calibrationDueOn });
  return g.node({ id: nodeId(s.type, s.id), type: s.type, label: s.label, status: `${status} (now)`, detail });
}

async function forwardOf(r: Resolved, range: { from: string | null; to: string | null }, timeZone: string): Promise<ForwardResult> {
  const g = new Graph();
  const root = subjectNode(g, r, timeZone);
  const inRange = (at: string) => {
    const d = labDate(new Date(at), timeZone);
    return (!range.from || d >= range.from) && (!range.to || d <= range.to);
  };
  const uses = (await directUses(r, timeZone, range)).filter((u) => inRange(u.at));
  const reached: number[] = [];
  const seen = new Set<number>(r.preparation ? [r.preparation.id] : []);
  const load = async (ids: number[]) => new Map((ids.length ? await Preparation.findAll({ where: { id: ids } }) : []).map((p) => [p.id, p]));

  const first = await load([...new Set(uses.map((u) => u.preparationId))]);
  let frontier: number[] = [];
  for (const u of uses) {
    const p = first.get(u.preparationId);
    if (!p) continue;
    const pid = preparationNode(g, p);
    g.edge({ from: root, to: pid, relation: u.relation, at: u.at, ...(u.statusAtUse ? { statusAtUse: u.statusAtUse } : {}) });
    if (!seen.has(p.id)) {
      seen.add(p.id);
      reached.push(p.id);
      frontier.push(p.id);
    }
  }
  // everything made from those, recursively (no date limit: a child inherits its parent's problem)
  while (frontier.length) {
    const links = await parentLinks('parent_preparation_id', frontier);
    const children = await load([...new Set(links.map((l) => l.preparationId))]);
    const parents = await load([...new Set(links.map((l) => l.parentId))]);
    frontier = [];
    for (const l of links) {
      const child = children.get(l.preparationId);
      const parent = parents.get(l.parentId);
      if (!child || !parent) continue;
      g.edge({ from: preparationNode(g, parent), to: preparationNode(g, child), relation: 'diluted into', at: child.createdAt });
      if (!seen.has(child.id)) {
        seen.add(child.id);
        reached.push(child.id);
        frontier.push(child.id);
      }
    }
  }
  // label prints of everything reached (and of the subject standard itself)
  const labelled = [...(r.preparation ? [r.preparation.id] : []), ...reached];
  if (labelled.length) {
    const prints = await LabelPrint.findAll({ where: { preparationId: labelled }, order: [['id', 'ASC']] });
    const byId = await load([...new Set(prints.map((lp) => lp.preparationId))]);
    for (const lp of prints) {
      const p = byId.get(lp.preparationId);
      if (!p) continue;
      const lid = g.node({
        id: nodeId('label_print', lp.id),
        type: 'label_print',
        label: `${lp.copies} label${lp.copies === 1 ? '' : 's'} of ${p.identifier} v${lp.preparationVersion}${lp.isReprint ? ` (reprint ${lp.number - 1})` : ''}`,
        status: `printed while ${lp.statusAtPrint}`,
        detail: { identifier: `${p.identifier} print ${lp.number}`, copies: lp.copies, number: lp.number, printedBy: lp.printedByName, printedAt: lp.printedAt, reason: lp.reason },
      });
      g.edge({ from: preparationNode(g, p), to: lid, relation: 'labels printed', at: lp.printedAt });
    }
  }
  const order = await load(reached);
  const sorted = [...reached].sort((a, b) => (order.get(a)!.createdAt < order.get(b)!.createdAt ? -1 : order.get(a)!.createdAt > order.get(b)!.createdAt ? 1 : a - b));
  return { graph: g.toJSON(), preparationIds: sorted };
}

// ------------------------------------------------------------------ public

/** The use-time range after `sinceLastGoodCheck` (balances only: from its last calibration date). */
function rangeOf(r: Resolved, q: Pick<TraceQuery, 'from' | 'to' | 'sinceLastGoodCheck'>): { from: string | null; to: string | null } {
  let from = q.from ?? null;
  if (q.sinceLastGoodCheck) {
    if (!r.balance) throw AppError.validation('"Since last good check" applies to a balance only', { sinceLastGoodCheck: '"Since last good check" applies to a balance only' });
    if (!r.balance.calibratedOn) {
      const message = `${r.balance.identifier} has no calibration date on record; give a "from" date instead`;
      throw AppError.validation(message, { sinceLastGoodCheck: message });
    }
    from = r.balance.calibratedOn;
  }
  return { from, to: q.to ?? null };
}

/**
 * Signed records whose data differ from what was signed show as seal_broken (record-integrity.ts): the row check
 * for every standard in the trace, the full check for the traced standard itself.
 */
async function sealBrokenOf(identifiers: string[], root?: Preparation): Promise<Map<string, SealBroken>> {
  const unique = [...new Set(identifiers)];
  if (!unique.length) return new Map();
  const ps = await Preparation.findAll({ where: { identifier: unique } });
  const states = await sealStates(ps, shownColumns);
  const out = new Map(ps.filter((p) => states.has(p.id)).map((p) => [p.identifier, states.get(p.id)!]));
  const full = root ? await recordSeal(root) : null;
  if (root && full) out.set(root.identifier, full);
  return out;
}

function markSealBroken(nodes: TraceNode[], broken: Map<string, SealBroken>): void {
  for (const n of nodes) {
    const b = n.type === 'preparation' ? broken.get(String(n.detail.identifier)) : undefined;
    if (b) {
      n.status = SEAL_BROKEN;
      n.detail.sealBroken = b;
    }
  }
}

/** GET /api/trace/:identifier */
export async function trace(identifier: string, q: TraceQuery): Promise<TraceResponse> {
  const r = await resolveSubject(identifier);
  const range = rangeOf(r, q);
  const { timeZone } = await getSettings();
  const forward = await forwardOf(r, range, timeZone);
  const backward = r.preparation ? (await backwardOf(r.preparation, timeZone)).graph : { nodes: [], edges: [] };
  const prepIds = forward.preparationIds;
  const identifiers = prepIds.length ? new Map((await Preparation.findAll({ where: { id: prepIds }, attributes: ['id', 'identifier'] })).map((p) => [p.id, p.identifier])) : new Map<number, string>();
  const nodes = [...backward.nodes, ...forward.graph.nodes];
  markSealBroken(nodes, await sealBrokenOf(nodes.filter((n) => n.type === 'preparation').map((n) => String(n.detail.identifier)), r.preparation));
  return { subject: r.subject, range, backward, forward: forward.graph, forwardPreparations: prepIds.map((id) => identifiers.get(id)!) };
}

/** Rows of the traceability report of one standard (the whole backward chain, each link's status when used). */
export async function traceReport(identifier: string): Promise<{ subject: TraceSubject; preparation: Preparation; rows: TraceReportRow[]; labDateTimeZone: string; labName: string }> {
  const r = await resolveSubject(identifier);
  if (!r.preparation) {
    const message = `The traceability report is for one standard; ${r.subject.identifier} is a ${SUBJECT_WORD[r.subject.type]}. Trace it, then open one of its standards.`;
    throw AppError.validation(message, { identifier: message });
  }
  const settings = await getSettings();
  const { rows } = await backwardOf(r.preparation, settings.timeZone);
  const broken = await sealBrokenOf(rows.filter((x) => x.link === 'preparation').map((x) => x.identifier), r.preparation);
  for (const x of rows) if (x.link === 'preparation' && broken.has(x.identifier)) x.statusNow = SEAL_BROKEN; // the CSV and PDF say so
  return { subject: r.subject, preparation: r.preparation, rows, labDateTimeZone: settings.timeZone, labName: settings.labName };
}

async function recordReportExport(actor: Actor, p: Preparation, format: 'pdf' | 'csv'): Promise<void> {
  await writeTransaction((transaction) =>
    recordAudit(
      {
        actor,
        action: 'export',
        entity: 'preparation',
        entityId: p.id,
        changes: [
          { field: 'kind', oldValue: null, newValue: `traceability_report_${format}` },
          { field: 'version', oldValue: null, newValue: p.version },
        ],
      },
      transaction,
    ),
  );
}

/** GET /api/trace/:identifier/report.pdf (each report served is audited as an export). */
export async function traceReportPdf(identifier: string, actor: Actor): Promise<{ pdf: Buffer; filename: string }> {
  const { subject, preparation, rows, labDateTimeZone, labName } = await traceReport(identifier);
  const pdf = await renderTraceabilityReport({
    lab: { name: labName, timeZone: labDateTimeZone },
    subject,
    status: rows[0]?.statusNow ?? preparation.status,
    version: preparation.version,
    rows,
    generatedAt: new Date().toISOString(),
    generatedBy: actor.fullName,
  });
  await recordReportExport(actor, preparation, 'pdf');
  return { pdf, filename: `${preparation.identifier}-v${preparation.version}-traceability.pdf` };
}

/** GET /api/trace/:identifier/report.csv: one row per link, columns TRACE_REPORT_COLUMNS. */
export async function traceReportCsv(identifier: string, actor: Actor): Promise<{ csv: string; filename: string }> {
  const { preparation, rows } = await traceReport(identifier);
  const lines = [
    csvLine([...TRACE_REPORT_COLUMNS]),
    ...rows.map((r) => csvLine([r.level, r.link, r.identifier, r.description, r.relation, r.usedAt ?? '', r.statusWhenUsed, r.statusNow, r.detail])),
  ];
  await recordReportExport(actor, preparation, 'csv');
  return { csv: lines.join(''), filename: `${preparation.identifier}-v${preparation.version}-traceability.csv` };
}

/** What a flag names as its origin, e.g. "balance BAL-A2, used 2026-11-01 to 2026-11-30". */
function sourceText(r: Resolved, range: { from: string | null; to: string | null }): string {
  const span = range.from && range.to ? `, used ${range.from} to ${range.to}` : range.from ? `, used since ${range.from}` : range.to ? `, used up to ${range.to}` : '';
  return `${SUBJECT_WORD[r.subject.type]} ${r.subject.identifier}${span}`;
}

/** POST /api/trace/:identifier/review-flags: one flag and one audit entry per record, in one transaction. */
export async function flagForReview(identifier: string, input: ReviewFlagsInput, actor: Actor): Promise<ReviewFlagsCreated> {
  const r = await resolveSubject(identifier);
  const range = rangeOf(r, input);
  const { timeZone } = await getSettings();
  const source = sourceText(r, range);
  return writeTransaction(async (transaction) => {
    // computed inside the write lock, so the set flagged is the set that exists at commit
    const { preparationIds } = await forwardOf(r, range, timeZone);
    if (!preparationIds.length) {
      throw new AppError('nothing_to_flag', 409, `Nothing was made from ${r.subject.identifier}${range.from || range.to ? ' in that date range' : ''}, so there is nothing to flag`);
    }
    const preps = new Map((await Preparation.findAll({ where: { id: preparationIds }, transaction })).map((p) => [p.id, p]));
    const now = new Date().toISOString();
    const identifiers: string[] = [];
    for (const id of preparationIds) {
      const p = preps.get(id)!;
      await sequelize().query(
        `INSERT INTO review_flags (preparation_id, source_preparation_id, reason, flagged_at, source, trace_subject, trace_from, trace_to, flagged_by, flagged_by_name)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
        { replacements: [p.id, r.preparation?.id ?? null, input.reason, now, source, r.subject.identifier, range.from, range.to, actor.id, actor.fullName], transaction },
      );
      await recordAudit(
        {
          actor,
          action: 'flag_for_review',
          entity: 'preparation',
          entityId: p.id,
          changes: [
            { field: 'reviewFlag', oldValue: null, newValue: input.reason },
            { field: 'reviewFlag.source', oldValue: null, newValue: source },
          ],
          reason: input.reason,
        },
        transaction,
      );
      identifiers.push(p.identifier);
    }
    return { flagged: identifiers.length, identifiers, source };
  });
}

interface FlagRow {
  id: number;
  reason: string;
  source: string | null;
  source_preparation_id: number | null;
  flagged_at: string;
  flagged_by: number | null;
  flagged_by_name: string | null;
  cleared_at: string | null;
  cleared_by: number | null;
  cleared_by_name: string | null;
  cleared_reason: string | null;
}

/** GET /api/preparations/:key/review-flags: every flag on the record, newest first. */
export async function reviewFlagsOf(key: string): Promise<ReviewFlagList> {
  let p: Preparation | null = null;
  if (/^[1-9]\d{0,15}$/.test(key)) p = await Preparation.findByPk(Number(key));
  else if (parsePreparationId(key)) p = await Preparation.findOne({ where: { identifier: key } });
  if (!p) throw AppError.notFound(`Preparation ${key}`);
  const rows = await sequelize().query<FlagRow>(
    `SELECT f.id, f.reason, f.source, f.source_preparation_id, f.flagged_at, f.flagged_by, f.flagged_by_name, f.cleared_at, f.cleared_by, f.cleared_by_name, f.cleared_reason
     FROM review_flags f WHERE f.preparation_id = ? ORDER BY f.id DESC`,
    { type: QueryTypes.SELECT, replacements: [p.id] },
  );
  const sources = new Map(
    (await Preparation.findAll({ where: { id: [...new Set(rows.map((f) => f.source_preparation_id).filter((x): x is number => x !== null))] }, attributes: ['id', 'identifier'] })).map((s) => [s.id, s.identifier]),
  );
  const items: ReviewFlagDto[] = rows.map((f) => ({
    id: f.id,
    reason: f.reason,
    source: f.source ?? (f.source_preparation_id !== null ? `standard ${sources.get(f.source_preparation_id) ?? f.source_preparation_id}` : null),
    flaggedAt: f.flagged_at,
    flaggedBy: f.flagged_by !== null ? { id: f.flagged_by, fullName: f.flagged_by_name ?? `user ${f.flagged_by}` } : null,
    cleared: f.cleared_at && f.cleared_by !== null ? { at: f.cleared_at, by: { id: f.cleared_by, fullName: f.cleared_by_name ?? `user ${f.cleared_by}` }, reason: f.cleared_reason ?? '' } : null,
  }));
  return { items };
}

// ------------------------------------------------------------------ forward report (recall)

/**
 * One row per preparation the forward trace reaches, in the order of `forwardPreparations`: what it is, its
 * status today, how the trace reached it and how many labels were printed (where the recall must look).
 */
export async function forwardReport(identifier: string, q: TraceQuery): Promise<{ subject: TraceSubject; range: { from: string | null; to: string | null }; rows: ForwardReportRow[]; timeZone: string; labName: string }> {
  const r = await resolveSubject(identifier);
  const range = rangeOf(r, q);
  const settings = await getSettings();
  const { graph, preparationIds } = await forwardOf(r, range, settings.timeZone);
  const preps = new Map((preparationIds.length ? await Preparation.findAll({ where: { id: preparationIds } }) : []).map((p) => [p.id, p]));
  const byId = new Map(graph.nodes.map((n) => [n.id, n]));
  const today = labDate(new Date(), settings.timeZone);
  const rows = preparationIds.map((id): ForwardReportRow => {
    const p = preps.get(id)!;
    const nid = nodeId('preparation', id);
    const via = graph.edges.filter((e) => e.to === nid && byId.get(e.from)?.type !== 'label_print');
    const prints = graph.edges.filter((e) => e.from === nid && byId.get(e.to)?.type === 'label_print').map((e) => byId.get(e.to)!);
    const from = (e: TraceEdge) => {
      const n = byId.get(e.from);
      const d = n?.detail as { identifier?: unknown } | undefined;
      return typeof d?.identifier === 'string' ? d.identifier : (n?.label ?? e.from);
    };
    const first = via[0];
    return {
      identifier: p.identifier,
      kind: kindOf(p).replace(/_/g, ' '),
      analyte: p.analyteFormula,
      concentration: p.concentrationDisplay ?? `${p.targetValue} ${p.targetUnit} (planned)`,
      statusNow: shownStatus(p.status, p.expiresOn, today).status,
      madeOn: p.createdOn,
      expiresOn: p.expiresOn,
      reachedVia: via.map((e) => `${from(e)} (${e.relation})`).join('; '),
      usedAt: first?.at ?? null,
      labelPrints: prints.length,
      labelCopies: prints.reduce((sum, n) => sum + (typeof n.detail.copies === 'number' ? n.detail.copies : 0), 0),
    };
  });
  return { subject: r.subject, range, rows, timeZone: settings.timeZone, labName: settings.labName };
}

/** A CSV cell a spreadsheet will not run: a leading = + - @ tab or CR gets a single quote before it. */
export function inertCell(value: string | number | null): string {
  const s = value === null ? '' : String(value);
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

/** The audit entity each trace subject is recorded under (the register it comes from). */
const AUDIT_ENTITY_OF: Record<TraceSubject['type'], string> = { preparation: 'preparation', material_lot: 'reference_material', balance: 'balance', volumetric_ware: 'volumetric_ware', solvent_lot: 'solvent' };

async function recordForwardExport(actor: Actor, r: { subject: TraceSubject; range: { from: string | null; to: string | null } }, count: number, format: 'pdf' | 'csv'): Promise<void> {
  await writeTransaction((transaction) =>
    recordAudit(
      {
        actor,
        action: 'export',
        entity: AUDIT_ENTITY_OF[r.subject.type],
        entityId: r.subject.id,
        changes: [
          { field: 'kind', oldValue: null, newValue: `forward_report_${format}` },
          { field: 'range', oldValue: null, newValue: `${r.range.from ?? 'start'} to ${r.range.to ?? 'today'}` },
          { field: 'preparations', oldValue: null, newValue: count },
        ],
      },
      transaction,
    ),
  );
}

const forwardFilename = (s: TraceSubject, ext: string) => `${s.identifier}-forward-trace.${ext}`;

/** GET /api/trace/:identifier/forward-report.pdf (each report served is audited as an export). */
export async function forwardReportPdf(identifier: string, q: TraceQuery, actor: Actor): Promise<{ pdf: Buffer; filename: string }> {
  const f = await forwardReport(identifier, q);
  const pdf = await renderForwardReport({ lab: { name: f.labName, timeZone: f.timeZone }, subject: f.subject, subjectWord: SUBJECT_WORD[f.subject.type], range: f.range, rows: f.rows, generatedAt: new Date().toISOString(), generatedBy: actor.fullName });
  await recordForwardExport(actor, f, f.rows.length, 'pdf');
  return { pdf, filename: forwardFilename(f.subject, 'pdf') };
}

/** GET /api/trace/:identifier/forward-report.csv: one row per preparation reached, columns FORWARD_REPORT_COLUMNS. */
export async function forwardReportCsv(identifier: string, q: TraceQuery, actor: Actor): Promise<{ csv: string; filename: string }> {
  const f = await forwardReport(identifier, q);
  const lines = [
    csvLine([...FORWARD_REPORT_COLUMNS]),
    ...f.rows.map((r) => csvLine([r.identifier, r.kind, r.analyte, r.concentration, r.statusNow, r.madeOn, r.expiresOn, r.reachedVia, r.usedAt ?? '', r.labelPrints, r.labelCopies].map(inertCell))),
  ];
  await recordForwardExport(actor, f, f.rows.length, 'csv');
  return { csv: lines.join(''), filename: forwardFilename(f.subject, 'csv') };
}
