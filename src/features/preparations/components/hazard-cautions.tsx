import type { TaskHazards } from '../../../../shared/prep/cautions.ts';
import { CautionBox } from '../../../components/ui/feedback.tsx';

/**
 * The cautions of a record for its task: what the work is, the cautions that fit it (the material's, the task's,
 * each solvent's), each solvent's own hazards named, the GHS codes as recorded, and the SDS line once.
 */
export function HazardCautions({ hazards, testId, showCodes = true }: { hazards: TaskHazards; testId: string; showCodes?: boolean }) {
  const named = hazards.solvents.filter((s) => s.hazards);
  return (
    <CautionBox>
      <p className="font-semibold" data-testid={`${testId}-task`}>
        {hazards.task}
      </p>
      {named.length ? (
        <p className="mt-1" data-testid={`${testId}-solvents`}>
          {named.map((s, i) => (
            <span key={s.name}>
              {i ? '; ' : ''}
              <span className="font-semibold">{s.name}</span>: {s.hazards}
              {s.pictograms.length ? ` (${s.pictograms.join(', ')})` : ''}
            </span>
          ))}
        </p>
      ) : null}
      <ul className="mt-1 list-disc space-y-1 pl-5" data-testid={testId}>
        {hazards.cautions.map((c) => (
          <li key={c}>{c}</li>
        ))}
      </ul>
      {showCodes && hazards.statements.length + hazards.pictograms.length ? (
        <p className="mt-1">Material GHS: {[...hazards.pictograms, ...hazards.statements].join(', ')}</p>
      ) : null}
      <p className="mt-1 font-semibold" data-testid={`${testId}-sds`}>
        {hazards.sdsNote}
      </p>
    </CautionBox>
  );
}
