import type { Sequelize } from 'sequelize';
import type { ProteinCurveInput, ProteinCurveResult, ProteinDetails, SaveProteinInput, WorkupSpecimen } from '@/schemas/measurement';
import type { User } from '@/schemas/user';
import { fitProteinCurve, interpolateProtein } from '../../domain/assay-engine/protein';
import { fmt } from '../../domain/assay-engine/trace';
import { badInput, notFound, staleVersion } from '../../lib/errors';
import { recordAudit } from '../audit/audit.service';
import { writeTransaction } from '../../db/write-transaction';
import * as repo from './measurements.repository';
import { loadEditableCase, recomputeForProtein } from './measurements.service';

const finiteOrNull = (x: number) => (Number.isFinite(x) ? x : null);

/** Standards fitted, the unknown read off the curve and multiplied by its dilution; stores nothing. */
export function evaluateProteinCurve(input: ProteinCurveInput): ProteinCurveResult {
  const curve = fitProteinCurve(input.standards, input.model);
  const read = interpolateProtein(curve, { absorbances: input.unknownAbsorbances, dilutionFactor: input.dilutionFactor });
  return {
    model: input.model,
    c0: finiteOrNull(curve.c0),
    c1: finiteOrNull(curve.c1),
    c2: finiteOrNull(curve.c2),
    r2: Number.isFinite(curve.c1) ? finiteOrNull(curve.r2) : null,
    usable: curve.usable,
    lowestMgPerMl: finiteOrNull(curve.lowestMgPerMl),
    highestMgPerMl: finiteOrNull(curve.highestMgPerMl),
    meanAbsorbance: read.meanAbsorbance,
    readMgPerMl: read.readMgPerMl,
    mgPerMl: read.mgPerMl,
    flags: [...curve.flags, ...read.flags.filter((f) => f.code !== 'BAD_STANDARD_CURVE' || curve.usable)],
  };
}

/**
 * Records a specimen's homogenate protein, from a standard curve (kept with the specimen) or typed in with its
 * source. The specimen's measurements are computed again with the new value in the same transaction.
 */
export async function saveSpecimenProtein(
  sequelize: Sequelize,
  actor: User,
  specimenId: number,
  input: SaveProteinInput,
): Promise<WorkupSpecimen> {
  let mgPerMl: number;
  let source: string;
  let details: ProteinDetails | null = null;
  if (input.kind === 'curve') {
    const { kind: _k, version: _v, ...curveInput } = input;
    const result = evaluateProteinCurve(curveInput);
    if (result.mgPerMl === null) {
      const why = result.flags.map((f) => f.message).join('; ') || 'the unknown could not be read off the curve';
      throw badInput({ [result.usable ? 'unknownAbsorbances' : 'standards']: why }, `No protein value: ${why}`);
    }
    mgPerMl = result.mgPerMl;
    source = `${curveInput.method}, ${curveInput.model} standard curve of ${curveInput.standards.length} standards (r² ${result.r2 === null ? 'n/a' : result.r2.toFixed(5)}), dilution ×${fmt(curveInput.dilutionFactor)}`;
    details = { kind: 'curve', input: curveInput, result, recordedAt: new Date().toISOString(), recordedBy: actor.name };
  } else {
    mgPerMl = input.proteinMgPerMl;
    source = input.proteinSource;
  }

  return writeTransaction(sequelize, async (t) => {
    const before = await repo.findWorkupSpecimen(specimenId, t);
    if (!before) throw notFound('Specimen', specimenId);
    await loadEditableCase(before.caseId, t);
    if (!before.accepted) throw badInput({ specimen: `Specimen ${before.label} was rejected on receipt; no protein is recorded on it` });
    if (input.version !== before.version) throw staleVersion('specimen');
    const ok = await repo.setSpecimenProteinIfVersion(specimenId, input.version, { proteinMgPerMl: mgPerMl, proteinSource: source, proteinDetails: details }, t);
    if (!ok) throw staleVersion('specimen');
    const after = (await repo.findWorkupSpecimen(specimenId, t))!;
    await recordAudit(
      actor,
      {
        action: 'protein',
        entity: 'specimen',
        entityId: specimenId,
        caseId: before.caseId,
        before: { proteinMgPerMl: before.proteinMgPerMl, proteinSource: before.proteinSource },
        after: { proteinMgPerMl: after.proteinMgPerMl, proteinSource: after.proteinSource },
      },
      t,
    );
    if (before.proteinMgPerMl !== mgPerMl) await recomputeForProtein(actor, specimenId, mgPerMl, t);
    const { caseId: _c, ...specimen } = after;
    return specimen;
  });
}
