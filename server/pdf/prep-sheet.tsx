/**
 * The prep sheet: one PDF per preparation and record version (REQUIREMENTS 1B, TR-09, ES-02). Rendered on
 * the server only (@react-pdf/renderer); the client never imports this module.
 *
 * Every page carries the lab header, identifier and version, the status, "Page x of y" and, unless the
 * record is verified, the unverified mark. Values are the stored decimal strings; rounding happens only
 * here, for display, and the full-precision values stay in the record.
 */
import Decimal from 'decimal.js';
import { Document, Image, Page, StyleSheet, Text, View } from '@react-pdf/renderer';
import type { ReactNode } from 'react';
import type { AuditEntryDto } from '../../shared/schemas/audit.ts';
import type { BudgetEntry, PreparationDetail, Signature, Weighing } from '../../shared/schemas/preparations.ts';
import type { DilutionSection, MixComponent, MixSection } from '../../shared/schemas/lineage.ts';
import type { CalibratedVolume, VolumetricWare } from '../../shared/schemas/inventory.ts';
import { calibratedVolumeLine, calibratedVolumeShown, twoDigits } from '../../shared/prep/calibrated-volume.ts';
import { PREVIEW_MARK, UNVERIFIED_MARK } from '../../shared/schemas/printing.ts';
import { fontFor, PLAIN_SHAPING, TEXT_FONT } from './fonts.ts';
import { labDateTime, labDay, percent, shortDecimal } from './format.ts';
import { gravimetricBudget, gravimetricCalculationLines, gravimetricInputRows, gravimetricOf, gravimetricReadingRows } from './gravimetric-sheet.ts';

export interface PrepSheetData {
  lab: { name: string; timeZone: string };
  detail: PreparationDetail;
  /** [] when the record has no signatures (or the signatures feature is not present) */
  signatures: Signature[];
  /** the record-level trail (preparation, its weighings, aliquots, make-ups and gravimetric readings), oldest first */
  trail: AuditEntryDto[];
  /** how many times sheets and labels were printed before this one */
  printCount: number;
  generatedAt: string;
  generatedBy: string;
  /** QR PNG of "<identifier>;v<version>" */
  qr: Buffer;
  qrText: string;
  /** a preview on screen: marked, and not counted or recorded as a print */
  preview?: boolean;
}

export const isVerified = (status: string) => status === 'verified';

const s = StyleSheet.create({
  page: { fontFamily: TEXT_FONT, fontFeatureSettings: PLAIN_SHAPING, fontSize: 8.5, paddingTop: 78, paddingBottom: 46, paddingHorizontal: 36, color: '#111' },
  header: { position: 'absolute', top: 20, left: 36, right: 36, borderBottomWidth: 1, borderBottomColor: '#333', paddingBottom: 4 },
  headerRow: { flexDirection: 'row', justifyContent: 'space-between' },
  lab: { fontSize: 11, fontWeight: 700 },
  small: { fontSize: 7.5, color: '#333' },
  banner: { marginTop: 4, backgroundColor: '#b00020', color: '#fff', fontWeight: 700, fontSize: 9, textAlign: 'center', paddingVertical: 2 },
  verifiedBanner: { marginTop: 4, borderWidth: 1, borderColor: '#1b5e20', color: '#1b5e20', fontWeight: 700, fontSize: 9, textAlign: 'center', paddingVertical: 1 },
  footer: { position: 'absolute', bottom: 18, left: 36, right: 36, flexDirection: 'row', justifyContent: 'space-between', fontSize: 7, color: '#333', borderTopWidth: 0.5, borderTopColor: '#999', paddingTop: 3 },
  h2: { fontSize: 10, fontWeight: 700, marginTop: 9, marginBottom: 3, borderBottomWidth: 0.5, borderBottomColor: '#999', paddingBottom: 1 },
  row: { flexDirection: 'row' },
  key: { width: 150, color: '#333' },
  val: { flex: 1 },
  bold: { fontWeight: 700 },
  big: { fontSize: 13, fontWeight: 700 },
  table: { borderTopWidth: 0.5, borderLeftWidth: 0.5, borderColor: '#999' },
  tr: { flexDirection: 'row' },
  th: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 2, fontWeight: 700, backgroundColor: '#eee', fontSize: 7.5 },
  td: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 2, fontSize: 7.5 },
  para: { marginBottom: 3, lineHeight: 1.35 },
});

/** Text that switches to the symbol font when it holds a character Inter's Latin subset lacks. */
function T({ children, style }: { children: string; style?: object | object[] }) {
  const extra = { fontFamily: fontFor(children) };
  return <Text style={[...(Array.isArray(style) ? style : style ? [style] : []), extra]}>{children}</Text>;
}

function KV({ k, v, bold }: { k: string; v: string; bold?: boolean }) {
  return (
    <View style={s.row} wrap={false}>
      <T style={s.key}>{k}</T>
      <T style={bold ? [s.val, s.bold] : s.val}>{v}</T>
    </View>
  );
}

function Section({ title, children, breakBefore }: { title: string; children: ReactNode; breakBefore?: boolean }) {
  return (
    <View break={breakBefore}>
      <Text style={s.h2} minPresenceAhead={40}>
        {title}
      </Text>
      {children}
    </View>
  );
}

interface Col {
  title: string;
  width: number | string;
}

