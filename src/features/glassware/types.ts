/**
 * The volume-check API as the client reads it (server/routes/volume-checks.routes.ts). The calculation's answer
 * is the shared core's type (shared/calc/volume-check.ts); the stored record's shape is written out here.
 */
import type { VolumeCheckResponse } from '../../../shared/schemas/volume-check.ts';

export type { VolumeCheckResponse };
export type QuantityText = { value: string; unit: string };
export type CheckWareKind = 'bulb_pipette' | 'volumetric_flask' | 'piston_pipette' | 'burette';
export type CheckStatus = 'planned' | 'prepared' | 'verified';

export interface VolumeCheckPlan {
  kind: CheckWareKind;
  class: 'A' | 'B' | null;
  material: 'borosilicate_3_3' | 'soda_lime' | 'polypropylene';
  mode: 'delivery' | 'content';
  nominal: QuantityText;
  tested: Array<{ value: string; unit: string; replicates: number }>;
  intervalMonths: number;
  limits?: { systematic: QuantityText; random?: QuantityText; source: string };
}

export interface VolumeCheckConditions {
  waterTemperatureC: string;
  waterAirSaturated: boolean;
  air: { temperatureC: string; pressureHPa: string; relativeHumidityPct: string };
  evaporation?: QuantityText;
}

export interface CheckReading {
  id: number;
  testedIndex: number;
  replicate: number;
  value: string;
  unit: string;
  supersedesId: number | null;
  correctionReason: string | null;
  recordedBy: { id: number; fullName: string };
  recordedAt: string;
  current: boolean;
}

export interface CheckSignature {
  id: number;
  meaning: string;
  meaningText: string;
  signer: { id: number; fullName: string };
  signedAt: string;
  recordVersion: number;
  recordHash: string;
  reason: string | null;
  valid: boolean;
}

export interface VolumeCheckDetail {
  id: number;
  identifier: string;
  status: CheckStatus;
  version: number;
  ware: { id: number; identifier: string; kind: string; nominalVolumeMl: string; class: string; material: string | null };
  balance: { id: number; identifier: string; readabilityMg: string; description: string };
  plan: VolumeCheckPlan;
  gates: Array<{ code: string; pass: boolean; message: string }>;
  conditions: VolumeCheckConditions;
  notes: string | null;
  readings: CheckReading[];
  result: { verdict: 'pass' | 'fail'; tested: VolumeCheckResponse[] } | null;
  calcVersion: string | null;
  nextDueOn: string | null;
  createdBy: { id: number; fullName: string };
  createdAt: string;
  signatures: CheckSignature[];
  verificationChecklist: ReadonlyArray<{ key: string; label: string }>;
  canSign: { prepare: boolean; verify: boolean; return: boolean; reasons: Record<string, string>; acknowledgementRequired?: boolean };
}

export interface VolumeCheckSummary {
  id: number;
  identifier: string;
  ware: string;
  wareId: number;
  balance: string;
  status: CheckStatus;
  verdict: 'pass' | 'fail' | null;
  nextDueOn: string | null;
  createdAt: string;
}

export interface WareCalibration {
  wareId: number;
  status: 'calibrated' | 'failed' | 'overdue' | 'not_checked';
  check: { identifier: string; verdict: 'pass' | 'fail'; verifiedOn: string; nextDueOn: string | null } | null;
  calibratedVolume: { value: string; unit: string; expandedUncertainty: string; k: string } | null;
}
