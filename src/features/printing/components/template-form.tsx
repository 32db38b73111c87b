import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { ChoiceField, SelectField, TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { LABEL_CONTENTS, PAGE_SIZE_MM, PAGE_SIZES, type LabelTemplate } from '../../../../shared/schemas/printing.ts';
import { useCreateLabelTemplate, useUpdateLabelTemplate } from '../api/printing-mutations.ts';
import { EMPTY_TEMPLATE, formFieldFor, parseTemplateForm, templateResolver, templateToForm, type TemplateFormValues } from '../template-form.ts';

/** Create (template undefined) or edit a label template. Admin only; the server checks the role and the page fit again. */
export function TemplateForm({ template, onDone }: { template?: LabelTemplate; onDone: (t: LabelTemplate) => void }) {
  const create = useCreateLabelTemplate();
  const update = useUpdateLabelTemplate(template?.id ?? 0);
  const mutation = template ? update : create;
  const [banner, setBanner] = useState<string | null>(null);
  const form = useForm<TemplateFormValues>({ resolver: templateResolver, defaultValues: template ? templateToForm(template) : EMPTY_TEMPLATE });
  const { errors } = form.formState;
  const kind = form.watch('kind');
  const pageSize = form.watch('pageSize');

  const onSubmit = form.handleSubmit((values) => {
    setBanner(null);
    const parsed = parseTemplateForm(values);
    if (!parsed.ok) return; // the resolver already put the messages on the fields
    mutation.mutate(parsed.input, {
      onSuccess: onDone,
      onError: (error) => {
        let placed = 0;
        if (error instanceof ApiError) {
          for (const [path, message] of Object.entries(error.fields)) {
            const field = formFieldFor(path);
            if (field) {
              form.setError(field, { type: 'server', message });
              placed += 1;
            }
          }
        }
        if (placed === 0) setBanner(error instanceof Error ? error.message : 'The template was not saved.');
      },
    });
  });

  const title = template ? `Edit “${template.name}”` : 'New label template';
  return (
    <form noValidate onSubmit={onSubmit} aria-labelledby="template-form-title" className="flex flex-col gap-5" data-testid="template-form">
      <h2 id="template-form-title" className="text-xl font-bold">
        {title}
      </h2>
      {banner ? <Banner title="The template was not saved">{banner}</Banner> : null}
      <div className="grid gap-4 md:grid-cols-3">
        <TextField label="Name" registration={form.register('name')} error={errors.name?.message} className="md:col-span-3" maxLength={80} />
        <TextField label="Label width" numeric suffix="mm" inputMode="decimal" registration={form.register('widthMm')} error={errors.widthMm?.message} />
        <TextField label="Label height" numeric suffix="mm" inputMode="decimal" registration={form.register('heightMm')} error={errors.heightMm?.message} />
        <SelectField
          label="Content"
          registration={form.register('content')}
          error={errors.content?.message}
          options={LABEL_CONTENTS.map((c) => ({ value: c, label: c === 'full' ? 'Full' : 'Small' }))}
          hint="Small: identifier, 2D code and expiry only"
        />
      </div>

      <fieldset className="flex flex-col gap-3">
        <legend className="mb-2 text-sm font-semibold">Layout</legend>
        <div className="grid gap-3 md:grid-cols-2">
          <ChoiceField type="radio" value="sheet" label="Sheet" hint="Several labels per page (A4 or Letter label sheets)" registration={form.register('kind')} />
          <ChoiceField type="radio" value="roll" label="Roll" hint="One label per page (label printers)" registration={form.register('kind')} />
        </div>
        {errors.kind?.message ? (
          <p role="alert" className="text-sm font-semibold text-bad-700">
            {errors.kind.message}
          </p>
        ) : null}
      </fieldset>

      {kind === 'sheet' ? (
        <div className="grid gap-4 md:grid-cols-3" data-testid="sheet-fields">
          <SelectField
            label="Page size"
            registration={form.register('pageSize')}
            error={errors.pageSize?.message}
            options={PAGE_SIZES.map((p) => ({ value: p, label: `${p} (${PAGE_SIZE_MM[p].width} × ${PAGE_SIZE_MM[p].height} mm)` }))}
            hint={pageSize ? `Page ${PAGE_SIZE_MM[pageSize].width} × ${PAGE_SIZE_MM[pageSize].height} mm` : undefined}
          />
          <TextField label="Rows" numeric inputMode="numeric" registration={form.register('rows')} error={errors.rows?.message} />
          <TextField label="Columns" numeric inputMode="numeric" registration={form.register('columns')} error={errors.columns?.message} />
          <TextField label="Top margin" numeric suffix="mm" inputMode="decimal" registration={form.register('marginTopMm')} error={errors.marginTopMm?.message} />
          <TextField label="Left margin" numeric suffix="mm" inputMode="decimal" registration={form.register('marginLeftMm')} error={errors.marginLeftMm?.message} />
          <div className="hidden md:block" />
          <TextField label="Gap between columns" numeric suffix="mm" inputMode="decimal" registration={form.register('gapXMm')} error={errors.gapXMm?.message} />
          <TextField label="Gap between rows" numeric suffix="mm" inputMode="decimal" registration={form.register('gapYMm')} error={errors.gapYMm?.message} />
        </div>
      ) : null}

      {template ? (
        <ChoiceField label="Active" hint="Inactive templates are not offered for printing; past prints keep their template." registration={form.register('active')} />
      ) : null}

      <div className="flex flex-wrap gap-3">
        <Button type="submit" busy={mutation.isPending} data-testid="template-submit">
          {template ? 'Save changes' : 'Create template'}
        </Button>
      </div>
    </form>
  );
}
