import { describe, expect, it } from 'vitest';
import { runPlanSchema, type RunWell } from '@/schemas/run';
import { nameProblem, ownerKeys, paint, wellIndexOf, type RunBrush } from '@/features/runs/utils/run-layout';
import { parseWellSelection } from '@/utils/plate-grid';

/*
 * The run layout editor's painting rules, checked against the shared run plan schema (src/schemas/run.ts), which
 * the server applies too: whatever the editor lays down for an ordinary layout must pass it, and the well
 * sharing it allows (a blank shared by several groups) must be what the editor produces. Expected well lists are
 * written out by hand from the plate geometry (ANSI/SLAS 4-2004, rows A–P × columns 1–24 on 384) [from memory].
 */

const specimen = (id: number, patch: Partial<RunBrush> = {}): RunBrush => ({
  use: 'specimen',
  specimenId: id,
  controlMaterialId: null,
  assay: 'CI',
  role: 'total',
  replicate: 1,
  ...patch,
});
const control = (id: number, patch: Partial<RunBrush> = {}): RunBrush => ({ ...specimen(0), use: 'control', specimenId: null, controlMaterialId: id, ...patch });

function plan(wells: RunWell[], plateFormat: 24 | 96 | 384 = 96) {
  return {
    instrument: 'Bench reader (test)',
    startedAt: '2026-03-04T09:30',
    plateFormat,
    wells,
    pathlength: { mode: 'given' as const, cm: 0.6 },
    reactionVolumeUl: 200,
    sampleVolumeUl: 10,
    controlProteinMgPerMl: {},
    windows: {},
  };
}

describe('paint', () => {
  it('when a 384-well row P is filled in total/background pairs, then P1…P24 hold replicates 1–12 and the plan passes the schema', () => {
    const wells = parseWellSelection('P', 384).wells!;
    const r = paint([], wells, specimen(7), 'pairs-per-column');
    expect(r.error).toBeNull();
    expect(r.wells).toHaveLength(24);
    expect(r.wells.find((w) => w.well === 'P23')).toMatchObject({ role: 'total', replicate: 12 });
    expect(r.wells.find((w) => w.well === 'P24')).toMatchObject({ role: 'background', replicate: 12 });
    expect(runPlanSchema.safeParse(plan(r.wells, 384)).success).toBe(true);
  });

  it('when a specimen is painted over a control well, then the well holds only the specimen', () => {
    const first = paint([], ['A1'], control(3), 'same').wells;
    const second = paint(first, ['A1'], specimen(5), 'same').wells;
    expect(second).toEqual([{ use: 'specimen', well: 'A1', specimenId: 5, assay: 'CI', role: 'total', replicate: 1 }]);
  });

  it('when two groups lay their blank on a plate blank, then the well is shared and the schema accepts it', () => {
    let wells = paint([], ['H12'], { ...specimen(0), use: 'blank' }, 'same').wells;
    wells = paint(wells, ['A1'], specimen(5), 'same').wells;
    wells = paint(wells, ['B1'], control(3), 'same').wells;
    wells = paint(wells, ['H12'], specimen(5, { role: 'blank' }), 'same').wells;
    wells = paint(wells, ['H12'], control(3, { role: 'blank' }), 'same').wells;
    expect(wells.filter((w) => w.well === 'H12').map((w) => w.use)).toEqual(['blank', 'specimen', 'control']);
    expect(runPlanSchema.safeParse(plan(wells)).success).toBe(true);
  });

  it('when the same group blank is clicked again on a shared well, then that group is taken off and the others stay', () => {
    let wells = paint([], ['A1', 'A2'], specimen(5), 'replicate-per-column').wells;
    wells = paint(wells, ['H1'], specimen(5, { role: 'blank' }), 'same').wells;
    wells = paint(wells, ['H1'], specimen(5, { role: 'blank', replicate: 2 }), 'same').wells;
    expect(wells.filter((w) => w.well === 'H1')).toHaveLength(2);
    wells = paint(wells, ['H1'], specimen(5, { role: 'blank' }), 'same', true).wells;
    expect(wells.filter((w) => w.well === 'H1')).toEqual([{ use: 'specimen', well: 'H1', specimenId: 5, assay: 'CI', role: 'blank', replicate: 2 }]);
  });

  it('when no specimen or control is chosen, then nothing is laid and the message says what to choose', () => {
    expect(paint([], ['A1'], specimen(0, { specimenId: null }), 'same')).toEqual({ wells: [], error: 'Choose the specimen to place first' });
    expect(paint([], ['A1'], control(0, { controlMaterialId: null }), 'same').error).toBe('Choose the control material to place first');
  });

  it('when erasing a column, then every entry of its wells goes, shared blanks included', () => {
    let wells = paint([], parseWellSelection('A1:B2', 24).wells!, specimen(5), 'pairs-per-column').wells;
    wells = paint(wells, ['C1'], specimen(5, { role: 'blank' }), 'same').wells;
    wells = paint(wells, parseWellSelection('1', 24).wells!, { ...specimen(5), use: 'erase' }, 'same').wells;
    expect(wells.map((w) => w.well).sort()).toEqual(['A2', 'B2']);
  });
});

describe('problems in the user words', () => {
  it('when the schema finds a background without a total, then the line names the well, the case and the specimen', () => {
    const wells = paint([], ['C3'], specimen(12, { role: 'background' }), 'same').wells;
    const checked = runPlanSchema.safeParse(plan(wells));
    expect(checked.success).toBe(false);
    const issue = checked.error!.issues.find((i) => i.path[0] === 'wells')!;
    const names = ownerKeys(wells, () => 'CR-2026-00042 specimen B');
    const at = wellIndexOf(issue.path)!;
    expect(nameProblem(issue.message, wells[at]!.well, names)).toMatch(/^Well C3: CR-2026-00042 specimen B CI replicate 1 has a background well \(C3\) but no total well$/);
  });

  it('when the server names a field "plan.wells.4.role", then the entry index is 4', () => {
    expect(wellIndexOf('plan.wells.4.role')).toBe(4);
    expect(wellIndexOf('instrument')).toBeNull();
  });

  it('when owners appear on the plate, then specimens are keyed S1, S2 and controls Q1 in order of first appearance', () => {
    const wells = [
      ...paint([], ['A1'], control(9), 'same').wells,
      ...paint([], ['A2'], specimen(4), 'same').wells,
      ...paint([], ['A3'], specimen(2), 'same').wells,
      ...paint([], ['A4'], specimen(4, { replicate: 2 }), 'same').wells,
    ];
    const keys = ownerKeys(wells, (o) => o);
    expect([...keys.entries()].map(([o, n]) => `${o}=${n.key}`)).toEqual(['control:9=Q1', 'specimen:4=S1', 'specimen:2=S2']);
  });
});
