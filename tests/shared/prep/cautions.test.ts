// Cautions chosen by the task (issue 16 §4 Hazards). The expected texts are the data of shared/prep/cautions.ts;
// what each check asserts is which hazards arise in which task: dust only when a solid is weighed, the oxidising
// property of a solid not for its dilute solution [common practice], the solvent's own hazards (nitric acid:
// corrosive and oxidising, CLP Annex VI for the concentrated acid, from memory), the SDS line once.
import { describe, expect, it } from 'vitest';
import { cautionsFor, mergeHazards, SDS_NOTE, solventHazard, TASK_CAUTION } from '../../../shared/prep/cautions.ts';

// lead(II) nitrate as the demo records it (H272, H302, H332, H360Df, H373, H410)
const leadNitrate = { ghsHazardStatements: ['H272', 'H302', 'H332', 'H360Df', 'H373', 'H410'], ghsPictograms: ['GHS03', 'GHS07', 'GHS08', 'GHS09'] };

describe('cautions fit the task', () => {
  it('weighing the solid: dust is kept down, the oxidising solid kept from combustibles; the SDS line is not among the cautions', () => {
    const h = cautionsFor({ task: 'weigh_solid', material: leadNitrate });
    expect(h.cautions[0]).toMatch(/^May damage fertility or the unborn child: weigh the solid in a ventilated/);
    expect(h.cautions.some((c) => /dust/.test(c))).toBe(true);
    expect(h.cautions.some((c) => /^Oxidising solid/.test(c))).toBe(true);
    expect(h.cautions).toContain(TASK_CAUTION.weigh_solid.text);
    expect(h.cautions).not.toContain(SDS_NOTE);
    expect(h.sdsNote).toBe(SDS_NOTE);
    expect(h.task).toMatch(/^Weighing the solid/);
  });

  it('pipetting a nitric-acid solution of it is not weighing a dust: no dust, no oxidising solid; never by mouth; nitric acid corrosive and oxidising', () => {
    const h = cautionsFor({ task: 'pipette_solution', material: leadNitrate, solventNames: ['Nitric acid 2 % (v/v)'] });
    expect(h.cautions.some((c) => /dust|weigh/i.test(c))).toBe(false);
    expect(h.cautions.some((c) => /^Oxidising solid/.test(c))).toBe(false);
    expect(h.cautions[0]).toMatch(/^May damage fertility or the unborn child: wear gloves/);
    expect(h.cautions).toContain(TASK_CAUTION.pipette_solution.text);
    expect(h.solvents).toEqual([expect.objectContaining({ name: 'Nitric acid 2 % (v/v)', hazards: 'corrosive, oxidising', pictograms: ['GHS03', 'GHS05'] })]);
    expect(h.cautions.some((c) => /^Nitric acid is corrosive/.test(c))).toBe(true);
    expect(h.cautions.some((c) => /^Nitric acid is an oxidiser/.test(c))).toBe(true);
  });

  it('a solvent named twice (the parent matrix and the make-up solvent) is listed once; water adds nothing; an unknown solvent points to its SDS', () => {
    const h = cautionsFor({ task: 'pipette_solution', material: leadNitrate, solventNames: ['Nitric acid 2 % (v/v)', 'Nitric acid 2 % (v/v)', 'Ultrapure water', null] });
    expect(h.solvents.map((s) => s.name)).toEqual(['Nitric acid 2 % (v/v)', 'Ultrapure water']);
    expect(h.cautions.filter((c) => /^Nitric acid is corrosive/.test(c))).toHaveLength(1);
    expect(solventHazard('Ultrapure water')).toMatchObject({ hazards: '', cautions: [] });
    expect(solventHazard('Toluene')).toMatchObject({ hazards: null, cautions: ['No cautions are stored for Toluene: read its SDS before use'] });
    expect(solventHazard('Methanol').hazards).toBe('highly flammable, toxic');
  });

  it('weighing a solution by mass: no dust, closed bottle between readings', () => {
    const h = cautionsFor({ task: 'weigh_solution', material: leadNitrate, solventNames: ['Methanol'] });
    expect(h.cautions.some((c) => /dust/.test(c))).toBe(false);
    expect(h.cautions).toContain(TASK_CAUTION.weigh_solution.text);
    expect(h.cautions.some((c) => /^Methanol is highly flammable/.test(c))).toBe(true);
  });

  it('pictograms give the cautions only when no statement is recorded; combined codes (H300+H310) count each', () => {
    expect(cautionsFor({ task: 'weigh_solid', material: { ghsHazardStatements: [], ghsPictograms: ['GHS06'] } }).cautions[0]).toMatch(/toxic/i);
    expect(cautionsFor({ task: 'pipette_solution', material: { ghsHazardStatements: [], ghsPictograms: ['GHS03'] } }).cautions).toEqual([TASK_CAUTION.pipette_solution.text]);
    expect(cautionsFor({ task: 'weigh_solid', material: { ghsHazardStatements: ['H300+H310'], ghsPictograms: [] } }).cautions[0]).toMatch(/^Toxic/);
  });

  it('a series: the levels’ cautions once each and their solvents united', () => {
    const a = cautionsFor({ task: 'pipette_solution', material: leadNitrate, solventNames: ['Nitric acid 2 % (v/v)'] });
    const b = cautionsFor({ task: 'pipette_solution', material: leadNitrate, solventNames: ['Nitric acid 2 % (v/v)', 'Methanol'] });
    const m = mergeHazards([a, b])!;
    expect(m.solvents.map((s) => s.name)).toEqual(['Nitric acid 2 % (v/v)', 'Methanol']);
    expect(new Set(m.cautions).size).toBe(m.cautions.length);
    expect(mergeHazards([])).toBeNull();
  });
});
