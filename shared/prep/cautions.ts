/**
 * Cautions that fit the task at hand (issue 16 §4 Hazards). Weighing a solid reference material raises dust;
 * pipetting a solution of it does not, but splashes and skin contact matter, and the solution's matrix (nitric
 * acid, methanol) brings hazards of its own. The texts are plain-language reminders chosen from the GHS hazard
 * statements recorded for the material and from the solvents' names; they are data here, each with its source.
 *
 * They never replace the safety data sheet: the SDS line is stated once per record or sheet (`SDS_NOTE`), and the
 * SDS, local regulations and the laboratory's own procedures decide.
 *
 * Sources: the wording follows the GHS precautionary statements (UN GHS, Annex 3: P260 do not breathe dust,
 * P264 wash hands, P270 do not eat or drink, P273 avoid release to the environment, P280 wear protective gloves
 * and eye protection, P210 keep away from heat and flames, P220 keep away from combustible materials), cited from
 * memory; which of them fit which task is common practice. Solvent classifications are those of the pure or
 * concentrated substance (CLP Regulation (EC) No 1272/2008, Annex VI), cited from memory.
 */

/** What the user does with the material on this record. */
export type PrepTask = 'weigh_solid' | 'pipette_solution' | 'weigh_solution';

export const SDS_NOTE = 'Follow the SDS, local regulations and the laboratory’s own procedures.';

export const TASK_TEXT: Record<PrepTask, string> = {
  weigh_solid: 'Weighing the solid reference material, then dissolving it and making up to the mark',
  pipette_solution: 'Pipetting a solution of the standard, then making up to the mark',
  weigh_solution: 'Weighing an aliquot of a solution of the standard, then making up to a mass',
};

/** The caution every record of the task carries, whatever the material (common practice). */
export const TASK_CAUTION: Record<PrepTask, { text: string; source: string }> = {
  weigh_solid: {
    text: 'Weighing a solid: keep dust down (antistatic boat, clean spatula, no draughts), and clean the balance pan and bench afterwards',
    source: 'common practice',
  },
  pipette_solution: {
    text: 'Never pipette by mouth: use a pipette filler or the piston pipette, and wear gloves and eye protection',
    source: 'common practice',
  },
  weigh_solution: {
    text: 'Keep the bottle closed between readings, wipe drips at once, and wear gloves and eye protection',
    source: 'common practice',
  },
};

interface MaterialRule {
  /** hazard-statement families (first four characters of the code) */
  codes: string[];
  /** the caution for each task; null where the hazard does not arise in that task */
  text: Record<PrepTask, string | null>;
  source: string;
}

const SOLUTION = (t: string) => ({ pipette_solution: t, weigh_solution: t });

