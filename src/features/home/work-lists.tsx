import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import type { WorkItem, WorkList } from '../../../shared/schemas/worklists.ts';
import { stageLabel, statusLabel } from '../preparations/format.ts';
import { worklistQueries } from './api/worklist-queries.ts';

type ListKey = 'awaitingVerification' | 'toWeighOrMakeUp' | 'expiringSoon';

const LISTS: Array<{ key: ListKey; title: string; empty: string; href: (i: WorkItem) => string }> = [
  { key: 'awaitingVerification', title: 'Awaiting my verification', empty: 'Nothing waits for your verification.', href: (i) => `/preparations/${i.identifier}/verify` },
  { key: 'toWeighOrMakeUp', title: 'To weigh or make up today', empty: 'No planned standard waits to be weighed or made up.', href: (i) => `/preparations/${i.identifier}/bench` },
  { key: 'expiringSoon', title: 'Expiring soon', empty: 'Nothing expires within the notice period.', href: (i) => `/preparations/${i.identifier}` },
];

function Row({ item, href, listKey }: { item: WorkItem; href: string; listKey: ListKey }) {
  const soon = listKey === 'expiringSoon' && item.daysLeft <= 2;
  return (
    <li>
      <Link
        to={href}
        data-testid={`work-item-${item.identifier}`}
        className="flex min-h-14 flex-wrap items-center justify-between gap-x-4 gap-y-1 rounded-lg border-2 border-line bg-card px-4 py-3 hover:border-slate-700"
      >
        <span className="flex flex-col">
          <span className="font-mono text-lg font-bold">{item.identifier}</span>
          <span className="text-ink-soft">
            {item.analyteFormula} from {item.materialName}
            {item.concentrationDisplay ? `, ${item.concentrationDisplay}` : `, target ${item.target.value} ${item.target.unit}`}
          </span>
          <span className="text-sm text-ink-soft">
            {statusLabel(item.status)}
            {item.stage && item.stage !== 'planned' && listKey === 'toWeighOrMakeUp' ? ` · ${stageLabel(item.stage)}` : ''} · planned by {item.mine ? 'you' : item.createdBy.fullName} · expires {item.expiresOn}
          </span>
        </span>
        <span className={`rounded-full border-2 px-3 py-1 font-semibold ${soon ? 'border-bad-700 bg-bad-50 text-bad-700' : 'border-slate-700'}`}>{item.next} →</span>
      </Link>
    </li>
  );
}

function ListSection({ listKey, title, empty, list, href }: { listKey: ListKey; title: string; empty: string; list: WorkList; href: (i: WorkItem) => string }) {
  const id = `worklist-${listKey}`;
  return (
    <section aria-labelledby={`${id}-title`} data-testid={id} className="rounded-xl border-2 border-line bg-card p-5">
      <h2 id={`${id}-title`} className="text-xl font-bold">
        {title} <span className="text-ink-soft">({list.total})</span>
      </h2>
      <p className="text-sm text-ink-soft">{list.scope}</p>
      {list.items.length === 0 ? (
        <p className="mt-3">{empty}</p>
      ) : (
        <ul className="mt-3 flex flex-col gap-2">
          {list.items.map((i) => (
            <Row key={i.id} item={i} href={href(i)} listKey={listKey} />
          ))}
        </ul>
      )}
      {list.total > list.items.length ? <p className="mt-2 text-sm text-ink-soft">{list.total - list.items.length} more not shown; see Preparations.</p> : null}
    </section>
  );
}

/** The signed-in user's work lists (GET /api/worklists); a list is shown only to the roles that act on it. */
export function WorkLists() {
  const q = useQuery(worklistQueries.mine());
  if (q.isPending) return <p className="text-ink-soft">Loading your work lists…</p>;
  if (q.isError) return <p role="alert">Your work lists could not be loaded: {q.error.message}</p>;
  const data = q.data;
  return (
    <div className="flex flex-col gap-4" data-testid="work-lists">
      <p className="text-sm text-ink-soft">Lab date {data.today}; expiry notice period {data.noticeDays} days.</p>
      {LISTS.map((l) => {
        const list = data[l.key];
        return list ? <ListSection key={l.key} listKey={l.key} title={l.title} empty={l.empty} list={list} href={l.href} /> : null;
      })}
    </div>
  );
}
