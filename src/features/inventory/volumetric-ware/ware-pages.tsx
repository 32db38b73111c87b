import { WARE_CLASSES, WARE_INPUT_STATUSES, WARE_KINDS, wareCreateInputSchema, wareUpdateInputSchema, type VolumetricWare } from '../../../../shared/schemas/inventory.ts';
import { withUnit } from '../components/detail-list.tsx';
import type { FormSection, FormValues } from '../components/record-form.tsx';
import { label, STATUS_LABELS, WARE_CLASS_LABELS, WARE_KIND_LABELS } from '../format.ts';
import { WareCalibrationPanel } from '../../glassware/components/calibration-panel.tsx';
import { RecordCreatePage, RecordDetailPage, type CreateConfig, type DetailConfig } from '../record-pages.tsx';

const sections: FormSection[] = [
  {
    title: 'Volumetric item',
    fields: [
      { name: 'identifier', label: 'Identifier', hint: 'As etched or labelled, e.g. VF-100-03' },
      { name: 'kind', label: 'Kind', type: 'select', options: WARE_KINDS.map((k) => ({ value: k, label: label(WARE_KIND_LABELS, k) })) },
      { name: 'nominalVolumeMl', label: 'Nominal volume', type: 'decimal', suffix: 'mL' },
      { name: 'class', label: 'Class', type: 'select', options: WARE_CLASSES.map((c) => ({ value: c, label: label(WARE_CLASS_LABELS, c) })) },
      { name: 'toleranceMl', label: 'Tolerance (±)', type: 'decimal', suffix: 'mL', hint: 'Maximum permissible error at nominal volume' },
      { name: 'material', label: 'Material', hint: 'e.g. borosilicate 3.3 (for the thermal expansion)' },
      { name: 'status', label: 'Status', type: 'select', options: WARE_INPUT_STATUSES.map((s) => ({ value: s, label: label(STATUS_LABELS, s) })) },
    ],
  },
];

const s = (v: string | null | undefined) => v ?? '';

function toForm(w: VolumetricWare): FormValues {
  return {
    identifier: w.identifier,
    kind: w.kind,
    nominalVolumeMl: w.nominalVolumeMl,
    class: w.class,
    toleranceMl: s(w.toleranceMl),
    material: s(w.material),
    status: w.status === 'retired' ? 'out_of_service' : w.status,
  };
}

export const wareDetailConfig: DetailConfig<'volumetric-ware'> = {
  kind: 'volumetric-ware',
  title: (w) => w.identifier,
  subtitle: (w) => `${label(WARE_KIND_LABELS, w.kind)}, ${w.nominalVolumeMl} mL, ${label(WARE_CLASS_LABELS, w.class)}`,
  rows: (w) => [
    { label: 'Identifier', value: w.identifier, numeric: true },
    { label: 'Kind', value: label(WARE_KIND_LABELS, w.kind) },
    { label: 'Nominal volume', value: withUnit(w.nominalVolumeMl, 'mL'), numeric: true },
    { label: 'Class', value: label(WARE_CLASS_LABELS, w.class) },
    { label: 'Tolerance', value: w.toleranceMl ? withUnit(`± ${w.toleranceMl}`, 'mL') : null, numeric: true },
    { label: 'Material', value: w.material },
  ],
  panels: (w) => <WareCalibrationPanel wareId={w.id} kind={w.kind} retired={w.status === 'retired'} />,
  sections,
  updateSchema: wareUpdateInputSchema,
  toForm,
};

export const wareCreateConfig: CreateConfig<'volumetric-ware'> = {
  kind: 'volumetric-ware',
  sections,
  createSchema: wareCreateInputSchema,
  intro: 'Flasks and pipettes with their class and tolerance at nominal volume.',
  empty: { identifier: '', kind: 'volumetric_flask', nominalVolumeMl: '', class: 'A', toleranceMl: '', material: 'borosilicate 3.3', status: 'in_service' },
};

export function WareDetailPage() {
  return <RecordDetailPage config={wareDetailConfig} />;
}

export function WareCreatePage() {
  return <RecordCreatePage config={wareCreateConfig} />;
}
