/**
 * The traceability report of one standard (REQUIREMENTS TR-04, TR-07; issue "traceability report"): the whole
 * backward chain, level by level (0 = the standard, 1 = its parent, …), each link with its status when used
 * (from the snapshots stored at the time) beside its status now. Rendered on the server only, with the fonts
 * the prep sheet uses (fonts.ts); the client never imports this module.
 */
import { createElement } from 'react';
import { Document, Page, StyleSheet, Text, View } from '@react-pdf/renderer';
import type { TraceReportRow, TraceSubject } from '../../shared/schemas/trace.ts';
import { renderDocument } from './document.ts';
import { fontFor, PLAIN_SHAPING, TEXT_FONT } from './fonts.ts';
import { labDateTime } from './format.ts';

export interface TraceabilityReportData {
  lab: { name: string; timeZone: string };
  subject: TraceSubject;
  status: string;
  version: number;
  rows: TraceReportRow[];
  generatedAt: string;
  generatedBy: string;
}

const s = StyleSheet.create({
  page: { fontFamily: TEXT_FONT, fontFeatureSettings: PLAIN_SHAPING, fontSize: 8, paddingTop: 64, paddingBottom: 40, paddingHorizontal: 30, color: '#111' },
  header: { position: 'absolute', top: 18, left: 30, right: 30, borderBottomWidth: 1, borderBottomColor: '#333', paddingBottom: 4 },
  headerRow: { flexDirection: 'row', justifyContent: 'space-between' },
  lab: { fontSize: 11, fontWeight: 700 },
  small: { fontSize: 7.5, color: '#333' },
  bold: { fontWeight: 700 },
  footer: { position: 'absolute', bottom: 16, left: 30, right: 30, flexDirection: 'row', justifyContent: 'space-between', fontSize: 7, color: '#333', borderTopWidth: 0.5, borderTopColor: '#999', paddingTop: 3 },
  h2: { fontSize: 10, fontWeight: 700, marginTop: 8, marginBottom: 3, borderBottomWidth: 0.5, borderBottomColor: '#999', paddingBottom: 1 },
  table: { borderTopWidth: 0.5, borderLeftWidth: 0.5, borderColor: '#999' },
  tr: { flexDirection: 'row' },
  th: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 2, fontWeight: 700, backgroundColor: '#eee', fontSize: 7 },
  td: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 2, fontSize: 7 },
  para: { marginBottom: 3, lineHeight: 1.35 },
});

const COLS = [
  { title: 'Link', width: '10%' },
  { title: 'Identifier', width: '14%' },
  { title: 'Description', width: '18%' },
  { title: 'Relation', width: '12%' },
  { title: 'Used', width: '13%' },
  { title: 'Status when used', width: '16%' },
  { title: 'Status now', width: '17%' },
] as const;

const LINK_WORD: Record<string, string> = {
  preparation: 'standard',
  material_lot: 'material lot',
  certificate: 'certificate',
  balance: 'balance',
  volumetric_ware: 'volumetric ware',
  solvent_lot: 'solvent lot',
  user: 'person',
  label_print: 'labels',
  volume_check: 'volume check',
};

function T({ children, style }: { children: string; style?: object | object[] }) {
  return <Text style={[...(Array.isArray(style) ? style : style ? [style] : []), { fontFamily: fontFor(children) }]}>{children}</Text>;
}

function Level({ level, rows, tz }: { level: number; rows: TraceReportRow[]; tz: string }) {
  const head = rows.find((r) => r.link === 'preparation');
  const title = level === 0 ? `Level 0 — the standard ${head?.identifier ?? ''}` : `Level ${level} — ${head ? `parent ${head.identifier}` : 'parent'}`;
  return (
    <View>
      <Text style={s.h2} minPresenceAhead={40}>
        {title}
      </Text>
      <View style={s.table}>
        <View style={s.tr} wrap={false}>
          {COLS.map((c) => (
            <T key={c.title} style={[s.th, { width: c.width }]}>
              {c.title}
            </T>
          ))}
        </View>
        {rows.map((r, i) => {
          const cells = [
            LINK_WORD[r.link] ?? r.link,
            r.identifier,
            r.detail ? `${r.description}\n${r.detail}` : r.description,
            r.relation,
            r.usedAt ? labDateTime(r.usedAt, tz) : '—',
            r.statusWhenUsed,
            r.statusNow,
          ];
          return (
            <View style={s.tr} key={i} wrap={false}>
              {cells.map((cell, j) => (
                <T key={j} style={[s.td, { width: COLS[j]!.width }]}>
                  {cell}
                </T>
              ))}
            </View>
          );
        })}
      </View>
    </View>
  );
}

export function TraceabilityReportDocument({ data }: { data: TraceabilityReportData }) {
  const tz = data.lab.timeZone;
  const levels = [...new Set(data.rows.map((r) => r.level))].sort((a, b) => a - b);
  const title = `${data.subject.identifier} v${data.version}`;
  return (
    <Document title={`Traceability report ${title}`} author={data.lab.name} creator="Tarebook" producer="Tarebook" creationDate={new Date(data.generatedAt)}>
      <Page size="A4" orientation="landscape" style={s.page}>
        <View style={s.header} fixed>
          <View style={s.headerRow}>
            <Text style={s.lab}>{data.lab.name}</Text>
            <Text style={s.bold}>{`Traceability report ${title}`}</Text>
          </View>
          <View style={s.headerRow}>
            <T style={s.small}>{data.subject.label}</T>
            <Text style={s.small}>{`Status now: ${data.status}`}</Text>
          </View>
        </View>
        <View style={s.footer} fixed>
          <Text>{`${title} · generated ${labDateTime(data.generatedAt, tz)} by ${data.generatedBy}`}</Text>
          <Text render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
        </View>
        <T style={s.para}>
          {`The chain from ${data.subject.identifier} back to its reference-material lot, level by level. "Status when used" comes from the snapshot stored when the item was used (balance calibration, glassware and lot status); "status now" is the register today. Times are in ${tz}.`}
        </T>
        {levels.map((level) => (
          <Level key={level} level={level} rows={data.rows.filter((r) => r.level === level)} tz={tz} />
        ))}
      </Page>
    </Document>
  );
}

export async function renderTraceabilityReport(data: TraceabilityReportData): Promise<Buffer> {
  return renderDocument(createElement(TraceabilityReportDocument, { data }));
}