function Table({ cols, rows }: { cols: Col[]; rows: string[][] }) {
  return (
    <View style={s.table}>
      <View style={s.tr} fixed={false} wrap={false}>
        {cols.map((c) => (
          <T key={c.title} style={[s.th, { width: c.width }]}>
            {c.title}
          </T>
        ))}
      </View>
      {rows.map((r, i) => (
        <View style={s.tr} key={i} wrap={false}>
          {r.map((cell, j) => (
            <T key={j} style={[s.td, { width: cols[j]!.width }]}>
              {cell}
            </T>
          ))}
        </View>
      ))}
    </View>
  );
}

const dash = (v: string | null | undefined) => (v === null || v === undefined || v === '' ? '—' : v);

/** "0.99990 ± 0.00030 (k = 2)" or the standard uncertainty when no expanded one is given. */
function purityText(p: PreparationDetail['snapshot']['material']['purity']): string {
  if (p.expandedUncertainty) return `${p.value} ± ${p.expandedUncertainty} (k = ${p.k ?? '2'}), ${p.basis} basis`;
  if (p.standardUncertainty) return `${p.value}, u = ${p.standardUncertainty}, ${p.basis} basis`;
  return `${p.value} (no uncertainty given), ${p.basis} basis`;
}

/** Calibration status of a balance on the day of use (from the balance snapshot taken at the weighing). */
export function calibrationStatus(b: Weighing['balance']['snapshot'], onDay: string): string {
  const status = b.status === 'in_service' ? 'in service' : b.status.replace(/_/g, ' ');
  if (!b.calibrationDueOn) return `${status}; no calibration due date recorded`;
  const due = b.calibrationDueOn;
  const state = onDay > due ? `CALIBRATION OVERDUE (due ${due})` : `calibrated ${dash(b.calibratedOn)}, due ${due}`;
  return `${status}; ${state}`;
}

function weighingAsRead(w: Weighing): string {
  if (w.mode === 'direct' && w.reading) return `${w.reading.value} ${w.reading.unit}`;
  if (w.before && w.after) return `before ${w.before.value} ${w.before.unit}, after ${w.after.value} ${w.after.unit}`;
  return '—';
}

const conditionsText = (c: { temperatureC: string; pressureHPa: string; relativeHumidityPct: string }) =>
  `${c.temperatureC} °C, ${c.pressureHPa} hPa, ${c.relativeHumidityPct} % RH`;

/** Air density in g/mL shown to 7 decimals (about 4 significant figures). */
const airDensityText = (g: string) => `${shortDecimal(g, 7)} g/mL`;

function budgetRows(budget: BudgetEntry[]): string[][] {
  return budget.map((b) => [
    b.label,
    `${shortDecimal(b.value, 8)} ${b.unit === '1' ? '' : b.unit}`.trim(),
    shortDecimal(b.standardUncertainty, 8),
    shortDecimal(b.sensitivity, 6),
    shortDecimal(b.contribution, 6),
    percent(b.share, 1),
  ]);
}

const ACTION_TEXT: Record<string, string> = {
  plan: 'planned',
  weighing_recorded: 'weighing recorded',
  weighing_superseded: 'weighing superseded',
  make_up_recorded: 'make-up recorded',
  sign: 'signed',
};

function trailRows(trail: AuditEntryDto[], tz: string): string[][] {
  return trail.map((e) => [
    labDateTime(e.occurredAt, tz),
    dash(e.actorName),
    `${ACTION_TEXT[e.action] ?? e.action.replace(/_/g, ' ')} (${e.entity} ${dash(e.entityId)})`,
    dash(e.reason),
  ]);
}

function CalculationText({ d }: { d: PreparationDetail }) {
  const r = d.result;
  const m = d.snapshot.material;
  if (!r) {
    return (
      <View>
        <T style={s.para}>
          {`Planned: to reach ${d.target.value} ${d.target.unit} of ${d.analyteFormula} in ${d.volume.value} ${d.volume.unit}, the true mass needed is ${shortDecimal(d.plan.trueMass.value, 4)} mg ` +
            `(target × volume ÷ (purity ${m.purity.value} × gravimetric factor ${shortDecimal(d.plan.gravimetricFactor, 6)})). ` +
            `Divided by the air-buoyancy factor ${shortDecimal(d.plan.buoyancyFactor, 8)} this gives the balance reading to aim for: ${d.plan.targetReading.value} mg ` +
            `(window ${d.plan.window.low}–${d.plan.window.high} mg, ±${d.plan.window.pct} %).`}
        </T>
        <T style={s.para}>No result yet: the concentration is computed when the weighing and the make-up to volume are recorded.</T>
      </View>
    );
  }
  const active = d.weighings.find((w) => w.id === r.basedOn.weighingId);
  const net = active?.net.value ?? '';
  const buoyancy = net && new Decimal(net).gt(0) ? new Decimal(r.trueMass.value).div(net).toSignificantDigits(10).toString() : '—';
  const c = r.concentration;
  const fcv = d.makeUp?.flask.snapshot.calibratedVolume;
  const lines = [
    `1. Balance reading (net, as read): m_read = ${dash(net)} mg (weighing #${r.basedOn.weighingId}).`,
    `2. Air-buoyancy correction: m_true = m_read × B, with B = (1 − ρ_air/ρ_weights) ÷ (1 − ρ_air/ρ_material) = ${buoyancy}, ` +
      `ρ_air = ${active ? airDensityText(active.airDensity) : '—'} (CIPM-2007 from the weighing's room conditions), ρ_weights = ${dash(active?.balance.snapshot.weightDensityGPerMl)} g/mL, ρ_material = ${dash(m.densityGPerMl)} g/mL: ` +
      `m_true = ${shortDecimal(r.trueMass.value, 4)} mg.`,
    `3. Analyte mass: m_true × purity ${m.purity.value} × gravimetric factor ${shortDecimal(d.plan.gravimetricFactor, 8)} (${d.analyteFormula} in ${m.formula}, from atomic weights).`,
    (fcv
      ? `4. Divided by the calibrated volume V = ${calibratedVolumeShown(fcv)} mL at 20 °C (flask ${d.makeUp?.flask.identifier ?? '—'}, mean of volume check ${fcv.checkIdentifier}; u(V) = U/k = ${twoDigits(fcv.standardUncertaintyMl)} mL)`
      : `4. Divided by the volume V = ${r.volume.value} mL (flask ${d.makeUp?.flask.identifier ?? '—'})`) +
      (r.temperatureCorrection ? `, corrected to 20 °C with the factor ${shortDecimal(r.temperatureCorrection.factor, 8)} for ${r.temperatureCorrection.temperatureC} °C` : '') +
      `: c = ${shortDecimal(c.value, 6)} ${c.unit}.`,
    `5. Combined standard uncertainty u(c) = ${shortDecimal(c.standardUncertainty, 6)} ${c.unit} (GUM, budget below); expanded U = k × u = ${shortDecimal(c.expandedUncertainty, 6)} ${c.unit} with k = ${c.k}.`,
    `Reported: ${c.display} (rounded for display; ${c.significantFigures.significantFigures} significant figures, limited by ${c.significantFigures.limitedBy}). Formula version ${r.calcVersion}, computed ${r.computedAt}.`,
  ];
  return (
    <View>
      {lines.map((l, i) => (
        <T key={i} style={s.para}>
          {l}
        </T>
      ))}
    </View>
  );
}

