/** The lowest replicate number of this assay not yet saved on the specimen (1 when none is). */
export function nextFreeReplicate(saved: readonly { specimenId: number; assay: string; replicate: number }[], specimenId: number, assay: string): number {
  const taken = new Set(saved.filter((m) => m.specimenId === specimenId && m.assay === assay).map((m) => m.replicate));
  let n = 1;
  while (taken.has(n)) n += 1;
  return n;
}
