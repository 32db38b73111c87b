/**
 * The series sheet: one A4 bench sheet for a calibration series (issue: "a printed series sheet lists them").
 * Lab, series identifier with a QR code of it, the parent standard as used (identifier, concentration ± U, the
 * reference material lot, expiry), the date and the preparer; one row per level (identifier, target, aliquot,
 * flask, planned and recomputed concentration, expiry, status, who prepared and verified); blank lines to
 * write the result by hand where it is not yet recorded (common practice on bench sheets); the cautions for
 * the material; signature lines. Values are the stored decimal strings and the API's `display` texts; nothing
 * is recomputed here. Rendered on the server only, with the fonts and shaping of the prep sheet (fonts.ts).
 */
import { createElement } from 'react';
import { Document, Image, Page, StyleSheet, Text, View } from '@react-pdf/renderer';
import type { SeriesDetail, SeriesLevelDetail } from '../../shared/schemas/lineage.ts';
import { UNVERIFIED_MARK } from '../../shared/schemas/printing.ts';
import { renderDocument } from './document.ts';
import { fontFor, PLAIN_SHAPING, TEXT_FONT } from './fonts.ts';
import { labDateTime, labDay } from './format.ts';

export interface SeriesSheetData {
  lab: { name: string; timeZone: string };
  series: SeriesDetail;
  generatedAt: string;
  generatedBy: string;
  /** QR PNG of the series identifier */
  qr: Buffer;
  qrText: string;
}

const s = StyleSheet.create({
  page: { fontFamily: TEXT_FONT, fontFeatureSettings: PLAIN_SHAPING, fontSize: 8.5, paddingTop: 74, paddingBottom: 44, paddingHorizontal: 30, color: '#111' },
  header: { position: 'absolute', top: 18, left: 30, right: 30, borderBottomWidth: 1, borderBottomColor: '#333', paddingBottom: 4 },
  headerRow: { flexDirection: 'row', justifyContent: 'space-between' },
  lab: { fontSize: 11, fontWeight: 700 },
  small: { fontSize: 7.5, color: '#333' },
  bold: { fontWeight: 700 },
  big: { fontSize: 15, fontWeight: 700 },
  banner: { marginTop: 4, backgroundColor: '#b00020', color: '#fff', fontWeight: 700, fontSize: 9, textAlign: 'center', paddingVertical: 2 },
  verifiedBanner: { marginTop: 4, borderWidth: 1, borderColor: '#1b5e20', color: '#1b5e20', fontWeight: 700, fontSize: 9, textAlign: 'center', paddingVertical: 1 },
  footer: { position: 'absolute', bottom: 16, left: 30, right: 30, flexDirection: 'row', justifyContent: 'space-between', fontSize: 7, color: '#333', borderTopWidth: 0.5, borderTopColor: '#999', paddingTop: 3 },
  h2: { fontSize: 10, fontWeight: 700, marginTop: 9, marginBottom: 3, borderBottomWidth: 0.5, borderBottomColor: '#999', paddingBottom: 1 },
  row: { flexDirection: 'row' },
  key: { width: 150, color: '#333' },
  val: { flex: 1 },
  table: { borderTopWidth: 0.5, borderLeftWidth: 0.5, borderColor: '#999' },
  tr: { flexDirection: 'row' },
  th: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 3, fontWeight: 700, backgroundColor: '#eee', fontSize: 7.5 },
  td: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 3, fontSize: 8, minHeight: 34 },
  para: { marginBottom: 3, lineHeight: 1.35 },
  writeLine: { borderBottomWidth: 0.75, borderBottomColor: '#555', height: 11, marginTop: 2 },
  sigBox: { flex: 1, marginRight: 12 },
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

const COLS = [
  { key: 'no', title: 'Level', width: '5%' },
  { key: 'id', title: 'Identifier', width: '11%' },
  { key: 'target', title: 'Target', width: '8%' },
  { key: 'aliquot', title: 'Aliquot (pipette, volume)', width: '12%' },
  { key: 'flask', title: 'Flask', width: '9%' },
  { key: 'planned', title: 'Planned concentration ± U', width: '15%' },
  { key: 'result', title: 'Recomputed concentration ± U', width: '16%' },
  { key: 'expiry', title: 'Expires', width: '8%' },
  { key: 'status', title: 'Status', width: '7%' },
  { key: 'signed', title: 'Prepared / verified', width: '9%' },
] as const;

