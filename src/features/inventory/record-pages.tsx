/**
 * The detail/edit page and the create page of every register. Each register supplies its fields,
 * form sections and schemas; the scaffolding (loading, not found, edit toggle, retire) is shared.
 */
import { useState, type ReactNode } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { NotFound } from '../../components/errors/not-found.tsx';
import { ApiError } from '../../lib/api-client.ts';
import { formatDateTime } from '../../lib/format.ts';
import { useAuth } from '../auth/use-auth.ts';
import { useCreateItem, useRetireItem, useUpdateItem } from './api/inventory-mutations.ts';
import { detailQuery, type ItemOf } from './api/inventory-queries.ts';
import { StatusBadge } from './components/badges.tsx';
import { DetailList, type DetailRow } from './components/detail-list.tsx';
import { RecordForm, type FormSection, type FormValues } from './components/record-form.tsx';
import { RetireDialog } from './components/retire-dialog.tsx';
import { INVENTORY_WRITE_ROLES, KIND_INFO, type InventoryKind } from './kinds.ts';

type Common = { retiredAt: string | null; retiredReason: string | null; status: string; createdAt: string; updatedAt: string; id: number };

export interface DetailConfig<K extends InventoryKind> {
  kind: K;
  title: (item: ItemOf<K>) => string;
  subtitle?: (item: ItemOf<K>) => ReactNode;
  rows: (item: ItemOf<K>) => DetailRow[];
  /** extra panels below the fields (hazards, certificates, minimum weight…) */
  panels?: (item: ItemOf<K>, canWrite: boolean) => ReactNode;
  /** the edit form's sections (a function when a hint depends on the record) */
  sections: FormSection[] | ((item: ItemOf<K>) => FormSection[]);
  updateSchema: z.ZodType;
  toForm: (item: ItemOf<K>) => FormValues;
}

export interface CreateConfig<K extends InventoryKind> {
  kind: K;
  sections: FormSection[];
  createSchema: z.ZodType;
  empty: FormValues;
  intro: string;
}

function useCanWrite(): boolean {
  const auth = useAuth();
  return auth.status === 'signed-in' && (INVENTORY_WRITE_ROLES as readonly string[]).includes(auth.user.role);
}

function BackLink({ kind }: { kind: InventoryKind }) {
  return (
    <Link to={KIND_INFO[kind].pagePath} className="mb-3 inline-flex min-h-12 items-center font-semibold text-brass-600 underline underline-offset-4" data-testid="back-to-list">
      ← {KIND_INFO[kind].title}
    </Link>
  );
}

export function RecordDetailPage<K extends InventoryKind>({ config }: { config: DetailConfig<K> }) {
  const { kind } = config;
  const info = KIND_INFO[kind];
  const { id: rawId } = useParams();
  const id = rawId && /^\d{1,9}$/.test(rawId) ? Number(rawId) : NaN;
  const canWrite = useCanWrite();
  const [editing, setEditing] = useState(false);
  const [retiring, setRetiring] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const query = useQuery({ ...detailQuery(kind, id), enabled: Number.isInteger(id) });
  const update = useUpdateItem(kind);
  const retire = useRetireItem(kind);

  if (!Number.isInteger(id)) return <NotFound />;
  if (query.isError && query.error instanceof ApiError && query.error.status === 404) return <NotFound />;
  if (query.isError) return <Banner title={`Could not load this ${info.singular}`}>{query.error.message}</Banner>;
  if (!query.data) return <Spinner label={`Loading the ${info.singular}…`} />;

  const item = query.data;
  const common = item as unknown as Common;
  const retired = common.status === 'retired';
  const name = config.title(item);

  return (
    <div className="flex min-w-0 flex-col gap-5" data-testid={`inventory-detail-${kind}`}>
      <div>
        <BackLink kind={kind} />
        <div className="flex flex-wrap items-start justify-between gap-4">
          <PageHeader title={<span data-testid="detail-title">{name}</span>}>{config.subtitle?.(item)}</PageHeader>
          <div className="flex flex-wrap items-center gap-3">
            <StatusBadge status={common.status} />
            {canWrite && !retired && !editing ? (
              <>
                <Button variant="secondary" onClick={() => { setNotice(null); setEditing(true); }} data-testid="edit-button">
                  Edit
                </Button>
                <Button variant="danger" onClick={() => setRetiring(true)} data-testid="retire-button">
                  Retire
                </Button>
              </>
            ) : null}
          </div>
        </div>
      </div>

      {notice ? <Banner tone="ok">{notice}</Banner> : null}
      {retired ? (
        <Banner tone="info" title={`Retired${common.retiredAt ? ` on ${formatDateTime(common.retiredAt)}` : ''}`} testId="retired-banner">
          {common.retiredReason ? `Reason: ${common.retiredReason}` : 'It can no longer be chosen for new work.'}
        </Banner>
      ) : null}

      {editing ? (
        <RecordForm
          mode="edit"
          sections={typeof config.sections === 'function' ? config.sections(item) : config.sections}
          schema={config.updateSchema}
          defaultValues={config.toForm(item)}
          submitLabel="Save changes"
          busy={update.isPending}
          testId="edit-form"
          onCancel={() => setEditing(false)}
          onSubmit={async (patch) => {
            await update.mutateAsync({ id, patch });
            setEditing(false);
            setNotice('Saved. The change is in the audit trail with the old and new values.');
          }}
        />
      ) : (
        <Panel title="Record" id="record">
          <DetailList rows={config.rows(item)} />
          <p className="mt-4 text-sm text-ink-soft">
            Created {formatDateTime(common.createdAt)} · last changed {formatDateTime(common.updatedAt)}
          </p>
        </Panel>
      )}

      {config.panels?.(item, canWrite && !retired)}

      <RetireDialog
        open={retiring}
        itemName={name}
        busy={retire.isPending}
        onClose={() => setRetiring(false)}
        onRetire={async (reason) => {
          await retire.mutateAsync({ id, reason });
          setRetiring(false);
          setEditing(false);
          setNotice(`${name} was retired.`);
        }}
      />
    </div>
  );
}

export function RecordCreatePage<K extends InventoryKind>({ config }: { config: CreateConfig<K> }) {
  const info = KIND_INFO[config.kind];
  const create = useCreateItem(config.kind);
  const navigate = useNavigate();
  return (
    <div className="flex min-w-0 flex-col gap-5" data-testid={`inventory-create-${config.kind}`}>
      <div>
        <BackLink kind={config.kind} />
        <PageHeader title={`Add a ${info.singular}`}>{config.intro}</PageHeader>
      </div>
      <RecordForm
        mode="create"
        sections={config.sections}
        schema={config.createSchema}
        defaultValues={config.empty}
        submitLabel={`Add ${info.singular}`}
        busy={create.isPending}
        testId="create-form"
        onCancel={() => navigate(info.pagePath)}
        onSubmit={async (body) => {
          const item = await create.mutateAsync(body);
          navigate(`${info.pagePath}/${item.id}`);
        }}
      />
    </div>
  );
}
