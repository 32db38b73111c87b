/**
 * Frozen copies of inventory rows, taken when a preparation is planned, weighed or made up
 * (REQUIREMENTS 0.1 principle 6: equipment status is snapshotted at the moment of use). The shapes are the
 * inventory DTOs of shared/schemas/inventory.ts, built by the inventory service's own mappers so a snapshot
 * holds exactly what the register showed; decimal values stay the strings stored.
 */
import type { Balance as BalanceDto, ReferenceMaterial as MaterialDto, Solvent as SolventDto, VolumetricWare as WareDto } from '../../shared/schemas/inventory.ts';
import type { Balance, ReferenceMaterial, Solvent, VolumetricWare } from '../db/models/index.ts';
import { balanceDto, materialDtos, solventDto, wareDto } from './inventory.service.ts';

export async function materialSnapshot(m: ReferenceMaterial): Promise<MaterialDto> {
  const [dto] = await materialDtos([m]);
  return dto!;
}

export const balanceSnapshot = (b: Balance): BalanceDto => balanceDto(b);
export const wareSnapshot = (w: VolumetricWare): WareDto => wareDto(w);
export const solventSnapshot = (s: Solvent): SolventDto => solventDto(s);
