/**
 * Planning gates that shared/prep/gates.ts does not cover: the volumetric flask chosen (in service and a
 * one-mark volumetric flask, REQUIREMENTS EQ-07 with USP <31>: class A unless stated otherwise), a volume
 * entered without a flask that no in-service flask has, and a material without a density (buoyancy needs
 * it, METROLOGY §2.3 / §9). Same shape as the core gates: code, severity, message and action with numbers.
 */
import { toDec } from '../calc/decimal.ts';
import { GATE_SEVERITY, type Gate, type GateCode, type GateSeverity } from './gates.ts';

export const PLAN_GATE_CODES = ['flask_not_in_service', 'flask_not_volumetric', 'flask_not_class_a', 'no_flask_for_volume', 'material_density_unknown', 'ware_check_failed'] as const;
export type PlanOnlyGateCode = (typeof PLAN_GATE_CODES)[number];
export type PlanGateCode = GateCode | PlanOnlyGateCode;

export interface PlanGate extends Omit<Gate, 'code'> {
  code: PlanGateCode;
}

export const PLAN_GATE_SEVERITY: Readonly<Record<PlanGateCode, GateSeverity>> = {
  ...GATE_SEVERITY,
  flask_not_in_service: 'block',
  flask_not_volumetric: 'block',
  flask_not_class_a: 'warn',
  no_flask_for_volume: 'warn',
  material_density_unknown: 'block',
  ware_check_failed: 'block',
};

export interface PlanFlask {
  identifier: string;
  kind: string;
  nominalVolumeMl: string;
  class: string;
  status: string;
}

function gate(code: PlanOnlyGateCode, message: string, action: string): PlanGate {
  return { code, severity: PLAN_GATE_SEVERITY[code], message, action };
}

const sameVolume = (a: string, b: string) => toDec(a).eq(toDec(b));

/** In-service one-mark flasks of a nominal volume, for suggestions. */
function usableFlasks(flasks: PlanFlask[], volumeMl: string): PlanFlask[] {
  return flasks.filter((f) => f.kind === 'volumetric_flask' && f.status === 'in_service' && sameVolume(f.nominalVolumeMl, volumeMl));
}

export function evaluateFlaskGates(input: { flask?: PlanFlask; volumeMl: string; flasks: PlanFlask[] }): PlanGate[] {
  const out: PlanGate[] = [];
  const f = input.flask;
  const others = usableFlasks(input.flasks, input.volumeMl).filter((x) => x.identifier !== f?.identifier);
  const alt = others[0] ? `; use ${others[0].identifier} (${others[0].nominalVolumeMl} mL, in service)` : `; no other in-service ${input.volumeMl} mL flask is registered`;
  if (f) {
    if (f.kind !== 'volumetric_flask') {
      out.push(gate('flask_not_volumetric', `${f.identifier} is a ${f.kind.replace(/_/g, ' ')}, not a one-mark volumetric flask`, `Choose a volumetric flask${alt}`));
    }
    if (f.status !== 'in_service') {
      out.push(gate('flask_not_in_service', `${f.identifier} is ${f.status.replace(/_/g, ' ')}`, `Do not use ${f.identifier}${alt}`));
    }
    if (f.kind === 'volumetric_flask' && f.class !== 'A') {
      out.push(gate('flask_not_class_a', `${f.identifier} is class ${f.class}; its tolerance is about twice that of class A`, `Use a class A flask unless the method allows class ${f.class}${alt}`));
    }
  } else if (usableFlasks(input.flasks, input.volumeMl).length === 0) {
    out.push(
      gate(
        'no_flask_for_volume',
        `No in-service volumetric flask of ${input.volumeMl} mL is registered`,
        'Make up in a registered flask of this volume (the make-up step asks for its identifier), or choose one of the registered flask volumes',
      ),
    );
  }
  return out;
}

export function evaluateMaterialDensityGate(material: { name: string; densityGPerMl: string | null }): PlanGate[] {
  if (material.densityGPerMl) return [];
  return [
    gate(
      'material_density_unknown',
      `${material.name} has no density recorded, so the air-buoyancy correction cannot be calculated`,
      `Enter the density of ${material.name} in the inventory (a handbook value to ±5 % is enough)`,
    ),
  ];
}

/** Ware whose latest verified gravimetric check failed (server/services/volume-check-gate.ts) is refused; the gate names the check. */
export function evaluateWareCheckGate(ware: { identifier: string }, failedCheck: { identifier: string } | null): PlanGate[] {
  if (!failedCheck) return [];
  return [
    gate(
      'ware_check_failed',
      `${ware.identifier} failed its volume check ${failedCheck.identifier}`,
      `Do not use ${ware.identifier} until a new check passes; choose other ware`,
    ),
  ];
}
