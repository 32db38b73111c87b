/**
 * The create and edit form of every register, driven by a list of field specs and validated with the
 * register's shared zod input schema (the same one the server uses). Server `error.fields` land on the
 * field they name. In edit mode only the fields that changed are sent, so the audit trail shows exactly
 * what was changed.
 */
import { useState, type ReactNode } from 'react';
import { get, useFieldArray, useForm, type FieldErrors, type Resolver, type UseFormReturn } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { fieldId, SelectField, TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { applyApiFieldErrors } from '../../../lib/form.ts';
import type { Option } from './list-toolbar.tsx';
import { ISO_DATE_INPUT } from '../../../lib/format.ts';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type FormValues = Record<string, any>;

export interface FieldSpec {
  /** dotted path, the same as the API input (`purity.value`) */
  name: string;
  label: string;
  type?: 'text' | 'decimal' | 'date' | 'select' | 'list' | 'textarea' | 'analytes';
  options?: readonly Option[];
  hint?: ReactNode;
  suffix?: string;
  /** spans both columns */
  wide?: boolean;
  /** shown only when creating (e.g. an identifier that never changes) */
  createOnly?: boolean;
}

export interface FormSection {
  title: string;
  fields: FieldSpec[];
}

/** "H302, H319 H332" → ["H302", "H319", "H332"]; list fields are typed as one line. */
export function splitList(text: unknown): unknown {
  if (typeof text !== 'string') return text;
  return text
    .split(/[\s,;]+/)
    .map((s) => s.trim())
    .filter(Boolean);
}

/** The message at a dotted path of the form's errors, if any. */
function errAt(errors: FieldErrors, path: string): string | undefined {
  const e = get(errors, path) as { message?: unknown } | undefined;
  return typeof e?.message === 'string' ? e.message : undefined;
}

function listFields(sections: FormSection[]): string[] {
  return sections.flatMap((s) => s.fields.filter((f) => f.type === 'list').map((f) => f.name));
}

/** zod checks each list item (`ghsHazardStatements.1`); the form shows one message at the list's field. */
function collapseListErrors(errors: FieldErrors, names: string[], values: FormValues): void {
  for (const name of names) {
    const e = errors[name] as unknown;
    if (!e || typeof e !== 'object' || 'message' in (e as object)) continue;
    const items = splitList(values[name]) as string[];
    const first = Object.entries(e as Record<string, { message?: string }>).find(([, v]) => v && typeof v === 'object' && v.message);
    if (first) {
      const item = items[Number(first[0])];
      errors[name] = { type: 'list', message: item ? `"${item}": ${first[1].message}` : String(first[1].message) };
    }
  }
}

function makeResolver(schema: z.ZodType, lists: string[]): Resolver<FormValues> {
  const inner = zodResolver(schema as never) as unknown as Resolver<FormValues>;
  return async (values, ctx, options) => {
    const prepared: FormValues = { ...values };
    for (const name of lists) prepared[name] = splitList(values[name]);
    const result = await inner(prepared, ctx, options);
    collapseListErrors(result.errors as FieldErrors, lists, values);
    return result;
  };
}

function setPath(target: FormValues, path: string, value: unknown) {
  const keys = path.split('.');
  let o = target;
  for (const k of keys.slice(0, -1)) o = o[k] ??= {};
  o[keys[keys.length - 1]] = value;
}

/** Server paths like `ghsHazardStatements.2` belong to the list field; analytes keep their row paths. */
function normaliseServerError(error: unknown, lists: string[]): unknown {
  if (!(error instanceof ApiError)) return error;
  const fields: Record<string, string> = {};
  for (const [path, msg] of Object.entries(error.fields)) {
    const list = lists.find((l) => path.startsWith(`${l}.`));
    fields[list ?? path] = msg;
  }
  return new ApiError(error.status, error.code, error.message, fields);
}

function AnalytesEditor({ form, disabled }: { form: UseFormReturn<FormValues>; disabled?: boolean }) {
  const { fields, append, remove } = useFieldArray({ control: form.control, name: 'analytes' });
  const errors = form.formState.errors;
  const listError = errAt(errors, 'analytes') ?? errAt(errors, 'analytes.root');
  return (
    <fieldset className="md:col-span-2" data-testid="analytes-editor">
      <legend className="mb-1 text-sm font-semibold">Analytes it is certified for</legend>
      <div className="flex flex-col gap-3">
        {fields.map((f, i) => (
          <div key={f.id} className="grid items-end gap-3 sm:grid-cols-[1fr_1fr_auto]">
            <TextField label={`Analyte ${i + 1} name`} registration={form.register(`analytes.${i}.name`)} error={errAt(errors, `analytes.${i}.name`)} />
            <TextField label="Formula" registration={form.register(`analytes.${i}.formula`)} error={errAt(errors, `analytes.${i}.formula`)} numeric />
            <Button variant="danger" onClick={() => remove(i)} disabled={disabled || fields.length <= 1} aria-label={`Remove analyte ${i + 1}`}>
              Remove
            </Button>
          </div>
        ))}
        {listError ? (
          <p role="alert" className="text-sm font-semibold text-bad-700">
            {listError}
          </p>
        ) : null}
        <div>
          <Button variant="secondary" onClick={() => append({ name: '', formula: '' })} disabled={disabled}>
            Add an analyte
          </Button>
        </div>
      </div>
    </fieldset>
  );
}

export function RecordForm({
  mode,
  sections,
  schema,
  defaultValues,
  submitLabel,
  onSubmit,
  onCancel,
  busy,
  testId,
}: {
  mode: 'create' | 'edit';
  sections: FormSection[];
  schema: z.ZodType;
  defaultValues: FormValues;
  submitLabel: string;
  /** create: the whole parsed input; edit: only the changed fields. Rejects with the ApiError. */
  onSubmit: (body: FormValues) => Promise<unknown>;
  onCancel?: () => void;
  busy?: boolean;
  testId?: string;
}) {
  const lists = listFields(sections);
  const form = useForm<FormValues>({ resolver: makeResolver(schema, lists), defaultValues });
  const { errors } = form.formState;
  const [banner, setBanner] = useState<string | null>(null);
  const visible = sections.map((s) => ({ ...s, fields: s.fields.filter((f) => mode === 'create' || !f.createOnly) }));
  const known = visible.flatMap((s) => s.fields.map((f) => f.name));

  const submit = form.handleSubmit(async (parsed) => {
    setBanner(null);
    let body: FormValues = parsed;
    if (mode === 'edit') {
      body = {};
      const raw = form.getValues();
      for (const name of known) {
        if (JSON.stringify(get(raw, name)) !== JSON.stringify(get(defaultValues, name))) setPath(body, name, get(parsed, name));
      }
      if (Object.keys(body).length === 0) {
        setBanner('Nothing was changed.');
        return;
      }
    }
    try {
      await onSubmit(body);
    } catch (error) {
      const rows = (form.getValues('analytes') as unknown[] | undefined)?.length ?? 0;
      const analytePaths = Array.from({ length: rows }, (_, i) => [`analytes.${i}.name`, `analytes.${i}.formula`]).flat();
      setBanner(applyApiFieldErrors(normaliseServerError(error, lists), form.setError, [...known, ...analytePaths]));
    }
  });

  const renderField = (f: FieldSpec) => {
    const error = errAt(errors, f.name);
    const className = f.wide ? 'md:col-span-2' : '';
    if (f.type === 'analytes') return <AnalytesEditor key={f.name} form={form} disabled={busy} />;
    if (f.type === 'select') {
      return <SelectField key={f.name} label={f.label} registration={form.register(f.name)} error={error} hint={f.hint} options={f.options ?? []} className={className} />;
    }
    if (f.type === 'textarea') {
      const id = fieldId(f.name);
      return (
        <div key={f.name} className="md:col-span-2">
          <label htmlFor={id} className="mb-1 block text-sm font-semibold">
            {f.label}
          </label>
          <textarea id={id} rows={3} {...form.register(f.name)} aria-invalid={error ? true : undefined} className="field-input" />
          {error ? (
            <p id={`${id}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {error}
            </p>
          ) : null}
        </div>
      );
    }
    return (
      <TextField
        key={f.name}
        label={f.label}
        registration={form.register(f.name)}
        error={error}
        hint={f.hint}
        suffix={f.suffix}
        className={className}
        numeric={f.type === 'decimal'}
        {...(f.type === 'date' ? ISO_DATE_INPUT : { type: 'text', inputMode: f.type === 'decimal' ? ('decimal' as const) : undefined })}
      />
    );
  };

  return (
    <form noValidate onSubmit={submit} className="flex flex-col gap-6" data-testid={testId}>
      {banner ? (
        <Banner tone={banner === 'Nothing was changed.' ? 'info' : 'error'} title={banner === 'Nothing was changed.' ? undefined : 'Not saved'}>
          {banner}
        </Banner>
      ) : null}
      {visible.map((s) => (
        <fieldset key={s.title} className="rounded-xl border-2 border-line bg-card p-5">
          <legend className="px-2 text-lg font-bold">{s.title}</legend>
          <div className="grid gap-4 md:grid-cols-2">{s.fields.map(renderField)}</div>
        </fieldset>
      ))}
      <div className="flex flex-wrap gap-3">
        <Button type="submit" busy={busy} data-testid="record-form-submit">
          {submitLabel}
        </Button>
        {onCancel ? (
          <Button variant="secondary" onClick={onCancel} disabled={busy}>
            Cancel
          </Button>
        ) : null}
      </div>
    </form>
  );
}
