/** One benchmark's outcome, as bench/run.ts prints and records it. */
export type BenchResult = {
  title: string;
  rows: { metric: string; value: string; goal: string; met: boolean }[];
  notes?: string;
};
