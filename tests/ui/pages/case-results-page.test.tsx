import { screen, within } from '@testing-library/react';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import CaseResultsPage from '@/app/routes/assay-work/case-results';
import type { CaseResults } from '@/schemas/results';
import { startRealApp, type RealApp } from '../../setup/real-app-fetch';
import { renderPage } from './render-page';
import { expectPrintedAs, numbersIn } from './shown-numbers';

/*
 * The results page of a demo case, rendered with Testing Library and fed by the real app in-process (demo seed,
 * in-memory SQLite). What the page prints is compared with the unrounded numbers the API answers for the same
 * case, read back from the screen (tests/ui/pages/shown-numbers.ts), and with hand-written words; the page's own
 * formatting code is never run here to make an expected value.
 */

let app: RealApp;
type CaseRow = { id: number; accession: string; state: string; patternCode: string | null; specimenTypes: string[] };

beforeAll(async () => {
  app = await startRealApp();
  await app.signInAs('technologist@demo.test');
}, 180_000);
afterAll(() => app.close());

async function demoCase(match: (c: CaseRow) => boolean): Promise<{ row: CaseRow; results: CaseResults }> {
  const { items } = await app.json<{ items: CaseRow[] }>('/api/cases');
  const row = items.find(match)!;
  expect(row, 'the demo seed has this case').toBeDefined();
  return { row, results: await app.json<CaseResults>(`/api/cases/${row.id}/results`) };
}

async function openResults(row: CaseRow) {
  renderPage('/cases/:id/results', `/cases/${row.id}/results`, CaseResultsPage);
  await screen.findByRole('heading', { name: `Results · ${row.accession}` });
}

/** The data cells of an assay's row: activity, ratio to CS, ratio to CII, criterion band, flags. */
function cellsOf(section: HTMLElement, assay: string): HTMLElement[] {
  return within(within(section).getByTestId(`result-row-${assay}`)).getAllByRole('cell');
}

// Where a value falls, in the words the page must use (not colour alone: WCAG 2.1 SC 1.4.1 [confirmed as the standard]).
const positionWords = { below: 'Below', within: 'Within', above: 'Above' } as const;

describe('the results page against the real app', { timeout: 180_000 }, () => {
  it('when a final muscle case with a low complex IV is opened, then every activity and ratio matches the API with its unit, position in words, interval and band', async () => {
    const { row, results } = await demoCase((c) => c.state === 'final' && c.patternCode === 'isolated:CIV');
    await openResults(row);

    // The caution on every result screen (product brief, "Cautions" [common practice]).
    expect(screen.getByRole('complementary', { name: 'Caution' })).toHaveTextContent(
      /support, and never replace, a diagnosis by a licensed clinician/,
    );
    expect(screen.getByTestId('results-basis')).toHaveTextContent(/^Frozen when the case was submitted for review/);

    const specimen = results.specimens[0]!;
    const section = screen.getByRole('region', { name: new RegExp(`^Specimen ${specimen.label} · `) });
    // Unit in the column heading: nmol·min⁻¹·mg⁻¹ protein (domain.md §1, activity formula [derived]).
    expect(within(section).getByRole('columnheader', { name: /^Activity/ })).toHaveTextContent('Activity (nmol/min/mg protein)');
    expect(specimen.assays.map((a) => a.assay)).toEqual(['CI', 'CII', 'CIII', 'CIV', 'CI+III', 'CII+III', 'CS']);

    for (const a of specimen.assays) {
      const [activity, ratioCs] = cellsOf(section, a.assay);
      // First figure in the cell is the activity (the replicate mean), then "n <count>".
      expectPrintedAs(numbersIn(activity!.textContent!)[0]!, a.activity.value!);
      expect(activity).toHaveTextContent(new RegExp(`n ${a.n}\\b`));
      expect(activity).toHaveTextContent(positionWords[a.activity.position!]);
      const [lower, upper] = numbersIn(activity!.textContent!.split('interval ')[1]!);
      expect(Number(lower)).toBe(a.activity.interval!.lower);
      expect(Number(upper)).toBe(a.activity.interval!.upper);
      const pct = /([\d.]+)% of mean/.exec(activity!.textContent!)![1]!;
      // % of the reference mean: whole numbers from 10% (rounded to the printed place, [common practice]).
      expectPrintedAs(pct, a.activity.percentOfMean!, 0);
      if (a.ratioCs) {
        expectPrintedAs(numbersIn(ratioCs!.textContent!)[0]!, a.ratioCs.value!);
        expect(ratioCs).toHaveTextContent(positionWords[a.ratioCs.position!]);
      } else {
        expect(ratioCs).toHaveTextContent('n/a');
      }
    }

    // Complex IV relative to CS: the API puts it at about 17% of the reference mean, under the 20% line of the
    // major criterion in a tissue (Bernier et al., Neurology 2002;59:1406–1411 [from memory]); the other complexes
    // sit near 100% and meet no criterion.
    const civ = specimen.assays.find((a) => a.assay === 'CIV')!;
    expect(civ.ratioCs!.percentOfMean).toBeLessThan(20);
    const [civActivity, civRatio, , civBand, civFlags] = cellsOf(section, 'CIV');
    expect(civActivity).toHaveTextContent('Below');
    expect(civRatio).toHaveTextContent('Below');
    expect(civRatio).toHaveTextContent('major-criterion band');
    expect(civBand).toHaveTextContent('Major criterion (ratio to CS)');
    expect(civFlags).toHaveTextContent(/^none$/);
    const [, ciRatio, , ciBand] = cellsOf(section, 'CI');
    expect(ciRatio).toHaveTextContent('Within');
    expect(ciBand).toHaveTextContent(/^Not met$/);
    // Citrate synthase is the denominator, not a complex with a criterion band.
    expect(cellsOf(section, 'CS')[3]).toHaveTextContent('n/a (CS)');

    expect(within(section).getByTestId('pattern-summary')).toHaveTextContent(specimen.pattern!.headline);
    expect(specimen.pattern!.headline).toMatch(/complex IV/);
  });

  it('when a fibroblast case has no interval for its age, then each row says "not compared" and names the missing interval in words', async () => {
    const { row, results } = await demoCase((c) => c.state === 'in_assay' && c.specimenTypes.includes('fibroblasts'));
    await openResults(row);
    expect(screen.getByRole('complementary', { name: 'Caution' })).toHaveTextContent(/licensed clinician/);
    expect(screen.getByTestId('results-basis')).toHaveTextContent(/^Computed just now from the saved measurements/);

    const specimen = results.specimens[0]!;
    const section = screen.getByRole('region', { name: new RegExp(`^Specimen ${specimen.label} · `) });
    for (const a of specimen.assays) {
      const [activity, , , , flags] = cellsOf(section, a.assay);
      expectPrintedAs(numbersIn(activity!.textContent!)[0]!, a.activity.value!);
      expect(activity).toHaveTextContent('not compared');
      // The flag's title in words, then each of the API's messages in the details.
      expect(a.flags.map((f) => f.code)).toContain('NO_INTERVAL');
      expect(within(flags!).getByText('No reference interval')).toBeInTheDocument();
      for (const f of a.flags) expect(flags).toHaveTextContent(f.message);
    }
  });
});
