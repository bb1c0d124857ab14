import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CaseHistoryEvent } from '@/schemas/case';
import { changeSentence } from '@/features/cases/utils/change-sentence';
import { buildSpecimenInput, createCase } from '../factories/cases';
import { recordDirectProtein } from '../factories/measurements';
import { makeTestApp, type TestApp } from '../setup/test-app';

let t: TestApp;
let tech: Awaited<ReturnType<TestApp['signedIn']>>;
beforeAll(async () => {
  t = await makeTestApp();
  tech = await t.signedIn('technologist');
});
afterAll(() => t.close());

describe('the case history in the bench’s words', () => {
  it('when protein is changed from 4.1 to 4.25 mg/mL, then the history says so in one sentence, with no field names', async () => {
    const c = await createCase(tech);
    const specimen = c.specimens[0]!;
    const first = await recordDirectProtein(tech, specimen, 4.1, 'BCA assay on the homogenate (invented)');
    expect(first.status).toBe(200);
    const second = await recordDirectProtein(tech, first.body, 4.25, 'BCA assay on the homogenate (invented)');
    expect(second.status).toBe(200);

    const history = await tech.get(`/api/cases/${c.id}/history`);
    const events = history.body.items as CaseHistoryEvent[];
    const changed = events.find((e) => e.summary === 'Specimen A: protein changed');
    expect(changed).toBeDefined();
    expect(changed!.changes.map(changeSentence)).toEqual(['Protein changed from 4.1 to 4.25 mg/mL']);
    const recorded = events.find((e) => e.summary === 'Specimen A: protein recorded');
    expect(recorded!.changes.map(changeSentence)).toContain('Protein set to 4.1 mg/mL');
    // No event falls back to a raw "Entity: action" line or a camelCase key.
    for (const e of events) {
      expect(e.summary).not.toMatch(/^[A-Z][a-z]+: [a-z-]+$/);
      for (const ch of e.changes) expect(ch.field).not.toMatch(/[a-z][A-Z]/);
    }
  });

  it('when a time is shown in the history, then it reads "20 Nov 2026 08:00" in the laboratory’s zone, as the PDF writes it', async () => {
    const admin = await t.signedIn('admin');
    const profile = (await admin.get('/api/lab-profile')).body;
    await admin.put('/api/lab-profile').send({ ...profile, timeZone: 'Pacific/Auckland' });
    try {
      // 08:00 on 20 Nov 2026 in Auckland is 19:00 UTC on the 19th (NZDT, UTC+13) [common practice: IANA tz rules].
      const c = await createCase(tech, { specimen: buildSpecimenInput({ collectedAt: null, receivedAt: '2026-11-20T08:00' }) });
      const history = await tech.get(`/api/cases/${c.id}/history`);
      const received = (history.body.items as CaseHistoryEvent[]).find((e) => e.summary === 'Specimen A received');
      expect(received!.changes.find((ch) => ch.field === 'Received')!.after).toBe('20 Nov 2026 08:00');
    } finally {
      const now = (await admin.get('/api/lab-profile')).body;
      await admin.put('/api/lab-profile').send({ ...now, timeZone: profile.timeZone });
    }
  });

  it('when a change has no value before or after, then the sentence says "set to" or "removed (was …)"', () => {
    expect(changeSentence({ field: 'Wet weight', before: null, after: '41', unit: 'mg' })).toBe('Wet weight set to 41 mg');
    expect(changeSentence({ field: 'Source', before: 'Quadriceps', after: null })).toBe('Source removed (was Quadriceps)');
  });
});