/** By hazard statement, most severe first. */
export const MATERIAL_RULES: MaterialRule[] = [
  {
    codes: ['H360', 'H361', 'H362'],
    text: {
      weigh_solid: 'May damage fertility or the unborn child: weigh the solid in a ventilated balance enclosure or fume hood, with gloves; do not breathe the dust',
      ...SOLUTION('May damage fertility or the unborn child: wear gloves, avoid skin contact and splashes, keep the solution closed'),
    },
    source: 'H360–H362 with P260, P280 (UN GHS Annex 3, from memory); per task: common practice',
  },
  {
    codes: ['H350', 'H351'],
    text: {
      weigh_solid: 'May cause cancer: weigh the solid in a ventilated enclosure with gloves; do not raise or breathe the dust',
      ...SOLUTION('May cause cancer: wear gloves, avoid skin contact, splashes and mist; keep exposure as low as possible'),
    },
    source: 'H350/H351 with P260, P280 (UN GHS Annex 3, from memory); per task: common practice',
  },
  {
    codes: ['H340', 'H341'],
    text: {
      weigh_solid: 'May cause genetic defects: weigh the solid in a ventilated enclosure with gloves; do not breathe the dust',
      ...SOLUTION('May cause genetic defects: wear gloves and avoid skin contact and splashes'),
    },
    source: 'H340/H341 with P260, P280 (UN GHS Annex 3, from memory); per task: common practice',
  },
  {
    codes: ['H370', 'H371', 'H372', 'H373'],
    text: {
      weigh_solid: 'Causes damage to organs (on repeated exposure): do not breathe the dust; weigh in a ventilated enclosure',
      ...SOLUTION('Causes damage to organs (on repeated exposure): avoid skin contact and mist; wash hands after the work'),
    },
    source: 'H370–H373 with P260, P264 (UN GHS Annex 3, from memory); per task: common practice',
  },
  {
    codes: ['H300', 'H301', 'H310', 'H311', 'H330', 'H331'],
    text: {
      weigh_solid: 'Toxic: avoid all contact and inhalation; weigh in a ventilated enclosure with gloves; keep the solid locked away',
      ...SOLUTION('Toxic: avoid all contact; wear gloves; keep the solution closed and locked away when not in use'),
    },
    source: 'H300–H331 with P260, P280, P405 (UN GHS Annex 3, from memory); per task: common practice',
  },
  {
    codes: ['H302', 'H312', 'H332'],
    text: {
      weigh_solid: 'Harmful if swallowed, in contact with skin or inhaled: wear gloves, avoid raising dust; do not eat or drink in the lab',
      ...SOLUTION('Harmful if swallowed or in contact with skin: wear gloves; do not eat or drink in the lab'),
    },
    source: 'H302/H312/H332 with P270, P280 (UN GHS Annex 3, from memory); per task: common practice',
  },
  {
    codes: ['H314', 'H318'],
    text: {
      weigh_solid: 'Causes severe burns or eye damage: wear gloves and eye protection',
      ...SOLUTION('Causes severe burns or eye damage: wear gloves and eye protection'),
    },
    source: 'H314/H318 with P280 (UN GHS Annex 3, from memory)',
  },
  {
    codes: ['H315', 'H317', 'H319'],
    text: {
      weigh_solid: 'Irritant to skin or eyes: wear gloves and safety glasses',
      ...SOLUTION('Irritant to skin or eyes: wear gloves and safety glasses'),
    },
    source: 'H315/H317/H319 with P280 (UN GHS Annex 3, from memory)',
  },
  {
    codes: ['H270', 'H271', 'H272'],
    // an oxidising solid: the property is the solid's; a dilute solution of it does not feed a fire
    text: { weigh_solid: 'Oxidising solid: keep it away from combustible material and reducing agents; clean spills up at once', pipette_solution: null, weigh_solution: null },
    source: 'H270–H272 with P220 (UN GHS Annex 3, from memory); not for its dilute solution: common practice',
  },
  {
    codes: ['H400', 'H410', 'H411', 'H412'],
    text: {
      weigh_solid: 'Toxic to aquatic life: collect spills, weighing boats and rinses as hazardous waste; nothing down the drain',
      ...SOLUTION('Toxic to aquatic life: collect left-over solution and rinses as hazardous waste; nothing down the drain'),
    },
    source: 'H400–H412 with P273, P501 (UN GHS Annex 3, from memory)',
  },
];

