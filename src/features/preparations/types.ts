/**
 * The preparations API as the client reads it: the shared contract (shared/schemas/preparations.ts),
 * plus the few names the pages use.
 */
export type {
  BudgetEntry,
  ConditionsInput,
  ConditionsUsed,
  CreatePreparationInput,
  ExpectedUncertainty,
  Gate as GateView,
  MakeUp,
  MakeUpInput,
  PersonRef,
  PlanInput,
  PreparationDetail,
  PreparationList,
  PreparationPreview as PreviewResponse,
  PreparationResult as Result,
  PreparationSnapshot as Snapshot,
  PreparationStage as Stage,
  PreparationSummary,
  Quantity,
  ReadingWindowDto as ReadingWindowView,
  Weighing,
  WeighingInput,
} from '../../../shared/schemas/preparations.ts';
export { PREPARATION_STAGES as STAGES } from '../../../shared/schemas/preparations.ts';
