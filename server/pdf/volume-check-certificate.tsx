/**
 * Calibration certificate of a volume check (ISO 4787 / ISO 8655-6): lab, check identifier, the ware and the
 * balance as they were, the conditions, per tested volume the replicate volumes at 20 °C, mean, systematic
 * and random error, expanded uncertainty (k) and the verdict with the limit and its source; the signatures.
 * Values are the stored decimal strings, shortened for display only; nothing is recomputed here. A check not
 * yet verified carries a banner. Rendered on the server only, through renderDocument (fonts.ts).
 */
import { createElement } from 'react';
import { Document, Page, StyleSheet, Text, View } from '@react-pdf/renderer';
import type { VolumeCheckDetail } from '../services/volume-check.service.ts';
import { limitSourceText } from '../../shared/calc/volume-tolerances.ts';
import { renderDocument } from './document.ts';
import { fontFor, PLAIN_SHAPING, TEXT_FONT } from './fonts.ts';
import { labDateTime, labDay, shortDecimal } from './format.ts';

export interface VolumeCheckCertificateData {
  lab: { name: string; timeZone: string };
  check: VolumeCheckDetail;
  generatedAt: string;
  generatedBy: string;
}

const s = StyleSheet.create({
  page: { fontFamily: TEXT_FONT, fontFeatureSettings: PLAIN_SHAPING, fontSize: 9, padding: 34, color: '#111' },
  lab: { fontSize: 11, fontWeight: 700 },
  title: { fontSize: 15, fontWeight: 700, marginTop: 4 },
  small: { fontSize: 7.5, color: '#333' },
  bold: { fontWeight: 700 },
  banner: { marginTop: 4, backgroundColor: '#b00020', color: '#fff', fontWeight: 700, fontSize: 9, textAlign: 'center', paddingVertical: 2 },
  h2: { fontSize: 10, fontWeight: 700, marginTop: 10, marginBottom: 3, borderBottomWidth: 0.5, borderBottomColor: '#999', paddingBottom: 1 },
  row: { flexDirection: 'row' },
  key: { width: 170, color: '#333' },
  val: { flex: 1 },
  para: { marginBottom: 3, lineHeight: 1.35 },
});

function T({ children, style }: { children: string; style?: object | object[] }) {
  return <Text style={[...(Array.isArray(style) ? style : style ? [style] : []), { fontFamily: fontFor(children) }]}>{children}</Text>;
}

function KV({ k, v, bold }: { k: string; v: string; bold?: boolean }) {
  return (
    <View style={s.row} wrap={false}>
      <T style={s.key}>{k}</T>
      <T style={bold ? [s.val, s.bold] : s.val}>{v}</T>
    </View>
  );
}

export function VolumeCheckCertificate({ data }: { data: VolumeCheckCertificateData }) {
  const c = data.check;
  const tz = data.lab.timeZone;
  const tested = c.result?.tested ?? [];
  return (
    <Document title={`Calibration certificate ${c.identifier}`}>
      <Page size="A4" style={s.page}>
        <T style={s.lab}>{data.lab.name}</T>
        <T style={s.title}>{`Calibration certificate ${c.identifier}`}</T>
        {c.status !== 'verified' ? <T style={s.banner}>{`NOT VERIFIED: status ${c.status}`}</T> : null}
        <T style={s.h2}>Item and method</T>
        <KV k="Ware" v={`${c.ware.identifier}: ${c.ware.nominalVolumeMl} mL ${c.ware.kind.replace(/_/g, ' ')}, class ${c.ware.class}, ${c.ware.material ?? '—'}`} />
        <KV k="Method" v={tested[0] ? `${tested[0].method} gravimetric (${c.plan.mode === 'content' ? 'contained' : 'delivered'} volume at 20 °C)` : 'gravimetric'} />
        <KV k="Balance" v={`${c.balance.identifier}: ${c.balance.description}, d = ${c.balance.readabilityMg} mg`} />
        <KV k="Water temperature" v={`${c.conditions.waterTemperatureC} °C (${c.conditions.waterAirSaturated ? 'air-saturated' : 'air-free'} water, Tanaka 2001)`} />
        <KV k="Air" v={`${c.conditions.air.temperatureC} °C, ${c.conditions.air.pressureHPa} hPa, ${c.conditions.air.relativeHumidityPct} %RH (CIPM-2007)`} />
        {tested.map((t, i) => (
          <View key={i} wrap={false}>
            <T style={s.h2}>{`Tested volume ${t.testedVolume.value} ${t.testedVolume.unit}, n = ${t.n}`}</T>
            <T style={[s.para, s.small]}>{`Volumes at 20 °C (${t.mean.unit}): ${t.replicates.map((r) => shortDecimal(r.volume.value, 5)).join('; ')}`}</T>
            <KV k="Mean volume" v={`${shortDecimal(t.mean.value, 5)} ${t.mean.unit}`} bold />
            <KV k="Systematic error" v={`${shortDecimal(t.systematicError.value, 5)} ${t.systematicError.unit} (${shortDecimal(t.systematicError.percent, 3)} %)`} />
            <KV k="Random error" v={`s = ${shortDecimal(t.randomError.standardDeviation.value, 5)} ${t.randomError.standardDeviation.unit} (CV ${shortDecimal(t.randomError.cvPercent, 3)} %)`} />
            <KV k="Expanded uncertainty" v={`U = ${shortDecimal(t.uncertainty.expandedUncertainty, 5)} ${t.uncertainty.unit} (k = ${t.uncertainty.k})`} />
            <KV k="Limit" v={`± ${t.verdict.limit.systematic.value} ${t.verdict.limit.systematic.unit}${t.verdict.limit.random ? `; s ≤ ${t.verdict.limit.random.value} ${t.verdict.limit.random.unit}` : ''}`} />
            <KV k="Verdict" v={t.verdict.result === 'pass' ? 'PASS' : 'FAIL'} bold />
            <T style={s.small}>{`Limit source: ${limitSourceText(t.verdict.limit.source, t.verdict.limit.fromMemory)}`}</T>
          </View>
        ))}
        <T style={s.h2}>Result</T>
        <KV k="Overall verdict" v={c.result ? (c.result.verdict === 'pass' ? 'PASS' : 'FAIL') : 'not complete'} bold />
        <KV k="Next check due" v={c.nextDueOn ?? '—'} />
        <KV k="Calculation" v={c.calcVersion ?? '—'} />
        <T style={[s.para, s.small]}>{tested[0]?.verdict.decisionRule ?? ''}</T>
        <T style={s.h2}>Signatures</T>
        {c.signatures.length ? c.signatures.map((g) => <KV key={g.id} k={g.meaningText} v={`${g.signer.fullName}, ${labDateTime(g.signedAt, tz)} (v${g.recordVersion}${g.valid ? '' : ', no longer valid'})`} />) : <T>none</T>}
        <T style={[s.small, { marginTop: 12 }]}>{`Printed ${labDay(data.generatedAt, tz)} by ${data.generatedBy}`}</T>
      </Page>
    </Document>
  );
}

export async function renderVolumeCheckCertificate(data: VolumeCheckCertificateData): Promise<Buffer> {
  return renderDocument(createElement(VolumeCheckCertificate, { data }));
}
