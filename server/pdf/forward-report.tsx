/**
 * The forward traceability report of a traced item, for a recall: every preparation made with the item (and
 * everything made from those), one row each, with its status today, how the trace reached it and how many
 * labels were printed. Rendered on the server only, with the fonts the other reports use (fonts.ts).
 */
import { createElement, type ReactElement } from 'react';
import { Document, Page, renderToBuffer, StyleSheet, Text, View, type DocumentProps } from '@react-pdf/renderer';
import type { ForwardReportRow, TraceSubject } from '../../shared/schemas/trace.ts';
import { fontFor, PLAIN_SHAPING, registerFonts, TEXT_FONT } from './fonts.ts';
import { labDateTime } from './format.ts';

export interface ForwardReportData {
  lab: { name: string; timeZone: string };
  subject: TraceSubject;
  /** "material lot", "balance", … */
  subjectWord: string;
  range: { from: string | null; to: string | null };
  rows: ForwardReportRow[];
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
  table: { borderTopWidth: 0.5, borderLeftWidth: 0.5, borderColor: '#999' },
  tr: { flexDirection: 'row' },
  th: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 2, fontWeight: 700, backgroundColor: '#eee', fontSize: 7 },
  td: { borderRightWidth: 0.5, borderBottomWidth: 0.5, borderColor: '#999', padding: 2, fontSize: 7 },
  para: { marginBottom: 6, lineHeight: 1.35 },
});

const COLS = [
  { title: 'Identifier', width: '11%' },
  { title: 'Kind', width: '7%' },
  { title: 'Concentration', width: '16%' },
  { title: 'Status now', width: '9%' },
  { title: 'Planned on', width: '8%' },
  { title: 'Expires on', width: '8%' },
  { title: 'Reached via', width: '20%' },
  { title: 'Used', width: '12%' },
  { title: 'Labels printed', width: '9%' },
] as const;

function T({ children, style }: { children: string; style?: object | object[] }) {
  return <Text style={[...(Array.isArray(style) ? style : style ? [style] : []), { fontFamily: fontFor(children) }]}>{children}</Text>;
}

export function ForwardReportDocument({ data }: { data: ForwardReportData }) {
  const tz = data.lab.timeZone;
  const span = data.range.from || data.range.to ? `uses from ${data.range.from ?? 'the start'} to ${data.range.to ?? 'today'} (lab dates)` : 'all uses';
  const title = `Forward trace of ${data.subjectWord} ${data.subject.identifier}`;
  const copies = data.rows.reduce((n, r) => n + r.labelCopies, 0);
  return (
    <Document title={title} author={data.lab.name} creator="Tarebook" producer="Tarebook" creationDate={new Date(data.generatedAt)}>
      <Page size="A4" orientation="landscape" style={s.page}>
        <View style={s.header} fixed>
          <View style={s.headerRow}>
            <Text style={s.lab}>{data.lab.name}</Text>
            <T style={s.bold}>{title}</T>
          </View>
          <View style={s.headerRow}>
            <T style={s.small}>{data.subject.label}</T>
            <T style={s.small}>{span}</T>
          </View>
        </View>
        <View style={s.footer} fixed>
          <T>{`${title} · generated ${labDateTime(data.generatedAt, tz)} by ${data.generatedBy}`}</T>
          <Text render={({ pageNumber, totalPages }) => `Page ${pageNumber} of ${totalPages}`} />
        </View>
        <T style={s.para}>
          {`${data.rows.length} ${data.rows.length === 1 ? 'preparation was' : 'preparations were'} made with ${data.subject.identifier} or from a standard made with it (${span}); ${copies} ${copies === 1 ? 'label was' : 'labels were'} printed for them. "Status now" is today's; "used" is when the item went into the preparation. Times are in ${tz}.`}
        </T>
        {data.rows.length ? (
          <View style={s.table}>
            <View style={s.tr} wrap={false} fixed>
              {COLS.map((c) => (
                <T key={c.title} style={[s.th, { width: c.width }]}>
                  {c.title}
                </T>
              ))}
            </View>
            {data.rows.map((r) => {
              const cells = [
                r.identifier,
                r.kind,
                `${r.analyte} ${r.concentration}`,
                r.statusNow,
                r.madeOn,
                r.expiresOn,
                r.reachedVia || '—',
                r.usedAt ? labDateTime(r.usedAt, tz) : '—',
                r.labelPrints ? `${r.labelCopies} in ${r.labelPrints} ${r.labelPrints === 1 ? 'print' : 'prints'}` : 'none',
              ];
              return (
                <View style={s.tr} key={r.identifier} wrap={false}>
                  {cells.map((cell, j) => (
                    <T key={j} style={[s.td, { width: COLS[j]!.width }]}>
                      {cell}
                    </T>
                  ))}
                </View>
              );
            })}
          </View>
        ) : (
          <T style={s.para}>Nothing was made with it in this period.</T>
        )}
      </Page>
    </Document>
  );
}

export async function renderForwardReport(data: ForwardReportData): Promise<Buffer> {
  registerFonts();
  return renderToBuffer(createElement(ForwardReportDocument, { data }) as unknown as ReactElement<DocumentProps>);
}
