/**
 * Vial labels (REQUIREMENTS LB-01…LB-07). The content comes only from the stored label snapshot of the
 * record version (never typed in the print dialog); the layout from the template snapshot.
 *
 *   full:  identifier + Data Matrix, name of the standard, concentration and unit, solvent, prepared and
 *          expiry dates, preparer's initials, storage, hazard pictogram codes
 *   small: identifier + Data Matrix, short name, concentration, expiry (and storage when it has room)
 *
 * Marks: the unverified mark on every label printed before verification, "REPRINT n" on reprints, and the
 * preview mark on previews. Sheets place rows × columns labels per page; rolls print one label per page.
 */
import { Document, Image, Page, Text, View } from '@react-pdf/renderer';
import type { LabelSnapshot, TemplateSnapshot } from '../db/models/printing.model.ts';
import { PAGE_SIZE_MM, PREVIEW_MARK, REPRINT_MARK, UNVERIFIED_MARK } from '../../shared/schemas/printing.ts';
import { fontFor, PLAIN_SHAPING, TEXT_FONT } from './fonts.ts';

export interface LabelMarks {
  unverified: boolean;
  preview: boolean;
  /** n of "REPRINT n" (print number − 1), or null for an original */
  reprint: number | null;
}

export interface LabelsData {
  template: TemplateSnapshot;
  label: LabelSnapshot;
  copies: number;
  marks: LabelMarks;
  /** Data Matrix PNG of label.identifier */
  dataMatrix: Buffer;
  /** fixed creation date, so the same print renders the same bytes */
  createdAt: string;
}

/** Millimetres to PDF points (1 in = 25.4 mm = 72 pt). Layout only, never a measured value. */
export const mmToPt = (mm: string | number) => (Number(mm) * 72) / 25.4;

/** The label cells of one page: [left, top] in points. */
export function labelPositions(t: TemplateSnapshot): Array<[number, number]> {
  if (t.layout.kind === 'roll') return [[0, 0]];
  const l = t.layout;
  const w = mmToPt(t.widthMm);
  const h = mmToPt(t.heightMm);
  const out: Array<[number, number]> = [];
  for (let r = 0; r < l.rows; r++) {
    for (let c = 0; c < l.columns; c++) {
      out.push([mmToPt(l.marginLeftMm) + c * (w + mmToPt(l.gapXMm)), mmToPt(l.marginTopMm) + r * (h + mmToPt(l.gapYMm))]);
    }
  }
  return out;
}

function Line({ text, size, bold, color }: { text: string; size: number; bold?: boolean; color?: string }) {
  return (
    <Text style={{ fontFamily: fontFor(text), fontSize: size, fontWeight: bold ? 700 : 400, lineHeight: 1.12, color: color ?? '#000' }}>{text}</Text>
  );
}

function Marks({ marks, size }: { marks: LabelMarks; size: number }) {
  return (
    <View>
      {marks.preview ? (
        <Text style={{ fontFamily: TEXT_FONT, fontSize: size, fontWeight: 700, textAlign: 'center', borderWidth: 0.5, borderColor: '#000', marginBottom: 0.5 }}>{PREVIEW_MARK}</Text>
      ) : null}
      {marks.reprint !== null ? (
        <Text style={{ fontFamily: TEXT_FONT, fontSize: size, fontWeight: 700, textAlign: 'center', borderWidth: 0.5, borderColor: '#000', marginBottom: 0.5 }}>{`${REPRINT_MARK} ${marks.reprint}`}</Text>
      ) : null}
      {marks.unverified ? (
        <Text style={{ fontFamily: TEXT_FONT, fontSize: size, fontWeight: 700, textAlign: 'center', backgroundColor: '#000', color: '#fff', paddingVertical: 0.3 }}>{UNVERIFIED_MARK}</Text>
      ) : null}
    </View>
  );
}