function inputRows(d: PreparationDetail): string[][] {
  const m = d.snapshot.material;
  const b = d.snapshot.balance;
  const f = d.makeUp?.flask.snapshot ?? d.snapshot.flask;
  const rows: string[][] = [
    ['Target concentration', `${d.target.value} ${d.target.unit}`, 'entered by the planner'],
    ['Analyte', d.analyteFormula, `chosen from the analytes of ${m.name}`],
    ['Purity (mass fraction)', purityText(m.purity), `certificate ${dash(m.certificateNumber)} (${m.producer}, lot ${m.lot})`],
    ['Material density', m.densityGPerMl ? `${m.densityGPerMl} g/mL` : '—', 'reference material record'],
    ['Density of the balance weights', `${b.weightDensityGPerMl} g/mL`, `balance ${b.identifier} record`],
    ['Balance readability', `${b.readabilityMg} mg`, `balance ${b.identifier} record`],
    ['Room conditions at planning', conditionsText(d.conditionsUsed), d.conditionsUsed.source === 'measured' ? `measured ${d.conditionsUsed.measuredAt}` : 'lab default conditions (settings)'],
    ['Air density at planning', airDensityText(d.plan.airDensity), 'CIPM-2007 equation from the conditions above'],
    f?.calibratedVolume
      ? ['Volume (calibrated)', `${calibratedVolumeShown(f.calibratedVolume)} mL at 20 °C`, calibratedVolumeLine(`flask ${f.identifier}`, f.calibratedVolume)]
      : ['Volume', `${d.volume.value} ${d.volume.unit}`, f ? `flask ${f.identifier}, class ${f.class}, tolerance ±${dash(f.toleranceMl)} mL` : 'entered by the planner'],
    ['Gravimetric factor', shortDecimal(d.plan.gravimetricFactor, 10), 'molar masses from standard atomic weights (IUPAC)'],
  ];
  if (d.makeUp) rows.push(['Solution temperature', `${d.makeUp.solutionTemperatureC} °C`, `entered at make-up by ${d.makeUp.recordedBy.fullName}`]);
  return rows;
}

// ------------------------------------------------------------------ volumetric dilutions (no weighing; METROLOGY §5.5)

/** The dilution section of a dilution or series level's detail; undefined for a stock. */
const dilutionOf = (d: PreparationDetail): DilutionSection | undefined => (d as PreparationDetail & { dilution?: DilutionSection }).dilution;

const wareText = (w: { identifier: string; kind: string; nominalVolumeMl: string; class?: string | null; toleranceMl?: string | null; calibratedVolume?: CalibratedVolume }) =>
  w.calibratedVolume
    ? `${w.kind.replace(/_/g, ' ')} ${calibratedVolumeLine(w.identifier, w.calibratedVolume)}`
    : `${w.identifier}: ${w.kind.replace(/_/g, ' ')}, ${w.nominalVolumeMl} mL${w.class && w.class !== 'n/a' ? `, class ${w.class}` : ''}${w.toleranceMl ? `, tolerance ±${w.toleranceMl} mL` : ''}`;

