/**
 * Caution texts for a preparation from the material snapshot's GHS hazard statements and pictograms.
 * The texts are plain-language reminders [common practice], not a substitute for the safety data sheet:
 * every list ends with the standing note.
 */
import type { Hazards } from '../../shared/schemas/preparations.ts';

export const STANDING_NOTE = 'Follow the SDS, local regulations and the laboratory’s own procedures.';

/** Hazard-statement families (first four characters of the code) → caution. */
const BY_STATEMENT: Array<{ codes: string[]; text: string }> = [
  { codes: ['H360', 'H361', 'H362'], text: 'May damage fertility or the unborn child: handle in a fume hood with gloves; follow the SDS and the lab’s procedures' },
  { codes: ['H350', 'H351'], text: 'May cause cancer: handle in a fume hood with gloves and keep exposure as low as possible' },
  { codes: ['H340', 'H341'], text: 'May cause genetic defects: handle in a fume hood with gloves' },
  { codes: ['H370', 'H371', 'H372', 'H373'], text: 'Causes damage to organs (on repeated exposure): avoid breathing dust; weigh in a ventilated enclosure' },
  { codes: ['H300', 'H301', 'H310', 'H311', 'H330', 'H331'], text: 'Toxic: avoid all contact and inhalation; weigh in a ventilated enclosure with gloves; keep locked away' },
  { codes: ['H302', 'H312', 'H332'], text: 'Harmful if swallowed, in contact with skin or inhaled: wear gloves; do not eat or drink in the lab' },
  { codes: ['H314', 'H318'], text: 'Causes severe burns or eye damage: wear gloves and eye protection' },
  { codes: ['H315', 'H317', 'H319'], text: 'Irritant to skin or eyes: wear gloves and safety glasses' },
  { codes: ['H270', 'H271', 'H272'], text: 'Oxidiser: keep away from combustible material and reducing agents' },
  { codes: ['H400', 'H410', 'H411', 'H412'], text: 'Toxic to aquatic life: collect solutions and rinses as hazardous waste; do not pour down the drain' },
];

/** Used only when no hazard statement is recorded for a pictogram's hazard. */
const BY_PICTOGRAM: Record<string, string> = {
  GHS01: 'Explosive: follow the SDS',
  GHS02: 'Flammable: keep away from ignition sources',
  GHS03: 'Oxidiser: keep away from combustible material',
  GHS04: 'Gas under pressure: follow the SDS',
  GHS05: 'Corrosive: wear gloves and eye protection',
  GHS06: 'Acutely toxic: avoid all contact and inhalation',
  GHS07: 'Harmful or irritant: wear gloves and safety glasses',
  GHS08: 'Serious health hazard: handle in a fume hood with gloves',
  GHS09: 'Hazardous to the aquatic environment: collect as hazardous waste',
};

export function hazardsFor(material: { ghsHazardStatements: string[]; ghsPictograms: string[] }): Hazards {
  const statements = [...material.ghsHazardStatements];
  const pictograms = [...material.ghsPictograms];
  const cautions: string[] = [];
  const families = new Set(statements.map((s) => s.trim().toUpperCase().slice(0, 4)));
  for (const row of BY_STATEMENT) {
    if (row.codes.some((c) => families.has(c))) cautions.push(row.text);
  }
  if (cautions.length === 0) {
    for (const p of pictograms) {
      const text = BY_PICTOGRAM[p.trim().toUpperCase()];
      if (text) cautions.push(text);
    }
  }
  cautions.push(STANDING_NOTE);
  return { pictograms, statements, cautions };
}