function OneLabel({ data, left, top }: { data: LabelsData; left: number; top: number }) {
  const t = data.template;
  const L = data.label;
  const w = mmToPt(t.widthMm);
  const h = mmToPt(t.heightMm);
  const pad = Math.max(1.5, Math.min(w, h) * 0.04);
  const small = t.content === 'small';
  // font size follows the label height: 25 mm → 5 pt, 12 mm → 3.2 pt (floor), 34 mm → 6.8 pt
  const fs = Math.max(3.2, Math.min(8, h / 14));
  const markFs = Math.max(2.4, Math.min(w / 28, fs * 0.85));
  const markLines = (data.marks.unverified ? 1 : 0) + (data.marks.reprint !== null ? 1 : 0) + (data.marks.preview ? 1 : 0);
  const markH = markLines * markFs * 1.35;
  const dm = Math.max(14, Math.min(h - 2 * pad - markH, w * (small ? 0.42 : 0.34)));
  return (
    <View style={{ position: 'absolute', left, top, width: w, height: h, padding: pad, overflow: 'hidden', flexDirection: 'column' }}>
      <View style={{ flexDirection: 'row', flexGrow: 1 }}>
        <View style={{ width: dm, marginRight: pad }}>
          <Image src={{ data: data.dataMatrix, format: 'png' }} style={{ width: dm, height: dm }} />
        </View>
        <View style={{ flex: 1 }}>
          <Line text={L.identifier} size={fs * 1.1} bold />
          {small ? (
            <>
              <Line text={L.analyteFormula} size={fs} bold />
              <Line text={L.concentrationShort} size={fs} bold />
              <Line text={`Exp ${L.expiresOn}`} size={fs} />
              {L.storage ? <Line text={L.storage} size={fs * 0.85} /> : null}
            </>
          ) : (
            <>
              <Line text={`${L.analyteFormula} standard from ${L.materialName}`} size={fs} bold />
              <Line text={L.concentration} size={fs} bold />
              {L.solvent ? <Line text={`in ${L.solvent}`} size={fs * 0.9} /> : null}
              <Line text={`Prep ${L.preparedOn} · ${L.preparerInitials}`} size={fs * 0.9} />
              <Line text={`Exp ${L.expiresOn}`} size={fs * 0.9} bold />
              {L.storage ? <Line text={`Store: ${L.storage}`} size={fs * 0.8} /> : null}
              {L.pictograms.length ? <Line text={L.pictograms.join(' ')} size={fs * 0.8} bold /> : null}
            </>
          )}
        </View>
      </View>
      <Marks marks={data.marks} size={markFs} />
    </View>
  );
}

export function LabelsDocument({ data }: { data: LabelsData }) {
  const t = data.template;
  const cells = labelPositions(t);
  const pages: number[][] = [];
  for (let i = 0; i < data.copies; i += cells.length) pages.push(Array.from({ length: Math.min(cells.length, data.copies - i) }, (_, j) => j));
  const size: [number, number] =
    t.layout.kind === 'roll'
      ? [mmToPt(t.widthMm), mmToPt(t.heightMm)]
      : [mmToPt(PAGE_SIZE_MM[t.layout.pageSize].width), mmToPt(PAGE_SIZE_MM[t.layout.pageSize].height)];
  const title = `Labels ${data.label.identifier} v${data.label.version}${data.marks.preview ? ' (preview)' : data.marks.reprint !== null ? ` (${REPRINT_MARK} ${data.marks.reprint})` : ''}`;
  return (
    <Document title={title} creator="Tarebook" producer="Tarebook" creationDate={new Date(data.createdAt)}>
      {pages.map((cellsOnPage, p) => (
        <Page key={p} size={size} style={{ position: 'relative', fontFeatureSettings: PLAIN_SHAPING }}>
          {cellsOnPage.map((i) => (
            <OneLabel key={i} data={data} left={cells[i]![0]} top={cells[i]![1]} />
          ))}
        </Page>
      ))}
    </Document>
  );
}
