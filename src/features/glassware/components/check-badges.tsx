import { StatusBadge } from '../../signatures/components/status-badge.tsx';
import { CALIBRATION_TEXT, verdictText } from '../format.ts';
import type { WareCalibration } from '../types.ts';

const TONE = {
  ok: 'border-ok-700 bg-ok-50 text-ok-700',
  bad: 'border-bad-700 bg-bad-50 text-bad-700',
  caution: 'border-caution-700 bg-caution-50 text-caution-700',
  neutral: 'border-slate-700 bg-card text-ink',
} as const;

/** Pass or fail, written out with a tick or a cross drawn beside the word (never colour alone). */
export function VerdictBadge({ verdict, testId }: { verdict: 'pass' | 'fail' | null | undefined; testId?: string }) {
  const tone = verdict === 'pass' ? TONE.ok : verdict === 'fail' ? TONE.bad : TONE.neutral;
  return (
    <span data-testid={testId} data-verdict={verdict ?? 'none'} className={`inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border-2 px-3 py-0.5 text-sm font-semibold ${tone}`}>
      <svg viewBox="0 0 14 14" width={14} height={14} aria-hidden="true" className="shrink-0">
        {verdict === 'pass' ? <path d="M2 7.5 5.5 11 12 3" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round" /> : null}
        {verdict === 'fail' ? <path d="M3 3 11 11 M11 3 3 11" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round" /> : null}
        {!verdict ? <path d="M3 7 H11" fill="none" stroke="currentColor" strokeWidth={2} strokeLinecap="round" /> : null}
      </svg>
      {verdictText(verdict)}
    </span>
  );
}

/** The ware's calibration status in words. */
export function CalibrationBadge({ status, testId }: { status: WareCalibration['status']; testId?: string }) {
  const t = CALIBRATION_TEXT[status];
  return (
    <span data-testid={testId} data-calibration={status} title={t.hint} className={`inline-flex items-center whitespace-nowrap rounded-full border-2 px-3 py-0.5 text-base font-semibold ${TONE[t.tone]}`}>
      {t.label}
    </span>
  );
}

/** The check's signature status with the app's status mark (returned shown as returned). */
export function CheckStatusBadge({ status, testId }: { status: string; testId?: string }) {
  return <StatusBadge status={status} testId={testId} />;
}
