import { z } from 'zod';
import { assayCodeSchema, calendarDateSchema, plainText } from './common';

/*
 * Quality control: the Westgard rule names, the stateless evaluation (POST /api/qc/evaluate), the laboratory's
 * rule selection, control materials with their versioned per-assay targets, and the Levey–Jennings chart data.
 * Shared by the server's routes and the client's forms and API calls.
 */

// ---------------------------------------------------------------------------------------------
// Rules (Westgard JO, Barry PL, Hunt MR, Groth T, Clin Chem 1981;27:493–501)

export const westgardRules = ['1-2s', '1-3s', '2-2s', 'R-4s', '4-1s', '10x'] as const;
export const westgardRuleSchema = z.enum(westgardRules);
export type WestgardRuleName = z.infer<typeof westgardRuleSchema>;

/** Plain-words meaning of each rule, for screens and reports (z = (value − mean) / SD). */
export const westgardRuleMeaning: Record<WestgardRuleName, string> = {
  '1-2s': 'one result beyond 2 SD (warning only)',
  '1-3s': 'one result beyond 3 SD',
  '2-2s': 'two results beyond 2 SD on the same side (two levels in the run, or one level in consecutive runs)',
  'R-4s': 'in one run, one level above +2 SD and another below −2 SD',
  '4-1s': 'one level’s last four results beyond 1 SD on the same side',
  '10x': 'one level’s last ten results on the same side of the mean',
};

export const qcStatusSchema = z.enum(['accept', 'warn', 'reject']);
export type QcStatus = z.infer<typeof qcStatusSchema>;
/** A run's stored status: as above, or 'none' when no control result had an approved target. */
export const runQcStatusSchema = z.enum(['accept', 'warn', 'reject', 'none']);
export type RunQcStatus = z.infer<typeof runQcStatusSchema>;

// ---------------------------------------------------------------------------------------------
// POST /api/qc/evaluate

const idSchema = z.union([z.string().min(1, 'Give an id').max(60), z.number().int()]);

export const qcEvaluateRequestSchema = z
  .object({
    levels: z
      .array(
        z.object({
          id: idSchema,
          mean: z.number({ error: 'The mean must be a number' }),
          sd: z.number({ error: 'The SD must be a number' }).gt(0, 'The SD must be greater than 0'),
        }),
      )
      .min(1, 'Give at least one level')
      .max(50),
    runs: z
      .array(
        z.object({
          id: idSchema,
          results: z.record(z.string(), z.number({ error: 'The result must be a number' })),
        }),
      )
      .min(1, 'Give at least one run')
      .max(5000),
    /** The rules to apply; all of them when left out. */
    rules: z.array(westgardRuleSchema).optional(),
  })
  .superRefine((body, ctx) => {
    const known = new Set<string>();
    body.levels.forEach((level, i) => {
      if (known.has(String(level.id))) {
        ctx.addIssue({ code: 'custom', path: ['levels', i, 'id'], message: `Level ${level.id} is listed twice` });
      }
      known.add(String(level.id));
    });
    body.runs.forEach((run, r) => {
      for (const key of Object.keys(run.results)) {
        if (!known.has(key)) {
          ctx.addIssue({ code: 'custom', path: ['runs', r, 'results', key], message: `Level ${key} is not among the levels` });
        }
      }
    });
  });
export type QcEvaluateRequest = z.infer<typeof qcEvaluateRequestSchema>;

export const qcViolationSchema = z.object({ rule: westgardRuleSchema, levels: z.array(idSchema) });
export const qcEvaluateResponseSchema = z.object({
  runs: z.array(z.object({ id: idSchema, status: qcStatusSchema, violations: z.array(qcViolationSchema) })),
});
export type QcEvaluateResponse = z.infer<typeof qcEvaluateResponseSchema>;

// ---------------------------------------------------------------------------------------------
// The laboratory's rule selection (GET/PUT /api/qc/rules)

export const qcRuleSelectionSchema = z.object({ rules: z.array(westgardRuleSchema) });
export type QcRuleSelection = z.infer<typeof qcRuleSelectionSchema>;

export const putQcRulesBodySchema = z
  .object({
    rules: z
      .array(westgardRuleSchema)
      .refine((rules) => new Set(rules).size === rules.length, 'Each rule once')
      .refine(
        (rules) => rules.some((r) => r !== '1-2s'),
        'Switch on at least one rule that rejects a run (1-2s alone only warns, so every run would pass)',
      ),
  })
  .strict();
export type PutQcRulesBody = z.infer<typeof putQcRulesBodySchema>;

// ---------------------------------------------------------------------------------------------
// Control materials and targets

const line = (label: string, max: number) =>
  z.string().trim().min(1, `${label} is required`).max(max, `At most ${max} characters`).superRefine(plainText(label));