/** Used only when no hazard statement is recorded: the pictograms then give the caution. */
export const PICTOGRAM_RULES: Record<string, { text: Record<PrepTask, string | null>; source: string }> = {
  GHS01: { text: { weigh_solid: 'Explosive: follow the SDS', ...SOLUTION('Explosive material: follow the SDS') }, source: 'GHS01 (UN GHS, from memory)' },
  GHS02: { text: { weigh_solid: 'Flammable: keep away from ignition sources', ...SOLUTION('Flammable: keep away from ignition sources') }, source: 'GHS02 with P210 (from memory)' },
  GHS03: { text: { weigh_solid: 'Oxidiser: keep away from combustible material', pipette_solution: null, weigh_solution: null }, source: 'GHS03 with P220 (from memory); not for a dilute solution: common practice' },
  GHS04: { text: { weigh_solid: 'Gas under pressure: follow the SDS', ...SOLUTION('Gas under pressure: follow the SDS') }, source: 'GHS04 (from memory)' },
  GHS05: { text: { weigh_solid: 'Corrosive: wear gloves and eye protection', ...SOLUTION('Corrosive: wear gloves and eye protection') }, source: 'GHS05 with P280 (from memory)' },
  GHS06: { text: { weigh_solid: 'Acutely toxic: avoid all contact; do not breathe the dust', ...SOLUTION('Acutely toxic: avoid all contact; wear gloves') }, source: 'GHS06 with P260, P280 (from memory)' },
  GHS07: { text: { weigh_solid: 'Harmful or irritant: wear gloves and safety glasses', ...SOLUTION('Harmful or irritant: wear gloves and safety glasses') }, source: 'GHS07 with P280 (from memory)' },
  GHS08: { text: { weigh_solid: 'Serious health hazard: weigh in a ventilated enclosure with gloves', ...SOLUTION('Serious health hazard: wear gloves, avoid skin contact and splashes') }, source: 'GHS08 with P260, P280 (from memory)' },
  GHS09: { text: { weigh_solid: 'Hazardous to the aquatic environment: collect as hazardous waste', ...SOLUTION('Hazardous to the aquatic environment: collect solution and rinses as hazardous waste') }, source: 'GHS09 with P273 (from memory)' },
};

/** A solvent's own hazards, recognised by its registered name. */
export interface SolventRule {
  match: RegExp;
  /** the substance, as the caution names it */
  substance: string;
  /** what it is, in words: "corrosive, oxidising" */
  hazards: string;
  pictograms: string[];
  statements: string[];
  cautions: string[];
  source: string;
}

export const SOLVENT_RULES: SolventRule[] = [
  {
    match: /\bnitric\b|\bHNO3\b/i,
    substance: 'Nitric acid',
    hazards: 'corrosive, oxidising',
    pictograms: ['GHS03', 'GHS05'],
    statements: ['H272', 'H290', 'H314'],
    cautions: [
      'Nitric acid is corrosive: wear gloves, eye protection and a lab coat; open, pour and dilute it in a fume hood; rinse a splash with plenty of water',
      'Nitric acid is an oxidiser: keep it and its rinses away from organic solvents (methanol, acetone), paper and other combustibles, and out of organic waste',
    ],
    source: 'nitric acid, CLP Annex VI (Ox. Liq., Skin Corr. 1A, Met. Corr.; from memory) for the concentrated acid the solution is made from; a dilute solution is milder: the SDS of the lot gives its own classification',
  },
  {
    match: /\bhydrochloric\b|\bHCl\b/i,
    substance: 'Hydrochloric acid',
    hazards: 'corrosive, irritant to the airways',
    pictograms: ['GHS05', 'GHS07'],
    statements: ['H290', 'H314', 'H335'],
    cautions: ['Hydrochloric acid is corrosive and its fumes irritate the airways: wear gloves and eye protection and open it in a fume hood'],
    source: 'hydrochloric acid, CLP Annex VI (Skin Corr. 1B, STOT SE 3; from memory) for the concentrated acid; a dilute solution is milder: see its SDS',
  },
  {
    match: /\bmethanol\b|\bMeOH\b/i,
    substance: 'Methanol',
    hazards: 'highly flammable, toxic',
    pictograms: ['GHS02', 'GHS06', 'GHS08'],
    statements: ['H225', 'H301', 'H311', 'H331', 'H370'],
    cautions: [
      'Methanol is highly flammable: no flames, hot plates or sparks near it; keep the bottle closed',
      'Methanol is toxic if swallowed, on the skin or inhaled and damages the optic nerve: work in a fume hood with nitrile gloves',
    ],
    source: 'methanol, CLP Annex VI (Flam. Liq. 2, Acute Tox. 3, STOT SE 1; from memory)',
  },
  {
    match: /\bacetonitrile\b|\bMeCN\b/i,
    substance: 'Acetonitrile',
    hazards: 'highly flammable, harmful, eye irritant',
    pictograms: ['GHS02', 'GHS07'],
    statements: ['H225', 'H302', 'H312', 'H332', 'H319'],
    cautions: ['Acetonitrile is highly flammable and harmful: keep away from ignition sources, work in a fume hood with gloves and safety glasses'],
    source: 'acetonitrile, CLP Annex VI (Flam. Liq. 2, Acute Tox. 4, Eye Irrit. 2; from memory)',
  },
  {
    match: /\bwater\b/i,
    substance: 'Water',
    hazards: '',
    pictograms: [],
    statements: [],
    cautions: [],
    source: 'not classified (common knowledge)',
  },
];

