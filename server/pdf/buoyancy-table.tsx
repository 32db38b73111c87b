/**
 * The buoyancy factor table as an A4 sheet to post at the balance: the air conditions and density, the weights'
 * density, and per named sample its density (with source), B = m/m' and 1/B (reading per gram of true mass),
 * exactly the display strings the API returns (nothing is recomputed here). Rendered through renderDocument.
 */
import { createElement } from 'react';
import { Document, Page, StyleSheet, Text, View } from '@react-pdf/renderer';
import type { BuoyancyTableResponse } from '../../shared/schemas/buoyancy-table.ts';
import { renderDocument } from './document.ts';
import { fontFor, PLAIN_SHAPING, TEXT_FONT } from './fonts.ts';
import { labDateTime } from './format.ts';

export interface BuoyancyTablePdfData {
  table: BuoyancyTableResponse;
  timeZone: string;
  printedBy: string;
}

const s = StyleSheet.create({
  page: { fontFamily: TEXT_FONT, fontFeatureSettings: PLAIN_SHAPING, fontSize: 9, padding: 34, color: '#111' },
  lab: { fontSize: 11, fontWeight: 700 },
  title: { fontSize: 16, fontWeight: 700, marginTop: 4 },
  small: { fontSize: 7.5, color: '#333' },
  para: { marginTop: 4, lineHeight: 1.35 },
  head: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: '#111', paddingBottom: 2, marginTop: 10, fontWeight: 700 },
  row: { flexDirection: 'row', borderBottomWidth: 0.5, borderBottomColor: '#bbb', paddingVertical: 2.5 },
  name: { width: 170 },
  rho: { width: 60, textAlign: 'right' },
  num: { width: 85, textAlign: 'right', fontSize: 11, fontWeight: 700 },
  ppm: { width: 60, textAlign: 'right' },
  src: { flex: 1, paddingLeft: 10, fontSize: 6.5, color: '#444' },
});

function T({ children, style }: { children: string; style?: object | object[] }) {
  return <Text style={[...(Array.isArray(style) ? style : style ? [style] : []), { fontFamily: fontFor(children) }]}>{children}</Text>;
}

export function BuoyancyTableSheet({ data }: { data: BuoyancyTablePdfData }) {
  const t = data.table;
  const a = t.air;
  return (
    <Document title="Buoyancy factor table">
      <Page size="A4" style={s.page}>
        <T style={s.lab}>{t.labName}</T>
        <T style={s.title}>Buoyancy factor table</T>
        <T style={s.para}>{`Air: ${a.temperatureC} °C, ${a.pressureHPa} hPa, ${a.relativeHumidityPct} % RH (${a.source === 'entered' ? 'entered' : "the lab's room conditions"}) → ρa = ${a.densityKgPerM3Display} kg/m³ (CIPM-2007). Weights: ρw = ${t.weightDensity} g/cm³.`}</T>
        <T style={s.para}>{"True mass = reading × B. Reading to aim for = true mass × 1/B. B = (1 − ρa/ρw)/(1 − ρa/ρ) (NIST SOP 2). Check the conditions at the balance: the factors hold for the air density above."}</T>
        <View style={s.head}>
          <T style={s.name}>Sample</T>
          <T style={s.rho}>ρ / (g/mL)</T>
          <T style={s.num}>B = m/m′</T>
          <T style={s.num}>1/B (g per g)</T>
          <T style={s.ppm}>ppm</T>
          <T style={s.src}>Density source</T>
        </View>
        {t.rows.map((r) => (
          <View key={r.name} style={s.row} wrap={false}>
            <T style={s.name}>{r.name}</T>
            <T style={s.rho}>{r.density}</T>
            <T style={s.num}>{r.factorDisplay}</T>
            <T style={s.num}>{r.readingPerGramDisplay}</T>
            <T style={s.ppm}>{r.correctionPpm}</T>
            <T style={s.src}>{r.source}</T>
          </View>
        ))}
        <T style={[s.small, { marginTop: 12 }]}>{`Calculation ${t.calcVersion}. Printed ${labDateTime(t.generatedAt, data.timeZone)} by ${data.printedBy}. A reference card computed by Tarebook, not a record; the densities marked "from memory" are to be checked against a handbook.`}</T>
      </Page>
    </Document>
  );
}

export async function renderBuoyancyTablePdf(data: BuoyancyTablePdfData): Promise<Buffer> {
  return renderDocument(createElement(BuoyancyTableSheet, { data }));
}