const STATUS_WORD: Record<string, string> = { planned: 'planned', prepared: 'prepared, awaiting verification', verified: 'verified', returned: 'returned', expired: 'EXPIRED', discarded: 'DISCARDED' };
export const statusWord = (status: string) => STATUS_WORD[status] ?? status.replace(/_/g, ' ');

/** Two blank lines to write the value and its uncertainty by hand (common practice on bench sheets). */
function WriteIn({ unit }: { unit: string }) {
  return (
    <View>
      <Text style={s.small}>{`c (${unit}), write in:`}</Text>
      <View style={s.writeLine} />
      <Text style={[s.small, { marginTop: 2 }]}>± U (k = 2):</Text>
      <View style={s.writeLine} />
    </View>
  );
}

function LevelRow({ l, tz }: { l: SeriesLevelDetail; tz: string }) {
  const cell = (i: number) => [s.td, { width: COLS[i]!.width }];
  const signed = [l.preparedBy ? `P: ${l.preparedBy.fullName}, ${labDay(l.preparedBy.signedAt, tz)}` : 'P: ______', l.verifiedBy ? `V: ${l.verifiedBy.fullName}, ${labDay(l.verifiedBy.signedAt, tz)}` : 'V: ______'];
  return (
    <View style={s.tr} wrap={false}>
      <T style={[...cell(0), s.bold]}>{String(l.levelNo)}</T>
      <T style={[...cell(1), s.bold]}>{l.identifier}</T>
      <T style={cell(2)}>{`${l.target.value} ${l.target.unit}`}</T>
      <View style={cell(3)}>
        <T>{l.aliquot.pipette.identifier}</T>
        <T>{`${l.aliquot.volumeMl} mL`}</T>
        {l.aliquotRecorded ? <T style={s.small}>{`delivered ${l.aliquotRecorded.volumeMl} mL with ${l.aliquotRecorded.pipetteIdentifier}`}</T> : null}
      </View>
      <View style={cell(4)}>
        <T>{l.flask.identifier || '—'}</T>
        <T>{`${l.flask.nominalVolumeMl} mL`}</T>
      </View>
      <T style={cell(5)}>{l.planned.display}</T>
      <View style={cell(6)}>{l.result ? <T style={s.bold}>{l.result.display}</T> : <WriteIn unit={l.target.unit} />}</View>
      <T style={cell(7)}>{l.expiresOn}</T>
      <T style={cell(8)}>{statusWord(l.status)}</T>
      <View style={cell(9)}>
        {signed.map((x, i) => (
          <T key={i} style={s.small}>
            {x}
          </T>
        ))}
      </View>
    </View>
  );
}

function SignatureLine({ label }: { label: string }) {
  return (
    <View style={s.sigBox} wrap={false}>
      <View style={[s.writeLine, { height: 22 }]} />
      <Text style={s.small}>{label}</Text>
    </View>
  );
}