function dilutionInputRows(d: PreparationDetail, dil: DilutionSection): string[][] {
  const p = dil.parent.snapshot;
  const f = d.makeUp?.flask.snapshot ?? d.snapshot.flask;
  const rows: string[][] = [
    ['Target concentration', `${d.target.value} ${d.target.unit}`, 'entered by the planner'],
    ['Analyte', d.analyteFormula, `as in the parent ${p.identifier}`],
    ['Parent concentration c1', `${p.concentration.display} (u = ${shortDecimal(p.concentration.standardUncertainty, 6)} ${p.concentration.unit})`, `parent ${p.identifier} v${p.version}, ${p.status} when used, expires ${p.expiresOn}`],
    ['Planned aliquot Vp', `${dil.plannedAliquot.volumeMl} mL`, wareText(dil.plannedAliquot.pipette.snapshot)],
    ['Final volume Vf', `${dil.plannedFinalMl} mL`, f ? wareText(f) : 'planned volume'],
  ];
  const used = dil.result ? dil.aliquots.find((x) => x.id === dil.result!.basedOn.aliquotId) : undefined;
  if (used?.pipette.snapshot.calibratedVolume) rows.push(['Aliquot delivered', `${used.volumeMl} mL`, wareText(used.pipette.snapshot)]);
  if (d.makeUp) rows.push(['Solution temperature', `${d.makeUp.solutionTemperatureC} °C`, `entered at make-up by ${d.makeUp.recordedBy.fullName}`]);
  return rows;
}

function DilutionCalculationText({ dil, flask }: { dil: DilutionSection; flask?: VolumetricWare | null }) {
  const r = dil.result;
  const c1 = dil.parent.snapshot.concentration;
  if (!r) {
    return (
      <View>
        <T style={s.para}>{`Planned: c2 = c1 × Vp ÷ Vf = ${shortDecimal(c1.value, 6)} ${c1.unit} × ${dil.plannedAliquot.volumeMl} mL ÷ ${dil.plannedFinalMl} mL; expected ${dil.planned.display}.`}</T>
        <T style={s.para}>No result yet: the concentration is computed when the aliquot and the make-up to volume are recorded.</T>
      </View>
    );
  }
  const a = dil.aliquots.find((x) => x.id === r.basedOn.aliquotId);
  const pcv = a?.pipette.snapshot.calibratedVolume;
  const fcv = flask?.calibratedVolume;
  const volumesFrom =
    pcv || fcv
      ? `volumes from ${[pcv ? `the calibrated volume of ${a!.pipette.identifier} (${pcv.checkIdentifier})` : `the tolerance of ${dash(a?.pipette.identifier)}`, fcv ? `the calibrated volume of ${flask!.identifier} (${fcv.checkIdentifier})` : 'the flask tolerance'].join(' and ')}, u = U/k of each check`
      : 'volumes from the ware tolerances (triangular for glass, rectangular for piston pipettes)';
  const lines = [
    `1. Aliquot of the parent ${dil.parent.identifier}: Vp = ${pcv ? `${calibratedVolumeShown(pcv)} mL at 20 °C (calibrated, ${pcv.checkIdentifier}; set ${dash(a?.volumeMl)} mL)` : `${dash(a?.volumeMl)} mL`} with ${dash(a?.pipette.identifier)} (aliquot #${r.basedOn.aliquotId}).`,
    `2. Made up to Vf${fcv ? ` = ${calibratedVolumeShown(fcv)} mL at 20 °C (calibrated, ${fcv.checkIdentifier})` : ''} (make-up #${r.basedOn.makeUpId}); c2 = c1 × Vp ÷ Vf with c1 = ${shortDecimal(c1.value, 6)} ${c1.unit} (as used): c2 = ${shortDecimal(r.value, 6)} ${r.unit}.`,
    `3. Relative variances add: (u(c2)/c2)² = (u(c1)/c1)² + (u(Vp)/Vp)² + (u(Vf)/Vf)², ${volumesFrom}: u(c2) = ${shortDecimal(r.standardUncertainty, 6)} ${r.unit} (relative ${percent(r.relative, 2)}); U = k × u = ${shortDecimal(r.expandedUncertainty, 6)} ${r.unit} with k = ${r.k}.`,
    `Reported: ${r.display}. Formula version ${r.calcVersion}.`,
  ];
  return (
    <View>
      {lines.map((l, i) => (
        <T key={i} style={s.para}>
          {l}
        </T>
      ))}
    </View>
  );
}

// ------------------------------------------------------------------ mixes (several parents into one flask; METROLOGY §5.5 per analyte)

/** The mix section of a mix's detail; undefined otherwise. */
const mixOf = (d: PreparationDetail): MixSection | undefined => (d as PreparationDetail & { mix?: MixSection }).mix;

/** One component of a mix in the shape of a dilution, so its calculation reads like one. */
const mixComponentAsDilution = (mix: MixSection, c: MixComponent): DilutionSection => ({
  method: 'volumetric',
  parent: c.parent,
  plannedAliquot: c.plannedAliquot,
  plannedFinalMl: mix.plannedFinalMl,
  planned: c.planned,
  aliquots: c.aliquots,
  ...(c.result ? { result: c.result } : {}),
});

function mixInputRows(d: PreparationDetail, mix: MixSection): string[][] {
  const f = d.makeUp?.flask.snapshot ?? d.snapshot.flask;
  const rows: string[][] = mix.components.flatMap((c) => {
    const p = c.parent.snapshot;
    return [
      [`${c.analyteFormula}: parent concentration c1`, `${p.concentration.display} (u = ${shortDecimal(p.concentration.standardUncertainty, 6)} ${p.concentration.unit})`, `parent ${p.identifier} v${p.version}, ${p.status} when used, expires ${p.expiresOn}`],
      [`${c.analyteFormula}: planned aliquot Vp`, `${c.plannedAliquot.volumeMl} mL`, wareText(c.plannedAliquot.pipette.snapshot)],
    ];
  });
  rows.push(['Final volume Vf (every analyte)', `${mix.plannedFinalMl} mL`, f ? wareText(f) : 'planned volume']);
  if (d.makeUp) rows.push(['Solution temperature', `${d.makeUp.solutionTemperatureC} °C`, `entered at make-up by ${d.makeUp.recordedBy.fullName}`]);
  return rows;
}

