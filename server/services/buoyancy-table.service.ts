/**
 * The buoyancy factor table (GET /api/calc/buoyancy-table and its PDF): the lab's current air density from the
 * t, p, RH entered, or else from the lab's stored default room conditions (settings), and the weights' density
 * (default 8.0 g/cm³); the numbers come from shared/calc/buoyancy-table.ts. Nothing is stored: it is a
 * reference card computed from the core, not a record (the PDF prints its inputs and calculation version).
 */
import { buoyancyTable, tableAirDensity } from '../../shared/calc/buoyancy-table.ts';
import { D } from '../../shared/calc/index.ts';
import type { BuoyancyTableQuery, BuoyancyTableResponse } from '../../shared/schemas/buoyancy-table.ts';
import { renderBuoyancyTablePdf } from '../pdf/buoyancy-table.tsx';
import { getSettings } from './settings.service.ts';

export async function getBuoyancyTable(q: BuoyancyTableQuery, now = new Date()): Promise<BuoyancyTableResponse> {
  const settings = await getSettings();
  const entered = q.t !== undefined && q.p !== undefined && q.rh !== undefined;
  const room = entered ? { temperatureC: q.t!, pressureHPa: q.p!, relativeHumidityPct: q.rh! } : settings.defaultRoomConditions;
  const airDensity = tableAirDensity(room); // CalcError (400 with the field) outside CIPM-2007's range
  const table = buoyancyTable({ airDensity, weightDensity: q.weightDensity ?? '8.0' });
  return {
    ...table,
    weightDensity: q.weightDensity ?? '8.0', // as typed ("8.0" keeps its digit)
    air: {
      source: entered ? 'entered' : 'lab-default',
      temperatureC: room.temperatureC,
      pressureHPa: room.pressureHPa,
      relativeHumidityPct: room.relativeHumidityPct,
      density: airDensity,
      densityKgPerM3Display: new D(airDensity).mul(1000).toFixed(4),
    },
    labName: settings.labName,
    generatedAt: now.toISOString(),
  };
}

export async function buoyancyTablePdf(q: BuoyancyTableQuery, printedBy: string): Promise<{ pdf: Buffer; filename: string; table: BuoyancyTableResponse }> {
  const [table, settings] = await Promise.all([getBuoyancyTable(q), getSettings()]);
  const pdf = await renderBuoyancyTablePdf({ table, timeZone: settings.timeZone, printedBy });
  return { pdf, filename: 'buoyancy-factor-table.pdf', table };
}
