import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import type { LabelTemplate } from '../../../shared/schemas/printing.ts';
import { printingQueries } from './api/printing-queries.ts';
import { TemplateForm } from './components/template-form.tsx';
import { templateContent, templateLayout, templateSize } from './format.ts';

/** /admin/label-templates: list, create and edit the label templates (admin). */
export function LabelTemplatesPage() {
  const templates = useQuery(printingQueries.templates());
  const [editing, setEditing] = useState<LabelTemplate | 'new' | null>(null);
  const [saved, setSaved] = useState<string | null>(null);

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Label templates">
        <p>Label size, content and the layout on the page. Every change is recorded in the audit trail; past prints keep the template they used.</p>
      </PageHeader>
      {saved ? (
        <Banner tone="ok" title="Template saved" testId="template-saved">
          {saved}
        </Banner>
      ) : null}
      <Panel title="Templates" id="templates-list">
        {templates.isPending ? (
          <Spinner label="Loading the label templates…" />
        ) : templates.isError ? (
          <Banner title="The label templates could not be loaded">{templates.error.message}</Banner>
        ) : (
          <div className="flex flex-col gap-4">
            {templates.data.items.length === 0 ? <p className="text-ink-soft">No templates yet.</p> : null}
            {templates.data.items.length > 0 ? (
              <div className="overflow-x-auto">
                <table className="w-full min-w-[44rem] border-collapse text-left" data-testid="templates-table">
                  <thead>
                    <tr className="border-b-2 border-line text-sm text-ink-soft">
                      <th scope="col" className="py-2 pr-4">Name</th>
                      <th scope="col" className="py-2 pr-4">Size</th>
                      <th scope="col" className="py-2 pr-4">Layout</th>
                      <th scope="col" className="py-2 pr-4">Content</th>
                      <th scope="col" className="py-2 pr-4">State</th>
                      <th scope="col" className="py-2">
                        <span className="sr-only">Actions</span>
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {templates.data.items.map((t) => (
                      <tr key={t.id} className="border-b border-line" data-testid="template-row">
                        <td className="py-2 pr-4 font-semibold">{t.name}</td>
                        <td className="num py-2 pr-4">{templateSize(t)}</td>
                        <td className="py-2 pr-4">{templateLayout(t)}</td>
                        <td className="py-2 pr-4">{templateContent(t.content)}</td>
                        <td className="py-2 pr-4">{t.active ? 'active' : 'inactive'}</td>
                        <td className="py-2 text-right">
                          <Button
                            variant="secondary"
                            onClick={() => {
                              setSaved(null);
                              setEditing(t);
                            }}
                            data-testid="template-edit"
                            aria-label={`Edit ${t.name}`}
                          >
                            Edit
                          </Button>
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            ) : null}
            <div>
              <Button
                onClick={() => {
                  setSaved(null);
                  setEditing('new');
                }}
                data-testid="template-new"
              >
                New template
              </Button>
            </div>
          </div>
        )}
      </Panel>
      {editing ? (
        <Panel>
          <TemplateForm
            key={editing === 'new' ? 'new' : editing.id}
            template={editing === 'new' ? undefined : editing}
            onDone={(t) => {
              setSaved(`“${t.name}”: ${templateSize(t)}, ${templateLayout(t)}.`);
              setEditing(null);
            }}
          />
          <div className="mt-3">
            <Button variant="secondary" onClick={() => setEditing(null)} data-testid="template-cancel">
              Cancel
            </Button>
          </div>
        </Panel>
      ) : null}
    </div>
  );
}