export const controlTargetStatusSchema = z.enum(['draft', 'approved', 'retired']);
export type ControlTargetStatus = z.infer<typeof controlTargetStatusSchema>;

export const controlTargetSchema = z.object({
  id: z.number().int(),
  controlMaterialId: z.number().int(),
  assayCode: assayCodeSchema,
  version: z.number().int(),
  mean: z.number(),
  sd: z.number(),
  source: z.enum(['entered', 'established']),
  /** For an established target: the control results it was computed from. */
  basis: z
    .object({
      resultIds: z.array(z.number().int()),
      n: z.number().int(),
      firstRunId: z.number().int(),
      lastRunId: z.number().int(),
      sd: z.literal('sample (n − 1)'),
    })
    .nullable(),
  status: controlTargetStatusSchema,
  note: z.string(),
  createdById: z.number().int().nullable(),
  createdByName: z.string().nullable(),
  approvedById: z.number().int().nullable(),
  approvedByName: z.string().nullable(),
  approvedAt: z.string().nullable(),
  retiredAt: z.string().nullable(),
  createdAt: z.string(),
});
export type ControlTarget = z.infer<typeof controlTargetSchema>;

export const controlMaterialSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  lot: z.string(),
  level: z.string(),
  expiresOn: z.string(),
  description: z.string(),
  retiredAt: z.string().nullable(),
  version: z.number().int(),
  /** Assays with an approved target. */
  approvedAssays: z.array(assayCodeSchema),
  createdAt: z.string(),
});
export type ControlMaterial = z.infer<typeof controlMaterialSchema>;

export const controlMaterialDetailSchema = controlMaterialSchema.extend({
  /** Every target version, per assay newest first. */
  targets: z.array(controlTargetSchema),
});
export type ControlMaterialDetail = z.infer<typeof controlMaterialDetailSchema>;

const expiresOnSchema = calendarDateSchema({ label: 'Expiry date', notBefore: '2000-01-01' });

export const createControlMaterialBodySchema = z
  .object({
    name: line('Material name', 120),
    lot: line('Lot', 60),
    level: line('Level', 60),
    expiresOn: expiresOnSchema,
    description: z.string().trim().max(2000, 'At most 2000 characters').superRefine(plainText('Description', true)).default(''),
  })
  .strict();
export type CreateControlMaterialBody = z.infer<typeof createControlMaterialBodySchema>;

export const patchControlMaterialBodySchema = z
  .object({
    version: z.number().int().min(0),
    name: line('Material name', 120).optional(),
    lot: line('Lot', 60).optional(),
    level: line('Level', 60).optional(),
    expiresOn: expiresOnSchema.optional(),
    description: z.string().trim().max(2000, 'At most 2000 characters').superRefine(plainText('Description', true)).optional(),
    /** true retires the material (no new runs may use it); false brings it back. */
    retired: z.boolean().optional(),
  })
  .strict();
export type PatchControlMaterialBody = z.infer<typeof patchControlMaterialBodySchema>;

export const createControlTargetBodySchema = z
  .object({
    assayCode: assayCodeSchema,
    mean: z.number({ error: 'Enter the target mean' }),
    sd: z.number({ error: 'Enter the target SD' }).gt(0, 'The SD must be greater than 0'),
    note: z.string().trim().max(1000, 'At most 1000 characters').superRefine(plainText('Note', true)).default(''),
  })
  .strict();
export type CreateControlTargetBody = z.infer<typeof createControlTargetBodySchema>;

export const establishControlTargetBodySchema = z.object({ assayCode: assayCodeSchema }).strict();
export type EstablishControlTargetBody = z.infer<typeof establishControlTargetBodySchema>;

/** How many of a material's first control results establish its target (mean and sample SD). */
export const ESTABLISH_FROM_RESULTS = 20;

// ---------------------------------------------------------------------------------------------
// Levey–Jennings chart (GET /api/control-materials/:id/chart?assay=CI)

export const chartQuerySchema = z.object({ assay: assayCodeSchema });

export const controlChartPointSchema = z.object({
  resultId: z.number().int(),
  runId: z.number().int(),
  runNumber: z.string(),
  measuredAt: z.string(),
  value: z.number(),
  /** Against the target the run was judged by; null when none was approved then. */
  z: z.number().nullable(),
  controlTargetId: z.number().int().nullable(),
  runStatus: runQcStatusSchema,
  overridden: z.boolean(),
});
export type ControlChartPoint = z.infer<typeof controlChartPointSchema>;

export const controlChartSchema = z.object({
  controlMaterialId: z.number().int(),
  assayCode: assayCodeSchema,
  /** Approved targets, current and retired, oldest first: each applies from approvedAt until retiredAt. */
  targets: z.array(controlTargetSchema),
  points: z.array(controlChartPointSchema),
});
export type ControlChart = z.infer<typeof controlChartSchema>;
