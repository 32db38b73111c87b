import { useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { formatLabTime } from '../preparations/format.ts';
import { outboxQueries } from './api/outbox-queries.ts';
import type { OutboxMessage } from '../../../shared/schemas/preparations.ts';

/**
 * The HTML part is shown in a sandboxed frame: `sandbox=""` gives it an opaque origin with no scripts, forms,
 * pop-ups or top navigation, so a message can never act on Tarebook.
 */
function MessageView({ m, tz }: { m: OutboxMessage; tz?: string }) {
  return (
    <div className="flex flex-col gap-4" data-testid="outbox-message">
      <dl className="grid gap-x-6 gap-y-1 sm:grid-cols-[auto_minmax(0,1fr)]">
        <dt className="font-semibold text-ink-soft">From</dt>
        <dd className="break-words">{m.from}</dd>
        <dt className="font-semibold text-ink-soft">To</dt>
        <dd className="break-words" data-testid="outbox-message-to">
          {m.to}
        </dd>
        <dt className="font-semibold text-ink-soft">Subject</dt>
        <dd className="font-semibold" data-testid="outbox-message-subject">
          {m.subject}
        </dd>
        <dt className="font-semibold text-ink-soft">Received</dt>
        <dd>{formatLabTime(m.receivedAt, tz)}</dd>
      </dl>
      <section aria-labelledby="outbox-html-title">
        <h3 id="outbox-html-title" className="mb-2 text-lg font-bold">
          As HTML
        </h3>
        <iframe
          title={`HTML of "${m.subject}"`}
          sandbox=""
          srcDoc={m.html}
          referrerPolicy="no-referrer"
          data-testid="outbox-html"
          className="h-72 w-full rounded-lg border-2 border-line bg-white"
        />
      </section>
      <section aria-labelledby="outbox-text-title">
        <h3 id="outbox-text-title" className="mb-2 text-lg font-bold">
          As plain text
        </h3>
        <pre data-testid="outbox-text" className="num max-h-[28rem] overflow-auto whitespace-pre-wrap break-words rounded-lg border-2 border-line bg-slate-100 p-4 text-[0.95rem]">
          {m.text}
        </pre>
      </section>
    </div>
  );
}

/** /admin/outbox: every message the local fake SMTP server received, newest first; select one to read it. */
export function OutboxPage() {
  const [params, setParams] = useSearchParams();
  const selected = params.get('id') ? Number(params.get('id')) : null;
  const list = useQuery(outboxQueries.list());
  const message = useQuery(outboxQueries.message(selected !== null && Number.isInteger(selected) ? selected : null));
  const settings = useQuery(settingsQueries.detail());
  const tz = settings.data?.timeZone;

  const items = [...(list.data?.items ?? [])].sort((a, b) => (a.receivedAt < b.receivedAt ? 1 : a.receivedAt > b.receivedAt ? -1 : b.id - a.id));

  return (
    <div className="flex flex-col gap-5">
      <PageHeader title="Outbox">
        What Tarebook&apos;s e-mail has delivered to the laboratory&apos;s local mail catcher: verification requests, returns and
        verifications. Nothing here leaves this machine.
      </PageHeader>

      <div className="flex flex-wrap items-center gap-3">
        <Button variant="secondary" onClick={() => void list.refetch()} busy={list.isFetching} data-testid="outbox-refresh">
          Refresh
        </Button>
        {list.data ? (
          <p className="text-ink-soft" data-testid="outbox-count">
            {items.length} message{items.length === 1 ? '' : 's'}
            {tz ? ` · times in ${tz}` : ''}
          </p>
        ) : null}
      </div>

      <div className="grid items-start gap-6 xl:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
        <Panel title="Received" id="outbox-list">
          {list.isPending ? (
            <Spinner label="Loading the outbox…" />
          ) : list.isError ? (
            <Banner title="The outbox could not be loaded">{list.error.message}</Banner>
          ) : items.length === 0 ? (
            <p className="text-ink-soft" data-testid="outbox-empty">
              No messages yet. Signing a record as prepared sends a verification request.
            </p>
          ) : (
            <ul className="flex flex-col gap-2" data-testid="outbox-list">
              {items.map((m) => (
                <li key={m.id}>
                  <button
                    type="button"
                    data-testid="outbox-row"
                    aria-current={selected === m.id ? 'true' : undefined}
                    onClick={() => setParams({ id: String(m.id) }, { replace: true })}
                    className={`flex min-h-16 w-full flex-col items-start gap-0.5 rounded-lg border-2 px-4 py-2 text-left ${
                      selected === m.id ? 'border-slate-700 bg-slate-100' : 'border-line bg-card hover:border-slate-700'
                    }`}
                  >
                    <span className="font-semibold" data-testid="outbox-row-subject">
                      {m.subject}
                    </span>
                    <span className="break-all text-sm" data-testid="outbox-row-to">
                      to {m.to}
                    </span>
                    <span className="text-sm text-ink-soft">{formatLabTime(m.receivedAt, tz)}</span>
                  </button>
                </li>
              ))}
            </ul>
          )}
        </Panel>

        <Panel title="Message" id="outbox-detail">
          {selected === null ? (
            <p className="text-ink-soft">Choose a message to read it.</p>
          ) : message.isPending ? (
            <Spinner label="Loading the message…" />
          ) : message.isError ? (
            <Banner title={message.error.status === 404 ? 'No such message' : 'The message could not be loaded'}>{message.error.message}</Banner>
          ) : (
            <MessageView m={message.data} tz={tz} />
          )}
        </Panel>
      </div>
    </div>
  );
}