export interface SolventHazard {
  /** the solvent as registered */
  name: string;
  /** what it is in words ("corrosive, oxidising"); empty when not hazardous; null when no rule knows it */
  hazards: string | null;
  pictograms: string[];
  cautions: string[];
}

export interface TaskHazards {
  /** the material's GHS pictograms and hazard statements, as recorded */
  pictograms: string[];
  statements: string[];
  /** the task, in words */
  task: string;
  /** the cautions that fit the task: the material's, then the task's, then each solvent's; no SDS line */
  cautions: string[];
  /** the solvents involved (make-up solvent, and the matrix an aliquot comes in), with their own hazards */
  solvents: SolventHazard[];
  /** the SDS line, shown once */
  sdsNote: string;
}

const familyOf = (code: string) => code.trim().toUpperCase().replace(/^EU/, '').slice(0, 4);
const norm = (s: string) => s.trim().replace(/\s+/g, ' ').toLowerCase();

/** The hazards of one solvent by its registered name. */
export function solventHazard(name: string): SolventHazard {
  const rule = SOLVENT_RULES.find((r) => r.match.test(name));
  if (!rule) return { name, hazards: null, pictograms: [], cautions: [`No cautions are stored for ${name}: read its SDS before use`] };
  return { name, hazards: rule.hazards, pictograms: [...rule.pictograms], cautions: [...rule.cautions] };
}

/**
 * The cautions of a record: the material's hazards as they arise in the task, the task's own caution, and the
 * hazards of each solvent involved (each named once; the same solvent twice is listed once).
 */
export function cautionsFor(input: {
  task: PrepTask;
  material: { ghsHazardStatements: string[]; ghsPictograms: string[] };
  solventNames?: Array<string | null | undefined>;
}): TaskHazards {
  const { task } = input;
  const statements = [...input.material.ghsHazardStatements];
  const pictograms = [...input.material.ghsPictograms];
  const cautions: string[] = [];
  const families = new Set(statements.flatMap((s) => s.split('+')).map(familyOf));
  for (const rule of MATERIAL_RULES) {
    const text = rule.text[task];
    if (text && rule.codes.some((c) => families.has(c))) cautions.push(text);
  }
  if (statements.length === 0) {
    for (const p of pictograms) {
      const text = PICTOGRAM_RULES[p.trim().toUpperCase()]?.text[task];
      if (text) cautions.push(text);
    }
  }
  cautions.push(TASK_CAUTION[task].text);
  const seen = new Set<string>();
  const solvents: SolventHazard[] = [];
  for (const name of input.solventNames ?? []) {
    if (!name || seen.has(norm(name))) continue;
    seen.add(norm(name));
    const h = solventHazard(name);
    solvents.push(h);
    for (const c of h.cautions) if (!cautions.includes(c)) cautions.push(c);
  }
  return { pictograms, statements, task: TASK_TEXT[task], cautions, solvents, sdsNote: SDS_NOTE };
}

/** One set of cautions for several records of the same task (a series): solvents united, cautions once each. */
export function mergeHazards(list: TaskHazards[]): TaskHazards | null {
  const first = list[0];
  if (!first) return null;
  const cautions: string[] = [];
  const solvents: SolventHazard[] = [];
  for (const h of list) {
    for (const c of h.cautions) if (!cautions.includes(c)) cautions.push(c);
    for (const s of h.solvents) if (!solvents.some((x) => norm(x.name) === norm(s.name))) solvents.push(s);
  }
  return { ...first, cautions, solvents };
}