export function SeriesSheetDocument({ data }: { data: SeriesSheetData }) {
  const sr = data.series;
  const tz = data.lab.timeZone;
  const p = sr.parent;
  const notVerified = sr.levels.filter((l) => l.status !== 'verified').length;
  return (
    <Document title={`Series sheet ${sr.identifier}`} author={data.lab.name} creator="Tarebook" producer="Tarebook" creationDate={new Date(data.generatedAt)}>
      <Page size="A4" orientation="landscape" style={s.page}>
        <View style={s.header} fixed>
          <View style={s.headerRow}>
            <Text style={s.lab}>{data.lab.name}</Text>
            <Text style={s.bold}>{`Calibration series ${sr.identifier}`}</Text>
          </View>
          <View style={s.headerRow}>
            <Text style={s.small}>Series sheet — calibration standards diluted from one parent</Text>
            <Text style={s.small}>{`${sr.levels.length} levels; ${sr.levels.length - notVerified} verified`}</Text>
          </View>
          {notVerified ? <Text style={s.banner}>{`${UNVERIFIED_MARK} (${notVerified} of ${sr.levels.length} levels not verified)`}</Text> : <Text style={s.verifiedBanner}>ALL LEVELS VERIFIED</Text>}
        </View>

        <View style={s.footer} fixed>
          <Text>{`${sr.identifier} · printed ${labDateTime(data.generatedAt, tz)} by ${data.generatedBy}`}</Text>
          <Text render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
        </View>

        <View style={[s.row, { justifyContent: 'space-between' }]}>
          <View style={{ flex: 1, paddingRight: 12 }}>
            <T style={s.big}>{`Series ${sr.identifier} — ${sr.analyteFormula} in ${sr.unit}`}</T>
            <View style={{ marginTop: 6 }}>
              <KV k="Parent standard" v={`${p.identifier} (version ${p.version} as used; status now: ${statusWord(p.status)})`} bold />
              <KV k="Parent concentration ± U" v={p.concentrationDisplay || '—'} bold />
              <KV k="Parent expires on" v={p.expiresOn || '—'} />
              <KV k="Reference material" v={`${p.material.name}${p.material.producer ? `, ${p.material.producer}` : ''}, lot ${p.material.lot}${p.material.certificateNumber ? `, certificate ${p.material.certificateNumber}` : ''}${p.material.expiresOn ? `, expires ${p.material.expiresOn}` : ''}`} />
              <KV k="Series planned on" v={labDateTime(sr.createdAt, tz)} />
              <KV k="Planned by" v={sr.createdBy.fullName} />
              {sr.notes ? <KV k="Notes" v={sr.notes} /> : null}
            </View>
          </View>
          <View style={{ width: 84, alignItems: 'center' }}>
            <Image src={{ data: data.qr, format: 'png' }} style={{ width: 72, height: 72 }} />
            <Text style={[s.small, { marginTop: 2 }]}>{data.qrText}</Text>
          </View>
        </View>

        <View wrap={false}>
          <Text style={s.h2}>Safety (read before you start)</Text>
          <KV k="Task" v={sr.hazards.task} />
          {sr.hazards.pictograms.length ? <KV k="Pictograms" v={sr.hazards.pictograms.join(', ')} /> : null}
          {sr.hazards.statements.length ? <KV k="Hazard statements" v={sr.hazards.statements.join(', ')} /> : null}
          {sr.hazards.solvents.filter((x) => x.hazards).map((x, i) => (
            <KV key={`sv${i}`} k={i === 0 ? 'Solvent hazards' : ''} v={`${x.name}: ${x.hazards}${x.pictograms.length ? ` (${x.pictograms.join(', ')})` : ''}`} />
          ))}
          {sr.hazards.cautions.map((c, i) => (
            <KV key={i} k={i === 0 ? 'Cautions' : ''} v={c} />
          ))}
          <KV k="" v={sr.hazards.sdsNote} />
        </View>

        <Text style={s.h2} minPresenceAhead={60}>
          Levels (each its own record, signed and verified on its own)
        </Text>
        <View style={s.table}>
          <View style={s.tr} wrap={false} fixed>
            {COLS.map((c) => (
              <T key={c.key} style={[s.th, { width: c.width }]}>
                {c.title}
              </T>
            ))}
          </View>
          {sr.levels.map((l) => (
            <LevelRow key={l.id} l={l} tz={tz} />
          ))}
        </View>
        <T style={[s.small, { marginTop: 3 }]}>
          {'Planned: expected with the planned pipette and flask (the parent counted as an input). Recomputed: from the aliquot and make-up recorded in Tarebook; where blank, write the value from the bench and enter it in Tarebook. Expiry: the stability rule, capped by the parent and the reference material. P = prepared, V = verified (e-signatures in Tarebook).'}
        </T>

        <View wrap={false}>
          <Text style={s.h2}>Signatures (bench copy)</Text>
          <View style={[s.row, { marginTop: 8 }]}>
            <SignatureLine label="Prepared by (name)" />
            <SignatureLine label="Signature" />
            <SignatureLine label="Date" />
          </View>
          <View style={[s.row, { marginTop: 12 }]}>
            <SignatureLine label="Checked / verified by (name)" />
            <SignatureLine label="Signature" />
            <SignatureLine label="Date" />
          </View>
        </View>
      </Page>
    </Document>
  );
}

export async function renderSeriesSheet(data: SeriesSheetData): Promise<Buffer> {
  return renderDocument(createElement(SeriesSheetDocument, { data }));
}
