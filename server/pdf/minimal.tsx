/** A one-page minimal document: the baseline the benchmark reports next to the prep sheet and labels. */
import { Document, Page, Text } from '@react-pdf/renderer';
import { TEXT_FONT } from './fonts.ts';

export function MinimalDocument() {
  return (
    <Document creator="Tarebook" producer="Tarebook" creationDate={new Date('2026-01-01T00:00:00Z')}>
      <Page size="A4" style={{ padding: 36, fontFamily: TEXT_FONT }}>
        <Text>Tarebook</Text>
      </Page>
    </Document>
  );
}
