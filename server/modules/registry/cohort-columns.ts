import type { AssayCode, Measure } from '@/schemas/common';
import type { CohortComplex, RangeScale } from '@/schemas/registry';

/*
 * Names of the cohort_members columns that carry a member's values (migration 0017), shared by the rows written at
 * signing (cohort-rows.ts), the plots' cells (cohort-plot-cells.ts) and the queries (cohort.repository.ts).
 */

/**
 * The member column (migration 0017) holding one measure's value ('value') or its % of the reference mean ('pct'),
 * e.g. "CI_III_ratio_cs_pct": range conditions read the member row alone.
 */
export const measureColumn = (assay: AssayCode, measure: Measure, scale: RangeScale): string => `${assay.replace('+', '_')}_${measure}_${scale}`;

/** The member column with the reference interval a complex's ratio to CS was read against (the plots' shading). */
export const intervalColumn = (complex: CohortComplex, bound: 'lower' | 'upper' | 'mean'): string => `${complex.replace('+', '_')}_ratio_cs_${bound}`;