function MixAliquots({ mix, tz }: { mix: MixSection; tz: string }) {
  const rows = mix.components.flatMap((c) =>
    c.aliquots.map((a) => [
      String(a.id),
      c.analyteFormula,
      wareText(a.pipette.snapshot) + (a.pipette.identifier !== c.plannedAliquot.pipette.identifier ? ' (substituted for the planned pipette)' : ''),
      `${a.volumeMl} mL`,
      `${a.recordedBy.fullName}, ${labDateTime(a.recordedAt, tz)}`,
      [a.supersedesId ? `corrects #${a.supersedesId}: ${dash(a.correctionReason)}` : '', a.supersededById ? `SUPERSEDED by #${a.supersededById}` : ''].filter(Boolean).join('; '),
    ]),
  );
  const missing = mix.components.filter((c) => !c.aliquots.some((a) => !a.supersededById));
  return (
    <Section title="Aliquots, one per analyte (as recorded; superseded entries stay listed)">
      {rows.length ? (
        <Table
          cols={[
            { title: '#', width: '6%' },
            { title: 'Analyte', width: '9%' },
            { title: 'Pipette', width: '31%' },
            { title: 'Volume', width: '10%' },
            { title: 'Recorded', width: '22%' },
            { title: 'Notes', width: '22%' },
          ]}
          rows={rows}
        />
      ) : null}
      {missing.map((c) => (
        <T key={c.linkId} style={s.para}>{`No aliquot of ${c.analyteFormula} recorded yet. Planned: ${c.plannedAliquot.volumeMl} mL of ${c.parent.identifier} with ${c.plannedAliquot.pipette.identifier}.`}</T>
      ))}
    </Section>
  );
}

function MixCalculationText({ mix }: { mix: MixSection }) {
  return (
    <View>
      {mix.components.map((c) => (
        <View key={c.linkId}>
          <T style={s.bold}>{`${c.analyteFormula} (from ${c.parent.identifier})`}</T>
          <DilutionCalculationText dil={mixComponentAsDilution(mix, c)} />
        </View>
      ))}
    </View>
  );
}

function MixBudgets({ mix }: { mix: MixSection }) {
  return (
    <View>
      {mix.components.map((c) =>
        c.result ? (
          <View key={c.linkId}>
            <T style={s.bold}>{c.analyteFormula}</T>
            <Table
              cols={[
                { title: 'Input', width: '30%' },
                { title: 'Value', width: '17%' },
                { title: 'Standard uncertainty', width: '15%' },
                { title: 'Sensitivity', width: '14%' },
                { title: 'Contribution', width: '14%' },
                { title: 'Share', width: '10%' },
              ]}
              rows={budgetRows(c.result.budget.map((b) => ({ ...b, unit: b.input === 'parent' ? c.result!.unit : b.input === 'aliquot' || b.input === 'final' ? 'mL' : '1' })))}
            />
            <T style={[s.para, { marginTop: 3 }]}>{`Combined u(c) = ${shortDecimal(c.result.standardUncertainty, 6)} ${c.result.unit}; U = ${shortDecimal(c.result.expandedUncertainty, 6)} ${c.result.unit} (k = ${c.result.k}).`}</T>
          </View>
        ) : (
          <T key={c.linkId} style={s.para}>{`${c.analyteFormula}: expected at planning ${c.planned.display}; the budget is computed with the result.`}</T>
        ),
      )}
    </View>
  );
}

function SignatureBlock({ sigs, tz }: { sigs: Signature[]; tz: string }) {
  if (!sigs.length) return <Text style={s.para}>No signatures yet.</Text>;
  return (
    <Table
      cols={[
        { title: 'Meaning', width: '34%' },
        { title: 'Name', width: '20%' },
        { title: 'Date and time', width: '22%' },
        { title: 'Version / validity', width: '24%' },
      ]}
      rows={sigs.map((g) => [
        g.meaningText + (g.reason ? ` — reason: ${g.reason}` : '') + (g.outOfPlanReason ? ` — result outside the plan, reason: ${g.outOfPlanReason}` : ''),
        g.signer.fullName,
        labDateTime(g.signedAt, tz),
        g.valid ? `v${g.recordVersion}, valid` : `superseded: applied to v${g.recordVersion}`,
      ])}
    />
  );
}

