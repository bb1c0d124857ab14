// Child process of bench/start-up.ts: times report renders in a fresh process. Argument "warm": run the start-up
// warm-up first, as the server does after it starts listening. Prints one line of JSON.
import { performance } from 'node:perf_hooks';
import { renderReportPdf } from '../server/domain/report-pdf/render-report-pdf';
import { warmUpReportRendering } from '../server/domain/report-pdf/warm-up';
import { buildReportDocument, buildTwoSpecimenReportDocument } from '../tests/factories/report-document';

const timed = async (work: () => Promise<unknown>) => {
  const t0 = performance.now();
  await work();
  return performance.now() - t0;
};

const warmUpMs = process.argv[2] === 'warm' ? await timed(() => warmUpReportRendering()) : null;
const firstMs = await timed(() => renderReportPdf(buildTwoSpecimenReportDocument()));
const laterMs: number[] = [];
for (let i = 0; i < 5; i++) laterMs.push(await timed(() => renderReportPdf(buildReportDocument())));
console.log(JSON.stringify({ warmUpMs, firstMs, laterMs }));
