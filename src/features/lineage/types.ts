/**
 * Working standards and calibration series as the client reads them (REQUIREMENTS TR-04, "calibration-level
 * series"; METROLOGY §5.5): the lineage contract in shared/schemas/lineage.ts.
 *   POST /api/preparations/:key/dilutions  DilutionInput       → PreparationDetail (201)
 *   POST /api/series/proposal              SeriesProposalInput → SeriesProposal
 *   POST /api/series                       SeriesInput         → 201 SeriesCreated
 */
export type {
  CreateSeriesInput as SeriesInput,
  CreateSeriesResponse as SeriesCreated,
  DilutionInput,
  LineageSection,
  PreparationDetailWithLineage as LineageDetail,
  PreparationKind,
  SeriesProposalInput,
  SeriesProposalResponse as SeriesProposal,
} from '../../../shared/schemas/lineage.ts';
export type { SeriesChoice, SeriesLevelProposal as ProposedLevel } from '../../../shared/calc/dilution.ts';