export function PrepSheetDocument({ data }: { data: PrepSheetData }) {
  const d = data.detail;
  const tz = data.lab.timeZone;
  const verified = isVerified(d.status);
  const m = d.snapshot.material;
  const activeWeighings = d.weighings;
  const dil = dilutionOf(d);
  const grav = gravimetricOf(d); // a dilution by mass (gravimetric-sheet.ts)
  const dr = dil?.result;
  const mix = mixOf(d); // a mix: every analyte from its own parent (MixAliquots, MixCalculationText, MixBudgets)
  const title = `${d.identifier} v${d.version}`;
  return (
    <Document title={`Prep sheet ${title}`} author={data.lab.name} creator="Tarebook" producer="Tarebook" creationDate={new Date(data.generatedAt)}>
      <Page size="A4" style={s.page}>
        <View style={s.header} fixed>
          <View style={s.headerRow}>
            <Text style={s.lab}>{data.lab.name}</Text>
            <Text style={s.bold}>{`Preparation record ${title}`}</Text>
          </View>
          <View style={s.headerRow}>
            <Text style={s.small}>Prep sheet — standard solution preparation</Text>
            <Text style={s.small}>{`Status: ${d.status === 'seal_broken' ? 'seal broken' : d.status}`}</Text>
          </View>
          {/* a preview carries its mark on the same line, so the layout of the page is the printed one */}
          {verified ? <Text style={s.verifiedBanner}>{data.preview ? `VERIFIED · ${PREVIEW_MARK}` : 'VERIFIED'}</Text> : <Text style={s.banner}>{data.preview ? `${UNVERIFIED_MARK} · ${PREVIEW_MARK}` : UNVERIFIED_MARK}</Text>}
          {d.sealBroken ? <Text style={s.banner}>{`SEAL BROKEN: this record no longer matches its signatures (${d.sealBroken.problems.join('; ')})`}</Text> : null}
        </View>

        <View style={s.footer} fixed>
          <Text>{`${title} · ${data.preview ? 'preview shown' : 'printed'} ${labDateTime(data.generatedAt, tz)} ${data.preview ? 'to' : 'by'} ${data.generatedBy}`}</Text>
          <Text render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
        </View>

        <View style={[s.row, { justifyContent: 'space-between' }]}>
          <View style={{ flex: 1, paddingRight: 10 }}>
            <T style={s.big}>{`${d.materialName} — ${d.analyteFormula}`}</T>
            <T style={[s.big, { marginTop: 4 }]}>{d.result ? d.result.concentration.display : dr ? dr.display : grav?.result ? grav.result.display : mix ? (d.concentrationDisplay ?? `No result yet (planned: ${mix.components.map((c) => `${c.analyteFormula} ${c.planned.display}`).join('; ')})`) : `No result yet (planned ${d.target.value} ${d.target.unit})`}</T>
            {dr && !d.result ? (
              <T style={s.small}>{`c = ${shortDecimal(dr.value, 6)} ${dr.unit}; expanded uncertainty U = ${shortDecimal(dr.expandedUncertainty, 4)} ${dr.unit} (k = ${dr.k}, about 95 % coverage); diluted from ${dil!.parent.identifier}`}</T>
            ) : null}
            {d.result ? (
              <T style={s.small}>{`c = ${shortDecimal(d.result.concentration.value, 6)} ${d.result.concentration.unit}; expanded uncertainty U = ${shortDecimal(d.result.concentration.expandedUncertainty, 4)} ${d.result.concentration.unit} (k = ${d.result.concentration.k}, about 95 % coverage)`}</T>
            ) : null}
            <View style={{ marginTop: 6 }}>
              <KV k="Identifier / version" v={title} bold />
              <KV k="Status" v={`${d.status} (stage: ${d.stage.replace('_', ' ')})`} />
              <KV k="Planned by" v={`${d.createdBy.fullName} (${d.createdBy.initials}), ${labDateTime(d.createdAt, tz)}`} />
              <KV k="Volume" v={`${d.volume.value} ${d.volume.unit}`} />
              {d.amendedFromVersion ? <KV k="Amended" v={`from version ${d.amendedFromVersion}; earlier signatures no longer apply`} /> : null}
              {d.reviewFlag ? <KV k="Review flag" v={`${d.reviewFlag.reason} (${labDateTime(d.reviewFlag.flaggedAt, tz)})`} /> : null}
            </View>
          </View>
          <View style={{ width: 78, alignItems: 'center' }}>
            <Image src={{ data: data.qr, format: 'png' }} style={{ width: 70, height: 70 }} />
            <Text style={[s.small, { marginTop: 2 }]}>{data.qrText}</Text>
          </View>
        </View>

        <Section title="Reference material">
          <KV k="Name / formula" v={`${m.name}, ${m.formula}${m.casNumber ? ` (CAS ${m.casNumber})` : ''}`} />
          <KV k="Grade / producer" v={`${m.grade}, ${m.producer}${m.catalogueNumber ? `, cat. ${m.catalogueNumber}` : ''}`} />
          <KV k="Lot / certificate" v={`${m.lot} / ${dash(m.certificateNumber)}`} />
          <KV k="Purity" v={mix ? "per parent: each parent's concentration already carries its material's purity" : purityText(m.purity)} />
          <KV k="Expiry of the material" v={dash(m.expiresOn)} />
          <KV k="Lot status at planning" v={m.status} />
        </Section>

        <Section title="Inputs and their sources">
          <Table
            cols={[
              { title: 'Input', width: '26%' },
              { title: 'Value', width: '34%' },
              { title: 'Source', width: '40%' },
            ]}
            rows={grav ? gravimetricInputRows(d, grav) : dil ? dilutionInputRows(d, dil) : mix ? mixInputRows(d, mix) : inputRows(d)}
          />
        </Section>

        {grav ? (
          <Section title="Readings of the aliquot and the final solution (as read; superseded entries stay listed)">
            {grav.readings.length ? (
              <Table
                cols={[
                  { title: '#', width: '6%' },
                  { title: 'As read', width: '22%' },
                  { title: 'Balance', width: '12%' },
                  { title: 'Room conditions and air density', width: '26%' },
                  { title: 'Recorded', width: '18%' },
                  { title: 'Notes', width: '16%' },
                ]}
                rows={gravimetricReadingRows(grav, tz)}
              />
            ) : (
              <Text style={s.para}>{`No readings recorded yet. Aliquot to aim for ${grav.plan.aliquot.readingShownG} g of ${grav.parent.identifier}, final solution ${grav.plan.final.readingShownG} g.`}</Text>
            )}
          </Section>
        ) : dil ? (
          <Section title="Aliquots (as recorded; superseded entries stay listed)">
            {dil.aliquots.length ? (
              <Table
                cols={[
                  { title: '#', width: '6%' },
                  { title: 'Pipette', width: '34%' },
                  { title: 'Volume', width: '12%' },
                  { title: 'Recorded', width: '24%' },
                  { title: 'Notes', width: '24%' },
                ]}
                rows={dil.aliquots.map((a) => [
                  String(a.id),
                  wareText(a.pipette.snapshot) + (a.pipette.identifier !== dil.plannedAliquot.pipette.identifier ? ' (substituted for the planned pipette)' : ''),
                  `${a.volumeMl} mL`,
                  `${a.recordedBy.fullName}, ${labDateTime(a.recordedAt, tz)}`,
                  [a.supersedesId ? `corrects #${a.supersedesId}: ${dash(a.correctionReason)}` : '', a.supersededById ? `SUPERSEDED by #${a.supersededById}` : ''].filter(Boolean).join('; '),
                ])}
              />
            ) : (
              <Text style={s.para}>{`No aliquot recorded yet. Planned: ${dil.plannedAliquot.volumeMl} mL of ${dil.parent.identifier} with ${dil.plannedAliquot.pipette.identifier}.`}</Text>
            )}
          </Section>
        ) : mix ? (
          <MixAliquots mix={mix} tz={tz} />
        ) : (
        <Section title="Weighings (as read; superseded entries stay listed)">
          {activeWeighings.length ? (
            <Table
              cols={[
                { title: '#', width: '5%' },
                { title: 'As read', width: '17%' },
                { title: 'Net', width: '9%' },
                { title: 'Balance and calibration at the time', width: '22%' },
                { title: 'Room conditions and air density', width: '20%' },
                { title: 'Recorded', width: '14%' },
                { title: 'Notes', width: '13%' },
              ]}
              rows={activeWeighings.map((w) => {
                const notes = [
                  w.inWindow ? 'in window' : `OUT OF WINDOW${w.outOfWindowReason ? `: ${w.outOfWindowReason}` : ''}`,
                  w.supersedesId ? `corrects #${w.supersedesId}: ${dash(w.correctionReason)}` : '',
                  w.supersededById ? `SUPERSEDED by #${w.supersededById}` : '',
                ].filter(Boolean);
                return [
                  String(w.id),
                  `${w.mode === 'direct' ? 'direct' : 'by difference'}: ${weighingAsRead(w)}`,
                  `${w.net.value} mg`,
                  `${w.balance.identifier}: ${calibrationStatus(w.balance.snapshot, labDay(w.recordedAt, tz))}`,
                  `${conditionsText(w.conditions)} (${w.conditions.source === 'measured' ? 'measured' : 'lab default'}); ρ_air ${airDensityText(w.airDensity)}`,
                  `${w.recordedBy.fullName}, ${labDateTime(w.recordedAt, tz)}`,
                  notes.join('; '),
                ];
              })}
            />
          ) : (
            <Text style={s.para}>No weighing recorded yet. Target reading {d.plan.targetReading.value} mg (window {d.plan.window.low}–{d.plan.window.high} mg).</Text>
          )}
        </Section>
        )}

        <Section title="Flask and solvent">
          {d.makeUp ? (
            <View>
              <KV
                k="Flask"
                v={`${d.makeUp.flask.identifier}: ${d.makeUp.flask.snapshot.nominalVolumeMl} mL, class ${d.makeUp.flask.snapshot.class}, tolerance ±${dash(d.makeUp.flask.snapshot.toleranceMl)} mL${d.makeUp.flask.substituted ? ' (substituted for the planned flask)' : ''}`}
              />
              {d.makeUp.flask.snapshot.calibratedVolume ? <KV k="Calibrated volume" v={calibratedVolumeLine(d.makeUp.flask.identifier, d.makeUp.flask.snapshot.calibratedVolume)} /> : null}
              <KV k="Solvent" v={`${d.makeUp.solvent.name}${d.makeUp.solvent.snapshot.grade ? `, ${d.makeUp.solvent.snapshot.grade}` : ''}, lot ${d.makeUp.solvent.lot}`} />
              <KV k="Solution temperature" v={`${d.makeUp.solutionTemperatureC} °C; correction to 20 °C ${d.makeUp.applyTemperatureCorrection ? 'applied' : 'not applied (temperature counted as an uncertainty)'}`} />
              <KV k="Made up by" v={`${d.makeUp.recordedBy.fullName}, ${labDateTime(d.makeUp.recordedAt, tz)}`} />
              {d.makeUp.correctionReason ? <KV k="Reason for a new make-up" v={d.makeUp.correctionReason} /> : null}
              {d.makeUpHistory.length ? <KV k="Earlier make-ups" v={d.makeUpHistory.map((h) => `#${h.id} ${h.flask.identifier} ${labDateTime(h.recordedAt, tz)}`).join('; ')} /> : null}
            </View>
          ) : (
            <Text style={s.para}>{grav ? 'Made up to a mass, not a volume: see the readings above' : 'Not made up to volume yet'}{d.snapshot.flask ? ` (planned flask ${d.snapshot.flask.identifier})` : ''}.</Text>
          )}
        </Section>

        <Section title="Calculation">
          {grav ? (
            <View>
              {gravimetricCalculationLines(grav).map((l, i) => (
                <T key={i} style={s.para}>
                  {l}
                </T>
              ))}
            </View>
          ) : dil ? <DilutionCalculationText dil={dil} flask={d.makeUp?.flask.snapshot ?? null} /> : mix ? <MixCalculationText mix={mix} /> : <CalculationText d={d} />}
        </Section>

        <Section title="Uncertainty budget (GUM)">
          {d.result ? (
            <View>
              <Table
                cols={[
                  { title: 'Input', width: '30%' },
                  { title: 'Value', width: '17%' },
                  { title: 'Standard uncertainty', width: '15%' },
                  { title: 'Sensitivity', width: '14%' },
                  { title: 'Contribution', width: '14%' },
                  { title: 'Share', width: '10%' },
                ]}
                rows={budgetRows(d.result.budget)}
              />
              <T style={[s.para, { marginTop: 3 }]}>{`Combined u(c) = ${shortDecimal(d.result.concentration.standardUncertainty, 6)} ${d.result.concentration.unit}; U = ${shortDecimal(d.result.concentration.expandedUncertainty, 6)} ${d.result.concentration.unit} (k = ${d.result.concentration.k}).`}</T>
            </View>
          ) : grav?.result ? (
            <View>
              <Table
                cols={[
                  { title: 'Input', width: '30%' },
                  { title: 'Value', width: '17%' },
                  { title: 'Standard uncertainty', width: '15%' },
                  { title: 'Sensitivity', width: '14%' },
                  { title: 'Contribution', width: '14%' },
                  { title: 'Share', width: '10%' },
                ]}
                rows={budgetRows(gravimetricBudget(grav) ?? [])}
              />
              <T style={[s.para, { marginTop: 3 }]}>{`Budget of the mass concentration. Combined u(γ) = ${shortDecimal(grav.result.massConcentration.standardUncertainty, 6)} mg/L; u(w) = ${shortDecimal(grav.result.massFraction.standardUncertainty, 6)} mg/kg (k = ${grav.result.massFraction.k} for U).`}</T>
            </View>
          ) : dr ? (
            <View>
              <Table
                cols={[
                  { title: 'Input', width: '30%' },
                  { title: 'Value', width: '17%' },
                  { title: 'Standard uncertainty', width: '15%' },
                  { title: 'Sensitivity', width: '14%' },
                  { title: 'Contribution', width: '14%' },
                  { title: 'Share', width: '10%' },
                ]}
                rows={budgetRows(dr.budget.map((b) => ({ ...b, unit: b.input === 'parent' ? dr.unit : b.input === 'aliquot' || b.input === 'final' ? 'mL' : '1' })))}
              />
              <T style={[s.para, { marginTop: 3 }]}>{`Combined u(c) = ${shortDecimal(dr.standardUncertainty, 6)} ${dr.unit}; U = ${shortDecimal(dr.expandedUncertainty, 6)} ${dr.unit} (k = ${dr.k}).`}</T>
            </View>
          ) : mix ? (
            <MixBudgets mix={mix} />
          ) : (
            <T style={s.para}>{`Expected at planning: ${grav ? `${grav.plan.planned.massFraction.display}; ${grav.plan.planned.massConcentration.display}` : dil ? dil.planned.display : d.plan.expectedUncertainty.display}. The budget is computed with the result.`}</T>
          )}
        </Section>

        <Section title="Expiry and storage">
          <KV k="Expires on" v={d.expiry.expiresOn} bold />
          <KV k="Basis" v={d.expiry.reason} />
          <KV k="Storage" v={dash(m.storage)} />
        </Section>

        <Section title="Hazards">
          <KV k="Task" v={d.hazards.task} />
          <KV k="Pictograms" v={d.hazards.pictograms.length ? d.hazards.pictograms.join(', ') : 'none recorded for the material'} />
          {d.hazards.statements.length ? <KV k="Hazard statements" v={d.hazards.statements.join(', ')} /> : null}
          {d.hazards.solvents.filter((x) => x.hazards).map((x, i) => (
            <KV key={`sv${i}`} k={i === 0 ? 'Solvent hazards' : ''} v={`${x.name}: ${x.hazards}${x.pictograms.length ? ` (${x.pictograms.join(', ')})` : ''}`} />
          ))}
          {d.hazards.cautions.map((c, i) => (
            <KV key={i} k={i === 0 ? 'Cautions' : ''} v={c} />
          ))}
          <KV k="" v={d.hazards.sdsNote} bold />
        </Section>

        {d.gates.length || d.notes ? (
          <Section title="Planning warnings and notes">
            {d.gates.map((g, i) => (
              <KV key={i} k={`${g.severity}: ${g.code}`} v={g.message} />
            ))}
            {d.notes ? <KV k="Notes" v={d.notes} /> : null}
          </Section>
        ) : null}

        <Section title="Signatures">
          <SignatureBlock sigs={data.signatures} tz={tz} />
        </Section>

        <Section title="Audit summary">
          <T style={s.para}>{`${data.trail.length} audit entries for this record and its weighings, aliquots, make-ups and gravimetric readings; printed ${data.printCount} time(s) before this copy. Times in ${tz}.`}</T>
          <Table
            cols={[
              { title: 'When', width: '27%' },
              { title: 'Who', width: '20%' },
              { title: 'What', width: '28%' },
              { title: 'Reason', width: '25%' },
            ]}
            rows={trailRows(data.trail.slice(-20), tz)}
          />
          {data.trail.length > 20 ? <Text style={s.small}>{`Showing the latest 20 of ${data.trail.length} entries; the full trail is in Tarebook.`}</Text> : null}
        </Section>
      </Page>
    </Document>
  );
}
