import type { Agent } from '../setup/lab-staff';

/** 1 mL reaction, 1 cm path, 10 µL of homogenate: with 4 mg/mL protein, 40 µg in the cuvette. */
export const cuvette = { pathlengthCm: 1, reactionVolumeUl: 1000, sampleVolumeUl: 10 };

/** Records a protein concentration typed in from elsewhere; the caller checks the response. */
export function recordDirectProtein(
  agent: Agent,
  specimen: { id: number; version: number },
  proteinMgPerMl: number,
  proteinSource: string,
) {
  return agent
    .put(`/api/specimens/${specimen.id}/protein`)
    .send({ kind: 'direct', proteinMgPerMl, proteinSource, version: specimen.version });
}
