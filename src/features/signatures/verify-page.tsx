import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { preparationQueries } from '../preparations/api/preparation-queries.ts';
import { DetailPage } from '../preparations/detail-page.tsx';
import { OutOfPlanNotice, VerificationPanel } from './components/verification-panel.tsx';

/**
 * /preparations/:identifier/verify: the verification workspace (REQUIREMENTS W3, RV-01…RV-03). The whole
 * record as on its own page (plan against actual, weighings with every superseded attempt, make-up, the
 * recomputed result and budget, frozen inputs, signatures, audit trail), then the checklist and the buttons.
 */
export function VerifyPage() {
  const { identifier = '' } = useParams();
  const detail = useQuery(preparationQueries.detail(identifier)); // the same query the record below uses
  const outOfPlan = detail.data?.status === 'prepared' ? detail.data.resultOutOfPlan : undefined;
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-center justify-between gap-3 rounded-xl border-2 border-slate-700 bg-slate-100 px-5 py-3" data-testid="verify-intro">
        <p className="text-lg">
          <span className="font-bold">Second-person review.</span> Read the whole record, then tick each item of the checklist at the end and sign.
        </p>
        <div className="flex flex-wrap gap-3">
          <a href="#detail-verification-title" className="inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-4 font-semibold hover:bg-white">
            Go to the checklist
          </a>
          <Link to={`/preparations/${encodeURIComponent(identifier)}`} className="inline-flex min-h-12 items-center rounded-lg border-2 border-transparent px-4 font-semibold text-brass-600 underline underline-offset-2">
            Back to the record
          </Link>
        </div>
      </div>
      {outOfPlan ? <OutOfPlanNotice o={outOfPlan} testId="verify-out-of-plan-top" /> : null}
      <DetailPage verification={(d) => <VerificationPanel d={d} />} />
    </div>
  );
}
