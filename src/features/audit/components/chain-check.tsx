import { Banner } from '../../../components/ui/feedback.tsx';
import { Button } from '../../../components/ui/button.tsx';
import { useVerifyChain } from '../api/audit-queries.ts';

/** "Check the chain": recomputes every hash on the server and shows the verdict prominently. */
export function ChainCheck() {
  const verify = useVerifyChain();
  const result = verify.data;
  return (
    <div className="flex flex-col gap-3">
      <div>
        <Button variant="secondary" onClick={() => verify.mutate()} busy={verify.isPending} data-testid="audit-verify">
          Check the chain
        </Button>
      </div>
      {verify.isError ? <Banner title="The check could not run">{verify.error.message}</Banner> : null}
      {result && !verify.isPending ? (
        result.ok ? (
          <Banner tone="ok" testId="audit-verify-result" title={`Chain intact: ${result.checked} entries checked`}>
            Every entry's hash matches its content and links to the one before it.
          </Banner>
        ) : (
          <Banner
            testId="audit-verify-result"
            title={`Broken at entry #${result.firstBroken?.id ?? '?'}: ${result.firstBroken?.reason ?? 'unknown'}`}
          >
            The trail was changed outside Tarebook at or before this entry. Keep the database file as it is and report
            it to QA as a data-integrity incident.
          </Banner>
        )
      ) : null}
    </div>
  );
}
